/** Small complex helpers on numbers (no allocation): results go into a caller-supplied 2-slot buffer. */

export type C2 = Float64Array; // [re, im]

export function c2(): C2 {
  return new Float64Array(2);
}

/** Principal complex logarithm of (re, im) into out. */
/**
 * |re + i im| as sqrt(re^2 + im^2) wherever the sum of squares neither overflows nor underflows (relative error
 * below 2 eps: one rounding in each square and in the sum, halved by the root, and one in the root; Higham, Accuracy
 * and Stability of Numerical Algorithms, 2nd ed., sec. 3.1), else scaled by the larger part m: m sqrt(1 + (s / m)^2), s the
 * smaller (below 1.75 eps: the quotient's, the square's, the sum's, the root's and the product's roundings, the sum at
 * least 1), and Math.hypot for 0, NaN and infinities. Math.hypot costs about six times as much in V8 (not inlined, its
 * result boxed), and the inversion takes millions of magnitudes, many of them past 1e-145 where the transform has fallen.
 */
export function cabs(re: number, im: number): number {
  const s = re * re + im * im;
  if (s > 1e-290 && s < 1e290) return Math.sqrt(s);
  const a = Math.abs(re);
  const b = Math.abs(im);
  const m = a > b ? a : b;
  if (!(m > 0 && m < Infinity)) return Math.hypot(re, im);
  const r = (a > b ? b : a) / m;
  return m * Math.sqrt(1 + r * r);
}

export function clog(re: number, im: number, out: C2): void {
  out[0] = Math.log(cabs(re, im));
  out[1] = Math.atan2(im, re);
}

/** exp(re + i im) into out. */
export function cexp(re: number, im: number, out: C2): void {
  const m = Math.exp(re);
  out[0] = m * Math.cos(im);
  out[1] = m * Math.sin(im);
}

/** Principal square root of (re, im) into out (Re >= 0). */
export function csqrt(re: number, im: number, out: C2): void {
  if (re === 0 && im === 0) {
    out[0] = 0;
    out[1] = 0;
    return;
  }
  const m = cabs(re, im);
  if (re >= 0) {
    const s = Math.sqrt(0.5 * (m + re));
    out[0] = s;
    out[1] = im / (2 * s);
  } else {
    const s = Math.sqrt(0.5 * (m - re));
    out[0] = Math.abs(im) / (2 * s);
    out[1] = im >= 0 ? s : -s;
  }
}

const TWO_PI = 2 * Math.PI;

/**
 * Make `im` continuous along the index order: add multiples of 2 pi so that consecutive values differ by at most pi.
 * `start` is the index whose value is kept (the point nearest t = 0); the pass runs outward both ways.
 */
export function unwrapFrom(im: Float64Array, start: number, n = im.length): void {
  for (let k = start + 1; k < n; k++) {
    const d = im[k] - im[k - 1];
    if (d > Math.PI || d < -Math.PI) im[k] -= TWO_PI * Math.round(d / TWO_PI);
  }
  for (let k = start - 1; k >= 0; k--) {
    const d = im[k] - im[k + 1];
    if (d > Math.PI || d < -Math.PI) im[k] -= TWO_PI * Math.round(d / TWO_PI);
  }
}

/** Index of the entry of t nearest 0 when t is sorted ascending, or -1 when t is not sorted. */
export function sortedAnchor(t: Float64Array): number {
  let best = 0;
  for (let k = 0; k < t.length; k++) {
    if (k > 0 && !(t[k] >= t[k - 1])) return -1;
    if (Math.abs(t[k]) < Math.abs(t[best])) best = k;
  }
  return best;
}

/** Index of the complex argument nearest 0 (the start of a path w(t) with w(0) = 0). */
export function nearestZero(wr: Float64Array, wi: Float64Array): number {
  let best = 0;
  let bv = Infinity;
  for (let k = 0; k < wr.length; k++) {
    const v = Math.abs(wr[k]) + Math.abs(wi[k]);
    if (v < bv) {
      bv = v;
      best = k;
    }
  }
  return best;
}
