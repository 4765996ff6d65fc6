import type { z } from "zod";
import type { CfBody } from "@/lib/api/schemas/cf";
import type { ConvolveRequest } from "@/lib/api/schemas/convolve";
import type { DensityBody } from "@/lib/api/schemas/density";
import type { MomentsBody } from "@/lib/api/schemas/moments";
import type { QuantilesBody } from "@/lib/api/schemas/quantiles";
import type { RiskBody } from "@/lib/api/schemas/risk";
import { compile, convolveTables, density, MAX_LATTICE, moments, powerTable, quantiles } from "@/lib/cf";
import { cfValues } from "@/lib/cf/cf-values";
import { riskMeasures } from "@/lib/cf/risk";
import { ApiError } from "./errors";
import { checkModel } from "./model-field";

// The computations behind the public endpoints, on validated bodies, without the gate. The route handlers,
// the portal's explorer and the OpenAPI examples all call these, so all three give the same answers.

const list = (a: Float64Array) => Array.from(a);

function args(t: number[] | { from: number; to: number; count: number }): Float64Array {
  if (Array.isArray(t)) return Float64Array.from(t);
  const out = new Float64Array(t.count);
  const dt = (t.to - t.from) / (t.count - 1);
  for (let i = 0; i < t.count; i++) out[i] = t.from + i * dt;
  out[t.count - 1] = t.to;
  return out;
}

export function runCf(body: z.infer<typeof CfBody>) {
  const compiled = compile(checkModel(body.model));
  const t = args(body.t);
  const v = cfValues(compiled, t);
  return { t: list(t), re: list(v.re), im: list(v.im), error: nullable(v.error)!, notes: v.notes };
}

/** The opt-in discretisation of continuous severities in compounds, at the request's tolerance. */
function compileFor(model: unknown, method: string | undefined, tolerance: number | undefined) {
  return compile(checkModel(model), method === "discretise" ? { discretise: tolerance !== undefined ? { tolerance } : {} } : {});
}

/** Float64Array values as plain JSON arrays; non-finite entries (unresolved) as null. */
const nullable = (a: Float64Array | undefined) => (a ? Array.from(a, (v) => (Number.isFinite(v) ? v : null)) : undefined);

export function runDensity(body: z.infer<typeof DensityBody>) {
  const compiled = compileFor(body.model, body.method, body.tolerance);
  const r = density(compiled, {
    x: body.x,
    grid: body.grid,
    method: body.method === "discretise" ? "auto" : body.method,
    tolerance: body.tolerance,
    range: body.range,
    maxFrequency: body.maxFrequency,
  });
  // a density that is infinite at a point (a power singularity met exactly) has no JSON number: null, listed by x
  const unbounded = r.pdf ? Array.from(r.x).filter((_, i) => r.pdf![i] === Infinity) : [];
  const { pointError: pe, ...diagnostics } = r.diagnostics;
  // per point: the route's own bounds, or the whole answer's where it bounds only that
  const n = r.x.length;
  const uniform = (v: number | null) => Array.from({ length: n }, () => (v !== null && Number.isFinite(v) ? v : null));
  const pointError = {
    ...(r.pdf || r.pmf ? { pdf: pe ? nullable(pe.pdf)! : uniform(diagnostics.error.pdf) } : {}),
    cdf: pe ? nullable(pe.cdf)! : uniform(diagnostics.error.cdf),
    sf: pe ? nullable(pe.sf)! : uniform(diagnostics.error.cdf),
  };
  return {
    x: list(r.x),
    ...(r.pdf ? { pdf: nullable(r.pdf) } : {}),
    ...(r.pmf ? { pmf: list(r.pmf) } : {}),
    cdf: list(r.cdf),
    sf: list(r.sf),
    atoms: r.atoms,
    diagnostics: { ...diagnostics, pointError, ...(unbounded.length > 0 ? { unboundedDensityAt: unbounded } : {}) },
  };
}

