import { z } from "zod";
import { FAMILY_NAMES, FAMILY_SPECS } from "./families/spec";
import { MAX_REPEAT } from "./limits";
import type { Model } from "./schema";
import { MIX_WEIGHT_TOLERANCE, type Path, isObj, describe, add, finiteNumber, unknownKeys, isCountLaw, finite, type OperatorSpec, unary } from "./notation-core";
import { TABLE_OPERATOR_SPECS } from "./notation-tables";

/**
 * The operators of the model notation, in one table: for each node its key, its name and description in the
 * OpenAPI document, its zod shape (the request schema and the documented schema are both built from it) and its
 * check (what validateModel runs: every problem as a JSON pointer and a sentence). Families live in
 * FAMILY_SPECS (./families/spec.ts); adding an operator is one entry here (or in notation-tables.ts for tabulated leaves) plus its CF in compile.ts.
 */

export { MIX_WEIGHT_TOLERANCE, LATTICE_SUM_TOLERANCE, isObj, describe, add, finiteNumber, unknownKeys, LAYERABLE, isCountLaw, type Path, type Ctx, type Walk, type OperatorSpec } from "./notation-core";

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
  ...TABLE_OPERATOR_SPECS,
] as const satisfies readonly OperatorSpec[];

/** The operator keys, in the order messages list them. */
export const OPERATORS = OPERATOR_SPECS.map((o) => o.key);
