import { CfError, toPointer } from "./errors";
import { FAMILY_NAMES, FAMILY_SPECS, type FamilyName } from "./families/spec";
import { MAX_DEPTH, MAX_MODEL_NODES } from "./limits";
import { add, describe, finiteNumber, isObj, OPERATOR_SPECS, OPERATORS, unknownKeys, type Ctx, type Path } from "./notation";
import type { FamilyModel, Model } from "./schema";

export { isCountLaw, LAYERABLE } from "./notation";

function checkFamily(ctx: Ctx, o: Record<string, unknown>, path: Path): FamilyModel | null {
  const name = o.family;
  if (typeof name !== "string" || !(FAMILY_NAMES as readonly string[]).includes(name)) {
    add(ctx, [...path, "family"], `Unknown family ${describe(name)}; choose one of ${FAMILY_NAMES.join(", ")}.`);
    return null;
  }
  const spec = FAMILY_SPECS[name as FamilyName];
  const before = ctx.issues.length;
  unknownKeys(ctx, o, ["family", ...spec.params.map((p) => p.name)], path, `a ${name} law`);
  const out: Record<string, unknown> = { family: name };
  for (const p of spec.params) {
    const v = o[p.name];
    const at = [...path, p.name];
    if (v === undefined) {
      if (p.optional) continue;
      if (p.default === undefined) add(ctx, at, `${name} needs the parameter "${p.name}" (${p.doc}).`);
      else out[p.name] = p.default;
      continue;
    }
    if (p.values) {
      if (typeof v !== "string" || !p.values.includes(v)) add(ctx, at, `${name}.${p.name} must be one of ${p.values.join(", ")}, got ${describe(v)}.`);
      else out[p.name] = v;
      continue;
    }
    if (!finiteNumber(ctx, v, at, `${name}.${p.name} (${p.doc})`)) continue;
    const tooLow = p.loOpen ? v <= p.lo : v < p.lo;
    const tooHigh = p.hiOpen ? v >= p.hi : v > p.hi;
    if (tooLow || tooHigh) {
      const lo = p.lo === -Infinity ? "" : `${p.loOpen ? "greater than" : "at least"} ${p.lo}`;
      const hi = p.hi === Infinity ? "" : `${p.hiOpen ? "less than" : "at most"} ${p.hi}`;
      add(ctx, at, `${name}.${p.name} (${p.doc}) must be ${[lo, hi].filter(Boolean).join(" and ")}, got ${v}.`);
      continue;
    }
    if (p.type === "int" && !Number.isInteger(v)) {
      add(ctx, at, `${name}.${p.name} must be a whole number, got ${v}.`);
      continue;
    }
    out[p.name] = v;
  }
  if (ctx.issues.length === before && spec.check) {
    const r = spec.check(out);
    if (r) add(ctx, [...path, r.param], r.detail);
  }
  return ctx.issues.length === before ? (out as FamilyModel) : null;
}

function walk(ctx: Ctx, v: unknown, path: Path, depth: number): Model | null {
  ctx.nodes++;
  if (ctx.limit) return null;
  if (ctx.nodes > MAX_MODEL_NODES) {
    ctx.limit = { pointer: toPointer(path), detail: `The model has more than ${MAX_MODEL_NODES} nodes; simplify it (for example use "repeat" instead of listing equal terms).` };
    return null;
  }
  if (depth > MAX_DEPTH) {
    ctx.limit = { pointer: toPointer(path), detail: `The model is nested deeper than ${MAX_DEPTH} levels; flatten it.` };
    return null;
  }
  if (!isObj(v)) {
    add(ctx, path, `Expected a model object (a law with "family" or one of ${OPERATORS.join(", ")}), got ${describe(v)}.`);
    return null;
  }
  if ("family" in v) return checkFamily(ctx, v, path);
  const ops = OPERATORS.filter((k) => k in v);
  if (ops.length !== 1) {
    add(
      ctx,
      path,
      ops.length === 0
        ? `Expected a model: give "family" or exactly one of ${OPERATORS.join(", ")}; found fields ${Object.keys(v).join(", ") || "none"}.`
        : `A model node has exactly one operator; found ${ops.join(" and ")}. Nest them instead.`,
    );
    return null;
  }
  const spec = OPERATOR_SPECS.find((o) => o.key === ops[0])!;
  return spec.check(ctx, v, path, depth, walk);
}

/**
 * Check a model in the notation (structure, every parameter, weights, lattice sums, count laws, limits) and
 * return it with defaults filled in. Throws CfError("limit_exceeded" | "invalid_model") listing every issue
 * with a JSON pointer and a sentence.
 */
export function validateModel(input: unknown): Model {
  const ctx: Ctx = { issues: [], limit: null, nodes: 0 };
  const m = walk(ctx, input, [], 0);
  if (ctx.limit) throw new CfError("limit_exceeded", ctx.limit.pointer, ctx.limit.detail);
  if (ctx.issues.length > 0 || !m) {
    const first = ctx.issues[0] ?? { pointer: "", detail: "The model is invalid." };
    throw new CfError("invalid_model", first.pointer, first.detail, ctx.issues);
  }
  return m;
}
