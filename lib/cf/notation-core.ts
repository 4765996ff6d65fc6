/** Shared pieces of the model notation: tolerances, the check context, small checks and the operator-table type. */
import { z } from "zod";
import { toPointer, type CfIssue } from "./errors";
import { FAMILY_NAMES, FAMILY_SPECS } from "./families/spec";
import { MAX_REPEAT } from "./limits";
import type { Model } from "./schema";

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

export function layerable(m: Model): boolean {
  if ("family" in m) return LAYERABLE.has(m.family);
  if ("lattice" in m || "sample" in m) return true;
  return continuousLayerable(m);
}

/** a layerable named law, scaled by a positive factor or shifted (its law and layer moments follow the affine map) */
function continuousLayerable(m: Model): boolean {
  if ("family" in m) return LAYERABLE.has(m.family);
  if ("scale" in m) return m.scale > 0 && continuousLayerable(m.of);
  if ("shift" in m) return Number.isFinite(m.shift) && continuousLayerable(m.of);
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

export const finite = (what: string) => z.number({ error: `${what} must be a finite number` });

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

export function unary(op: "scale" | "shift" | "repeat"): OperatorSpec["check"] {
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
