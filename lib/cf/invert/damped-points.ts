// Many arbitrary points of a damped solution: the damped sums once on a fine FFT grid, then local interpolation at
// each point, with the interpolation error bounded from the sums' own coefficients.
import type { DampedSolution } from "./damped";
import { nextPowerOfTwo } from "../fftplan";
import { checkDeadline } from "../deadline";
import { sumOnGrid } from "./fft";
import { takenOutAt } from "./damped-eval";
import type { Nodes } from "./nodes";

/** interpolation stencil: M equispaced grid values around the point (M/2 on each side) */
const M = 10;
/** largest FFT the interpolation route takes (above it the pointwise sums are used) */
const MAX_N = 1 << 22;

/**
 * max over u in [0, 1] of prod_{j = -M/2 + 1}^{M/2} |u - j| (the node polynomial of the stencil on a unit grid),
 * sampled finely and widened by 1% (it is smooth, with its maximum at u = 1/2 for this symmetric stencil)
 */
const NODE_POLY = (() => {
  let best = 0;
  for (let i = 0; i <= 1000; i++) {
    const u = i / 1000;
    let p = 1;
    for (let j = -M / 2 + 1; j <= M / 2; j++) p *= Math.abs(u - j);
    best = Math.max(best, p);
  }
  return 1.01 * best;
})();

let FACT = 1;
for (let j = 2; j <= M; j++) FACT *= j;

/**
 * The plan of the interpolation route for n points up to R: the grid step dx = T / N such that the Lagrange
 * remainder D_M dx^M NODE_POLY / M! stays below `target` (before undamping), where D_M = (h/pi) sum_k t_k^M |c_k|
 * bounds the M-th derivative of the truncated damped sum g(y) = (h/pi) sum_k Re(e^{-i t_k y} c_k) everywhere
 * (the remainder of Lagrange interpolation, e.g. Atkinson, An Introduction to Numerical Analysis, thm 3.2).
 * Null when the FFT would cost more than the n pointwise sums.
 */
export function pointsPlan(s: DampedSolution, n: number, target: number, wantPdf: boolean): { N: number; dC: number; dP: number } | null {
  let dC = 0;
  let dP = 0;
  for (let k = 0; k < s.K; k++) {
    const tm = Math.pow((k + 0.5) * s.h, M);
    dC += tm * Math.hypot(s.cRe[k], s.cIm[k]);
    if (wantPdf) dP += tm * Math.hypot(s.pRe[k], s.pIm[k]);
  }
  dC *= s.h / Math.PI;
  dP *= s.h / Math.PI;
  const D = Math.max(dC, dP);
  if (!(D > 0) || !(target > 0)) return null;
  const dx = Math.pow((target * FACT) / (NODE_POLY * D), 1 / M);
  const N = nextPowerOfTwo(Math.max(2 * M, Math.ceil(s.T / dx)));
  if (N > MAX_N) return null;
  // cost in multiply-adds: the FFTs (5 N log2 N each) and the node loads, against n K per pointwise sum
  const passes = wantPdf ? 2 : 1;
  if (passes * (5 * N * Math.log2(N) + s.K) + n * M * passes >= passes * n * s.K) return null;
  return { N, dC, dP };
}

/** Density and cdf of the continuous part at arbitrary points by the plan above, each value with its bound. */
export function dampedPoints(
  s: DampedSolution,
  xs: Float64Array,
  wantPdf: boolean,
  plan: { N: number; dC: number; dP: number },
): { fc: Float64Array; Fc: Float64Array; errF: Float64Array; errf: Float64Array } {
  const { N } = plan;
  const dx = s.T / N;
  const mk = (re: Float64Array, im: Float64Array): Nodes => ({ h: s.h, K: s.K, re, im, wre: re, wim: im, absCdf: 0, absPdf: 0, mass: 0 });
  const gC = new Float64Array(N);
  sumOnGrid(mk(s.cRe, s.cIm), s.lo, s.lo, N, 0, N, gC, null, null);
  const gP = wantPdf ? new Float64Array(N) : null;
  if (gP) sumOnGrid(mk(s.pRe, s.pIm), s.lo, s.lo, N, 0, N, gP, null, null);
  const n = xs.length;
  const fc = new Float64Array(n);
  const Fc = new Float64Array(n);
  const errF = new Float64Array(n);
  const errf = new Float64Array(n);
  const w = new Float64Array(M);
  // the truncated sums are anti-periodic with period T: g(y + T) = -g(y) (t_k T = (k + 1/2) 2 pi)
  const at = (g: Float64Array, j: number) => (j < 0 ? -g[j + N] : j >= N ? -g[j - N] : g[j]);
  for (let i = 0; i < n; i++) {
    if ((i & 1023) === 0) checkDeadline("pointwise");
    const x = xs[i];
    const y = x - s.lo;
    if (y < 0) continue;
    const u = y / dx;
    const j0 = Math.floor(u) - M / 2 + 1;
    // Lagrange weights on the stencil j0 .. j0 + M - 1 at u, and the node polynomial at u
    let node = 1;
    for (let a = 0; a < M; a++) {
      let l = 1;
      for (let b = 0; b < M; b++) if (b !== a) l *= (u - (j0 + b)) / (a - b);
      w[a] = l;
      node *= Math.abs(u - (j0 + a));
    }
    let vC = 0;
    let vP = 0;
    for (let a = 0; a < M; a++) {
      vC += w[a] * at(gC, j0 + a);
      if (gP) vP += w[a] * at(gP, j0 + a);
    }
    const interpC = (plan.dC * Math.pow(dx, M) * node) / FACT;
    const interpP = (plan.dP * Math.pow(dx, M) * node) / FACT;
    // the Lebesgue sum of the weights: how much the grid values' errors can grow through the interpolation
    let leb = 0;
    for (let a = 0; a < M; a++) leb += Math.abs(w[a]);
    const g = Math.exp(s.beta * y);
    const kv = takenOutAt(s, x);
    Fc[i] = Math.min(Math.max(g * vC + kv.F + s.cdfShift, 0), s.Mc);
    fc[i] = gP ? Math.max(g * vP + kv.f, 0) : 0;
    // the truncation part of the sums' bound holds at every y (no stencil factor); their rounding and CF-value parts
    // sit in the grid values and pass through the weights (times the Lebesgue sum)
    const roundC = s.sumCdf - s.truncCdf;
    const roundP = s.sumPdf - s.truncPdf;
    errF[i] = g * (s.truncCdf + leb * roundC + interpC + 4 * M * Number.EPSILON * leb * Math.abs(vC)) + s.aliasCdf + kv.err;
    errf[i] = g * (s.truncPdf + leb * roundP + interpP + 4 * M * Number.EPSILON * leb * Math.abs(vP)) + s.aliasPdf + kv.errf;
  }
  return { fc, Fc, errF, errf };
}
