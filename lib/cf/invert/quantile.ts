import { CfError } from "../errors";
import type { DirectMethod } from "../direct/types";
import { directQuantiles } from "../direct/answer";
import { momentRest } from "../direct/shortfall";
import type { Atom, CompiledModel } from "../types";
import { invertWithinTerms } from "./continuous";
import { roundingOf, solutionAt } from "./shared";
import { lawShape } from "./range";
import { atomQuantiles, latticeQuantiles } from "./quantile-table";
import { shortfallLight } from "./shortfall";
import { stopLossBounds } from "./tail-moments";
import { solveLevels, type Evaluator } from "./solve-levels";
import { dampable } from "./damped";
import { dampedQuantiles } from "./quantile-damped";
import { heavyQuantiles } from "./quantile-heavy";
import { mixtureQuantiles } from "./mixture";
import { lightAliasAt } from "./light-images";
import { truncationAt } from "./nodes";

export interface QuantileOptions {
  /** also return the expected shortfall ES_p = q_p + E[(X - q_p)^+] / (1 - p) (TVaR) */
  expectedShortfall?: boolean;
  /** absolute cdf accuracy used for the inversion (default 1e-14 light tails, 1e-9 power tails) */
  tolerance?: number;
}

export interface QuantileDiagnostics {
  method: "gil-pelaez" | "gil-pelaez-damped" | "lattice-table" | "discretised" | "lattice-fft" | "atoms" | "mixture" | DirectMethod;
  terms: number;
  range: { from: number; to: number };
  /** bound on |F_computed - F| used by the root finder */
  cdfError: number;
  /** per level: bound on |x - q_p| (Infinity where not resolved) */
  quantileError: Float64Array;
  /** per level: bound on the absolute error of ES (present when requested) */
  expectedShortfallError?: Float64Array;
  notes: string[];
  /**
   * the cdf error the levels were solved to (the request's, else 1e-10: the routes aim tighter where they can) and whether
   * cdfError meets it and every expected shortfall's bound its goal (shortfallGoalMissed)
   */
  tolerance?: { target: number; met: boolean };
  /** set where an expected shortfall's derived bound stays above its goal (a note names the levels); not part of the API answer */
  shortfallGoalMissed?: boolean;
}

export interface QuantileResult {
  p: Float64Array;
  x: Float64Array;
  expectedShortfall?: Float64Array;
  diagnostics: QuantileDiagnostics;
}

/**
 * Quantiles q_p = min{x : F(x) >= p} and expected shortfall. Atoms and lattice points are handled exactly
 * (a level inside a jump returns the atom), flat parts return their left end; in between, a bracketed
 * Newton iteration on the mid-point Gil-Pelaez sums (the upper tail solves S(x) = 1 - p so that p close to 1
 * keeps its relative accuracy). ES follows Acerbi & Tasche (2002), ES_p = q + E[(X - q)^+]/(1 - p), with
 * E[(X - q)^+] = int_q^inf S(y) dy integrated term by term in the same sums.
 */
export function quantiles(model: CompiledModel, pIn: ArrayLike<number>, options: QuantileOptions = {}): QuantileResult {
  const r = quantilesOf(model, pIn, options);
  const d = r.diagnostics;
  const target = options.tolerance ?? 1e-10;
  const met = d.cdfError <= target && !d.shortfallGoalMissed;
  d.tolerance = { target, met };
  if (!(d.cdfError <= target)) d.notes.push(`tolerance ${target} not reached: the levels were solved with a cdf bound of ${d.cdfError.toExponential(2)} (their quantile and ES bounds carry it)`);
  return r;
}

