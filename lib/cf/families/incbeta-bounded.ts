/**
 * The regularised incomplete beta function I_x(a, b) and its complement with derived bounds on their absolute errors,
 * where a sum of positive terms reaches it within a budget of terms (else null).
 * I_x(a, b) = x^a y^b / (a B(a, b)) sum_n t_n, t_0 = 1, t_{n+1} = t_n x (a + b + n)/(a + 1 + n), y = 1 - x
 * (DLMF 8.17.8 with 15.2.1), summed on the side below the mean (x <= a/(a+b); above, I_y(b, a) = 1 - I_x(a, b),
 * A&S 26.5.2), where the smaller value is, or where that series is too long on the other side. The ratios fall to x when
 * b > 1 and rise to x when b <= 1, so once they are below 1 the rest after t_N is at most t_N r/(1 - r) with r = max of
 * the next ratio and x (b <= 1) or the next ratio (b > 1). Rounding: u = 2^-53 per operation, Math.log/exp within one ulp (2u relative), log Gamma
 * by lgammaErr (./special.ts); first-order propagation with a 1% margin.
 */
import { lgamma, lgammaErr } from "./special";

const U = Number.EPSILON / 2;
/** the most terms summed by default (about 4 us; callers retry the rare point beyond it with a larger budget) */
const BUDGET = 2000;

export interface IncBetaShape {
  a: number;
  b: number;
  /** log B(a, b) and a bound on its error */
  lB: number;
  eLB: number;
}

export function incBetaShape(a: number, b: number): IncBetaShape {
  const s = a + b;
  const la = lgamma(a);
  const lb = lgamma(b);
  const ls = lgamma(s);
  const t = la + lb;
  const lB = t - ls;
  // the rounding of a + b, found exactly (TwoSum), moves log Gamma by at most |psi| times it, |psi(x)| <= max(log x,
  // 1/x + 0.6) (psi(x) = psi(x + 1) - 1/x >= -gamma - 1/x, psi(x) < log x)
  const bb = s - a;
  const ds = Math.abs(a - (s - bb) + (b - bb));
  const eLB = lgammaErr(a) + lgammaErr(b) + lgammaErr(s) + Math.max(Math.log(s), 1 / s + 0.6) * ds * 1.01 + U * (Math.abs(t) + Math.abs(lB));
  return { a, b, lB, eLB: 1.01 * eLB };
}

export interface IncBeta {
  /** I_x(a, b) and 1 - I_x(a, b) */
  v: number;
  /** summed in y (the series for I_y(b, a)): the caller charges the shift of y, else of x */
  fromY: boolean;
  /** an upper bound on u f(u) for the variable summed (u = x or y, f its beta density): a relative shift r of it moves
   * I by at most r u f(u) (to first order) */
  uf: number;
  c: number;
  /** bounds on their absolute errors */
  e: number;
  ce: number;
}

/**
 * I_x(a, b) from x and y = 1 - x, each given within rx relative of the exact pair (x + y = 1): the bound covers the
 * mismatch of the two (y against 1 - x) but not the argument's own shift, which the caller charges as density times
 * shift. null where both series would need more than `budget` terms.
 */
export function incBetaBounded(s: IncBetaShape, x: number, y: number, rx: number, budget = BUDGET): IncBeta | null {
  if (!(x > 0)) return x === 0 ? { v: 0, c: 1, e: 0, ce: 0, fromY: false, uf: 0 } : null;
  if (!(y > 0)) return y === 0 ? { v: 1, c: 0, e: 0, ce: 0, fromY: true, uf: 0 } : null;
  // the side below the mean first (the smaller value, relative accuracy); where its series is too long, the other
  // side's (whose terms may rise before they fall), the smaller value then 1 minus it (still within its bound)
  let swap = x * (s.a + s.b) > s.a;
  let r = swap ? side(s.b, s.a, y, x, s.lB, s.eLB, rx, budget) : side(s.a, s.b, x, y, s.lB, s.eLB, rx, budget);
  if (!r) {
    swap = !swap;
    r = swap ? side(s.b, s.a, y, x, s.lB, s.eLB, rx, budget) : side(s.a, s.b, x, y, s.lB, s.eLB, rx, budget);
  }
  if (!r) return null;
  const other = 1 - r.v;
  const oe = r.e + U * other;
  return swap ? { v: other, c: r.v, e: oe, ce: r.e, fromY: true, uf: r.uf } : { v: r.v, c: other, e: r.e, ce: oe, fromY: false, uf: r.uf };
}

