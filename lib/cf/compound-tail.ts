// A Chernoff bound on the mass a compound's lattice table leaves past its end (./compound-table.ts).
import type { Node } from "./node";

const EPS = Number.EPSILON;
const U = EPS / 2;

/**
 * P(S >= L g) for S = X_1 + ... + X_N on g Z (the severity sev_i = P(X = i g), i >= 0, whole: nothing past its end, each
 * entry within err_i), by Markov's inequality on e^{s S / g} (Chernoff): at most E[z^N] e^{-s L} with z = E e^{s X / g}
 * = sum_i P(X = i g) e^{s i} <= sum_i (sev_i + err_i) e^{s i}, the count's log-pgf K(w) = log E e^{w N} non-decreasing in
 * w (its derivative is a tilted mean of N >= 0). The sum of positive terms within (n + 4) eps and each e^{s i} (with
 * the top exponent s (n - 1) factored out) within 4u (s n + s (n - 1) + 1) of itself, log z rounded up past its rounding; K from the count's closed
 * form (countCgf at real w: Poisson lambda (z - 1), negative binomial r (log(1 - a) - log(1 - a z))) taken within
 * 64 eps (1 + |K| + s L + the magnitudes its roundings scale with) of itself, z kept up to the midpoint of 1 and the radius
 * of convergence 1 / a. Every s tried gives a bound; the least of a golden-section search over s (the exponent is convex in
 * s) is returned; Infinity without an (a, b, 0) count with 0 <= a < 1 and a log-pgf, or where no s gives a finite value.
 */
export function compoundTailBound(N: Node, sev: Float64Array, err: Float64Array, L: number): number {
  const pj = N.panjer;
  // (a, b, 0) counts only: a = 0 Poisson(b), a = q in (0, 1) negative binomial(1 + b / a, 1 - a)
  if (!pj || pj.c1 !== undefined || !(pj.a >= 0 && pj.a < 1) || !(pj.a > 0 ? pj.b >= 0 : pj.b > 0) || !N.countCgf || !(L > 0)) return Infinity;
  const a = pj.a;
  const r = a > 0 ? 1 + pj.b / a : 0;
  const n = sev.length;
  // z up to the midpoint of 1 and the radius 1 / a
  const logZMax = a > 0 ? Math.log(0.5 * (1 + 1 / a)) : Infinity;
  // the magnitudes the closed form's roundings scale with: lambda e^w (Poisson), r (|log(1 - a)| + |log(1 - a z)| +
  // a z / (1 - a z)) (negative binomial: the last from the rounding of 1 - a z)
  const scale = (w: number) => {
    const z = Math.exp(w);
    return a > 0 ? r * (Math.abs(Math.log(1 - a)) + Math.abs(Math.log(1 - a * z)) + (a * z) / (1 - a * z)) : pj.b * z;
  };
  const wr = new Float64Array(1);
  const wi = new Float64Array(1);
  const re = new Float64Array(1);
  const im = new Float64Array(1);
  // log of sum_i (sev_i + err_i) e^{s i}, rounded up: the top exponent factored out
  const logZ = (s: number) => {
    const top = s * (n - 1);
    let sum = 0;
    for (let i = 0; i < n; i++) sum += (Math.max(sev[i], 0) + err[i]) * Math.exp(s * i - top);
    if (!(sum > 0)) return NaN;
    const up = sum * (1 + (n + 4) * EPS + 4 * U * (s * n + top + 1));
    const w = top + Math.log(up);
    return w + EPS * (Math.abs(top) + Math.abs(Math.log(up)) + 1);
  };
  const bound = (s: number) => {
    const w = logZ(s);
    if (!(w <= logZMax)) return Infinity;
    wr[0] = w;
    N.countCgf!(wr, wi, re, im);
    const K = re[0];
    if (!Number.isFinite(K)) return Infinity;
    const e = K - s * L + 64 * EPS * (1 + Math.abs(K) + s * L + scale(w));
    return Math.exp(e) * (1 + 4 * EPS);
  };
  let best = Infinity;
  const f = (s: number) => {
    const b = bound(s);
    if (b < best) best = b;
    return Math.log(b);
  };
  // bracket: s doubled while the bound falls and stays finite
  let hi = 1 / Math.max(n, 1);
  let fhi = f(hi);
  for (let i = 0; i < 60; i++) {
    const f2 = f(2 * hi);
    if (!(f2 < fhi)) break;
    hi *= 2;
    fhi = f2;
  }
  // golden section on [0, 2 hi]
  let lo = 0;
  let up = 2 * hi;
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = up - g * (up - lo);
  let x2 = lo + g * (up - lo);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let i = 0; i < 60; i++) {
    if (f1 <= f2) {
      up = x2;
      x2 = x1;
      f2 = f1;
      x1 = up - g * (up - lo);
      f1 = f(x1);
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + g * (up - lo);
      f2 = f(x2);
    }
  }
  return best;
}

/**
 * The mass a table of a law's whole mass 1 leaves out, from its entries (within l1 together of the exact ones): 1 - sum,
 * the sum compensated (Neumaier: within 2u |s| + gamma_n^2 sum |p|, Higham, Accuracy and Stability of Numerical
 * Algorithms, 2nd ed., sec. 4.3) and the subtraction within u, plus l1 (as ./compile.ts withTrustedTail widens it).
 */
export function restBound(p: Float64Array, l1: number): number {
  let s = 0;
  let c = 0;
  for (let k = 0; k < p.length; k++) {
    const v = Math.max(p[k], 0);
    const z = s + v;
    c += Math.abs(s) >= v ? s - z + v : v - z + s;
    s = z;
  }
  s += c;
  const n = p.length + 2;
  const g2 = ((n * U) / (1 - n * U)) ** 2;
  return (Math.max(0, 1 - s) + (2 * U + g2) * s + U + l1) * (1 + 4 * U);
}
