import type { Atom, CompiledModel } from "../types";
import { DAMPED_BUDGET, KERNEL_BUDGET, MAX_K, dampedAt, dampedPlan, dampedSetup, type DampedPlan, type DampedSolution } from "./damped";
import type { QuantileOptions, QuantileResult } from "./quantile";
import { atomMass } from "./shared";
import { solveLevels, type Evaluator } from "./solve-levels";
import { aliasCdfAt, type DampedPoint } from "./damped-eval";
import { truncationAtY, truncationSup } from "./damped-slope";
import { dampedReach, startRange } from "./damped-reach";

/** default cdf target of the quantile search (the request's tolerance when given) */
const QUANTILE_TOLERANCE = 1e-10;

/**
 * The default cdf target for levels down to `tail` in the upper tail: a level far in a light tail needs the sf to a
 * relative accuracy, so the target shrinks with the tail asked (1e-6 of it, at least 1e-14); a power tail keeps tol.
 */
export function lightTailTarget(model: CompiledModel, tol: number, tail: number): number {
  return Number.isFinite(model.tails.right) ? tol : Math.min(tol, Math.max(1e-6 * tail, 1e-14));
}
/**
 * the range ends where S + bound (the loose probe's) is below REACH times the smallest tail level asked: then F(R) > p for
 * every level, so each lies inside [lo, R]; the final inversion's terms grow with R, and for a heavy tail the point where
 * S falls to tail / 2 lies far past the quantile (Poisson(1)-lognormal(0, 2.5), p = 0.99: 638 against 345)
 */
const REACH = 0.8;
/**
 * points the final solution is evaluated at per level (they weigh the two-claim term's cost against the terms it saves):
 * 8 to 11 search steps a level (measured on Poisson-lognormal compounds, sigma 1 to 2.5), the level's ES and bound
 */
const POINTS_PER_LEVEL = 14;

/**
 * Quantiles and expected shortfall of an aggregate law bounded below by the damped inversion (./damped): the range
 * [lo, R] is doubled until S(R) is below the smallest tail level asked, then each level is solved by the bracketed
 * Newton search on the pointwise sums. Error of a quantile: 2 e / f over the bracket (e the cdf bound at R, the
 * largest over the range). ES_p = q + E[(X - q)^+]/(1 - p) with E[(X - q)^+] = E X - q + int_lo^q F (Acerbi &
 * Tasche 2002), int F from the third damped sum; its bound plus e times the quantile's error, over 1 - p.
 * Returns null when the transform decays too slowly for the damped route (the caller falls back).
 */
