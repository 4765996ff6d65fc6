/**
 * The recurrence route of expSumArithmetic (./cf-quadrature.ts): the terms c_j exp(t_k e_j w) of the nodes j >= J0 added
 * into the sums S_k, each node's term carried from one frequency to the next by z_{k+1} = z_k exp(d e_j w), restarted
 * directly every RESYNC steps, and dropped once its restart value's log falls below `cut` (|c_j exp(t e_j w)| < DROP; the
 * magnitude only decreases after that).
 *
 * The frequencies are taken in blocks of BLOCK (a multiple of RESYNC), every node's run over one block before the next
 * block, so that a block's sums and their compensations stay in cache (node by node over all K frequencies, the loop
 * streamed four arrays of K doubles through memory once per node). Each node restarts at the same multiples of RESYNC and
 * is dropped at the same frequency as in a run over all K at once, and at every k the nodes are added in the same order of
 * j: the same sums to the bit.
 */
import { checkDeadline } from "../deadline";

/** the recurrence is restarted from a direct evaluation every RESYNC steps */
export const RESYNC = 16;
/** frequencies per block: a multiple of RESYNC; five arrays of BLOCK doubles (t, two sums, two compensations) = 40 kB */
const BLOCK = 1024;

/**
 * Adds the terms of nodes J0..n-1 into (outRe, outIm), compensated by (kr, ki) (Kahan), for frequencies tk with step d.
 * `cut[j]` is log(DROP / |c_j|) (-Infinity never drops), `live[j]` 0 for a node that contributes nothing.
 * real: c and w real (outIm untouched).
 */
export function recurrenceSums(
  cRe: Float64Array,
  cIm: Float64Array,
  e: Float64Array,
  J0: number,
  wRe: number,
  wIm: number,
  tk: Float64Array,
  d: number,
  cut: Float64Array,
  live: Uint8Array,
  real: boolean,
  outRe: Float64Array,
  outIm: Float64Array,
  kr: Float64Array,
  ki: Float64Array,
): void {
  const n = e.length;
  const K = tk.length;
  // the per-node ratios exp(d e_j w), as the unblocked loop computes them
  const rr = new Float64Array(n);
  const ri = new Float64Array(n);
  for (let j = J0; j < n; j++) {
    if (!live[j]) continue;
    const er = e[j] * wRe;
    const ei = e[j] * wIm;
    const sa = Math.exp(d * er);
    rr[j] = real || ei === 0 ? sa : sa * Math.cos(d * ei);
    ri[j] = real || ei === 0 ? 0 : sa * Math.sin(d * ei);
  }
  for (let k0 = 0; k0 < K; k0 += BLOCK) {
    const k1 = Math.min(K, k0 + BLOCK);
    for (let j = J0; j < n; j++) {
      if ((j & 63) === 0) checkDeadline("cf-quadrature");
      if (!live[j]) continue;
      const er = e[j] * wRe;
      const ei = e[j] * wIm;
      const dropped = real
        ? realRun(cRe[j], er, rr[j], cut[j], tk, k0, k1, outRe, kr)
        : ei === 0
          ? realWRun(cRe[j], cIm[j], er, rr[j], cut[j], tk, k0, k1, outRe, outIm, kr, ki)
          : complexRun(cRe[j], cIm[j], er, ei, rr[j], ri[j], cut[j], tk, k0, k1, outRe, outIm, kr, ki);
      if (dropped) live[j] = 0;
    }
  }
}

/** one real term c exp(t e w), w real, over [k0, k1): returns true once it is dropped */
function realRun(c: number, er: number, rr: number, cut: number, tk: Float64Array, k0: number, k1: number, outRe: Float64Array, kr: Float64Array): boolean {
  let k = k0;
  while (k < k1) {
    const lm = tk[k] * er;
    if (lm < cut) return true;
    let zr = c * Math.exp(lm);
    const end = Math.min(k1, k + RESYNC);
    for (; k < end; k++) {
      const yr = zr - kr[k];
      const sr = outRe[k] + yr;
      kr[k] = sr - outRe[k] - yr;
      outRe[k] = sr;
      zr *= rr;
    }
  }
  return false;
}

/**
 * one complex term with w real: the complex steps with the ratio's and the restart's imaginary parts zero (cos 0 = 1,
 * sin 0 = 0), which leave the real and imaginary parts unmixed
 */
function realWRun(
  cr: number,
  ci: number,
  er: number,
  rr: number,
  cut: number,
  tk: Float64Array,
  k0: number,
  k1: number,
  outRe: Float64Array,
  outIm: Float64Array,
  kr: Float64Array,
  ki: Float64Array,
): boolean {
  let k = k0;
  while (k < k1) {
    const lm = tk[k] * er;
    if (lm < cut) return true;
    const m = Math.exp(lm);
    let zr = cr * m;
    let zi = ci * m;
    const end = Math.min(k1, k + RESYNC);
    for (; k < end; k++) {
      const yr = zr - kr[k];
      const sr = outRe[k] + yr;
      kr[k] = sr - outRe[k] - yr;
      outRe[k] = sr;
      const yi = zi - ki[k];
      const si = outIm[k] + yi;
      ki[k] = si - outIm[k] - yi;
      outIm[k] = si;
      zr *= rr;
      zi *= rr;
    }
  }
  return false;
}

/** one complex term with w complex over [k0, k1) */
function complexRun(
  cr: number,
  ci: number,
  er: number,
  ei: number,
  rr: number,
  ri: number,
  cut: number,
  tk: Float64Array,
  k0: number,
  k1: number,
  outRe: Float64Array,
  outIm: Float64Array,
  kr: Float64Array,
  ki: Float64Array,
): boolean {
  let k = k0;
  while (k < k1) {
    const t = tk[k];
    const lm = t * er;
    if (lm < cut) return true;
    const m = Math.exp(lm);
    const cs = m * Math.cos(t * ei);
    const sn = m * Math.sin(t * ei);
    let zr = cr * cs - ci * sn;
    let zi = cr * sn + ci * cs;
    const end = Math.min(k1, k + RESYNC);
    for (; k < end; k++) {
      const yr = zr - kr[k];
      const sr = outRe[k] + yr;
      kr[k] = sr - outRe[k] - yr;
      outRe[k] = sr;
      const yi = zi - ki[k];
      const si = outIm[k] + yi;
      ki[k] = si - outIm[k] - yi;
      outIm[k] = si;
      const nr = zr * rr - zi * ri;
      zi = zr * ri + zi * rr;
      zr = nr;
    }
  }
  return false;
}