function quantilesOf(model: CompiledModel, pIn: ArrayLike<number>, options: QuantileOptions): QuantileResult {
  const p = Float64Array.from(pIn);
  for (let i = 0; i < p.length; i++) {
    if (!(p[i] >= 0 && p[i] <= 1)) throw new CfError("invalid_model", `/p/${i}`, "each level p must be a number in [0, 1]");
  }
  // a single named law (or scaled / shifted) with a direct evaluation: no inversion
  if (model.direct && !(options.expectedShortfall && model.direct.shortfallByInversion)) {
    const mean = model.momentIndex > 1 ? model.cumulants(1)[0] : null;
    const meanErr = mean === null ? Infinity : (model.cumulantErrors?.(1)[0] ?? Infinity);
    return directQuantiles(model.direct, p, options.expectedShortfall ?? false, model.tails, mean, meanErr, model.notes, options.expectedShortfall ? momentRest(model) : undefined);
  }
  const kind = model.kind;
  if (kind.type === "lattice") return withModelNotes(model, latticeQuantiles(model, kind.origin, kind.step, p, options));
  if (kind.type === "discrete") {
    if (!kind.atoms) throw new CfError("not_applicable", "", "this discrete law has too many atoms to list; its quantiles cannot be computed");
    return atomQuantiles(kind.atoms, p, options);
  }
  const atoms: Atom[] = kind.type === "mixed" ? [...kind.atoms].sort((u, v) => u.x - v.x) : [];
  const w = 1 - atoms.reduce((s, a) => s + a.p, 0);
  if (w <= 1e-14) return atomQuantiles(atoms, p, options);
  if (model.components) {
    const r = mixtureQuantiles(model, p, options);
    if (r) return withModelNotes(model, inSupport(model, atoms, r));
  }
  if (dampable(model)) {
    const r = dampedQuantiles(model, atoms, p, options);
    if (r) return withModelNotes(model, inSupport(model, atoms, r));
  }
  const shape = lawShape(model);
  return withModelNotes(model, inSupport(model, atoms, shape.heavy ? heavyQuantiles(model, atoms, w, p, options) : lightQuantiles(model, atoms, w, p, options)));
}

/**
 * The quantile lies in [x - e, x + e] and in the support [lo, hi]: an answer outside the support moves to the nearer end,
 * its bound to what is left of the interval there (Poisson(1)-lognormal(0, 2.5) at p = 0.001: -2170 +- 2170 became 0 +-
 * 0.036); a level at most the mass of an atom at a finite lower end (nothing lies below it) has that end as its exact
 * quantile, and there ES_p = lo + (E X - lo) / (1 - p) (X >= lo), within the mean's derived bound over 1 - p (it was the
 * route's integral at its own quantile: 24.4 +- 8.7 against 22.78 for that law at 0.001). Elsewhere the expected
 * shortfall keeps the route's value and bound.
 */
function inSupport(model: CompiledModel, atoms: Atom[], r: QuantileResult): QuantileResult {
  const [lo, hi] = model.support;
  const base = Number.isFinite(lo) ? atoms.filter((a) => a.x === lo).reduce((s, a) => s + a.p, 0) : 0;
  const { x, p } = r;
  const err = r.diagnostics.quantileError;
  const es = r.expectedShortfall;
  const esErr = r.diagnostics.expectedShortfallError;
  const mean = base > 0 && es && esErr && model.momentIndex > 1 && model.cumulantErrors ? [model.cumulants(1)[0], model.cumulantErrors(1)[0]] : null;
  for (let i = 0; i < x.length; i++) {
    if (base > 0 && p[i] <= base * (1 - 4 * Number.EPSILON)) {
      x[i] = lo;
      err[i] = 0;
      if (mean && mean[0] !== null && mean[1] !== null && Number.isFinite(mean[0]) && Number.isFinite(mean[1])) {
        const v = lo + (mean[0] - lo) / (1 - p[i]);
        const e = (mean[1] + 4 * Number.EPSILON * (Math.abs(mean[0]) + Math.abs(lo))) / (1 - p[i]) + 4 * Number.EPSILON * Math.abs(v);
        if (!(e >= esErr![i])) {
          es![i] = v;
          esErr![i] = e;
        }
      }
    } else if (x[i] < lo && x[i] + err[i] >= lo) {
      err[i] = Math.min(x[i] + err[i] - lo, err[i]) * (1 + 4 * Number.EPSILON);
      x[i] = lo;
    } else if (x[i] > hi && x[i] - err[i] <= hi) {
      err[i] = Math.min(hi - (x[i] - err[i]), err[i]) * (1 + 4 * Number.EPSILON);
      x[i] = hi;
    }
  }
  return r;
}

