import type { TableRound } from "../table-rounding";
import { telescopedDrift, type DW } from "./dd-telescope";

const U = Number.EPSILON / 2;

/**
 * A derived bound on a table v_k ~ p_k, k = k0..k1 (consecutive), of a law on the integers whose ratio r_k = p_{k+1} /
 * p_k is known in closed form (computed within relRatio of itself) and non-increasing in k (log-concave: Poisson,
 * binomial, negative binomial with r >= 1), whatever the accuracy of the formula that gave v, a posteriori:
 *  - with d_k = log(v_k / p_k), |d_{k+1} - d_k| = |log(v_{k+1} / (v_k r_k))|: the computed quotient (two divisions) and
 *    the ratio's own error, so |d_k - d_a| <= D_k summed from the largest entry a; where the ratio is also given as a
 *    double word (ratioDW), D_k is at most the telescoped log(v_k / (v_a prod r)) (./dd-telescope.ts), the smaller taken;
 *  - the mass outside the window: at most p_{k1} r_{k1} / (1 - r_{k1}) above (ratios non-increasing) and p_{k0} s / (1 - s),
 *    s = 1 / r_{k0-1}, below (0 at the support's ends), with p at most v e^{1 + D} (checked below);
 *  - normalisation: sum_k v_k e^{-d_k} = 1 - T, T in [0, Tmax], so e^{-d_a} lies in [(1 - Tmax) / sum v_k e^{D_k},
 *    1 / sum v_k e^{-D_k}] (the sums within gamma_n).
 * Then |v_k - p_k| <= v_k (e^{|d_a| + D_k} - 1) (`pointErr`): every entry within `pmf`, their sum within `l1`, and Tmax bounds the mass
 * the window leaves out. null where a step cannot be bounded (a zero or subnormal entry, |d_a| past 1).
 */
export function bulkRound(
  v: Float64Array,
  k0: number,
  ratio: (k: number) => number,
  relRatio: number,
  atLow: boolean,
  atTop: boolean,
  ratioDW?: { at: (k: number) => DW | null; rel: number },
): { round: TableRound; tail: number; pointErr: Float64Array } | null {
  const n = v.length;
  if (n < 2) return null;
  let a = 0;
  for (let k = 0; k < n; k++) {
    if (!(v[k] >= 1e-300)) return null;
    if (v[k] > v[a]) a = k;
  }
  const D = new Float64Array(n);
  const step = (i: number) => {
    // |log(v_{i+1} / (v_i r))| from the computed quotient q (two divisions, and the ratio's error)
    const q = v[i + 1] / v[i] / ratio(k0 + i);
    const x = Math.abs(q - 1) + 2 * U + relRatio;
    if (!(x < 0.5)) return Infinity;
    return (x / (1 - x)) * (1 + 2 * U);
  };
  for (let i = a + 1; i < n; i++) D[i] = (D[i - 1] + step(i - 1)) * (1 + U);
  for (let i = a - 1; i >= 0; i--) D[i] = (D[i + 1] + step(i)) * (1 + U);
  // where the ratio is given as a double word, the drift telescoped (./dd-telescope.ts) where smaller: it does not grow
  // with the distance from a
  const T = ratioDW ? telescopedDrift(v, k0, a, ratioDW.at, ratioDW.rel) : null;
  if (T) for (let k = 0; k < n; k++) if (T[k] < D[k]) D[k] = T[k];
  // the mass outside, with p at most v e^{1 + D} (|d_a| <= 1 is checked after)
  let tail = 0;
  if (!atTop) {
    const r = ratio(k0 + n - 1) * (1 + relRatio);
    if (!(r < 1)) return null;
    tail += v[n - 1] * Math.exp(1 + D[n - 1]) * (r / (1 - r));
  }
  if (!atLow) {
    const s = (1 / ratio(k0 - 1)) * (1 + relRatio + U);
    if (!(s < 1)) return null;
    tail += v[0] * Math.exp(1 + D[0]) * (s / (1 - s));
  }
  tail *= 1 + 8 * U;
  // (e^D <= 1 + D + D^2 and e^-D >= 1 - D for 0 <= D <= 1: no exp per entry) by Kahan's compensated sums: each term
  // within 3u of itself, the sums of these positive terms within (2u + O(n u^2)) of themselves (Higham, Accuracy and
  // Stability of Numerical Algorithms, 2nd ed., sec. 4.3), the O(n u^2) taken generously as 4 n^2 u^2
  let up = 0;
  let cu = 0;
  let lo = 0;
  let cl = 0;
  for (let k = 0; k < n; k++) {
    const d = D[k];
    if (!(d <= 1)) return null;
    const yu = v[k] * (1 + d * (1 + d)) - cu;
    const tu = up + yu;
    cu = tu - up - yu;
    up = tu;
    const yl = v[k] * (1 - d) - cl;
    const tl = lo + yl;
    cl = tl - lo - yl;
    lo = tl;
  }
  const g0 = 6 * U + 4 * n * n * U * U;
  const g = g0 / (1 - g0);
  up *= 1 + g;
  lo *= 1 - g;
  const eHigh = 1 / lo;
  const eLow = (1 - tail) / up;
  const da = Math.max(Math.abs(Math.log(eHigh)), Math.abs(Math.log(eLow))) * (1 + 4 * U) + 4 * U;
  if (!(da <= 1)) return null;
  let pmf = 0;
  let l1 = 0;
  const pointErr = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    // (e^x - 1 <= x (1 + x) for 0 <= x <= 1, expm1 past it)
    const x = da + D[k];
    const e = v[k] * (x <= 1 ? x * (1 + x) : Math.expm1(x)) * (1 + 4 * U);
    pointErr[k] = e;
    if (e > pmf) pmf = e;
    l1 += e;
  }
  return { round: { pmf, l1: l1 * (1 + n * Number.EPSILON) }, tail, pointErr };
}
