/**
 * Severity CFs by quadrature: the shared driver from phi at |t| to the log-CF, and the trapezoidal rule on a shifted
 * contour with its step set from the strip of analyticity (Trefethen & Weideman 2014, SIAM Review 56, sec. 5).
 * The families' own batched and damped variants (lognormal, weibull, pareto in ./numeric) use the same rule.
 */
import { cabs, sortedAnchor, unwrapFrom } from "../complex";
import { checkDeadline } from "../deadline";
import { scratch } from "../damped-scratch";
import { quadratureNodes } from "./numeric-rule";
import { KahanComplex } from "./kahan";
import { recurrenceSums } from "./exp-sum-recurrence";
import { SHIFT_BLOCK, complexMoments, realMoments, shiftedMoments, shiftedMomentsComplexW } from "./exp-sum-moments";

/**
 * Shared driver: phi(t) for t > 0 from a per-t quadrature, phi(-t) = conj phi(t), phi(0) = 1; then log with the
 * imaginary part unwrapped along t (when t is sorted).
 */
export function fromPhi(t: Float64Array, re: Float64Array, im: Float64Array, phiPos: (x: number, out: Float64Array) => void) {
  const tmp = new Float64Array(2);
  for (let k = 0; k < t.length; k++) {
    if ((k & 15) === 0) checkDeadline("cf-quadrature");
    const x = t[k];
    if (x === 0) {
      re[k] = 0;
      im[k] = 0;
      continue;
    }
    phiPos(Math.abs(x), tmp);
    re[k] = Math.log(cabs(tmp[0], tmp[1]));
    im[k] = (x < 0 ? -1 : 1) * Math.atan2(tmp[1], tmp[0]);
  }
  const anchor = sortedAnchor(t);
  if (anchor >= 0) unwrapFrom(im, anchor);
}

/**
 * A positive law written as X = A e^s, s with an analytic log-density L(s). For t > 0,
 * phi(t) = int exp(L(s) + i t A e^s) ds; the path is moved to Im s = theta (Cauchy's theorem), where the oscillating
 * factor decays like exp(-t A e^v sin theta), and the trapezoidal rule on the shifted line converges geometrically
 * in the step (Trefethen & Weideman 2014, SIAM Review 56, sec. 5). Step h from a strip of half-width `strip`
 * about the path with |integrand| <= e^logM: error <= 2 e^logM / (e^{2 pi strip / h} - 1) <= 1e-17.
 */
export interface Contour {
  theta: number;
  strip: number;
  logM: number;
  /** log-density of s at (v + i theta) into out */
  L(v: number, out: Float64Array): void;
  /** path ends for a given a = t A: beyond them the integrand is below 1e-18 */
  range(a: number): [number, number];
  /** the parameter that sets the rule's length and the advice, for the refusal past MAX_QUADRATURE_NODES */
  what: string;
  advice: string;
}

export function contourPhi(c: Contour): (a: number, out: Float64Array) => void {
  const h = (2 * Math.PI * c.strip) / (40 + Math.max(0, c.logM));
  const sn = Math.sin(c.theta);
  const cs = Math.cos(c.theta);
  const l = new Float64Array(2);
  const acc = new KahanComplex();
  return (a, out) => {
    const [lo, hi] = c.range(a);
    acc.reset();
    const n = quadratureNodes(Math.ceil((hi - lo) / h), c.what, c.advice);
    // a long rule checks the deadline once per frequency (fromPhi checks every 16 frequencies)
    if (n > 4096) checkDeadline("cf-quadrature");
    for (let j = 0; j <= n; j++) {
      const v = lo + j * h;
      const ev = Math.exp(v);
      c.L(v, l);
      const mr = l[0] - a * ev * sn;
      if (mr < -800) continue;
      const mag = Math.exp(mr);
      const ph = l[1] + a * ev * cs;
      acc.addPolar(mag, ph);
    }
    out[0] = acc.re * h;
    out[1] = acc.im * h;
  };
}


