/**
 * The Filon rule's spherical Bessel values j_0..j_{M-1}(w) (sphericalBessel, for ./filon.ts) and derived bounds on their
 * error: for each order
 * n < M a constant E_n with |computed j_n(w) - j_n(w)| <= E_n at every double w >= 0, rounding and (in Miller's
 * backward recurrence) the truncated start together. Standard model fl(a op b) = (a op b)(1 + d), |d| <= u = 2^-53,
 * gamma_k = k u / (1 - k u) (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 2.2, 3.1); Math.sin
 * and Math.cos within one ulp (common practice). The tools (DLMF sec. 10.47-10.60):
 * - |j_m(w)| <= w^m / (2m + 1)!! (from the integral j_m(w) = w^m / (2^{m+1} m!) int_{-1}^{1} cos(wt) (1 - t^2)^m dt, 10.54.2);
 * - S_m(w) = w^2 (j_m^2 + y_m^2) = sum_{k<=m} (2k)! (m + k)! / (k!^2 (m - k)!) (2w)^{-2k} (the modulus of h_m^(1), 10.49.6),
 *   so |j_m|, |y_m| <= sqrt(S_m) / w, S_m decreasing in w;
 * - the Wronskian j_{m+1} y_m - j_m y_{m+1} = w^{-2} (10.50.1): a local error d injected into the three-term recurrence
 *   f_{m-1} + f_{m+1} = (2m + 1) / w f_m (10.51.1) reaches order n as d w^2 (j_n y_k - y_n j_k) (k the neighbour of the
 *   injection), at most d sqrt(S_n S_k) by Cauchy-Schwarz.
 * Upward (w > M + 4): the initial errors of j_0, j_1 and each step's 3 roundings propagated by that Green's function;
 * every term is decreasing in w, so the bound at w = M + 4 holds above. Miller (0.5 <= w <= M + 4): the computed run f^
 * against the exact run F_n = L (j_n - r y_n) from the same start (r = j_T / y_T, T = top + 1 where the run starts at 0),
 * f^_n = F_n + e_n; the normalised error (e_n - (F_n / F_v) e_v) / L sums each step's d_k times K(n, k) =
 * -w^2 J_k (y_n - J_n y_v / J_v) (J = j - r y), which stays small where the orders fall (k > w); the truncation is
 * r (j_n y_v - y_n j_v) / J_v. Bounded on cells of w (each majorant at its worst end: those increasing in w at the right,
 * decreasing at the left) that do not straddle an integer (top = M + EXTRA + ceil(w) fixed on each); v, the order
 * normalised to, is the larger of |j_0|, |j_1| as computed, at least sqrt(g / 2) / w less their errors with g = sin^2 w +
 * (sin w / w - cos w)^2 = w^2 (j_0^2 + j_1^2), taken at the cell's middle less its slope bound times half the width.
 * Power series (w < 0.5): the leading factor's 2n roundings, the tail's terms' and sum's, 1 + tail, the product; all
 * increasing in w, taken at 0.5. The table: 19 u (n = 0) to ~250 u (n = 15, turning points of Miller's run).
 */
/** nodes per panel of the Filon rule (degree M - 1 interpolant): the orders j_0..j_{M-1} */
export const M = 16;
/** spherical Bessel orders carried below M in the backward recurrence (Miller's algorithm) */
export const EXTRA = 24;
/** Miller's run is rescaled by 2^-664 (~1e-200, exact) when it passes 1e200 */
const RESCALE = 2 ** -664;

/** 1 / (k (2n + 2k + 1)) at [n * 10 + k]: the ratios of successive terms of the power series of j_n, over -w^2 / 2 */
const SERIES = (() => {
  const r = new Float64Array(M * 10);
  for (let n = 0; n < M; n++) for (let k = 1; k <= 9; k++) r[n * 10 + k] = 1 / (k * (2 * n + 2 * k + 1));
  return r;
})();

