import type { Atom, CompiledModel } from "../types";
import { DAMPED_BUDGET, KERNEL_BUDGET, dampedAt, dampedGrid, dampedPlan, dampedSetup, gridPeriod } from "./damped";
import { atomMass, type Request } from "./shared";
import { dampedPoints, pointsPlan } from "./damped-points";
import { truncationSup } from "./damped-slope";
import { aliasCdfAt } from "./damped-eval";
import { markovTail, momentBounds } from "./moment-tails";
import type { DensityResult, PointErrors } from "./types";

/**
 * density() for aggregate laws bounded below (compounds and their sums, scales, shifts and mixtures): the damped
 * inversion of ./damped on an FFT grid or point by point, atoms exact, every value with its own bound.
 */
export function dampedDensity(
  model: CompiledModel,
  atoms: Atom[],
  req: Request,
  tol: number,
  wantPdf: boolean,
  useFft: boolean,
): DensityResult | null {
  const lo = model.support[0];
  // (plain loops: Float64Array.from and map with a callback take V8's generic path, a few ms over a mixture's grids)
  let xs: Float64Array;
  if (req.kind === "points") xs = req.x;
  else {
    xs = new Float64Array(req.count);
    for (let i = 0; i < req.count; i++) xs[i] = req.from + i * req.dx;
  }
  const n = xs.length;
  let R = lo;
  for (let i = 0; i < n; i++) if (xs[i] > R) R = xs[i];
  // the nearest point to lo at or past it: the truncation's supremum is taken from there (the sums' bound by parts grows
  // towards lo, where the sine is small), each point keeping its own bound
  let yLow = Infinity;
  for (let i = 0; i < n; i++) if (xs[i] >= lo && xs[i] - lo < yLow) yLow = xs[i] - lo;
  if (!(yLow < Infinity)) yLow = 0;
  if (R <= lo) R = lo + Math.max(model.scale, 1e-300);
  const cdf = new Float64Array(n);
  const sf = new Float64Array(n);
  const pdf = wantPdf ? new Float64Array(n) : undefined;
  let errF = 0;
  let errf = 0;
  // every value's own bound (the sums' error grows with e^{beta (x - lo)}, the images' shrink away from lo): the answer's
  // bound is their largest
  const ptF = new Float64Array(n);
  const ptf = new Float64Array(n);
  let method: "fft-damped" | "gil-pelaez-damped";
  let gridSize: number;
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  const put = (i: number, Fc: number, fc: number, eF: number, ef: number) => {
    ptF[i] = eF;
    ptf[i] = ef;
    errF = Math.max(errF, eF);
    errf = Math.max(errf, ef);
    const m = atomMass(atoms, xs[i]);
    cdf[i] = Math.min(1, m.below + Fc);
    sf[i] = Math.max(0, m.above + (Mc - Fc));
    if (pdf) pdf[i] = fc;
  };
  // a one-claim term or kernels taken out: what is left decays fast, so a long range is worth its terms (as for quantiles)
  const budget = model.dampedKernels?.length || model.dampedSeverity ? KERNEL_BUDGET : DAMPED_BUDGET;
  let sol;
  const notes0: string[] = [];
  if (req.kind === "grid" && useFft) {
    // withInt false: the setup below forms no integrated cdf, so without a second moment the period is set by the cdf's
    // images after their closed-form shift (Poisson(2)-pareto(1.5): T 2 333 -> 1 607); the plan within the setup's budget, so
    // that a derived envelope needing more terms gives way to the samples' one (dampedPlan) instead of leaving the route
    const periodOf = (T: number) => gridPeriod(lo, req.from, req.dx, req.count, T).T;
    const plan = dampedPlan(model, atoms, R, tol, wantPdf, n, false, budget, periodOf, wantPdf, "range", yLow, false);
    const g = gridPeriod(lo, req.from, req.dx, req.count, plan.T);
    sol = dampedSetup(model, atoms, R, { tolerance: tol, wantPdf, period: g.T, budget, plan, wantInt: false, transient: true });
    if (!sol) return null;
    const r = dampedGrid(sol, req.from, req.dx, req.count, g.N, wantPdf);
    for (let i = 0; i < n; i++) {
      put(i, r.Fc[i], r.fc[i], r.errF[i], r.errf[i]);
    }
    method = "fft-damped";
    gridSize = g.N;
  } else {
    sol = dampedSetup(model, atoms, R, { tolerance: tol, wantPdf, budget, points: n, pointwise: n < 32 ? true : "interpolated", wantInt: false, transient: true, byParts: "range", yLow });
    if (!sol) return null;
    // many points: the sums once on a fine FFT grid and interpolated, the interpolation error inside tol / 16
    const pp = n >= 32 ? pointsPlan(sol, n, tol / (16 * Math.exp(sol.beta * (R - lo))), wantPdf) : null;
    if (pp) {
      const r = dampedPoints(sol, xs, wantPdf, pp);
      for (let i = 0; i < n; i++) {
        put(i, r.Fc[i], r.fc[i], r.errF[i], r.errf[i]);
      }
      notes0.push(`the sums evaluated on an FFT grid of ${pp.N} points and interpolated at each point (${pp.M}-point Lagrange stencil, its remainder bounded from the sums' coefficients)`);
    } else {
      for (let i = 0; i < n; i++) {
        const v = dampedAt(sol, xs[i], wantPdf, false);
        put(i, v.Fc, v.fc, v.errF, v.errf);
      }
    }
    method = "gil-pelaez-damped";
    gridSize = pp ? pp.N : sol.K;
  }
  const amp = Math.exp(sol.beta * (R - lo));
  // the truncation's largest share over the range (by parts where the solution has tau: then not at R alone)
  const trunc = truncationSup(sol.truncCdf, sol.truncTau, sol.h, sol.beta, R - lo, yLow);
  // the images' bound per point is largest at lo (aliasCdfAt is non-increasing), and never above a point's whole bound
  const alias = Math.min(aliasCdfAt(sol, 0), errF);
  // the cdf's and the sf's error are the continuous part's (the atoms are exact); clamping only moves toward the truth
  const pointError: PointErrors = { pdf: new Float64Array(n), cdf: new Float64Array(n), sf: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    pointError.pdf[i] = wantPdf ? ptf[i] + 4 * Number.EPSILON : NaN;
    pointError.cdf[i] = ptF[i] + 4 * Number.EPSILON;
    pointError.sf[i] = ptF[i] + 4 * Number.EPSILON;
  }
  // the mass past the window [lo, lo + T): at most the images' uniform bound, or Markov's inequality at its best order on
  // the law's moments (./moment-tails.ts) where that is smaller (a fast-decaying remainder lets the plan take a short period,
  // for which the uniform bound q / (1 - q) E[Y^2] / T^2 is loose: Poisson(2)-exponential(1), T = 82, 2.8e-9)
  const mb = momentBounds(model, lo, sol.T);
  const beyond = Math.min(sol.aliasCdf, mb ? markovTail(mb, sol.T, false) : Infinity);
  const notes = [...sol.notes, ...notes0];
  if (errF > tol || (wantPdf && errf > tol)) {
    notes.push(`tolerance ${tol} not reached: cdf bound ${errF.toExponential(2)}, density bound ${errf.toExponential(2)} (truncation and rounding grow by e^{beta (x - lo)} after undamping)`);
  }
  if (atoms.length) notes.push(`atoms separated exactly: ${atoms.map((a) => `P(X = ${a.x}) = ${a.p}`).join(", ")}; pdf is the density of the rest`);
  return {
    x: req.kind === "points" ? xs.slice() : xs,
    pdf,
    cdf,
    sf,
    atoms,
    diagnostics: {
      method,
      gridSize,
      terms: sol.K,
      frequencyStep: sol.h,
      maxFrequency: sol.maxFrequency,
      range: { from: lo, to: lo + sol.T },
      capturedMass: 1 - beyond,
      error: {
        aliasing: alias,
        truncation: trunc,
        rounding: Math.max(errF - alias - trunc, 0) + 4 * Number.EPSILON,
        pdf: wantPdf ? errf + 4 * Number.EPSILON : NaN,
        cdf: errF + 4 * Number.EPSILON,
      },
      levels: 1,
      notes: [...notes, ...model.notes],
      pointError,
    },
  };
}
