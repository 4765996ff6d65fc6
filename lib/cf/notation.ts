import { z } from "zod";
import { toPointer, type CfIssue } from "./errors";
import { FAMILY_NAMES, FAMILY_SPECS } from "./families/spec";
import { MAX_LATTICE, MAX_REPEAT, MAX_SAMPLE } from "./limits";
import type { Model } from "./schema";

/**
 * The operators of the model notation, in one table: for each node its key, its name and description in the
 * OpenAPI document, its zod shape (the request schema and the documented schema are both built from it) and its
 * check (what validateModel runs: every problem as a JSON pointer and a sentence). Families live in
 * FAMILY_SPECS (./families/spec.ts); adding an operator is one entry here plus its CF in compile.ts.
 */

/** Tolerances of the notation: mixture weights and lattice probabilities must sum to 1 within these. */
export const MIX_WEIGHT_TOLERANCE = 1e-12;
export const LATTICE_SUM_TOLERANCE = 1e-9;

export type Path = (string | number)[];

export interface Ctx {
  issues: CfIssue[];
  limit: CfIssue | null;
  nodes: number;
}

/** Checks a child model (recursion back into the validator). */
export type Walk = (ctx: Ctx, v: unknown, path: Path, depth: number) => Model | null;

export const isObj = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);
export const describe = (v: unknown) =>
  typeof v === "number" ? String(v) : v === null ? "null" : Array.isArray(v) ? "an array" : typeof v === "string" ? JSON.stringify(v) : typeof v;

export function add(ctx: Ctx, path: Path, detail: string) {
  if (ctx.issues.length < 50) ctx.issues.push({ pointer: toPointer(path), detail });
}

export function finiteNumber(ctx: Ctx, v: unknown, path: Path, what: string): v is number {
  if (typeof v !== "number" || !Number.isFinite(v)) {
    add(ctx, path, `${what} must be a finite number, got ${describe(v)}.`);
    return false;
  }
  return true;
}

export function unknownKeys(ctx: Ctx, o: Record<string, unknown>, allowed: readonly string[], path: Path, what: string) {
  for (const k of Object.keys(o)) {
    if (!allowed.includes(k)) add(ctx, [...path, k], `Unknown field "${k}" in ${what}; allowed fields are ${allowed.join(", ")}.`);
  }
}

/** Named laws the per-claim layer integrates against: the families whose spec says so (their built node carries the
 *  pdf and cdf the layer needs). */
export const LAYERABLE: ReadonlySet<string> = new Set(FAMILY_NAMES.filter((f) => FAMILY_SPECS[f].layerable));

function layerable(m: Model): boolean {
  if ("family" in m) return LAYERABLE.has(m.family);
  if ("lattice" in m || "sample" in m) return true;
  return false;
}

/** True when the (already checked) model is a law on 0, 1, 2, ... */
export function isCountLaw(m: Model): boolean {
  const isNat = (x: number) => Number.isInteger(x) && x >= 0;
  if ("family" in m) return m.family === "point" ? isNat(m.at as number) : FAMILY_SPECS[m.family].count === true;
  if ("sum" in m) return m.sum.every(isCountLaw);
  if ("repeat" in m) return isCountLaw(m.of);
  if ("shift" in m) return isNat(m.shift) && isCountLaw(m.of);
  if ("scale" in m) return Number.isInteger(m.scale) && m.scale > 0 && isCountLaw(m.of);
  if ("mix" in m) return m.mix.every((c) => isCountLaw(c.of));
  if ("compound" in m) return isCountLaw(m.compound.count) && isCountLaw(m.compound.each);
  if ("lattice" in m) {
    const { origin, step, p } = m.lattice;
    if (isNat(origin) && isNat(step)) return true;
    // allow leading zeros below 0 etc.: every point with positive mass must be a natural number
    for (let k = 0; k < p.length; k++) if (p[k] > 0 && !isNat(origin + k * step)) return false;
    return true;
  }
  if ("sample" in m) return m.sample.every((x, k) => isNat(x) || (m.weights !== undefined && m.weights[k] === 0));
  return false;
}

const finite = (what: string) => z.number({ error: `${what} must be a finite number` });