/**
 * j_0..j_{M-1}(w) for w >= 0 into out. Upward recurrence where every order is below w (stable there), else Miller's
 * backward recurrence from order M + EXTRA + w, normalised by whichever of j_0, j_1 is larger (they are never both
 * small: j_0^2 + ... sums to 1 with weights 2n + 1).
 */
export function sphericalBessel(w: number, out: Float64Array): void {
  if (w === 0) {
    out.fill(0);
    out[0] = 1;
    return;
  }
  if (w < 0.5) {
    // power series j_n(w) = w^n / (2n + 1)!! sum_k (-w^2 / 2)^k / (k! (2n + 3)(2n + 5)...(2n + 2k + 1)) (DLMF 10.53.1),
    // summed until a term is below 1e-18 of the sum: the ratios of the terms after it are below w^2 / 20 < 1/80, so
    // what is left is below 1e-18 relative too; 9 terms at most leave less than (w^2 / 2)^9 / 9! < 1e-16 relative
    let lead = 1;
    const h = -(w * w) / 2;
    for (let n = 0; n < M; n++) {
      if (n > 0) lead *= w / (2 * n + 1);
      if (lead === 0) {
        out[n] = 0;
        continue;
      }
      // the terms after the first summed on their own, then 1 added (the sum's rounding then ~u: filon-bessel.ts)
      let term = 1;
      let tail = 0;
      for (let k = 1; k <= 9; k++) {
        term *= h * SERIES[n * 10 + k];
        tail += term;
        if (Math.abs(term) < 1e-18 * (1 + tail)) break;
      }
      out[n] = lead * (1 + tail);
    }
    return;
  }
  const s = Math.sin(w);
  const c = Math.cos(w);
  const j0 = s / w;
  const j1 = s / (w * w) - c / w;
  if (w > M + 4) {
    out[0] = j0;
    out[1] = j1;
    for (let n = 1; n + 1 < M; n++) out[n + 1] = ((2 * n + 1) / w) * out[n] - out[n - 1];
    return;
  }
  const top = M + EXTRA + Math.ceil(w);
  let jp = 0;
  let jc = 1e-250;
  for (let n = top; n >= 1; n--) {
    const jm = ((2 * n + 1) / w) * jc - jp;
    jp = jc;
    jc = jm;
    if (n - 1 < M) out[n - 1] = jc;
    if (Math.abs(jc) > 1e200) {
      // rescale the run so far by a power of two (exact)
      for (let k = n - 1; k < M; k++) out[k] *= RESCALE;
      jp *= RESCALE;
      jc *= RESCALE;
    }
  }
  const f = Math.abs(j0) >= Math.abs(j1) ? j0 / out[0] : j1 / out[1];
  for (let n = 0; n < M; n++) out[n] *= f;
}

const U = Number.EPSILON / 2;
const gam = (k: number) => (k * U) / (1 - k * U);
/** margin for the bound's own arithmetic (each majorant a few dozen roundings at most) */
const UP = 1 + 1e-12;
const DOWN = 1 - 1e-12;
/** a subnormal step's absolute error (2^-1074), twice */
const SUB = 2 * 2 ** -1074;

/** S_m(w) as summed (within a few dozen u: the callers' margins) */
function sTerm(m: number, w: number): number {
  const q = 1 / (4 * w * w);
  let t = 1;
  let s = 1;
  // (2k)! (m + k)! / (k!^2 (m - k)!) over its k - 1 value: 2 (2k - 1) (m + k) (m - k + 1) / k
  for (let k = 1; k <= m; k++) {
    t *= ((2 * (2 * k - 1) * (m + k) * (m - k + 1)) / k) * q;
    s += t;
  }
  return s;
}

/** S_m(w) = w^2 (j_m^2 + y_m^2) for m = 0..top (rounded up, or down with low) */
export function sTable(top: number, w: number, low = false): Float64Array {
  const out = new Float64Array(top + 1);
  for (let m = 0; m <= top; m++) out[m] = sTerm(m, w) * (low ? DOWN : UP);
  return out;
}

