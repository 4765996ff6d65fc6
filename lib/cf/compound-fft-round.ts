/**
 * Rounding bounds of a compound pmf formed by the discrete Fourier transform (./discretise.ts, ./discretise-bounds.ts):
 * p = (1/M) F( P_N(conj F f) ) on M points. u = eps/2. The pieces, each derived for the steps as coded:
 *  - the forward transform (fft.js, radix 4), componentwise: each output within L sum_k |f_k| of the exact one (per
 *    output, the levels' errors are at most eta times the absolute sum of the inputs they combine, which partition the
 *    inputs; L = log2(M) eta / (1 - log2(M) eta), eta <= 16 u, as ./invert/lattice.ts after Higham, Accuracy and
 *    Stability of Numerical Algorithms, 2nd ed., sec. 24.1);
 *  - the generating function at the computed point: its value moves by at most |dz| times |P_N'| on the segment, which
 *    is at most E N on the closed unit disc (non-negative coefficients: |P'(z)| <= P'(|z|) <= P'(1)), and at most
 *    c |P_N(z)| e^{c |dz|} where the count's log-derivative is bounded by c (cgfSlope) on the disc; the log route pulls a
 *    point outside back onto the disc radially, the nearest point there, which moves it no further from the exact one
 *    where that lies inside (sum f <= 1; past it by delta, E N + 2 delta E N^2, second order); plus each value's own
 *    evaluation error;
 *  - the inverse (the forward transform of a Hermitian vector, divided by M, exact for M a power of 2), normwise
 *    (Higham thm 24.2): ||dp||_2 <= (||da||_2 + L ||a^||_2) / sqrt(M).
 * A run of up to K entries (a cdf or sf value) is within sqrt(K) ||dp||_2 (and so is the sum of the entries' absolute
 * errors, which covers clipping negative values at 0).
 */
import type { Node } from "./node";
import { cumulantEst } from "./cumulant-bounds";

const U = Number.EPSILON / 2;

/** Higham's L for fft.js at size M (see above) */
export function fftL(M: number): number {
  const levels = Math.log2(M);
  return (levels * 16 * U) / (1 - levels * 16 * U);
}

/**
 * An upper bound on |P_N'| over the points used: E N where sum f <= 1, else E N + 2 delta E N^2 (delta the excess
 * over the disc, at most 1e-12 here); E N and E N^2 from the count's cumulants raised by their derived bounds.
 * Infinity without them.
 */
export function countSlope(N: Node, delta: number): number {
  const [k1, k2] = cumulantEst(N, 2);
  if (!k1 || !Number.isFinite(k1.e)) return Infinity;
  const m1 = (k1.v + k1.e) * (1 + 2 * U);
  if (!(delta > 0)) return m1;
  if (!(delta <= 1e-12) || !k2 || !Number.isFinite(k2.e)) return Infinity;
  const m2 = (k2.v + k2.e + m1 * m1) * (1 + 4 * U);
  return (m1 + 2 * delta * m2) * (1 + 4 * U);
}

/**
 * sqrt(sum_k x_k^2) over the first n entries (rounded up past its own rounding), and an upper bound on sum_k x_k for
 * non-negative x: compensated (Kahan) summation, within (2u + O(n u^2)) of the sum (Higham, Accuracy and Stability of
 * Numerical Algorithms, 2nd ed., sec. 4.3)
 */
export function norm2(x: ArrayLike<number>, n = x.length): { n2: number; sum: number } {
  let s2 = 0;
  let s = 0;
  let c = 0;
  for (let k = 0; k < n; k++) {
    s2 += x[k] * x[k];
    const y = x[k] - c;
    const t = s + y;
    c = t - s - y;
    s = t;
  }
  return { n2: Math.sqrt(s2 * (1 + (n + 2) * 2 * U)) * (1 + U), sum: s * (1 + 2 * U + 4 * n * n * U * U) };
}

/**
 * ||dp||_2 of the computed output(s) against the exact transform of the stored severity masses, from the sum over all
 * M frequencies of the squared errors of the values (`local2`: input and evaluation, see valueError) and the squared
 * 2-norm of the values (`out2`).
 */
export function compoundFftRound(M: number, local2: number, out2: number): number {
  const L = fftL(M);
  const r = ((Math.sqrt(local2) * (1 + 2 * U) + L * Math.sqrt(out2)) / Math.sqrt(M)) * (1 + 8 * U);
  return Number.isFinite(r) ? r : Infinity;
}

/**
 * The count's generating function's Lipschitz bound near a value of modulus m at distance d: min(E N bound `global`,
 * c m e^{c d}) with c the count's cgfSlope where it has one
 */
export function localSlope(global: number, c: number | undefined, m: number, d: number): number {
  if (c === undefined || !Number.isFinite(c)) return global;
  // (e^x <= 1 + 2x for 0 <= x <= 1)
  const cd = c * d;
  return Math.min(global, c * m * (cd <= 1 ? 1 + 2 * cd : Math.exp(cd)) * (1 + 4 * U));
}

/**
 * The error of a value fl(exp(K)) (cos, sin) from a log-generating function K computed at w = log z, |z| <= 1, the
 * point z off the exact one by dZ (the forward transform): w's own rounding (the log of |Z|^2 / 2: 1.5 u + 2 u |Re w|;
 * atan2 and the unwrapping: (3 |Im w| + 2 pi) u) moves z by |z| |dw| more; the value moves by the local slope times
 * that (|z| <= 1 taken for |z|); the count's K within `ulps` units of rounding relative to 1 + |K| (the convention the CF route applies to every
 * model's log-CF, ./invert/part.ts cfRelError), exp, cos and sin of K adding |Re K| u + u and |Im K| u + 2u.
 */
export function logRouteError(wr: number, wi: number, kr: number, ki: number, m: number, ulps: number, dZ: number, global: number, c: number | undefined): number {
  // (|z| <= 1; a point whose |Z|^2 underflowed to 0 stands at e^-745: 1e-323 more; m = exp(K) as the caller formed it)
  const dz = dZ + (1.5 + 2 * Math.abs(wr) + 3 * Math.abs(wi) + 2 * Math.PI) * U * 1.01 + 1e-323;
  const rel = Number.EPSILON * ((ulps + 1) * (1 + Math.abs(kr) + Math.abs(ki)) + 3);
  return (localSlope(global, c, m * (1 + rel), dz) * dz + m * rel) * 1.01;
}
