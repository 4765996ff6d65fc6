/**
 * The moment routes of expSumArithmetic (./cf-quadrature.ts): nodes whose terms c_j exp(t e_j w) are summed through their
 * Taylor moments, about 0 (t e_j |w| <= 1 at every frequency) or about each block's first frequency (shiftedMoments). The
 * loops sit in functions of their own so that an optimised loop never meets a branch of its caller without type feedback.
 */
import { cabs } from "../complex";
import { checkDeadline } from "../deadline";

/** Taylor order used for the nodes summed through their moments in expSumArithmetic. */
export const MOMENT_ORDER = 24;

/** m! for m <= MOMENT_ORDER, formed by the same products in the same order as the routes did per call */
const FACTORIAL = (() => {
  const inv = new Float64Array(MOMENT_ORDER + 1);
  let f = 1;
  for (let m = 0; m <= MOMENT_ORDER; m++) {
    if (m > 0) f *= m;
    inv[m] = f;
  }
  return inv;
})();

/**
 * expSumArithmetic's moment route for real weights c_j and a real w, on real parts only (the same operations in the same
 * order as the complex route, whose imaginary parts are then exact zeros): writes the Taylor sums into outRe and
 * returns sum_j |c_j| over the J0 nodes taken.
 */
export function realMoments(c: Float64Array, e: Float64Array, J0: number, w: number, tk: Float64Array, outRe: Float64Array): number {
  const M = MOMENT_ORDER;
  const mr = new Float64Array(M + 1);
  const qr = new Float64Array(M + 1);
  let absSum = 0;
  for (let j = 0; j < J0; j++) {
    absSum += Math.abs(c[j]);
    let p = 1;
    for (let m = 0; m <= M; m++) {
      const yr = c[j] * p - qr[m];
      const tr = mr[m] + yr;
      qr[m] = tr - mr[m] - yr;
      mr[m] = tr;
      p *= e[j];
    }
  }
  let f = 1;
  for (let m = 1; m <= M; m++) {
    f *= m;
    mr[m] /= f;
  }
  // four frequencies at a time (horner4)
  const K = tk.length;
  let k = 0;
  for (; k + 4 <= K; k += 4) {
    const z0 = tk[k] * w;
    const z1 = tk[k + 1] * w;
    const z2 = tk[k + 2] * w;
    const z3 = tk[k + 3] * w;
    horner4(mr, M, z0, z1, z2, z3, H4);
    outRe[k] = H4[0];
    outRe[k + 1] = H4[1];
    outRe[k + 2] = H4[2];
    outRe[k + 3] = H4[3];
  }
  for (; k < K; k++) {
    const z = tk[k] * w;
    let a = mr[M];
    for (let m = M - 1; m >= 0; m--) a = a * z + mr[m];
    outRe[k] = a;
  }
  return absSum;
}

/** frequencies a block of shiftedMoments spans (its nodes have SHIFT_BLOCK d e_j |w| <= 1) */
export const SHIFT_BLOCK = 512;

/**
 * expSumArithmetic's nodes J0 <= j < J1 for a real w < 0, block by block of SHIFT_BLOCK frequencies from t_a = tk[k0]:
 * c_j exp(t e_j w) = c'_j exp((t - t_a) e_j w) with c'_j = c_j exp(t_a e_j w), |c'_j| <= |c_j|, summed through the
 * moments sum_j c'_j e_j^m / m!, m <= MOMENT_ORDER, at z = (t - t_a) w, |z e_j| <= 1 (the same Taylor remainder as the
 * moments about 0); each block's total added into the sums compensated (Kahan), like a node's term. Returns sum |c_j|.
 * A node's cost is then a share of the blocks' moments, not a recurrence step at every frequency until it is dropped
 * (Poisson(2)-pareto(1.5)'s damped transform at 163 389 frequencies: some 30 nodes ran the whole range).
 */