/** w^m / (2m + 1)!! for m = 0..top, rounded up */
function seriesLead(top: number, w: number): Float64Array {
  const out = new Float64Array(top + 1);
  let x = 1;
  for (let m = 0; m <= top; m++) {
    if (m > 0) x *= w / (2 * m + 1);
    out[m] = x * UP;
  }
  return out;
}

/** the errors of the computed j_0 = sin w / w and j_1 = sin w / w^2 - cos w / w at w >= wa */
function startErrors(wa: number): [number, number] {
  // sin within one ulp (2u of it, <= 2u), the division u: (2u + u (1 + 2u)) / w
  const e0 = ((3.01 * U) / wa) * UP;
  // s / fl(w w): 2u + 2u; c / w: 3u; the difference u of |j_1^| <= (1 / w^2 + 1 / w) 1.01
  const e1 = ((4.02 * U) / (wa * wa) + (3.01 * U) / wa + 1.01 * U * (1 / (wa * wa) + 1 / wa)) * UP;
  return [e0, e1];
}

/** the upward branch's bound at w0 (every term decreasing in w: the bound for all w >= w0) */
function upwardBound(M: number, w0: number): Float64Array {
  const S = sTable(M, w0);
  const J = S.map((s) => Math.sqrt(s) / w0);
  const [e0, e1] = startErrors(w0);
  const E = new Float64Array(M);
  E[0] = e0;
  E[1] = e1;
  const d = new Float64Array(M);
  for (let n = 1; n + 1 < M; n++) {
    // out[n + 1] = fl(fl(fl((2n + 1) / w) out[n]) - out[n - 1]): gamma_3 of the product and u of out[n - 1]
    d[n + 1] = gam(3) * ((2 * n + 1) / w0) * (J[n] + E[n]) + U * (J[n - 1] + E[n - 1]) + SUB;
    const N = n + 1;
    let e = Math.sqrt(S[N] * S[1]) * e0 + Math.sqrt(S[N] * S[0]) * e1;
    for (let m = 2; m <= N; m++) e += d[m] * Math.sqrt(S[N] * S[m - 1]);
    E[N] = e * UP;
  }
  return E;
}

/** the power series branch's bound (w < 0.5; every term increasing in w: taken at 0.5) */
function seriesBound(M: number): Float64Array {
  const w = 0.5;
  const h = (w * w) / 2;
  const lead = seriesLead(M, w);
  const E = new Float64Array(M);
  for (let n = 0; n < M; n++) {
    // tail = sum_{k=1}^{9} t_k, t_k = t_{k-1} h / (k (2n + 2k + 1)): |t_k| <= x r^{k-1}
    const x = h / (2 * n + 3);
    const r = h / (2 * (2 * n + 5));
    const X = (x / (1 - r)) * UP;
    // each t_k carries 4k roundings (h, the ratio, two products), the tail's sum 9 more; 1 + tail one; the
    // product with the lead one and the lead 2n: relative to |j_n| <= lead (1 + X)
    const sumErr = U * (1 + X) + gam(45) * X;
    // what the series leaves: past a term below 1e-18 of the sum (>= 1 - X), or past the 9th term
    const t10 = x * r ** 9;
    const left = Math.max(1.02e-18 * (1 + X), (t10 / (1 - r)) * UP);
    E[n] = lead[n] * (gam(2 * n + 1) * (1 + X + sumErr) + sumErr + left) * UP + SUB;
  }
  return E;
}

/**
 * Lower bounds on |j_v| over [wa, wb] where v (0 or 1) is the order normalised to (the larger of |j_0|, |j_1| as
 * computed), -Infinity where v is never taken there; on sub-cells of ratio 1.002. On each: max(|j_0|, |j_1|) >= sqrt(g /
 * 2) / w, g = sin^2 w + (sin w / w - cos w)^2 at the middle less |g'| <= 1 + 2 (1 + 1/w)(1 + 1/w + 1/w^2) times half the
 * width, or the larger value at the middle less 1/2 per unit of w (|j_n'| <= 1/2, from 10.54.2), less both values'
 * errors (the computed one is the larger); v = 1 only where |j_1| + e1 can pass |j_0| - e0, and v = 0 only where |j_0|
 * + e0 can reach |j_1| - e1; and |j_v| at least its own value's lower bound.
 */
