// The damped inversion's plan (beta, period, cut-off) and the sums' rounding allowances; psi_c itself in ./damped-psi.ts.
import type { Atom, CompiledModel } from "../types";
import { kernelsMass } from "../damped-kernels";
import { cutoffFor, truncationAt, type Envelope } from "./nodes";
import { noiseOf, probe, probed, probedNear, slopeValues, type Probed } from "./damped-psi";
import { densityBeyondWindow, imageLimit, imageMoments, imageTail } from "./damped-images";
import { sumSlopeEnvelopes } from "./damped-sum-slope";
import { slopeCutoff, slopeCutoffRange, slopeEnvelope, slopeTruncationAt, slopeTruncationRange, type SlopeEnvelope } from "./damped-slope";

export { noiseOf, psiOf } from "./damped-psi";
import { GRID_REL } from "./fft";

const EPS = Number.EPSILON;

/**
 * Relative rounding of one frequency term and its share of the accumulation in the pointwise sums (damped-eval.ts
 * dampedAt), per unit of |coefficient|: the phase e^{-i t_k y} from an exact argument (t_k exact, t_k y split by
 * Dekker's product) to within 4 eps, the block table e^{-i j h y} to 4 eps, their product 2 eps, the term's products
 * 2 eps (16 eps in all, with margin); sums of 8 terms, 8 of those per block and the blocks compensated (Neumaier):
 * gamma_7 + gamma_7 + 2 eps < 9 eps (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., eq. 4.4 and
 * sec. 4.3). 32 eps leaves the rest as margin.
 */
export const SUM_REL = 32 * EPS;

/**
 * The frequency step rounded down to 29 significant bits: then t_k = (k + 1/2) h is exact for every k < 2^22, so the
 * transform and the phases of the pointwise sums see the same nodes, with no rounding in between.
 */
export function exactStep(h: number): number {
  const q = Math.pow(2, Math.floor(Math.log2(h)) - 28);
  return Math.floor(h / q) * q;
}

/**
 * Relative allowance per unit of sum(|c_k|) for rounding in the sums and in the CF values: the derived SUM_REL when
 * the sums are taken point by point with exact nodes (dampedAt), otherwise the FFT routes' allowance; the CF's
 * relative error twice, except where psi is formed from the severity's transform (severityPsi), whose per-node noise
 * already carries the propagated CF error.
 */
export function sumAllowance(model: CompiledModel, K: number, pointwise: Exactness, perNodeRel = false): number {
  // perNodeRel: psiOf's noise (not a plan's probe) carries the relative error per node, on |e^L| (per frequency where the
  // model bounds it so, else the constant one)
  const sevPsi = model.dampedSeverity?.count && model.support[0] === 0;
  const cf = sevPsi || perNodeRel ? 0 : 2 * (model.cfRelError ?? 0);
  if (!pointwise) return GRID_REL + cf;
  return (pointwise === "interpolated" ? FFT_REL : SUM_REL) + cf;
}

/**
 * How the sums of a solution are evaluated: false (FFT on a grid the request fixes: nodes rounded, the allowance
 * GRID_REL plus the grid's own part, see dampedGrid), true (exact nodes, pointwise sums only: SUM_REL), "interpolated" (exact nodes, the sums by one
 * FFT on the solution's own grid, see damped-points.ts, or pointwise: FFT_REL)
 */
export type Exactness = boolean | "interpolated";

/**
 * Rounding of an FFT of the sums per unit of sum |c_k| on the solution's own grid (no pre-rotation, exact nodes): each
 * radix-2 level of the transform adds at most about 4.5 unit roundoffs of the inputs' absolute sum (a twiddle multiply
 * and an add; the partial transforms at one level partition the inputs, so their errors add to at most that per
 * level: Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 24.1, componentwise), taken as 8 eps a
 * level for N up to 2^22, plus 16 eps for the post-rotation and the output products. The wrapped bins' accumulation
 * (K/N terms a bin) is added where N is known (damped-points.ts).
 */
export const FFT_REL = (8 * 22 + 16) * EPS;