export function shiftedMoments(
  cRe: Float64Array,
  cIm: Float64Array,
  e: Float64Array,
  J0: number,
  J1: number,
  w: number,
  tk: Float64Array,
  outRe: Float64Array,
  outIm: Float64Array,
  kr: Float64Array,
  ki: Float64Array,
  real = false,
): number {
  if (real) return shiftedMomentsReal(cRe, e, J0, J1, w, tk, outRe, kr);
  const M = MOMENT_ORDER;
  const K = tk.length;
  const mr = new Float64Array(M + 1);
  const mi = new Float64Array(M + 1);
  const qr = new Float64Array(M + 1);
  const qi = new Float64Array(M + 1);
  const inv = FACTORIAL;
  let absSum = 0;
  for (let j = J0; j < J1; j++) absSum += cabs(cRe[j], cIm[j]);
  for (let k0 = 0; k0 < K; k0 += SHIFT_BLOCK) {
    if ((k0 & 8191) === 0) checkDeadline("cf-quadrature");
    const k1 = Math.min(K, k0 + SHIFT_BLOCK);
    const ta = tk[k0];
    mr.fill(0);
    mi.fill(0);
    qr.fill(0);
    qi.fill(0);
    for (let j = J0; j < J1; j++) {
      const g = Math.exp(ta * (e[j] * w));
      const ar = cRe[j] * g;
      const ai = cIm[j] * g;
      let p = 1;
      for (let m = 0; m <= M; m++) {
        const yr = ar * p - qr[m];
        const tr = mr[m] + yr;
        qr[m] = tr - mr[m] - yr;
        mr[m] = tr;
        const yi = ai * p - qi[m];
        const ti = mi[m] + yi;
        qi[m] = ti - mi[m] - yi;
        mi[m] = ti;
        p *= e[j];
      }
    }
    for (let m = 1; m <= M; m++) {
      mr[m] /= inv[m];
      mi[m] /= inv[m];
    }
    for (let k = k0; k < k1; k++) {
      const z = (tk[k] - ta) * w;
      let ar = mr[M];
      let ai = mi[M];
      for (let m = M - 1; m >= 0; m--) {
        ar = ar * z + mr[m];
        ai = ai * z + mi[m];
      }
      const yr = ar - kr[k];
      const sr = outRe[k] + yr;
      kr[k] = sr - outRe[k] - yr;
      outRe[k] = sr;
      const yi = ai - ki[k];
      const si = outIm[k] + yi;
      ki[k] = si - outIm[k] - yi;
      outIm[k] = si;
    }
  }
  return absSum;
}

/**
 * shiftedMoments for a complex w (Re w < 0): the block's weights c'_j = c_j exp(t_a e_j w) (|c'_j| <= |c_j|), the moments
 * sum_j c'_j e_j^m / m! compensated, and the Taylor sums at the complex z = (t - t_a) w, |z e_j| <= 1 (the same remainder),
 * each block's total added into the sums compensated. Returns sum |c_j| over the nodes taken.
 */
export function shiftedMomentsComplexW(
  cRe: Float64Array,
  cIm: Float64Array,
  e: Float64Array,
  J0: number,
  J1: number,
  wRe: number,
  wIm: number,
  tk: Float64Array,
  outRe: Float64Array,
  outIm: Float64Array,
  kr: Float64Array,
  ki: Float64Array,
): number {
  const M = MOMENT_ORDER;
  const K = tk.length;
  const mr = new Float64Array(M + 1);
  const mi = new Float64Array(M + 1);
  const qr = new Float64Array(M + 1);
  const qi = new Float64Array(M + 1);
  const inv = FACTORIAL;
  let absSum = 0;
  for (let j = J0; j < J1; j++) absSum += cabs(cRe[j], cIm[j]);
  for (let k0 = 0; k0 < K; k0 += SHIFT_BLOCK) {
    if ((k0 & 8191) === 0) checkDeadline("cf-quadrature");
    const k1 = Math.min(K, k0 + SHIFT_BLOCK);
    const ta = tk[k0];
    mr.fill(0);
    mi.fill(0);
    qr.fill(0);
    qi.fill(0);
    for (let j = J0; j < J1; j++) {
      const g = Math.exp(ta * (e[j] * wRe));
      const ph = ta * (e[j] * wIm);
      const gr = g * Math.cos(ph);
      const gi = g * Math.sin(ph);
      const ar = cRe[j] * gr - cIm[j] * gi;
      const ai = cRe[j] * gi + cIm[j] * gr;
      let p = 1;
      for (let m = 0; m <= M; m++) {
        const yr = ar * p - qr[m];
        const tr = mr[m] + yr;
        qr[m] = tr - mr[m] - yr;
        mr[m] = tr;
        const yi = ai * p - qi[m];
        const ti = mi[m] + yi;
        qi[m] = ti - mi[m] - yi;
        mi[m] = ti;
        p *= e[j];
      }
    }
    for (let m = 1; m <= M; m++) {
      mr[m] /= inv[m];
      mi[m] /= inv[m];
    }
    for (let k = k0; k < k1; k++) {
      const dt = tk[k] - ta;
      const zr = dt * wRe;
      const zi = dt * wIm;
      let ar = mr[M];
      let ai = mi[M];
      for (let m = M - 1; m >= 0; m--) {
        const nr = ar * zr - ai * zi + mr[m];
        ai = ar * zi + ai * zr + mi[m];
        ar = nr;
      }
      kahanAdd(outRe, kr, k, ar);
      kahanAdd(outIm, ki, k, ai);
    }
  }
  return absSum;
}

