import { z } from "zod";
import { FAMILY_NAMES, FAMILY_SPECS, type FamilyName, type ParamSpec } from "./families/spec";
import { MAX_LATTICE, MAX_REPEAT, MAX_SAMPLE } from "./limits";

/** Tolerances of the notation: mixture weights and lattice probabilities must sum to 1 within these. */
export const MIX_WEIGHT_TOLERANCE = 1e-12;
export const LATTICE_SUM_TOLERANCE = 1e-9;

// ---- TypeScript shape of the notation (fields with defaults are optional) ----
/** A named law: { family, ...parameters } as listed in FAMILY_SPECS. */
export type FamilyModel = { family: FamilyName } & { [param: string]: number | string };

export interface SumModel { sum: Model[] }
export interface ScaleModel { scale: number; of: Model }
export interface ShiftModel { shift: number; of: Model }
export interface RepeatModel { repeat: number; of: Model }
export interface MixModel { mix: { weight: number; of: Model }[] }
export interface CompoundModel { compound: { count: Model; each: Model } }
export interface LatticeModel { lattice: { origin: number; step: number; p: number[] } }
/** Empirical law: mass w_i / sum(w) at sample[i] (w_i = 1 when weights are absent); repeated values merge. */
export interface SampleModel { sample: number[]; weights?: number[] }
/** Per-claim layer: share * min(max(X - deductible, 0), limit). */
export interface LayerModel { layer: { deductible?: number; limit?: number; share?: number }; of: Model }

export type Model =
  | FamilyModel
  | SumModel
  | ScaleModel
  | ShiftModel
  | RepeatModel
  | MixModel
  | CompoundModel
  | LatticeModel
  | SampleModel
  | LayerModel;

// ---- zod schemas (request schemas of the API; recursion through z.lazy) ----
function rangeText(s: ParamSpec): string {
  const lo = s.lo === -Infinity ? "" : `${s.loOpen ? ">" : ">="} ${s.lo}`;
  const hi = s.hi === Infinity ? "" : `${s.hiOpen ? "<" : "<="} ${s.hi}`;
  return [lo, hi].filter(Boolean).join(" and ");
}

function paramSpec(family: FamilyName, name: string): ParamSpec {
  const s = FAMILY_SPECS[family].params.find((p) => p.name === name);
  if (!s) throw new Error(`no parameter ${name} in ${family}`);
  return s;
}

function num(family: FamilyName, name: string) {
  const s = paramSpec(family, name);
  const what = `${family}.${name}`;
  let n = z.number({ error: `${what} must be a finite number` });
  if (s.type === "int") n = n.int({ error: `${what} must be an integer` });
  if (s.lo !== -Infinity) n = s.loOpen ? n.gt(s.lo, { error: `${what} must be > ${s.lo}` }) : n.gte(s.lo, { error: `${what} must be >= ${s.lo}` });
  if (s.hi !== Infinity) n = s.hiOpen ? n.lt(s.hi, { error: `${what} must be < ${s.hi}` }) : n.lte(s.hi, { error: `${what} must be <= ${s.hi}` });
  return n.describe(`${s.doc}${rangeText(s) ? ` (${rangeText(s)})` : ""}`);
}
function numD(family: FamilyName, name: string) {
  return num(family, name).default(paramSpec(family, name).default as number);
}

function familySchema(name: FamilyName) {
  const spec = FAMILY_SPECS[name];
  const shape: Record<string, z.ZodType> = { family: z.literal(name) };
  for (const p of spec.params) {
    if (p.values) shape[p.name] = z.enum(p.values as [string, ...string[]]).default(p.default as string).describe(p.doc);
    else shape[p.name] = p.default !== undefined ? numD(name, p.name) : p.optional ? num(name, p.name).optional() : num(name, p.name);
  }
  const obj = z.object(shape).strict();
  const check = spec.check;
  return check
    ? obj.superRefine((m, ctx) => {
        const r = check(m);
        if (r) ctx.addIssue({ code: "custom", message: r.detail, path: [r.param] });
      })
    : obj;
}

/** One schema per family, generated from FAMILY_SPECS. */
export const FamilySchema = z.discriminatedUnion(
  "family",
  FAMILY_NAMES.map(familySchema) as unknown as [ReturnType<typeof familySchema>, ...ReturnType<typeof familySchema>[]],
);

const finite = (what: string) => z.number({ error: `${what} must be a finite number` });
const lazyModel = z.lazy(() => ModelSchema);