/** Plan for the range [lo, R]: beta (R - lo) = U, e^{-beta T} <= tol / (8 M_c), and the envelope of |psi_c|. */
export interface DampedPlan {
  beta: number;
  T: number;
  U: number;
  env: Envelope;
  tmax: number;
  noise: number;
  /** the two-claim term is taken out of psi too (see SeverityKernel.pair) */
  pairOut: boolean;
  /** the sums' estimated rounding (CF noise included) over its share of tol (1/4; 1/3 "range"): above 1 the plan cannot reach the tolerance */
  rounding: number;
  /**
   * an envelope of |c'| (./damped-slope.ts) where the cut-off was chosen by the summation-by-parts bound at the range's
   * end (pointwise cdf sums only: the bound then holds per point, away from the period's ends), else null
   */
  slope: SlopeEnvelope | null;
  /** the density's counterpart (an envelope of |psi_c'|), where the range's density is bounded by parts too; else null */
  slopePdf: SlopeEnvelope | null;
}

/**
 * How the truncated sums may be bounded by summation by parts (./damped-slope.ts): false (not: the envelope's uniform
 * tail), true (the cdf alone at the exact nodes, point by point, the cut-off from the bound at the range's end: the
 * quantile search, which bounds the rest of the range itself), "range" (every point of the range carries its own bound,
 * grids and arbitrary points, cdf and density: the cut-off from the bound's supremum over the range after undamping)
 */
export type ByParts = boolean | "range";

/**
 * The quantile search's cut-off (ByParts true) reaches the target at the range's end; with the sampled |phi'| that can be
 * a cut-off where the bound nearer lo (the uniform tail, times e^{beta y}) is far larger, and the search's bracket takes the
 * range's largest bound (Poisson(1)-lognormal(0, 2.5) at 0.9999: 1.8e6 terms but a quantile bound of 24, against 3.9e6 and
 * 1.2e-3 from the closed-form slope). So the range's supremum is also kept within END_SLACK times the target: measured
 * there 100 / 1 000 / 3 000: 4.2e6 / 2.5e6 / 2.0e6 terms, bounds 1.7e-3 / 1.6e-3 / 1.3e-3, the range's bound 1.2e-9 /
 * 8.1e-9 / 3.0e-8; 1 000 keeps it below 1e-8 at the default cdf target 1e-10
 */
const END_SLACK = 1000;
/**
 * The same search's bound at the lowest level (a level near lo, where the truncation by parts is largest, takes the range's
 * bound there): within LOW_SLACK times the target. Measured on compound.json and compound-wide.json's levels 0.001 ..
 * 0.9999 at once: without it Poisson(10)-lognormal(0, 2) at 0.001 was 5.8e-7 relative off; 1 / 10 / 30 put Poisson(1)-
 * lognormal(0, 2.5) past the damped route's budget, 100: 2.8e5 and 3.2e6 terms, worst 3.6e-8 and 1.6e-9 relative off
 */
const LOW_SLACK = 100;

/**
 * cost of the two-claim term at one point, in units of one frequency term (its panels against the transform's work): 60
 * scaled by its nodes a point since the wider ellipses (87 -> 67, ../lognormal-pair.ts MAX_IM), and again since its panel
 * target follows P(N = 2) and panels below it are left out (67 -> 42-50 at 1e-9). Poisson(0.1)-lognormal(0, 1.5) at
 * 1 000 points then takes it (2 924 terms and an FFT of 2^14 against 49 080 and 2^18): least CPU of 12 runs on the
 * loaded machine 14.8 / 18.3 ms against 19.7 / 20.0
 */
const PAIR_COST = 30;
/**
 * cost of one probe of the transform (433 frequencies, the derived bounds and slopes) in units of one frequency term: a
 * damping already probed is preferred to one whose estimated terms are fewer by less. Measured on the seed 1 8-part compound
 * mixture (7 quantiles with ES, warm): 36 probes took 81-98 ms of 214-229 ms, the 43 650 terms the rest (about 3 us a
 * term against 2.5 ms a probe, some 800 terms); its 1000-point density 17 probes about 35 ms, 49 052 terms about 25 ms
 */
