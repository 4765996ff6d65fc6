/** The tabulated leaves and the per-claim layer of the notation table (notation.ts): lattice, sample, layer. */
import { z } from "zod";
import { toPointer } from "./errors";
import { FAMILY_NAMES } from "./families/spec";
import { MAX_LATTICE, MAX_SAMPLE } from "./limits";
import { LATTICE_SUM_TOLERANCE, type Path, isObj, describe, add, finiteNumber, unknownKeys, LAYERABLE, layerable, finite, type OperatorSpec } from "./notation-core";

export const TABLE_OPERATOR_SPECS = [
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
    guide: "One claim's layer: c min(max(X − d, 0), l) (deductible 0, limit unlimited, share 1 when left out). X is a named law whose cdf the engine evaluates (every family on a half line or an interval: exponential, gamma, chi_squared, lognormal, pareto, weibull, lomax, generalized_pareto, burr, loglogistic, inverse_gaussian, inverse_gamma, beta, pert, triangular, uniform, truncated_normal; also normal), a lattice or a sample; other laws (cauchy, laplace, logistic, student_t, stable, variance_gamma, nig, sums, compounds) are refused with a 422 that lists the accepted ones. The law has atoms at 0 and at c l. Inside a compound with a Poisson, negative binomial, binomial, geometric or zero-modified count the aggregate law stays continuous: its atoms (at 0, c l, 2 c l, ... where every claim sits at 0 or at the limit) are listed with their masses, the layer's CF is computed by a Filon-type rule on the claim density, and the jumps of the aggregate density at the multiples of c l are taken out in closed form before inversion. /api/v1/risk, and method discretise elsewhere (and other counts), round every claim down and up onto a lattice that holds both atoms exactly; the two compounds bracket the law (and every quantile, stop-loss, layer mean and expected shortfall of it), and /api/v1/risk answers the middle of the bracket with half its width as the error bound.",
    name: "LayerNode",
    description:
      "per-claim layer: share * min(max(X - deductible, 0), limit) for one claim X (deductible 0, limit unlimited, share 1 when left out); X a named law whose cdf the engine evaluates in closed form or by a special function (the accepted families are listed in the model guide), such a law scaled by a positive factor or shifted, a lattice or a sample",
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
          `A per-claim layer applies to a named law whose cdf is evaluated in closed form or by a special function (${FAMILY_NAMES.filter((f) => LAYERABLE.has(f)).join(", ")}), such a law scaled by a positive factor or shifted, or a lattice or sample law; wrap sums and compounds the other way round (layer each claim, then compound).`,
        );
      return ctx.issues.length === before && !ctx.limit && of ? { layer: out, of } : null;
    },
  },
] as const satisfies readonly OperatorSpec[];