export function dampedQuantiles(model: CompiledModel, atoms: Atom[], p: Float64Array, o: QuantileOptions): QuantileResult | null {
  const lo = model.support[0];
  const k = model.cumulants(2);
  const mean = k[0];
  const sd = k[1] !== null && k[1] >= 0 ? Math.sqrt(k[1]) : null;
  let tail = 0.5;
  for (let i = 0; i < p.length; i++) if (p[i] > 0 && p[i] < 1) tail = Math.min(tail, 1 - p[i]);
  const spread = sd ?? model.scale;
  const tol = o.tolerance ?? lightTailTarget(model, QUANTILE_TOLERANCE, tail);
  const R0 = startRange(model, tail);
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  const split = (x: number) => atomMass(atoms, x);
  // locate R with cheap loose inversions, then invert once at the tolerance
  const loose = Math.max(tol, Math.min(1e-7, tail / 100));
  // kernels taken out (pareto, weibull severities): what is left decays fast, so a long range is worth its terms
  const budget = model.dampedKernels?.length || model.dampedSeverity ? KERNEL_BUDGET : DAMPED_BUDGET;
  const reach = dampedReach(model, atoms, R0, REACH * tail, loose, budget);
  if (!reach) return null;
  const { R, last } = reach;
  // a lower bound on every level's quantile (less lo), from the last loose inversion: x with F + bound < p for the lowest
  // level above the atom at lo lies left of its quantile. The plan keeps the bound within the target there as at R
  // (the truncation by parts falls away from lo, and a low level sits near it: Poisson(10)-lognormal(0, 2) at 0.001)
  const yLow = last ? lowestLevelBelow(last, atoms, p, lo, R, tol) : undefined;
  const points = POINTS_PER_LEVEL * p.length + 8;
  // no plan within the budget, or only one whose rounding cannot reach the tolerance: up to MAX_K terms before the
  // undamped route, which takes as many and resolves less. The cut-off comes from the truncation bound by parts where the
  // severity bounds its transform's slope (./damped-slope.ts): Poisson(1)-lognormal(0, 2.5) at 0.99, 0.995, 0.999 once
  // needed 13.1e6 terms (over MAX_K: the undamped route, 35-65% off), now 1.5e6, quantile bounds 1.4e-9 to 1.3e-8 relative
  // without ES the integrated cdf's bound is not used: the period may then rest on the cdf's shifted images alone
  const withInt = !!o.expectedShortfall;
  let plan = dampedPlan(model, atoms, R, tol, false, points, true, budget, undefined, undefined, true, yLow, withInt);
  let use = budget;
  const terms = (pl: DampedPlan) => (pl.tmax * pl.T) / (2 * Math.PI);
  if (budget === KERNEL_BUDGET && (plan.rounding > 1 || terms(plan) > budget)) {
    const wide = dampedPlan(model, atoms, R, tol, false, points, true, MAX_K, undefined, undefined, true, yLow, withInt);
    if (terms(wide) <= MAX_K && (wide.rounding <= 1 || terms(plan) > budget)) {
      plan = wide;
      use = MAX_K;
    }
  }
  // transient: used only here, by dampedAt, until this function returns
  const sol = dampedSetup(model, atoms, R, { tolerance: tol, wantPdf: true, budget: use, pointwise: true, points, plan, transient: true });
  if (!sol) return null;
  const s = sol!;
  // the bound over [lo, R] (errAt's never above it): the value at R, where every part but two grows with x; the cdf's image
  // remainder falls with x (its uniform bound instead), and the truncation by parts (./damped-slope.ts) is largest at R or
  // near lo, where the sine is small (its supremum over the range instead)
  const yR = R - lo;
  const gR = Math.exp(s.beta * yR);
  let errCdf = dampedAt(s, R, false, false).errF + (s.aliasCdf - aliasCdfAt(s, yR));
  if (s.truncTau < s.truncCdf)
    errCdf += Math.max(truncationSup(s.truncCdf, s.truncTau, s.h, s.beta, yR) - gR * truncationAtY(s.truncCdf, s.truncTau, s.h, yR), 0) * (1 + 4 * Number.EPSILON);
  // the search asks again for points it has seen (the solution, its bracket's ends, errAt beside eval at one x, each
  // level's first steps): the last 32 points with the density are kept, and their cdf bound serves errAt (the same sums;
  // Poisson(2)-pareto, seven levels: 78 evaluations of 142k terms, 29 of them repeats)
  const seen = new Map<number, DampedPoint>();
  const withPdf = (x: number) => {
    let v = seen.get(x);
    if (!v) {
      v = dampedAt(s, x, true, false);
      if (seen.size >= 32) seen.delete(seen.keys().next().value!);
      seen.set(x, v);
    }
    return v;
  };
  const ev: Evaluator = {
    eval(x: number) {
      const v = withPdf(x);
      const m = split(x);
      return { F: m.below + v.Fc, S: m.above + (Mc - v.Fc), f: v.fc };
    },
    errCdf: errCdf + 4 * Number.EPSILON,
    // the bound grows with x (the factor e^{beta (x - lo)} on the sums' errors): at the quantile it is far below errCdf
    errAt: (x: number) => (seen.get(x) ?? dampedAt(s, x, false, false)).errF + 4 * Number.EPSILON,
    lo: lo - 1e-9 * Math.max(R - lo, 1e-300),
    hi: R,
    terms: s.K,
  };
  const notes = [...s.notes];
  const sorted = [...atoms].sort((u, v) => u.x - v.x);
  const { x, err } = solveLevels(ev, sorted, p, model.support, spread, notes);
  let es: Float64Array | undefined;
  let esErr: Float64Array | undefined;
  if (o.expectedShortfall) {
    es = new Float64Array(p.length).fill(NaN);
    esErr = new Float64Array(p.length).fill(Infinity);
    if (!(model.momentIndex > 1) || mean === null || !Number.isFinite(mean)) {
      notes.push("expected shortfall does not exist (the mean is infinite)");
    } else {
      for (let i = 0; i < p.length; i++) {
        const q = x[i];
        if (!Number.isFinite(q)) continue;
        if (p[i] >= 1) {
          es[i] = q;
          esErr[i] = err[i];
          continue;
        }
        const ex = dampedExcess(s, atoms, mean, q);
        es[i] = q + ex.value / (1 - p[i]);
        // ES(q) - ES(q*) = int_{q*}^q (F - p) / (1 - p), F monotone with F(q*) = p: at most |q - q*| |F(q) - p| / (1 - p), and
        // |F(q) - p| is within the residual at q plus the cdf's own bound there (not the range's largest)
        const at = ev.eval(q);
        const off = Math.min(Math.abs(at.F - p[i]), Math.abs(at.S - (1 - p[i]))) + ev.errAt!(q);
        esErr[i] = (ex.error + off * err[i]) / (1 - p[i]) + 4 * Number.EPSILON * Math.abs(es[i]);
      }
      notes.push("expected shortfall from E X - q + int_lo^q F, the integral by the damped transform psi / (beta - i t)^2");
    }
  }
  return {
    p,
    x,
    expectedShortfall: es,
    diagnostics: {
      method: "gil-pelaez-damped",
      terms: s.K,
      range: { from: lo, to: lo + s.T },
      cdfError: ev.errCdf,
      quantileError: err,
      expectedShortfallError: esErr,
      notes,
    },
  };
}

