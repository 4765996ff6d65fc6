import { lgamma, lgammaErr } from "../families/special";
import { tanHalfPi } from "./stable-kernel";

/**
 * Derived bounds on the derivatives of a stable density (alpha != 1, S1), from its CF alone: for the standard law with
 * phi(t) = exp(psi(t)), psi(t) = -|t|^alpha (1 - i beta tan(pi alpha/2) sign t), and any m with the integrals finite,
 *   |z|^m |f^(k)(z)| = |(1/2pi) int d^m/dt^m [(-it)^k phi(t)] e^{-itz} dt| <= (1/pi) int_0^inf |d^m/dt^m [t^k phi(t)]| dt
 * (m integrations by parts; phi(-t) is the conjugate of phi(t), so both half-lines give the same integral). On t > 0
 * psi^(r) = -(alpha)_r t^(alpha - r) (1 - i beta T) exactly ((alpha)_r the falling factorial), so phi^(j) = P_j phi with
 * P_j = sum_n p_jn t^(n alpha - j), p_(j+1)n = (n alpha - j) p_jn + c p_j(n-1), c = -alpha (1 - i beta T), and by
 * Leibniz d^m[t^k phi] = sum_n q_n t^(k + n alpha - m) phi with q_n = sum_i C(m, i) (k)_i p_(m-i)n: the bound is
 *   B_m = (1/pi) sum_n |q_n| Gamma((k + 1 + n alpha - m)/alpha) / alpha      (int_0^inf t^e e^{-t^alpha} dt).
 * Valid for m < k + 1 + alpha (the n = 1 term integrable at 0, the (m-1)-th derivative continuous there; the n = 0 term is
 * (k)_m, zero for m > k). So |f^(k)(z)| <= min_m B_m / |z|^m. Each B_m is formed in a few dozen roundings and then
 * enlarged by 1e-12 relative (far above them); each Gamma is taken at the top of lgamma's derived bound.
 */
export interface StableSmooth {
  /** B_m for m = 0..M (see the header) */
  readonly B: readonly number[];
}

/** enlargement of each B_m over the roundings of its coefficients and sums (a few dozen, each within an ulp) */
const SAFETY = 1 + 1e-12;

export function stableSmooth(alpha: number, beta: number, k: number): StableSmooth | null {
  if (!(alpha > 0 && alpha < 2) || alpha === 1 || !(Math.abs(beta) <= 1)) return null;
  const T = tanHalfPi(alpha);
  // c = -alpha (1 - i beta T) as (re, im)
  const cr = -alpha;
  const ci = alpha * beta * T;
  if (!Number.isFinite(ci)) return null;
  const M = Math.ceil(k + alpha); // m < k + 1 + alpha
  // p[j][n]: complex coefficients (re, im), n = 0..j
  const pr: number[][] = [[1]];
  const pi: number[][] = [[0]];
  for (let j = 0; j < M; j++) {
    const nr: number[] = new Array(j + 2).fill(0);
    const ni: number[] = new Array(j + 2).fill(0);
    for (let n = 0; n <= j; n++) {
      const f = n * alpha - j;
      nr[n] += f * pr[j][n];
      ni[n] += f * pi[j][n];
      // times c
      nr[n + 1] += cr * pr[j][n] - ci * pi[j][n];
      ni[n + 1] += cr * pi[j][n] + ci * pr[j][n];
    }
    pr.push(nr);
    pi.push(ni);
  }
  const B: number[] = [];
  for (let m = 0; m <= M; m++) {
    if (!(m < k + 1 + alpha)) break;
    let sum = 0;
    for (let n = 0; n <= m; n++) {
      let qr = 0;
      let qi = 0;
      for (let i = 0; i <= m; i++) {
        if (m - i < n) continue;
        const w = binom(m, i) * falling(k, i);
        if (w === 0) continue;
        qr += w * pr[m - i][n];
        qi += w * pi[m - i][n];
      }
      const q = Math.hypot(qr, qi);
      if (q === 0) continue;
      const e = k + n * alpha - m;
      if (!(e > -1)) return null;
      const x = (e + 1) / alpha;
      // Gamma(x) within its lgamma bound (exp within an ulp)
      sum += (q * Math.exp(lgamma(x) + lgammaErr(x)) * (1 + 4 * Number.EPSILON)) / alpha;
    }
    B.push((sum / Math.PI) * SAFETY * (1 + 64 * Number.EPSILON * (m + 1) * (m + 1)));
  }
  return { B };
}

/** A bound on |f^(k)| of the standard law over the z-interval [za, zb] (min over m of B_m / min |z|^m). */
export function smoothOver(s: StableSmooth, za: number, zb: number): number {
  const d = za > 0 ? za : zb < 0 ? -zb : 0;
  let best = s.B[0];
  let p = 1;
  for (let m = 1; m < s.B.length; m++) {
    p *= d;
    if (p > 0) best = Math.min(best, s.B[m] / p);
  }
  return best;
}

function binom(m: number, i: number): number {
  let r = 1;
  for (let j = 1; j <= i; j++) r = (r * (m - i + j)) / j;
  return r;
}

function falling(k: number, i: number): number {
  let r = 1;
  for (let j = 0; j < i; j++) r *= k - j;
  return r;
}