/** out[k] += a compensated by q[k] (Kahan) */
function kahanAdd(out: Float64Array, q: Float64Array, k: number, a: number): void {
  const y = a - q[k];
  const s = out[k] + y;
  q[k] = s - out[k] - y;
  out[k] = s;
}

/**
 * shiftedMoments for real weights (and the real w it takes): the real parts' operations alone, in the same order, so the
 * same sums to the bit (the complex route's imaginary parts are then exact zeros) at half the work; outIm untouched.
 */
function shiftedMomentsReal(c: Float64Array, e: Float64Array, J0: number, J1: number, w: number, tk: Float64Array, outRe: Float64Array, kr: Float64Array): number {
  const M = MOMENT_ORDER;
  const K = tk.length;
  const mr = new Float64Array(M + 1);
  const qr = new Float64Array(M + 1);
  const inv = FACTORIAL;
  let absSum = 0;
  for (let j = J0; j < J1; j++) absSum += Math.abs(c[j]);
  for (let k0 = 0; k0 < K; k0 += SHIFT_BLOCK) {
    if ((k0 & 8191) === 0) checkDeadline("cf-quadrature");
    const k1 = Math.min(K, k0 + SHIFT_BLOCK);
    const ta = tk[k0];
    mr.fill(0);
    qr.fill(0);
    for (let j = J0; j < J1; j++) {
      const ar = c[j] * Math.exp(ta * (e[j] * w));
      let p = 1;
      for (let m = 0; m <= M; m++) {
        const yr = ar * p - qr[m];
        const tr = mr[m] + yr;
        qr[m] = tr - mr[m] - yr;
        mr[m] = tr;
        p *= e[j];
      }
    }
    for (let m = 1; m <= M; m++) mr[m] /= inv[m];
    // four Horner chains side by side, as in realMoments
    let k = k0;
    for (; k + 4 <= k1; k += 4) {
      const z0 = (tk[k] - ta) * w;
      const z1 = (tk[k + 1] - ta) * w;
      const z2 = (tk[k + 2] - ta) * w;
      const z3 = (tk[k + 3] - ta) * w;
      horner4(mr, M, z0, z1, z2, z3, H4);
      kahanAdd(outRe, kr, k, H4[0]);
      kahanAdd(outRe, kr, k + 1, H4[1]);
      kahanAdd(outRe, kr, k + 2, H4[2]);
      kahanAdd(outRe, kr, k + 3, H4[3]);
    }
    for (; k < k1; k++) {
      const z = (tk[k] - ta) * w;
      let ar = mr[M];
      for (let m = M - 1; m >= 0; m--) ar = ar * z + mr[m];
      kahanAdd(outRe, kr, k, ar);
    }
  }
  return absSum;
}

/**
 * expSumArithmetic's moment route for complex weights or a complex w (the nodes j < J0, t e_j |w| <= 1 for every t): writes
 * the Taylor sums into outRe, outIm and returns sum_j |c_j| over them. Its own function, as realMoments, so that an
 * optimised loop here never meets a branch of the caller it has not seen (each such deopt recompiles the whole caller).
 */