export function runQuantiles(body: z.infer<typeof QuantilesBody>) {
  const compiled = compileFor(body.model, body.method, body.tolerance);
  const lower = body.tail === "lower" && body.expectedShortfall;
  const r = quantiles(compiled, body.p, { expectedShortfall: (body.expectedShortfall ?? false) && !lower, tolerance: body.tolerance });
  const d = r.diagnostics;
  if (lower) {
    // E[X | X <= q_p] = -E[-X | -X >= q_{1-p}(-X)]: the upper-tail shortfall of the negated law
    const neg = compileFor({ scale: -1, of: checkModel(body.model) }, body.method, body.tolerance);
    const rn = quantiles(neg, body.p.map((p) => 1 - p), { expectedShortfall: true, tolerance: body.tolerance });
    r.expectedShortfall = rn.expectedShortfall?.map((v) => -v);
    d.expectedShortfallError = rn.diagnostics.expectedShortfallError;
    // its bounds' caveats and a shortfall goal it missed belong to this answer too (its notes not already said)
    if (d.tolerance && rn.diagnostics.tolerance && !rn.diagnostics.tolerance.met) d.tolerance.met = false;
    for (const n of rn.diagnostics.notes) if (!d.notes.includes(n)) d.notes.push(`lower-tail expected shortfall (the negated law's upper tail): ${n}`);
  }
  return {
    p: body.p,
    x: list(r.x),
    ...(body.expectedShortfall ? { expectedShortfall: nullable(r.expectedShortfall) ?? [] } : {}),
    diagnostics: {
      method: d.method,
      terms: d.terms,
      range: d.range,
      cdfError: d.cdfError,
      ...(d.tolerance ? { tolerance: d.tolerance } : {}),
      quantileError: nullable(d.quantileError)!,
      ...(d.expectedShortfallError ? { expectedShortfallError: nullable(d.expectedShortfallError) } : {}),
      // every approximation made anywhere in the model is stated here too (CF quadratures, discretisations)
      notes: [...new Set([...d.notes, ...compiled.notes])],
    },
  };
}

export function runMoments(body: z.infer<typeof MomentsBody>) {
  const r = moments(compile(checkModel(body.model)), body.order ?? 4);
  const notes = [...r.notes, ...r.reasons.flatMap((reason, k) => (reason ? [`order ${k + 1}: ${reason}`] : []))];
  return {
    raw: r.raw,
    central: r.central,
    cumulants: r.cumulants,
    mean: r.mean,
    variance: r.variance,
    skewness: r.skewness,
    excessKurtosis: r.excessKurtosis,
    rawError: r.rawError,
    centralError: r.centralError,
    cumulantError: r.cumulantError,
    meanError: r.meanError,
    varianceError: r.varianceError,
    skewnessError: r.skewnessError,
    excessKurtosisError: r.excessKurtosisError,
    exists: r.exists,
    momentIndex: Number.isFinite(r.momentIndex) ? r.momentIndex : null,
    notes,
  };
}

export function runConvolve(body: z.infer<typeof ConvolveRequest>) {
  const power = body.power ?? 1;
  const length = (body.terms.reduce((s, t) => s + t.p.length - 1, 0) * power) + 1;
  if (length > MAX_LATTICE) {
    throw new ApiError("limit_exceeded", `The result would have ${length} points; the limit is ${MAX_LATTICE}.`, {
      errors: [{ detail: `The result would have ${length} points, above the limit of ${MAX_LATTICE}.`, pointer: body.power ? "/power" : "/terms" }],
    });
  }
  // the terms as given are exact: each entry's rounding bound starts at 0 and follows the convolutions and powers
  // (lib/cf/table-rounding.ts: per entry while the products are direct sums, else the largest entry's bound)
  const tables = body.terms.map((t) => ({ origin: t.origin, step: t.step, p: Float64Array.from(t.p), tailMass: 0, round: { pmf: 0, l1: 0 }, pointErr: new Float64Array(t.p.length) }));
  const once = convolveTables(tables);
  const r = power > 1 ? powerTable(once, power) : once;
  const pe = r.pointErr && r.pointErr.length === r.p.length ? r.pointErr : null;
  const pError = Array.from(r.p, (_, k) => (pe ? pe[k] : r.round ? r.round.pmf : null));
  return { origin: r.origin, step: r.step, p: list(r.p), pError, tailMass: r.tailMass };
}

export function runRisk(body: z.infer<typeof RiskBody>) {
  const model = checkModel(body.model);
  const { model: _m, method, tolerance, ...req } = body;
  void _m;
  if (Object.values(req).every((v) => v === undefined))
    throw new ApiError("validation", "Ask for at least one measure.", {
      errors: [{ detail: "Ask for at least one of var, es, stopLoss, limitedMean, layerMean, exceedance, returnPeriod, outside.", pointer: "" }],
    });
  const r = riskMeasures(model, req, method === "discretise" ? { discretise: tolerance !== undefined ? { tolerance } : {} } : {});
  const { notes, diagnostics, ...measures } = r;
  return { ...measures, notes: [...new Set(notes)], diagnostics };
}