/** Every approximation made in the model (CF quadratures, discretisations) is stated with the answer. */
function withModelNotes(model: CompiledModel, r: QuantileResult): QuantileResult {
  r.diagnostics.notes = [...new Set([...r.diagnostics.notes, ...model.notes])];
  return r;
}

function lightQuantiles(model: CompiledModel, atoms: Atom[], w: number, p: Float64Array, o: QuantileOptions): QuantileResult {
  const shape = lawShape(model);
  // every root-finding step costs one pass over the nodes: when a slowly decaying CF needs very many, relax the
  // target (the error estimates follow) rather than spend seconds per level
  const tol = o.tolerance ?? 1e-14;
  const out = invertWithinTerms(
    model,
    atoms,
    { kind: "points", x: new Float64Array([shape.center]) },
    { method: "gil-pelaez", tolerance: tol / w, wantPdf: false },
    o.tolerance === undefined ? 1 << 17 : Infinity,
    1e-9 / w,
  );
  const sol = out.solution!;
  // the sums' truncation: the terms k >= K carry |phi(t_k)| / (pi (k + 1/2)) <= (h / pi) E(t_k) / t_k with E the envelope
  // (./nodes.ts) and E(t)/t non-increasing, so h E(t_k)/t_k <= int_{t_k - h}^{t_k} E/t and their sum is at most
  // (1/pi) int_{(K - 1/2) h}^inf E(t)/t dt: the envelope's tail at the probe at or below (K - 1/2) h (the window's
  // uniform bound doubles the tail at K h)
  const tStar = (sol.nodes.K - 0.5) * sol.nodes.h;
  const trunc = Math.min(sol.error.truncation, truncationAt(sol.envelope, tStar).cdf);
  const roundCdf = sol.sumErrCdf - sol.error.truncation;
  // the uniform aliasing is 2 |F_h(a)| plus twice the sums' own error at a (continuous.ts lightPath), that error now the
  // tighter truncation plus the rounding
  const aliasCdf = Math.min(sol.error.cdf - sol.sumErrCdf, sol.aliasCore + 2 * (trunc + roundCdf));
  const errCdf = w * (trunc + roundCdf + aliasCdf) * (1 + 4 * Number.EPSILON) + 4 * Number.EPSILON;
  // per point: the aliasing (./light-images.ts) and the rounding of the phases, which grows with |x - center| (shared.ts
  // roundingOf), where they are below the window's uniform bounds; the truncation is the same everywhere
  const aliasAt = lightAliasAt(model, sol, w);
  const errAt = (x: number) => {
    const alias = aliasAt ? Math.min(aliasCdf, aliasAt(x)) : aliasCdf;
    const round = Math.min(roundCdf, roundingOf(sol.part, sol.nodes, Math.abs(x - sol.part.center)).cdf);
    return w * (trunc + round + alias) * (1 + 4 * Number.EPSILON) + 4 * Number.EPSILON;
  };
  const ev: Evaluator = {
    eval: solutionAt(sol, atoms, w),
    errCdf,
    errAt,
    lo: sol.window.a,
    hi: sol.window.b,
    terms: sol.nodes.K,
  };
  const notes = [...out.notes];
  const { x, err } = solveLevels(ev, atoms, p, shape.support, shape.spread, notes);
  let es: Float64Array | undefined;
  let esErr: Float64Array | undefined;
  if (o.expectedShortfall) {
    es = new Float64Array(p.length);
    esErr = new Float64Array(p.length);
    const tails = stopLossBounds(model);
    for (let i = 0; i < p.length; i++) {
      const r = shortfallLight(sol, atoms, w, x[i], p[i], errCdf, err[i], tails);
      es[i] = r.value;
      esErr[i] = r.error;
    }
  }
  return {
    p,
    x,
    expectedShortfall: es,
    diagnostics: {
      method: "gil-pelaez",
      terms: sol.nodes.K,
      range: { from: sol.window.a, to: sol.window.b },
      cdfError: errCdf,
      quantileError: err,
      expectedShortfallError: esErr,
      notes,
    },
  };
}