export function complexMoments(
  cRe: Float64Array,
  cIm: Float64Array,
  e: Float64Array,
  J0: number,
  wRe: number,
  wIm: number,
  tk: Float64Array,
  outRe: Float64Array,
  outIm: Float64Array,
): number {
  const M = MOMENT_ORDER;
  const mr = new Float64Array(M + 1);
  const mi = new Float64Array(M + 1);
  const absSum = momentSums(cRe, cIm, e, 0, J0, mr, mi);
  let f = 1;
  for (let m = 1; m <= M; m++) {
    f *= m;
    mr[m] /= f;
    mi[m] /= f;
  }
  if (wIm === 0) hornerReal(mr, mi, wRe, tk, 0, tk.length, outRe, outIm);
  else hornerComplex(mr, mi, wRe, wIm, tk, outRe, outIm);
  return absSum;
}

/** mr[m] + i mi[m] = sum_{j0 <= j < j1} c_j e_j^m, m <= mr.length - 1, compensated (Kahan); returns sum |c_j| */
function momentSums(cRe: Float64Array, cIm: Float64Array, e: Float64Array, j0: number, j1: number, mr: Float64Array, mi: Float64Array): number {
  const M = mr.length - 1;
  // qr, qi carry each addition's rounding
  const qr = new Float64Array(M + 1);
  const qi = new Float64Array(M + 1);
  let absSum = 0;
  for (let j = j0; j < j1; j++) {
    absSum += cabs(cRe[j], cIm[j]);
    let p = 1;
    for (let m = 0; m <= M; m++) {
      const yr = cRe[j] * p - qr[m];
      const tr = mr[m] + yr;
      qr[m] = tr - mr[m] - yr;
      mr[m] = tr;
      const yi = cIm[j] * p - qi[m];
      const ti = mi[m] + yi;
      qi[m] = ti - mi[m] - yi;
      mi[m] = ti;
      p *= e[j];
    }
  }
  return absSum;
}

/**
 * the Taylor sums at z = (t_k - t0) w for k in [k0, k1), w real (the pareto's Laplace form: the terms ai zi and ar zi are
 * zeros, so two real Horner steps per order), written to out (t0 = 0: k0 = 0, the moments about 0)
 */
function hornerReal(mr: Float64Array, mi: Float64Array, w: number, tk: Float64Array, k0: number, k1: number, outRe: Float64Array, outIm: Float64Array): void {
  const M = mr.length - 1;
  const t0 = k0 === 0 ? 0 : tk[k0];
  for (let k = k0; k < k1; k++) {
    const z = (tk[k] - t0) * w;
    let ar = mr[M];
    let ai = mi[M];
    for (let m = M - 1; m >= 0; m--) {
      ar = ar * z + mr[m];
      ai = ai * z + mi[m];
    }
    outRe[k] = ar;
    outIm[k] = ai;
  }
}

/** the Taylor sums at z = t_k w, w complex */
function hornerComplex(mr: Float64Array, mi: Float64Array, wRe: number, wIm: number, tk: Float64Array, outRe: Float64Array, outIm: Float64Array): void {
  const M = mr.length - 1;
  for (let k = 0; k < tk.length; k++) {
    const t = tk[k];
    const zr = t * wRe;
    const zi = t * wIm;
    let ar = mr[M];
    let ai = mi[M];
    for (let m = M - 1; m >= 0; m--) {
      const nr = ar * zr - ai * zi + mr[m];
      ai = ar * zi + ai * zr + mi[m];
      ar = nr;
    }
    outRe[k] = ar;
    outIm[k] = ai;
  }
}

/** the polynomial sum_m mr[m] z^m (m <= M) at four points by Horner's rule side by side (one chain's latency hides behind
 * the others'; each the same operations in the same order as one chain: the same values to the bit), written to out */
function horner4(mr: Float64Array, M: number, z0: number, z1: number, z2: number, z3: number, out: Float64Array): void {
  let a0 = mr[M];
  let a1 = a0;
  let a2 = a0;
  let a3 = a0;
  for (let m = M - 1; m >= 0; m--) {
    const c = mr[m];
    a0 = a0 * z0 + c;
    a1 = a1 * z1 + c;
    a2 = a2 * z2 + c;
    a3 = a3 * z3 + c;
  }
  out[0] = a0;
  out[1] = a1;
  out[2] = a2;
  out[3] = a3;
}
const H4 = new Float64Array(4);