/**
 * contourPhi's rule for many equispaced t > 0 at once (the inversion's nodes): on the fixed path Im s = theta term j is
 * c_j exp(t e_j i e^{i theta}) with c_j = h exp(L(v_j + i theta)) and e_j = scale e^{v_j}, so the terms are summed across
 * t by recurrence (expSumArithmetic) instead of a full rule per t. The path ends are those of the smallest t (beyond
 * them every larger t's integrand is smaller still), the step and its error are contourPhi's. Writes log phi(t) (the
 * imaginary part unwrapped) and returns the shortcuts' bound (see expSumArithmetic).
 */
export function contourLogCfArithmetic(c: Contour, scale: number, t: Float64Array, re: Float64Array, im: Float64Array): number {
  const h = (2 * Math.PI * c.strip) / (40 + Math.max(0, c.logM));
  const [lo, hi] = c.range(t[0] * scale);
  const n = Math.max(2, quadratureNodes(Math.ceil((hi - lo) / h) + 1, c.what, c.advice));
  const cRe = new Float64Array(n);
  const cIm = new Float64Array(n);
  const e = new Float64Array(n);
  const l = new Float64Array(2);
  for (let j = 0; j < n; j++) {
    const v = lo + j * h;
    e[j] = scale * Math.exp(v);
    c.L(v, l);
    if (l[0] < -800) continue;
    const mag = h * Math.exp(l[0]);
    cRe[j] = mag * Math.cos(l[1]);
    cIm[j] = mag * Math.sin(l[1]);
  }
  const K = t.length;
  const sr = new Float64Array(K);
  const si = new Float64Array(K);
  const bound = expSumArithmetic(cRe, cIm, e, -Math.sin(c.theta), Math.cos(c.theta), t, sr, si);
  for (let k = 0; k < K; k++) {
    re[k] = Math.log(cabs(sr[k], si[k]));
    im[k] = Math.atan2(si[k], sr[k]);
  }
  unwrapFrom(im, 0);
  return bound;
}

/** e / 25!: Taylor remainder of exp(z) after the z^24 term for |z| <= 1. */
const MOMENT_REMAINDER = Math.E / 1.5511210043330986e25;
/** terms below this magnitude (and decreasing from there on) are left out */
export const EXP_SUM_DROP = 1e-21;
const DROP = EXP_SUM_DROP;
/**
 * expSumArithmetic's bound per frequency for positive weights c_j and a real w < 0 (every term positive): each node's
 * share of the returned bound, |c_j| (e/25! + 80 eps), is taken at its expansion point (0 for the moments, t e_j |w| <= 1;
 * a block's first frequency for the shifted moments, within d e_j |w| SHIFT_BLOCK <= 1 of t_k) or is relative to the term
 * itself (the recurrence's drift), so it is at most e (e/25! + 80 eps) times the node's term at t_k; summed over the
 * nodes, |S_k - rule_k| <= EXP_SUM_REL rule_k + n EXP_SUM_DROP.
 */
export const EXP_SUM_REL = Math.E * (MOMENT_REMAINDER + 80 * Number.EPSILON);

/**
 * Quadrature sums S_k = sum_j c_j exp(t_k e_j w) at equispaced frequencies t_k (step d, see arithmeticNodes), for the rules
 * above, in which the frequency enters only through exp(t e_j w) (nodes 0 < e_0 <= e_1 <= ..., Re w < 0).
 * Nodes with t_max e_j |w| <= 1 are summed through their moments, exp(z) = sum_{m <= 24} z^m / m! + R with
 * |R| <= e / 25! for |z| <= 1 (Taylor, Lagrange remainder), and with a real w (or a complex one, given `complexShift`: the
 * caller's rounding bound then takes numeric-rule.ts complexShiftUnits) those with SHIFT_BLOCK d e_j |w| <= 1 the same
 * way about each block's first frequency (./exp-sum-moments.ts shiftedMoments, shiftedMomentsComplexW); the others by the recurrence
 * z_{k+1} = z_k exp(d e_j w) (one complex multiply, restarted directly every 16 steps: relative drift below
 * 16 (sqrt 5 + 2) eps), dropped once |c_j exp(t e_j w)| < 1e-21 (the magnitude only decreases after that).
 * Returns the bound on |S_k - rule| these shortcuts add: sum_j |c_j| (e/25! + 80 eps) + n 1e-21, where the drift of a
 * term summed by recurrence counts with its size at the first frequency, |c_j| exp(t_0 e_j Re w) <= |c_j|.
 */
