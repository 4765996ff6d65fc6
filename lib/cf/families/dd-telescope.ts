// The drift of a table's relative errors from its largest entry, telescoped in double-word arithmetic (./bulk-bound.ts).
import { twoProdErr } from "../moment-error";

const U = Number.EPSILON / 2;

/** a double-word number hi + lo (|lo| <= ulp(hi) / 2) */
export interface DW {
  hi: number;
  lo: number;
}

/** Fast2Sum (Dekker), |a| >= |b|: a + b exactly as hi + lo */
function fast2Sum(a: number, b: number): DW {
  const s = a + b;
  return { hi: s, lo: b - (s - a) };
}

/** x y for double words by Dekker's TwoProduct and the cross terms (DWTimesDW); null where TwoProduct does not apply */
function mulDW(x: DW, y: DW): DW | null {
  const ch = x.hi * y.hi;
  const cl1 = twoProdErr(x.hi, y.hi, ch);
  if (cl1 === null) return null;
  const cl3 = cl1 + (x.hi * y.lo + x.lo * y.hi);
  return fast2Sum(ch, cl3);
}

/** x / b for a double word x and a double b (DWDivFP): q1 = x_hi / b, the remainder by TwoProduct, q2 = r / b */
function divDWByFP(x: DW, b: number): DW | null {
  const q1 = x.hi / b;
  const p = q1 * b;
  const e = twoProdErr(q1, b, p);
  if (e === null) return null;
  const r = x.hi - p - e + x.lo;
  return fast2Sum(q1, r / b);
}

/** a / y for a double a and a double word y: q1 = a / y_hi, the remainder a - q1 y by TwoProduct, q2 = r / y_hi */
function divFPByDW(a: number, y: DW): DW | null {
  const q1 = a / y.hi;
  const p = q1 * y.hi;
  const e = twoProdErr(q1, y.hi, p);
  if (e === null) return null;
  const r = a - p - e - q1 * y.lo;
  return fast2Sum(q1, r / y.hi);
}

/**
 * Bounds D_k on |d_k - d_a|, d_k = log(v_k / p_k), for a table v of a law whose ratios r_k = p_{k+1} / p_k are given as
 * double words within `rel` of themselves (ratioDW; null where it cannot say): d_k - d_a = log Q_k exactly, Q_k = v_k /
 * (v_a prod_{i=a}^{k-1} r_i) above a and v_k prod_{i=k}^{a-1} r_i / v_a below, so the product telescopes and no rounding
 * adds up step by step (the stepwise bound of ./bulk-bound.ts grows with the distance from a). Q_k in double words: each
 * product and quotient within a few u^2 of itself (Joldes, Muller & Popescu, Tight and rigorous error bounds for basic
 * building blocks of double-word arithmetic, ACM TOMS 2017, recalled from memory: at most 7 u^2 for these algorithms),
 * taken as 32 u^2, and each ratio within rel, so the computed Q_k is within eta = |k - a| (rel + 32 u^2) + 96 u^2 of
 * the exact one; with delta = (Q_hi - 1) + Q_lo (Q_hi - 1 exact, Sterbenz; the sum one rounding),
 * |log Q| <= |delta| (1 + u) / (1 - |delta| (1 + u)) + eta / (1 - eta). Infinity at k where |delta| reaches 1/2 or an
 * operation does not apply; null where a ratio cannot be given.
 */
export function telescopedDrift(v: Float64Array, k0: number, a: number, ratioDW: (k: number) => DW | null, rel: number): Float64Array | null {
  const n = v.length;
  const D = new Float64Array(n);
  const bound = (Q: DW | null, m: number) => {
    if (!Q) return Infinity;
    const delta = Math.abs(Q.hi - 1 + Q.lo);
    const eta = m * (rel + 32 * U * U) + 96 * U * U;
    const x = delta * (1 + U);
    if (!(x < 0.5) || !(eta < 0.5)) return Infinity;
    return (x / (1 - x) + eta / (1 - eta)) * (1 + 4 * U);
  };
  let P: DW | null = { hi: 1, lo: 0 };
  for (let k = a + 1; k < n; k++) {
    const r = ratioDW(k0 + k - 1);
    if (!r) return null;
    P = P && mulDW(P, r);
    const W = P && mulDW(P, { hi: v[a], lo: 0 });
    D[k] = bound(W && divFPByDW(v[k], W), k - a);
  }
  P = { hi: 1, lo: 0 };
  for (let k = a - 1; k >= 0; k--) {
    const r = ratioDW(k0 + k);
    if (!r) return null;
    P = P && mulDW(P, r);
    const X = P && mulDW(P, { hi: v[k], lo: 0 });
    D[k] = bound(X && divDWByFP(X, v[a]), a - k);
  }
  return D;
}

/**
 * lambda / (k + 1) as a double word (the Poisson ratio): q = fl(lambda / (k + 1)), the remainder lambda - q (k + 1) by
 * TwoProduct (lambda - p exact, Sterbenz), divided once more: within 4 u^2 of the exact ratio (two roundings of the
 * remainder's u-sized share); null where TwoProduct does not apply.
 */
export function quotientDW(lambda: number, k: number): DW | null {
  const d = k + 1;
  const q = lambda / d;
  const p = q * d;
  const e = twoProdErr(q, d, p);
  if (e === null) return null;
  return fast2Sum(q, (lambda - p - e) / d);
}

/** the relative error bound of quotientDW */
export const QUOTIENT_DW_REL = 4 * U * U;