const PROBE_COST = 800;
/**
 * a solution evaluated at no more than FEW_POINTS points one by one (a loose probe of the range), or on an FFT grid (the
 * density's), pays for its terms about one transform value each, as a probe does for its 433 frequencies and their bounds:
 * there a probe costs PROBE_COST terms whatever the plan's size (the cap at an eighth of its terms is for the searches' sums)
 */
const FEW_POINTS = 16;
/**
 * A plan whose envelope is derived through the operators is kept while its terms are at most OPERATOR_COST times the
 * sampled plan's plus OPERATOR_SLACK (measured on the seeded random sums: within that, 9 of 10 sums of compounds and
 * gamma terms keep the derived bound at no more than twice the time; past it a few took 10-30 times the terms)
 */
const OPERATOR_COST = 3;
const OPERATOR_SLACK = 2048;

/**
 * U trades the period (T = span A / U) against the frequency cut-off (the sums' target is tol / (8 e^U)) and the
 * rounding that e^U amplifies: the U in [2, 8] with the fewest terms whose rounding estimate stays below tol / 4.
 * With a two-claim term available, both plans are made and the cheaper for `points` evaluation points is kept.
 * `periodOf` maps the period a plan needs to the one it will get (an FFT grid's N dx, N a power of 2), so the terms
 * are counted over the period actually used. `pdfReach`: the density is answered at the tolerance (density(), not a
 * quantile's bracket), so a cut-off whose density truncation cannot reach its target counts against the plan.
 * `byParts`: the truncated sums may be bounded by parts (see ByParts). `yLow` (ByParts true): a lower bound on y = x - lo of
 * every level the quantile search will solve, where its bound must reach the target as at the range's end; ("range"): the
 * smallest y of the points answered, from which on the truncation's supremum is taken. `withInt`: the
 * integrated cdf's bound matters (expected shortfall); without it and without a second moment the period is set by the
 * cdf's images after their closed-form shift (imageLimit, imageTail) instead of their whole mass.
 */
export function dampedPlan(
  model: CompiledModel,
  atoms: Atom[],
  R: number,
  tol: number,
  wantPdf: boolean,
  points = 256,
  pointwise: Exactness = false,
  budget = Infinity,
  periodOf: (T: number) => number = (T) => T,
  pdfReach = wantPdf,
  byParts: ByParts = false,
  yLow?: number,
  withInt = true,
): DampedPlan {
  // the envelope from the severity's derived bounds where it has them; where that plan needs more terms than the budget, or
  // its cut-off cannot reach the truncation target, the samples' envelope instead (its bound then an estimate between the
  // samples, and the answer says so)
  const args = [model, atoms, R, tol, wantPdf] as const;
  const rest = [pointwise, budget, periodOf, pdfReach, byParts, yLow, withInt, points] as const;
  const plan = (pairOut: boolean) => {
    const p = planFor(...args, pairOut, ...rest, true);
    if (!p.plan.env.derived) return p;
    // bounds through the operators (a sum of compounds and gamma terms) see the kernels cancel only the gamma terms' powers
    // (../damped-kernel-rest.ts), not a compound's claims or the samples' faster local decay: where their plan needs more
    // than OPERATOR_COST times the samples' terms, the samples' plan is kept
    const through = (p.plan.env as Probed).throughOperators === true;
    const fits = p.K <= budget;
    if (fits && !through && p.reach <= 1) return p;
    const q = planFor(...args, pairOut, ...rest, false);
    if (!fits) return q.K <= budget ? q : p;
    const cheap = (d: Planned) => !through || d.K <= OPERATOR_COST * q.K + OPERATOR_SLACK;
    // a plan that reaches the truncation target first: the derived one where it does (within the cost rule, or where the
    // samples' does not either); where it does not, the derived envelope once more with every damping's cut-off judged on
    // its own probe (the choice above judges them all on one probe, at U = 4; more terms or another damping), then the
    // samples' where that reaches; where none does, the plan that misses by the least (seed 6 model 3 of the bench's random
    // set: a derived density plan of 135 terms missing by 5e10 was kept, a pdf bound of 0.68). The rounding estimate plays
    // no part here: the sums are the same kind in both plans, and the derived envelope's looser integral only overstates it
    // (seed 3 model 32: 3.8 against 0.86, where the derived answer's bounds were the smaller). A plan through the operators
    // past the cost rule is not kept even where the samples' misses its target: gamma(2.345, 1.664) + Poisson(2) x
    // pareto(3.268, 1.598), 1000-point density: 1.41M derived terms (1 s) against 40.9k (0.1 s, pdf bound 4.6e-10
    // estimated between the samples, which its note says)
    if (p.reach <= 1) return cheap(p) || (q.reach > 1 && !through) ? p : q;
    const s = planFor(...args, pairOut, ...rest, true, true);
    const sFits = s.K <= budget;
    if (sFits && s.reach <= 1) return cheap(s) || (q.reach > 1 && !through) ? s : q;
    if (q.reach <= 1) return q;
    const d = sFits && s.reach < p.reach ? s : p;
    return cheap(d) && d.reach <= q.reach ? d : q;
  };
  const plain = plan(false);
  // the second plan only where it can pay: the plain plan's terms exceed what the term costs at the points
  const can = model.dampedSeverity?.count && model.dampedSeverity.pair && model.support[0] === 0 && plain.K > PAIR_COST * points;
  const pair = can ? plan(true) : null;
  if (!pair) return plain.plan;
  // here too a plan that reaches the truncation target before one that does not, then the cost at the points
  if (pair.reach <= 1 !== plain.reach <= 1) return pair.reach <= 1 ? pair.plan : plain.plan;
  return pair.K + PAIR_COST * points < plain.K ? pair.plan : plain.plan;
}