function normaliser(wa: number, wb: number): [number, number] {
  const low: [number, number] = [Infinity, Infinity];
  const seen = [false, false];
  let a = wa;
  while (a < wb) {
    const b = Math.min(wb, a * 1.002);
    const [e0, e1] = startErrors(a);
    const mid = (a + b) / 2;
    const s = Math.sin(mid);
    const c = Math.cos(mid);
    const g = s * s + (s / mid - c) ** 2;
    const slope = 1 + 2 * (1 + 1 / a) * (1 + 1 / a + 1 / (a * a));
    const gLo = g - slope * ((b - a) / 2) - 1e-12;
    const half = 0.5 * ((b - a) / 2);
    const a0 = Math.abs(s / mid);
    const a1 = Math.abs(s / (mid * mid) - c / mid);
    const lo0 = (a0 - e0) * DOWN - half - e0;
    const lo1 = (a1 - e1) * DOWN - half - e1;
    const hi0 = (a0 + e0) * UP + half + e0;
    const hi1 = (a1 + e1) * UP + half + e1;
    const both = Math.max(gLo > 0 ? (Math.sqrt(gLo / 2) / b) * DOWN : 0, Math.max(lo0, lo1)) - 2 * Math.max(e0, e1);
    if (!(hi0 < lo1)) {
      seen[0] = true;
      low[0] = Math.min(low[0], Math.max(both, lo0));
    }
    if (!(hi1 < lo0)) {
      seen[1] = true;
      low[1] = Math.min(low[1], Math.max(both, lo1));
    }
    a = b;
  }
  return [seen[0] ? low[0] : -Infinity, seen[1] ? low[1] : -Infinity];
}