export function expSumArithmetic(
  cRe: Float64Array,
  cIm: Float64Array,
  e: Float64Array,
  wRe: number,
  wIm: number,
  tk: Float64Array,
  outRe: Float64Array,
  outIm: Float64Array,
  complexShift = false,
): number {
  const n = e.length;
  const K = tk.length;
  const d = (tk[K - 1] - tk[0]) / (K - 1);
  const tEnd = tk[K - 1];
  const wAbs = cabs(wRe, wIm);
  outRe.fill(0, 0, K);
  outIm.fill(0, 0, K);
  // compensated (Kahan) sums across the nodes: kr, ki carry each addition's rounding
  const kr = scratch("expKr", K).fill(0);
  const ki = scratch("expKi", K).fill(0);
  let J0 = 0;
  while (J0 < n && tEnd * e[J0] * wAbs <= 1) J0++;
  // real weights and a real w (the Student t's Bessel rule): the imaginary parts are exact zeros throughout, so the real
  // steps alone give the same sums to the bit at a quarter of the work (moments) or half (recurrence)
  let real = wIm === 0;
  for (let j = 0; real && j < n; j++) real = cIm[j] === 0;
  let absSum = 0;
  if (J0 > 0 && real) absSum = realMoments(cRe, e, J0, wRe, tk, outRe);
  else if (J0 > 0) absSum = complexMoments(cRe, cIm, e, J0, wRe, wIm, tk, outRe, outIm);
  // a real w: the nodes with SHIFT_BLOCK d e_j |w| <= 1 past J0 through their moments about each block's first frequency
  // (shiftedMoments); the recurrence takes the rest
  let J1 = J0;
  if ((wIm === 0 || complexShift) && K >= 2 * SHIFT_BLOCK) while (J1 < n && SHIFT_BLOCK * d * e[J1] * wAbs <= 1) J1++;
  if (J1 > J0) {
    absSum +=
      wIm === 0 ? shiftedMoments(cRe, cIm, e, J0, J1, wRe, tk, outRe, outIm, kr, ki, real) : shiftedMomentsComplexW(cRe, cIm, e, J0, J1, wRe, wIm, tk, outRe, outIm, kr, ki);
  }
  const cut = new Float64Array(n);
  const live = new Uint8Array(n);
  absSum += liveNodes(cRe, cIm, e, J1, wRe, tk[0], cut, live);
  recurrenceSums(cRe, cIm, e, J1, wRe, wIm, tk, d, cut, live, real, outRe, outIm, kr, ki);
  return absSum * (MOMENT_REMAINDER + 80 * Number.EPSILON) + n * DROP;
}

/**
 * the recurrence's nodes from J1 on: cut[j] = log(DROP / |c_j|) and live[j] = 1 where c_j is not 0; returns the sum of their
 * sizes at the first frequency, |c_j| exp(t_0 e_j Re w) (Re w < 0, t >= t_0), to which the recurrence's drift is relative
 */
function liveNodes(cRe: Float64Array, cIm: Float64Array, e: Float64Array, J1: number, wRe: number, t0: number, cut: Float64Array, live: Uint8Array): number {
  let absSum = 0;
  for (let j = J1; j < e.length; j++) {
    const a = cabs(cRe[j], cIm[j]);
    if (a === 0) continue;
    absSum += a * Math.exp(t0 * (e[j] * wRe));
    cut[j] = Math.log(DROP / a);
    live[j] = 1;
  }
  return absSum;
}

/**
 * t positive and equispaced to within 8 eps t_k at every node (so the recurrence's steps of d stay inside the
 * allowance of expSumArithmetic), and long enough for it to pay.
 */
export function arithmeticNodes(t: Float64Array, min = 64): boolean {
  const K = t.length;
  if (K < min || !(t[0] > 0)) return false;
  const d = (t[K - 1] - t[0]) / (K - 1);
  if (!(d > 0)) return false;
  for (let k = 1; k < K; k++) if (Math.abs(t[k] - (t[0] + k * d)) > 8 * Number.EPSILON * t[k]) return false;
  return true;
}