/** a plan, its terms over the period used, and its truncation over the target at the plan's own damping (above 1: missed) */
interface Planned {
  plan: DampedPlan;
  K: number;
  reach: number;
}

function planFor(
  model: CompiledModel,
  atoms: Atom[],
  R: number,
  tol: number,
  wantPdf: boolean,
  pairOut: boolean,
  pointwise: Exactness,
  budget: number,
  periodOf: (T: number) => number,
  pdfReach: boolean,
  byParts: ByParts,
  yLow: number | undefined,
  withInt: boolean,
  points: number,
  derived: boolean,
  ownProbes = false,
): Planned {
  const lo = model.support[0];
  const span = Math.max(R - lo, 1e-6 * Math.max(model.scale, Math.abs(lo), 1e-300));
  // the inverted function is the continuous part less the kernels: its size bounds the images
  const w2 = pairOut ? (model.dampedSeverity?.pair?.w ?? 0) : 0;
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 1e-300) + kernelsMass(model.dampedKernels ?? []) + (model.dampedSeverity?.w ?? 0) + w2;
  const A = Math.max(Math.log((8 * Mc) / tol), 2);
  const noise = noiseOf(model, atoms);
  // with the cdf's images taken out (imageMoments) the aliasing is q second / T^2 instead of q Mc: beta T need only be
  // log(8 second / (T^2 tol)), solved by a few fixed-point steps (the period shrinks, which raises the need again)
  const im = imageMoments(model, atoms, pairOut);
  // "range": every point takes its own image bound q / (1 - q) B(y + T) <= q / (1 - q) B(T) (./damped-images.ts imageTail:
  // Markov's inequality at its best order and the closed forms' tails, far below second / T^2 for a tail like the
  // lognormal's), so the need is B(T); and the density's images, at most q / (1 - q) times densityBeyondWindow, where it is answered
  const sev = model.dampedSeverity ?? null;
  const pairK = pairOut ? (sev?.pair ?? null) : null;
  // without a second moment (a power tail of index <= 2: Poisson(2)-pareto(1.5)) the cdf's images still come out in closed
  // form (imageLimit, as the setup does) and B(T) bounds what is left, so the period need not carry q Mc (beta T 28 -> 19
  // there); not where the integrated cdf's bound matters: its images keep the whole mass without a second moment
  const lim = im || withInt ? null : imageLimit(model, atoms, pairOut);
  const tailOnly = lim !== null && Number.isFinite(lim) && imageTail(model, atoms, lo, model.dampedKernels ?? [], sev, pairK, span) !== null;
  const need = (T: number) => {
    if (!im) {
      let c = imageTail(model, atoms, lo, model.dampedKernels ?? [], sev, pairK, T)!(T);
      if (byParts === "range" && (wantPdf || pdfReach)) c = Math.max(c, densityBeyondWindow(model, atoms, T, pairK));
      return c + 4 * EPS * Math.abs(lim!);
    }
    let c = im.second / (T * T);
    if (byParts === "range") {
      const B = imageTail(model, atoms, lo, model.dampedKernels ?? [], sev, pairK, T);
      if (B) c = Math.min(c, B(T));
      if (wantPdf || pdfReach) c = Math.max(c, densityBeyondWindow(model, atoms, T, pairK));
    }
    return c + 4 * EPS * Math.abs(im.A);
  };
  const periodFor = (U: number) => {
    let a = A;
    let T = Math.max((span * a) / U, span * 1.25);
    if (!im && !tailOnly) return T;
    for (let it = 0; it < 4; it++) {
      a = Math.min(A, Math.max(2, Math.log((8 * need(T)) / tol)));
      T = Math.max((span * a) / U, span * 1.25);
    }
    return T;
  };
  // the envelope every damping is judged on: a probe already made within a factor 2 of beta = 4 / span where the model has
  // one (a loose range probe's, ./damped-reach.ts), else the probe at 4 / span; that damping is then a candidate too, at no
  // probe's cost (the chosen damping's own probe bounds the plan in either case). Seed 1's 8-part compound mixture, 7
  // quantiles with ES: 22 -> 16 probes
  const near = ownProbes ? null : probedNear(model, atoms, 4 / span, pairOut, derived);
  const beta0 = near ? near.beta : 4 / span;
  const env0 = near ? near.env : probe(model, atoms, beta0, pairOut, derived);
  // the cdf alone, summed point by point: the cut-off may come from the summation-by-parts bound at y = span
  const bySlope = byParts === true && pointwise === true && !wantPdf && !pdfReach;
  const byRange = byParts === "range";
  // "range": every point answered lies at or past yLow from lo, so the truncation's supremum is taken over [yLow, span]
  const yMin = byRange && yLow !== undefined && yLow > 0 ? Math.min(yLow, span) : 0;
  const lowOk = bySlope && yLow !== undefined && yLow > 0 && yLow < span;
  const slopes = (beta: number, env: Probed) => {
    if (!(bySlope || byRange)) return { c: null, p: null };
    // the sampled |phi'| only from the first probe where the uniform cdf tail is within reach: below it no cut-off can meet the
    // target ("range": the bound's supremum is at least the uniform tail; the quantile search's keeps it within END_SLACK
    // times e^U target), and the closed-form slope bound serves there (the low frequencies' quadratures cost the most)
    const reachable = tol * (byRange ? 1 : END_SLACK);
    let from = 0;
    while (from < env.t.length && env.tailCdf[from] > reachable) from++;
    const dp = slopeValues(model, beta, env, Math.max(from - 8, 0));
    const c = slopeEnvelope(model, atoms, beta, pairOut, env, env.noise, env.phi, "cdf", dp);
    const p = byRange && c && (wantPdf || pdfReach) ? slopeEnvelope(model, atoms, beta, pairOut, env, env.noise, env.phi, "pdf", dp) : null;
    // a sum bounded through the operators: the product rule's slope bounds instead (./damped-sum-slope.ts; seed 1 model 8
    // of the bench's random set, a 1000-point density grid: 278 691 -> 156 955 terms, the bound derived as before)
    if (!c && byRange) {
      const sum = sumSlopeEnvelopes(model, atoms, beta, env, wantPdf || pdfReach);
      if (sum) return sum;
    }
    return { c, p };
  };
  // the cut-off and the truncation it leaves (over the target: above 1 the target is not reached), for the cdf and, where
  // asked, the density; "range": the supremum after undamping over [0, span] against e^U target, the period as used
  const cutoffOf = (env: Envelope, sl: { c: Envelope | null; p: Envelope | null }, beta: number, U: number, T: number, target: number) => {
    const Tp = periodOf(T);
    const amp = target * Math.exp(U);
    const pdfToo = wantPdf || pdfReach;
    let tmax: number;
    if (byRange && sl.c && (!pdfToo || sl.p)) {
      const tc = slopeCutoffRange(env, "cdf", sl.c, Tp, beta, span, amp, yMin) ?? cutoffFor(env, Infinity, target);
      const tp = pdfToo ? (slopeCutoffRange(env, "pdf", sl.p!, Tp, beta, span, amp, yMin) ?? cutoffFor(env, target, Infinity)) : 0;
      // the setup's last node is within h / 2 below the cut-off asked (K = ceil(tmax / h), bounded from (K - 1/2) h)
      tmax = Math.max(tc, tp) + (2 * Math.PI) / Tp;
    } else {
      tmax = (sl.c && bySlope ? slopeCutoff(env, sl.c, T, span, target) : undefined) ?? cutoffFor(env, wantPdf ? target : Infinity, target);
      // and the bound over the whole range within END_SLACK of the target (see there)
      if (sl.c && bySlope) tmax = Math.max(tmax, slopeCutoffRange(env, "cdf", sl.c, T, beta, span, END_SLACK * amp) ?? cutoffFor(env, Infinity, target));
      // and at yLow, the lowest level's lower bound, within LOW_SLACK times the target after undamping: the bound, log-convex
      // in y on (0, T), is then within that over [yLow, span], where every level asked lies
      if (sl.c && bySlope && lowOk) tmax = Math.max(tmax, slopeCutoff(env, sl.c, T, yLow!, LOW_SLACK * amp * Math.exp(-beta * yLow!)) ?? cutoffFor(env, Infinity, target));
    }
    if (!Number.isFinite(tmax)) tmax = env.t[env.t.length - 1];
    const tr = truncationAt(env, tmax);
    let rc = tr.cdf / target;
    let rp = tr.pdf / target;
    if (byRange && sl.c) rc = Math.min(rc, slopeTruncationRange(env, "cdf", sl.c, tmax, Tp, beta, span, yMin) / amp);
    else if (sl.c && bySlope) {
      rc = slopeTruncationAt(env, sl.c, tmax, T, span) / target;
      if (lowOk) rc = Math.max(rc, (slopeTruncationAt(env, sl.c, tmax, T, yLow!) * Math.exp(beta * yLow!)) / (LOW_SLACK * amp));
    }
    if (byRange && sl.p) rp = Math.min(rp, slopeTruncationRange(env, "pdf", sl.p, tmax, Tp, beta, span, yMin) / amp);
    return { tmax, reach: Math.max(rc, pdfReach ? rp : 0) };
  };
  // the rounding's share of the tolerance: tol / 4, or tol / 3 for "range" plans, whose truncation takes tol / 8 at most
  // over the range (the images tol / 8, the points route's interpolation tol / 16): a larger damping, fewer terms (Poisson(10)-
  // lognormal(0, 1.5) at 1 000 points: U 6 -> 6.5, 40 811 -> 38 206 terms, under the interpolation's FFT of 2^17)
  const roundShare = byRange ? 1 / 3 : 1 / 4;
  let best = { U: 4, beta: 4 / span, K: Infinity, bad: Infinity, cost: Infinity };
  // the slope envelopes made in the choice, by envelope: the chosen damping's are the same values (slopes is pure in them)
  const made = new Map<Envelope, ReturnType<typeof slopes>>();
  const slopesOf = (beta: number, env: Probed) => {
    let s = made.get(env);
    if (!s) made.set(env, (s = slopes(beta, env)));
    return s;
  };
  const sl0 = slopesOf(beta0, env0);
  const candidates: { U: number; beta: number }[] = [];
  for (let U = 2; U <= 8; U += 0.5) candidates.push({ U, beta: U / span });
  if (beta0 !== 4 / span) candidates.push({ U: beta0 * span, beta: beta0 });
  for (const { U, beta } of candidates) {
    const T = periodFor(U);
    const target = tol / (8 * Math.exp(U));
    // ownProbes: each damping's envelope probed at its own beta (a probe each, memoised per model), not all at U = 4
    const e = ownProbes ? probe(model, atoms, beta, pairOut, derived) : env0;
    const { tmax, reach } = cutoffOf(e, ownProbes ? slopesOf(beta, e) : sl0, beta, U, T, target);
    const K = Math.max(16, (tmax * periodOf(T)) / (2 * Math.PI));
    // scale of the cdf sum: (1/pi) int |psi_c| / |beta - i t| up to tmax
    // and of the CF values' own noise, the same integral of the per-node noise (the probe's, largest first)
    // ("range" with the density: its sum's scale (1/pi) int |psi_c| too, which the cut-off by parts no longer keeps small)
    const pdfRound = byRange && (wantPdf || pdfReach);
    let S = (Mc * e.t[0]) / (Math.PI * beta);
    let Z = (e.noise[0] * e.t[0]) / (Math.PI * beta);
    let Sp = (Mc * e.t[0]) / Math.PI;
    let Zp = (e.noise[0] * e.t[0]) / Math.PI;
    for (let i = 0; i + 1 < e.t.length && e.t[i] < tmax; i++) {
      const dt = e.t[i + 1] - e.t[i];
      const w = dt / (Math.PI * Math.max(e.t[i], beta));
      S += e.env[i] * w;
      Z += e.noise[i] * w;
      Sp += (e.env[i] * dt) / Math.PI;
      Zp += (e.noise[i] * dt) / Math.PI;
    }
    const allow = sumAllowance(model, K, pointwise);
    // the noise on every route (the setup charges it to the FFT grids' sums as to the pointwise ones): left out on the grids,
    // a composite FFT period let Poisson(2)-lognormal(0, 1)'s plan take U 5.5 for a density bound of 1.8e-10 over 1e-10 asked
    const round = Math.exp(U) * Math.max(allow * S + Z, pdfRound ? allow * Sp + Zp : 0);
    // a cut-off that cannot reach the truncation target (cutoffFor then returns its best) counts against the plan too
    const bad = Math.max(round / (tol * roundShare), reach);
    // within the budget of terms first (a plan past it is refused by the setup): there the fewest terms whose rounding
    // is below tol / 4, else the smallest rounding (the bounds then state what is reached)
    // (a damping whose envelope is not probed yet pays PROBE_COST terms for the probe the plan then makes, at most an eighth
    // of its own: a small plan's sums, taken at every point the search evaluates, outweigh one probe)
    const fits = K <= budget;
    const bestFits = best.K <= budget;
    const cost = K + (probed(model, atoms, beta, pairOut, derived) ? 0 : pointwise === false || points <= FEW_POINTS ? PROBE_COST : Math.min(PROBE_COST, K / 8));
    if (fits !== bestFits) {
      if (fits) best = { U, beta, K, bad, cost };
    } else if ((bad <= 1 && (best.bad > 1 || cost < best.cost)) || (bad > 1 && best.bad > 1 && bad < best.bad)) best = { U, beta, K, bad, cost };
  }
  const U = best.U;
  const beta = best.beta;
  const env = probe(model, atoms, beta, pairOut, derived);
  const sl = slopesOf(beta, env);
  const target = tol / (8 * Math.exp(U));
  const T = periodFor(U);
  const { tmax, reach } = cutoffOf(env, sl, beta, U, T, target);
  const slope = sl.c;
  const slopePdf = sl.p;
  return { plan: { beta, T, U, env, tmax, noise, pairOut, rounding: best.bad, slope, slopePdf }, K: (tmax * periodOf(T)) / (2 * Math.PI), reach };
}