/** the Miller branch's bound on one cell [wa, wb] (top fixed on it), into E (max) */
function millerCell(M: number, top: number, wa: number, wb: number, out: Float64Array): void {
  const T = top + 1;
  const Sa = sTable(T, wa);
  const SbT = sTerm(T, wb) * DOWN;
  const ser = seriesLead(T, wb);
  const J = new Float64Array(T + 1);
  const Y = new Float64Array(T + 1);
  for (let m = 0; m <= T; m++) {
    Y[m] = (Math.sqrt(Sa[m]) / wa) * UP;
    J[m] = Math.min(1, ser[m], Y[m]);
  }
  const yT = Math.sqrt(Math.max(0, SbT / (wb * wb) - J[T] * J[T])) * DOWN;
  const rho = (J[T] / yT) * UP;
  if (!(rho < 1e-6)) {
    out.fill(Infinity);
    return;
  }
  const Jp = J.map((v, m) => (v + rho * Y[m]) * UP);
  // rho |y_k| <= rho |y_T| for k <= T (S_k increases with k)
  const eta = rho * Y[T];
  const w2 = wb * wb * UP;
  // |j_n y_m - y_n j_m| <= the smaller of sqrt(S_n S_m) / w^2 (Cauchy-Schwarz) and |j_n| |y_m| + |y_n| |j_m|
  const cross = (n: number, m: number) => Math.min(Y[n] * Y[m], J[n] * Y[m] + Y[n] * J[m]) * UP;
  const H = (n: number, m: number) => w2 * cross(n, m);
  // |L| = 1e-250 w^2 |y_T| (F_top = 1e-250 = L J_top, J_top = -1 / (w^2 y_T) by the Wronskian): subnormal steps' part
  const tiny = SUB / (1e-250 * wa * wa * yT);
  const E = new Float64Array(T + 2);
  const D = new Float64Array(T + 2);
  for (let n = top - 1; n >= 0; n--) {
    const m = n + 1;
    // f^_{m-1} = fl(fl(fl((2m + 1) / w) f^_m) - f^_{m+1}): gamma_3 of the product, u of f^_{m+1}; |f^_k / L| <= Jp_k + E_k
    D[m] = gam(3) * ((2 * m + 1) / wa) * (Jp[m] + E[m]) + U * (Jp[m + 1] + E[m + 1]) + tiny;
    let e = 0;
    const jn = J[n];
    const yn = Y[n];
    for (let k = n + 1; k <= top; k++) {
      const yk = Y[k];
      const p = yn * yk;
      const q = jn * yk + yn * J[k];
      e += D[k] * (p < q ? p : q);
    }
    E[n] = e * w2 * UP * UP;
  }
  const [e0, e1] = startErrors(wa);
  const lows = normaliser(wa, wb);
  for (const v of [0, 1]) {
    if (!(lows[v] > -Infinity)) continue;
    const Jv = lows[v] - rho * Y[v];
    const den = (Jv - E[v]) * DOWN;
    if (!(den > 0 && Jv > 0)) {
      out.fill(Infinity);
      return;
    }
    const ev = v === 0 ? e0 : e1;
    // sum_k D_k |J_k| over any k: the first-order part gamma_3 sum a_k j_k^2 + u sum |j_k j_{k+1}| <= (gamma_3 + Si(2w) /
    // 2 u) / w by sum (2k + 1) j_k^2 = 1 and sum j_k^2 = Si(2w) / (2w) (DLMF 10.60.9, 10.60.10; Si <= 1.852), the rest
    // (the terms with eta = rho |y_T| or the run's own errors E_k) by the majorants
    let rest = 0;
    for (let k = 1; k <= top; k++) {
      const a = (2 * k + 1) / wa;
      rest += gam(3) * a * ((eta + E[k]) * (J[k] + eta) + J[k] * eta) + U * ((eta + E[k + 1]) * (J[k] + eta) + J[k + 1] * eta) + tiny * (J[k] + eta);
    }
    const first = ((gam(3) + 0.926 * U) / wa) * UP + rest * UP;
    for (let n = 0; n < M; n++) {
      // (the order normalised to is exact up to its own value's error and the last two roundings: W = 0)
      const W = n === v ? 0 : cross(n, v);
      const Q = (w2 * W) / Jv;
      // (or the majorants term by term where the orders are past w: there J_k falls faster than Q_n grows)
      let byTerm = 0;
      for (let k = Math.max(n, v) + 1; k <= top; k++) byTerm += D[k] * Jp[k];
      let N = Math.min(first, byTerm * UP) * Q;
      for (let k = v + 1; k <= n; k++) N += D[k] * (Jp[n] / Jv) * H(v, k);
      for (let k = n + 1; k <= v; k++) N += D[k] * H(n, k);
      const ratio = (Jp[n] + E[n]) / den;
      const err = ev * ratio + (J[v] * N) / den + (rho * W) / Jv + gam(2) * (J[v] + ev) * ratio;
      out[n] = Math.max(out[n], err * UP);
    }
  }
}

let TABLE: Float64Array | null = null;

/**
 * E_n (n < M) for sphericalBessel with M orders, EXTRA orders carried in Miller's start (top = M + EXTRA + ceil(w)),
 * the upward recurrence above w = M + 4 and the power series below 0.5. Computed once (a few ms).
 */
export function besselErrors(M: number, EXTRA: number): Float64Array {
  if (TABLE && TABLE.length === M) return TABLE;
  const E = new Float64Array(M);
  const up = upwardBound(M, M + 4);
  const se = seriesBound(M);
  const mi = new Float64Array(M);
  const hi = M + 4;
  // cells (k - 1, k] (ceil(w) = k) from 0.5, each split geometrically (ratio 1.05; the normaliser on finer ones)
  for (let k = 1; k <= hi; k++) {
    let a = Math.max(0.5, k - 1);
    const end = k;
    const top = M + EXTRA + k;
    while (a < end) {
      const b = Math.min(end, a * 1.05);
      millerCell(M, top, a, b, mi);
      a = b;
    }
  }
  for (let n = 0; n < M; n++) E[n] = Math.max(up[n], se[n], mi[n]) + 1e-300;
  TABLE = E;
  return E;
}