/** I_x(a, b) by the series, x <= a/(a + b) */
function side(a: number, b: number, x: number, y: number, lB: number, eLB: number, rx: number, budget: number): { v: number; e: number; uf: number } | null {
  // the ratios tend to x (from above when b > 1, from below when b <= 1, where they reach near x once n >> a): a term
  // falls below 2^-60 of the first only after about 41.6 / -log x of them; beyond the budget, give up at once
  if (41.6 > -Math.log(x) * budget) return null;
  const ab = a + b;
  let t = 1;
  let sum = 1;
  let terr = 0;
  let run = 0;
  let n = 0;
  let rest = 0;
  for (;;) {
    // t_{n+1} = t_n x (a + b + n)/(a + 1 + n): a + b and the two sums, the product, the quotient, the product (6u)
    const ratio = (x * (ab + n)) / (a + 1 + n);
    t *= ratio;
    n++;
    sum += t;
    terr += 6 * n * U * t;
    run += U * sum;
    const next = (x * (ab + n)) / (a + 1 + n);
    const rho = (b > 1 ? next : Math.max(next, x)) * (1 + 8 * U);
    if (rho < 1 && t * rho <= 2 ** -60 * sum * (1 - rho)) {
      rest = (1.01 * t * rho) / (1 - rho);
      break;
    }
    if (n >= budget || !(sum <= 1e300)) return null;
  }
  const lx = Math.log(x);
  const ly = Math.log(y);
  const la = Math.log(a);
  const p1 = a * lx;
  const p2 = b * ly;
  const s1 = p1 + p2;
  const s2 = s1 - la;
  const L = s2 - lB;
  // the logs 2u relative, the products u, the three sums u each, log B's own; y against 1 - x: y/(1 - x) within
  // rx (1 + x/y), raised to b
  const eL = 1.01 * (U * (3 * Math.abs(p1) + 3 * Math.abs(p2) + 2 * Math.abs(la) + Math.abs(s1) + Math.abs(s2) + Math.abs(L)) + b * rx * (1 + x / y)) + eLB;
  // far out e^L alone may underflow while the product does not: then e^{L + log sum} (the log's rounding added)
  const lsum = L > -700 ? 0 : Math.log(sum);
  const v = L > -700 ? Math.exp(L) * sum : Math.exp(L + lsum);
  const eTot = eL + U * (2 * Math.abs(lsum) + (lsum ? Math.abs(L + lsum) : 0));
  const rs = (1.01 * (terr + run) + rest) / sum;
  // x f(x) = x^a y^(b-1) / B(a, b) = e^L a / y, raised by its own error bound
  const uf = Math.exp(L + Math.log(a / y) + eTot + 8 * U * (1 + Math.abs(L))) * 1.01 + (v < 2 ** -1020 ? 8 * Number.MIN_VALUE : 0);
  return { v, e: v * 1.01 * (Math.expm1(eTot) + 3 * U + rs) + (v < 2 ** -1020 ? 8 * Number.MIN_VALUE : 0), uf };
}

/**
 * I_x(a, b) and 1 - I_x(a, b) at an exact double x in (0, 1) with their bounds: y = 1 - x is formed (within u
 * relative), and where the sum ran in y its shift is charged as u y f(y). Points past the default budget get a larger
 * one (about 2 ms); null past that.
 */
export function incBetaValue(a: number, b: number, x: number): IncBeta | null {
  const s = incBetaShape(a, b);
  const r = incBetaBounded(s, x, 1 - x, U) ?? incBetaBounded(s, x, 1 - x, U, 1e6);
  if (!r || !r.fromY) return r;
  const shift = 1.01 * U * r.uf;
  return { ...r, e: r.e + shift, ce: r.ce + shift };
}