export const SumSchema = z.object({ sum: z.array(lazyModel).min(1, { error: "sum needs at least one term" }) }).strict();
export const ScaleSchema = z
  .object({ scale: finite("scale").refine((a) => a !== 0, { error: "scale must be non-zero; use a point law for a constant" }), of: lazyModel })
  .strict();
export const ShiftSchema = z.object({ shift: finite("shift"), of: lazyModel }).strict();
export const RepeatSchema = z
  .object({
    repeat: z
      .number({ error: "repeat must be an integer" })
      .int({ error: "repeat must be an integer" })
      .gte(1, { error: "repeat must be >= 1" })
      .lte(MAX_REPEAT, { error: `repeat must be <= ${MAX_REPEAT}` }),
    of: lazyModel,
  })
  .strict();
export const MixSchema = z
  .object({
    mix: z
      .array(z.object({ weight: finite("weight").gt(0, { error: "weight must be > 0" }), of: lazyModel }).strict())
      .min(1, { error: "mix needs at least one component" }),
  })
  .strict()
  .refine((m) => Math.abs(m.mix.reduce((s, c) => s + c.weight, 0) - 1) <= MIX_WEIGHT_TOLERANCE, {
    error: `mix weights must sum to 1 within ${MIX_WEIGHT_TOLERANCE}`,
    path: ["mix"],
  });
export const CompoundSchema = z.object({ compound: z.object({ count: lazyModel, each: lazyModel }).strict() }).strict();
export const LatticeSchema = z
  .object({
    lattice: z
      .object({
        origin: finite("lattice.origin"),
        step: finite("lattice.step").gt(0, { error: "lattice.step must be > 0" }),
        p: z
          .array(finite("lattice probability").gte(0, { error: "lattice probabilities must be >= 0" }))
          .min(1, { error: "lattice.p needs at least one probability" })
          .max(MAX_LATTICE, { error: `lattice.p may hold at most ${MAX_LATTICE} values` }),
      })
      .strict(),
  })
  .strict()
  .refine((m) => Math.abs(m.lattice.p.reduce((s, v) => s + v, 0) - 1) <= LATTICE_SUM_TOLERANCE, {
    error: `lattice.p must sum to 1 within ${LATTICE_SUM_TOLERANCE}`,
    path: ["lattice", "p"],
  });
const finiteOpt = (what: string) => z.number({ error: `${what} must be a finite number` });
export const LayerSchema = z
  .object({
    layer: z
      .object({
        deductible: finiteOpt("layer.deductible").gte(0, { error: "layer.deductible must be >= 0" }).optional().describe("each claim's retention d (default 0)"),
        limit: finiteOpt("layer.limit").gt(0, { error: "layer.limit must be > 0" }).optional().describe("the most paid per claim above the deductible, l (default unlimited)"),
        share: finiteOpt("layer.share").gt(0, { error: "layer.share must be > 0" }).lte(1, { error: "layer.share must be <= 1" }).optional().describe("the share c of the layer taken (default 1)"),
      })
      .strict(),
    of: lazyModel,
  })
  .strict();
export const SampleSchema = z
  .object({
    sample: z
      .array(finite("sample value"))
      .min(1, { error: "sample needs at least one value" })
      .max(MAX_SAMPLE, { error: `sample may hold at most ${MAX_SAMPLE} values` }),
    weights: z
      .array(finite("sample weight").gte(0, { error: "sample weights must be >= 0" }))
      .max(MAX_SAMPLE, { error: `weights may hold at most ${MAX_SAMPLE} values` })
      .optional()
      .describe("optional weight of each sample value (finite, >= 0, positive total); the law puts mass w_i / sum(w) at sample[i]"),
  })
  .strict()
  .superRefine((m, ctx) => {
    if (!m.weights) return;
    if (m.weights.length !== m.sample.length)
      ctx.addIssue({ code: "custom", message: `weights must have one entry per sample value (${m.sample.length}), got ${m.weights.length}`, path: ["weights"] });
    else if (!(m.weights.reduce((s, w) => s + w, 0) > 0))
      ctx.addIssue({ code: "custom", message: "weights must have a positive total", path: ["weights"] });
  });

/** The whole notation. Structural checks only; `validateModel` adds the count-law rule and the tree limits. */
export const ModelSchema: z.ZodType<Model> = z.union([
  FamilySchema,
  SumSchema,
  ScaleSchema,
  ShiftSchema,
  RepeatSchema,
  MixSchema,
  CompoundSchema,
  LatticeSchema,
  SampleSchema,
  LayerSchema,
]) as unknown as z.ZodType<Model>;
