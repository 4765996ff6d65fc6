import { z } from "zod";
import { FAMILY_NAMES, FAMILY_SPECS, type FamilyName, type ParamSpec } from "./families/spec";
import { OPERATOR_SPECS } from "./notation";

export { LATTICE_SUM_TOLERANCE, MIX_WEIGHT_TOLERANCE } from "./notation";

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

const lazyModel = z.lazy(() => ModelSchema);
const node = (key: (typeof OPERATOR_SPECS)[number]["key"]) => OPERATOR_SPECS.find((o) => o.key === key)!.zod(lazyModel);

// The operators' schemas come from the notation's one table (./notation.ts).
export const SumSchema = node("sum");
export const ScaleSchema = node("scale");
export const ShiftSchema = node("shift");
export const RepeatSchema = node("repeat");
export const MixSchema = node("mix");
export const CompoundSchema = node("compound");
export const LatticeSchema = node("lattice");
export const LayerSchema = node("layer");
export const SampleSchema = node("sample");

/** The whole notation. Structural checks only; `validateModel` adds the count-law rule and the tree limits. */
export const ModelSchema: z.ZodType<Model> = z.union([FamilySchema, ...OPERATOR_SPECS.map((o) => o.zod(lazyModel))] as unknown as [
  z.ZodType,
  z.ZodType,
  ...z.ZodType[],
]) as unknown as z.ZodType<Model>;