/** One operator (or leaf) of the notation. */
export interface OperatorSpec {
  /** the field that names the node */
  key: string;
  /** its component name in the OpenAPI document */
  name: string;
  description: string;
  /** how the node is written, and what it means, for the notation guide (/docs/models) */
  syntax: string;
  guide: string;
  /** the zod shape, with `model` as the schema of a child model */
  zod: (model: z.ZodType) => z.ZodType;
  /** the check: the node with defaults filled in, or null after recording its problems in ctx */
  check: (ctx: Ctx, v: Record<string, unknown>, path: Path, depth: number, walk: Walk) => Model | null;
}

function unary(op: "scale" | "shift" | "repeat"): OperatorSpec["check"] {
  return (ctx, v, path, depth, walk) => {
    const before = ctx.issues.length;
    unknownKeys(ctx, v, [op, "of"], path, `a ${op}`);
    const a = v[op];
    if (finiteNumber(ctx, a, [...path, op], `"${op}"`)) {
      if (op === "scale" && a === 0) add(ctx, [...path, op], `"scale" must be non-zero; for the constant 0 use { "family": "point", "at": 0 }.`);
      if (op === "repeat" && (!Number.isInteger(a) || a < 1))
        add(ctx, [...path, op], `"repeat" must be a whole number of copies, at least 1; got ${a}.`);
      if (op === "repeat" && Number.isInteger(a) && a > MAX_REPEAT && !ctx.limit)
        ctx.limit = { pointer: toPointer([...path, op]), detail: `"repeat" may be at most ${MAX_REPEAT}; got ${a}.` };
    }
    if (!("of" in v)) {
      add(ctx, [...path, "of"], `"${op}" needs "of": the model it applies to.`);
      return null;
    }
    const of = walk(ctx, v.of, [...path, "of"], depth + 1);
    return ctx.issues.length === before && !ctx.limit && of ? ({ [op]: a, of } as unknown as Model) : null;
  };
}

