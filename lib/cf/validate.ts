import { CfError, toPointer, type CfIssue } from "./errors";
import { FAMILY_NAMES, FAMILY_SPECS, type FamilyName } from "./families/spec";
import { MAX_DEPTH, MAX_LATTICE, MAX_MODEL_NODES, MAX_REPEAT, MAX_SAMPLE } from "./limits";
import { LATTICE_SUM_TOLERANCE, MIX_WEIGHT_TOLERANCE, type FamilyModel, type Model } from "./schema";

type Path = (string | number)[];
const OPERATORS = ["sum", "scale", "shift", "repeat", "mix", "compound", "lattice", "sample", "layer"] as const;

interface Ctx {
  issues: CfIssue[];
  limit: CfIssue | null;
  nodes: number;
}

const isObj = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);
const describe = (v: unknown) =>
  typeof v === "number" ? String(v) : v === null ? "null" : Array.isArray(v) ? "an array" : typeof v === "string" ? JSON.stringify(v) : typeof v;

function add(ctx: Ctx, path: Path, detail: string) {
  if (ctx.issues.length < 50) ctx.issues.push({ pointer: toPointer(path), detail });
}

function finiteNumber(ctx: Ctx, v: unknown, path: Path, what: string): v is number {
  if (typeof v !== "number" || !Number.isFinite(v)) {
    add(ctx, path, `${what} must be a finite number, got ${describe(v)}.`);
    return false;
  }
  return true;
}

function unknownKeys(ctx: Ctx, o: Record<string, unknown>, allowed: readonly string[], path: Path, what: string) {
  for (const k of Object.keys(o)) {
    if (!allowed.includes(k)) add(ctx, [...path, k], `Unknown field "${k}" in ${what}; allowed fields are ${allowed.join(", ")}.`);
  }
}

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

/** Named laws the per-claim layer integrates against (those whose pdf and cdf the engine evaluates: closed forms,
 *  the normal cdf, the incomplete gamma and beta functions). */
export const LAYERABLE: ReadonlySet<string> = new Set([
  "normal",
  "uniform",
  "exponential",
  "gamma",
  "chi_squared",
  "lognormal",
  "pareto",
  "weibull",
  "lomax",
  "generalized_pareto",
  "burr",
  "loglogistic",
  "inverse_gaussian",
  "inverse_gamma",
  "triangular",
  "truncated_normal",
  "beta",
  "pert",
]);

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
  const op = ops[0];
  const before = ctx.issues.length;
  switch (op) {
    case "sum": {
      unknownKeys(ctx, v, ["sum"], path, "a sum");
      const arr = v.sum;
      if (!Array.isArray(arr) || arr.length === 0) {
        add(ctx, [...path, "sum"], `"sum" must be a non-empty array of models.`);
        return null;
      }
      const terms = arr.map((x, i) => walk(ctx, x, [...path, "sum", i], depth + 1));
      return ctx.issues.length === before && !ctx.limit ? { sum: terms as Model[] } : null;
    }
    case "scale":
    case "shift":
    case "repeat": {
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
    }
    case "mix": {
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
    }
    case "compound": {
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
    }
    case "lattice": {
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
    }
    case "layer": {
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
          `A per-claim layer applies to a named law with a closed-form cdf (${FAMILY_NAMES.filter((f) => LAYERABLE.has(f)).join(", ")}) or to a lattice or sample law; wrap sums and compounds the other way round (layer each claim, then compound).`,
        );
      return ctx.issues.length === before && !ctx.limit && of ? { layer: out, of } : null;
    }
    case "sample": {
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
    }
  }
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