/** E[(X - q)^+] = E X - q + int_lo^q F (atoms exactly, the continuous part's integral from the damped sums) and its bound */
export function dampedExcess(s: DampedSolution, atoms: Atom[], mean: number, q: number): { value: number; error: number } {
  // int_lo^q F_c is 0 exactly at or below lo (a level inside the atom at lo): no sums needed
  const v = q <= s.lo ? { Ic: 0, errI: 0 } : dampedAt(s, q, false, true);
  let atomInt = 0;
  for (const a of atoms) if (a.x <= q) atomInt += a.p * (q - a.x);
  const value = Math.max(mean - q + atomInt + v.Ic, 0);
  return { value, error: v.errI + 8 * Number.EPSILON * (Math.abs(mean) + Math.abs(q) + atomInt + v.Ic) };
}

/**
 * y = x - lo of a point left of every level's quantile, by 24 bisection steps on a loose solution: F(x) + its bound < p_min
 * there (p_min the lowest level above the mass at lo plus tol; lower ones are the atom's or within tol of it), so F < p_min;
 * undefined where no such point is found right of lo
 */
function lowestLevelBelow(s: DampedSolution, atoms: Atom[], p: Float64Array, lo: number, R: number, tol: number): number | undefined {
  const at0 = atoms.reduce((m, a) => m + (a.x <= lo ? a.p : 0), 0);
  let pMin = Infinity;
  for (let i = 0; i < p.length; i++) if (p[i] > at0 + tol && p[i] < 1) pMin = Math.min(pMin, p[i]);
  if (!Number.isFinite(pMin)) return undefined;
  const left = (x: number) => {
    const v = dampedAt(s, x, false, false);
    return atomMass(atoms, x).below + v.Fc + v.errF < pMin;
  };
  let a = lo;
  let b = R;
  for (let j = 0; j < 24; j++) {
    const mid = 0.5 * (a + b);
    if (left(mid)) a = mid;
    else b = mid;
  }
  return a > lo && left(a) ? a - lo : undefined;
}