export const OPERATOR_SPECS = [
  {
    key: "sum",
    syntax: '{ "sum": [model, ...] }',
    guide: "The sum of independent terms: characteristic functions multiply.",
    name: "SumNode",
    description: "independent sum of the terms",
    zod: (model) => z.object({ sum: z.array(model).min(1, { error: "sum needs at least one term" }) }).strict(),
    check: (ctx, v, path, depth, walk) => {
      const before = ctx.issues.length;
      unknownKeys(ctx, v, ["sum"], path, "a sum");
      const arr = v.sum;
      if (!Array.isArray(arr) || arr.length === 0) {
        add(ctx, [...path, "sum"], `"sum" must be a non-empty array of models.`);
        return null;
      }
      const terms = arr.map((x, i) => walk(ctx, x, [...path, "sum", i], depth + 1));
      return ctx.issues.length === before && !ctx.limit ? { sum: terms as Model[] } : null;
    },
  },
  {
    key: "scale",
    syntax: '{ "scale": a, "of": model }',
    guide: "The law of aX; phi(t) becomes phi(at).",
    name: "ScaleNode",
    description: "the law of a X",
    zod: (model) =>
      z.object({ scale: finite("scale").refine((a) => a !== 0, { error: "scale must be non-zero; use a point law for a constant" }), of: model }).strict(),
    check: unary("scale"),
  },
  {
    key: "shift",
    syntax: '{ "shift": b, "of": model }',
    guide: "The law of X + b.",
    name: "ShiftNode",
    description: "the law of X + b",
    zod: (model) => z.object({ shift: finite("shift"), of: model }).strict(),
    check: unary("shift"),
  },
  {
    key: "repeat",
    syntax: '{ "repeat": n, "of": model }',
    guide: "The sum of n independent copies.",
    name: "RepeatNode",
    description: "sum of n independent copies",
    zod: (model) =>
      z
        .object({
          repeat: z
            .number({ error: "repeat must be an integer" })
            .int({ error: "repeat must be an integer" })
            .gte(1, { error: "repeat must be >= 1" })
            .lte(MAX_REPEAT, { error: `repeat must be <= ${MAX_REPEAT}` }),
          of: model,
        })
        .strict(),
    check: unary("repeat"),
  },
  {
    key: "mix",
    syntax: '{ "mix": [{ "weight": w, "of": model }, ...] }',
    guide: "A mixture; weights positive and summing to 1.",
    name: "MixNode",
    description: `mixture; weights positive, summing to 1 within ${MIX_WEIGHT_TOLERANCE}`,
    zod: (model) =>
      z
        .object({
          mix: z
            .array(z.object({ weight: finite("weight").gt(0, { error: "weight must be > 0" }), of: model }).strict())
            .min(1, { error: "mix needs at least one component" }),
        })
        .strict()
        .refine((m) => Math.abs(m.mix.reduce((s, c) => s + c.weight, 0) - 1) <= MIX_WEIGHT_TOLERANCE, {
          error: `mix weights must sum to 1 within ${MIX_WEIGHT_TOLERANCE}`,
          path: ["mix"],
        }),
    check: (ctx, v, path, depth, walk) => {
      const before = ctx.issues.length;
      unknownKeys(ctx, v, ["mix"], path, "a mixture");
      const arr = v.mix;
      if (!Array.isArray(arr) || arr.length === 0) {
        add(ctx, [...path, "mix"], `"mix" must be a non-empty array of { "weight": w, "of": model }.`);
        return null;
      }
      let total = 0;
      const comps: { weight: number; of: Model }[] = [];
      arr.forEach((c, i) => {
        const at: Path = [...path, "mix", i];
        if (!isObj(c)) {
          add(ctx, at, `Each mixture component is { "weight": w, "of": model }, got ${describe(c)}.`);
          return;
        }
        unknownKeys(ctx, c, ["weight", "of"], at, "a mixture component");
        if (finiteNumber(ctx, c.weight, [...at, "weight"], "The weight")) {
          if (c.weight <= 0) add(ctx, [...at, "weight"], `Mixture weights must be positive; got ${c.weight}. Drop the component instead.`);
          total += c.weight;
        }
        if (!("of" in c)) add(ctx, [...at, "of"], `The mixture component needs "of": its model.`);
        else {
          const of = walk(ctx, c.of, [...at, "of"], depth + 1);
          if (of) comps.push({ weight: c.weight as number, of });
        }
      });
      if (ctx.issues.length === before && Math.abs(total - 1) > MIX_WEIGHT_TOLERANCE)
        add(ctx, [...path, "mix"], `Mixture weights sum to ${total}; they must sum to 1 (within ${MIX_WEIGHT_TOLERANCE}). Rescale them.`);
      return ctx.issues.length === before && !ctx.limit ? { mix: comps } : null;
    },
  },
  {
    key: "compound",
    syntax: '{ "compound": { "count": model, "each": model } }',
    guide: "A random sum: count copies of each, count a law on 0, 1, 2, …",
    name: "CompoundNode",
    description: "random sum of `count` (a law on 0, 1, 2, ...) independent copies of `each`",
    zod: (model) => z.object({ compound: z.object({ count: model, each: model }).strict() }).strict(),
    check: (ctx, v, path, depth, walk) => {
      const before = ctx.issues.length;
      unknownKeys(ctx, v, ["compound"], path, "a compound");
      const c = v.compound;
      if (!isObj(c)) {
        add(ctx, [...path, "compound"], `"compound" must be { "count": model, "each": model }.`);
        return null;
      }
      unknownKeys(ctx, c, ["count", "each"], [...path, "compound"], "a compound");
      if (!("count" in c)) add(ctx, [...path, "compound", "count"], `The compound needs "count": a law on 0, 1, 2, ... (e.g. poisson).`);
      if (!("each" in c)) add(ctx, [...path, "compound", "each"], `The compound needs "each": the law of one summand.`);
      if (ctx.issues.length > before) return null;
      const count = walk(ctx, c.count, [...path, "compound", "count"], depth + 1);
      const each = walk(ctx, c.each, [...path, "compound", "each"], depth + 1);
      if (count && !isCountLaw(count))
        add(
          ctx,
          [...path, "compound", "count"],
          `The count of a compound must be a law on 0, 1, 2, ... (${FAMILY_NAMES.filter((f) => FAMILY_SPECS[f].count).join(", ")}, a point at a whole number, or a lattice/sample of whole numbers).`,
        );
      return ctx.issues.length === before && !ctx.limit && count && each ? { compound: { count, each } } : null;
    },
  },
  {
    key: "lattice",
    syntax: '{ "lattice": { "origin": x0, "step": h, "p": [...] } }',
    guide: "A tabulated law on x0 + k h; p non-negative, summing to 1.",
    name: "LatticeNode",
    description: `a law on the lattice origin + k step with probabilities p (summing to 1 within ${LATTICE_SUM_TOLERANCE})`,
    zod: () =>
      z
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
        }),
    check: (ctx, v, path, depth, walk) => {
      const before = ctx.issues.length;
      unknownKeys(ctx, v, ["lattice"], path, "a lattice law");
      const l = v.lattice;
      const at: Path = [...path, "lattice"];
      if (!isObj(l)) {
        add(ctx, at, `"lattice" must be { "origin": x0, "step": h, "p": [...] }.`);
        return null;
      }
      unknownKeys(ctx, l, ["origin", "step", "p"], at, "a lattice law");
      finiteNumber(ctx, l.origin, [...at, "origin"], "lattice.origin");
      if (finiteNumber(ctx, l.step, [...at, "step"], "lattice.step") && l.step <= 0)
        add(ctx, [...at, "step"], `lattice.step must be positive, got ${l.step}.`);
      const p = l.p;
      if (!Array.isArray(p) || p.length === 0) {
        add(ctx, [...at, "p"], `lattice.p must be a non-empty array of probabilities.`);
        return null;
      }
      if (p.length > MAX_LATTICE) {
        if (!ctx.limit) ctx.limit = { pointer: toPointer([...at, "p"]), detail: `lattice.p may hold at most ${MAX_LATTICE} values; got ${p.length}.` };
        return null;
      }
      let total = 0;
      for (let k = 0; k < p.length && ctx.issues.length < 50; k++) {
        const x = p[k];
        if (typeof x !== "number" || !Number.isFinite(x) || x < 0) add(ctx, [...at, "p", k], `lattice.p[${k}] must be a finite probability >= 0, got ${describe(x)}.`);
        else total += x;
      }
      if (ctx.issues.length === before && Math.abs(total - 1) > LATTICE_SUM_TOLERANCE)
        add(ctx, [...at, "p"], `lattice.p sums to ${total}; it must sum to 1 (within ${LATTICE_SUM_TOLERANCE}). Normalise the probabilities.`);
      return ctx.issues.length === before ? { lattice: { origin: l.origin as number, step: l.step as number, p: p as number[] } } : null;
    },
  },
  {
    key: "sample",
    syntax: '{ "sample": [...], "weights"?: [...] }',
    guide: "The empirical law of observed values, optionally weighted (a frequency table).",
    name: "SampleNode",
    description: "the empirical law of the sample values (weighted when weights are given)",
    zod: () =>
      z
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
          else if (!(m.weights.reduce((s, w) => s + w, 0) > 0)) ctx.addIssue({ code: "custom", message: "weights must have a positive total", path: ["weights"] });
        }),
    check: (ctx, v, path, depth, walk) => {
      const before = ctx.issues.length;
      unknownKeys(ctx, v, ["sample", "weights"], path, "a sample");
      const s = v.sample;
      if (!Array.isArray(s) || s.length === 0) {
        add(ctx, [...path, "sample"], `"sample" must be a non-empty array of finite numbers.`);
        return null;
      }
      if (s.length > MAX_SAMPLE) {
        if (!ctx.limit) ctx.limit = { pointer: toPointer([...path, "sample"]), detail: `"sample" may hold at most ${MAX_SAMPLE} values; got ${s.length}.` };
        return null;
      }
      for (let k = 0; k < s.length && ctx.issues.length < 50; k++) {
        if (typeof s[k] !== "number" || !Number.isFinite(s[k])) add(ctx, [...path, "sample", k], `sample[${k}] must be a finite number, got ${describe(s[k])}.`);
      }
      const w = v.weights;
      if (w === undefined) return ctx.issues.length === before ? { sample: s as number[] } : null;
      // pointers name the field itself: <node>/weights (shape, total) and <node>/weights/k (one entry)
      if (!Array.isArray(w)) {
        add(ctx, [...path, "weights"], `"weights" must be an array of finite numbers >= 0, one per sample value.`);
        return null;
      }
      if (w.length !== s.length) {
        add(ctx, [...path, "weights"], `"weights" must have one entry per sample value: sample has ${s.length} values, weights has ${w.length}.`);
        return null;
      }
      let total = 0;
      for (let k = 0; k < w.length && ctx.issues.length < 50; k++) {
        const x = w[k];
        if (typeof x !== "number" || !Number.isFinite(x) || x < 0) add(ctx, [...path, "weights", k], `weights[${k}] must be a finite number >= 0, got ${describe(x)}.`);
        else total += x;
      }
      if (ctx.issues.length === before && !(total > 0 && Number.isFinite(total)))
        add(ctx, [...path, "weights"], total > 0 ? `"weights" sum to more than the largest finite number; scale them down.` : `"weights" sum to ${total}; at least one weight must be positive.`);
      return ctx.issues.length === before ? { sample: s as number[], weights: w as number[] } : null;
    },
  },
  {
    key: "layer",
    syntax: '{ "layer": { "deductible"?: d, "limit"?: l, "share"?: c }, "of": model }',
    guide: "One claim's layer: c min(max(X − d, 0), l) (deductible 0, limit unlimited, share 1 when left out). X is a named law whose cdf the engine evaluates (every family on a half line or an interval: exponential, gamma, chi_squared, lognormal, pareto, weibull, lomax, generalized_pareto, burr, loglogistic, inverse_gaussian, inverse_gamma, beta, pert, triangular, uniform, truncated_normal; also normal), a lattice or a sample; other laws (cauchy, laplace, logistic, student_t, stable, variance_gamma, nig, sums, compounds) are refused with a 422 that lists the accepted ones. The law has atoms at 0 and at c l; inside a compound every claim is rounded down and rounded up onto a lattice that holds both atoms exactly, the two compounds bracket the law (and every quantile, stop-loss, layer mean and expected shortfall of it), and /api/v1/risk answers the middle of the bracket with half its width as the error bound.",
    name: "LayerNode",
    description:
      "per-claim layer: share * min(max(X - deductible, 0), limit) for one claim X (deductible 0, limit unlimited, share 1 when left out); X a named law whose cdf the engine evaluates in closed form or by a special function (the accepted families are listed in the model guide), a lattice or a sample",
    zod: (model) =>
      z
        .object({
          layer: z
            .object({
              deductible: finite("layer.deductible").gte(0, { error: "layer.deductible must be >= 0" }).optional().describe("each claim's retention d (default 0)"),
              limit: finite("layer.limit").gt(0, { error: "layer.limit must be > 0" }).optional().describe("the most paid per claim above the deductible, l (default unlimited)"),
              share: finite("layer.share").gt(0, { error: "layer.share must be > 0" }).lte(1, { error: "layer.share must be <= 1" }).optional().describe("the share c of the layer taken (default 1)"),
            })
            .strict(),
          of: model,
        })
        .strict(),
    check: (ctx, v, path, depth, walk) => {
      const before = ctx.issues.length;
      unknownKeys(ctx, v, ["layer", "of"], path, "a per-claim layer");
      const l = v.layer;
      const at: Path = [...path, "layer"];
      if (!isObj(l)) {
        add(ctx, at, `"layer" must be { "deductible": d, "limit": l, "share": c } (each optional).`);
        return null;
      }
      unknownKeys(ctx, l, ["deductible", "limit", "share"], at, "a layer");
      const out: { deductible?: number; limit?: number; share?: number } = {};
      if (l.deductible !== undefined && finiteNumber(ctx, l.deductible, [...at, "deductible"], "layer.deductible")) {
        if (l.deductible < 0) add(ctx, [...at, "deductible"], `layer.deductible must be >= 0, got ${l.deductible}.`);
        else out.deductible = l.deductible;
      }
      if (l.limit !== undefined && finiteNumber(ctx, l.limit, [...at, "limit"], "layer.limit")) {
        if (!(l.limit > 0)) add(ctx, [...at, "limit"], `layer.limit must be > 0 (leave it out for an unlimited layer), got ${l.limit}.`);
        else out.limit = l.limit;
      }
      if (l.share !== undefined && finiteNumber(ctx, l.share, [...at, "share"], "layer.share")) {
        if (!(l.share > 0 && l.share <= 1)) add(ctx, [...at, "share"], `layer.share must be in (0, 1], got ${l.share}.`);
        else out.share = l.share;
      }
      if (!("of" in v)) {
        add(ctx, [...path, "of"], `"layer" needs "of": the law of one claim.`);
        return null;
      }
      const of = walk(ctx, v.of, [...path, "of"], depth + 1);
      if (of && !layerable(of))
        add(
          ctx,
          [...path, "of"],
          `A per-claim layer applies to a named law whose cdf is evaluated in closed form or by a special function (${FAMILY_NAMES.filter((f) => LAYERABLE.has(f)).join(", ")}) or to a lattice or sample law; wrap sums and compounds the other way round (layer each claim, then compound).`,
        );
      return ctx.issues.length === before && !ctx.limit && of ? { layer: out, of } : null;
    },
  },
] as const satisfies readonly OperatorSpec[];

/** The operator keys, in the order messages list them. */
export const OPERATORS = OPERATOR_SPECS.map((o) => o.key);
