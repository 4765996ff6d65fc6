/**
 * The Student t's log-CF for large nu, with a derived bound on its absolute error: the normal variance mixture
 * phi = E exp(-z^2 / (2V)), V ~ chi^2_nu (JKB vol. 2, ch. 28), z = sqrt(nu) scale |t|, as a ratio of two integrals in
 * y = log V, each taken about its own point e1 (v = e1 e^u) so that only O(1) quantities are added:
 *   log phi = T(e1) + log I(e1/2, z^2/(2 e1)) - log I(nu/2, 0),  I(a, b) = int exp(h u - a expm1(u) - b expm1(-u)) du,
 * h = nu/2, T(e) = h log(e/nu) - (e - nu)/2 - z^2/(2e); the identity holds for every e1 > 0 (the change of variable), and
 * e1 = nu + d, d = 2 z^2/(nu + sqrt(nu^2 + 4 z^2)) puts the second integrand's peak at u = 0.
 * Each I by the trapezoidal rule with step w/4 (w = 1/sqrt(a + b), the peak's width), bounded by
 *  - discretisation: 2 (M/I)/(e^{2 pi beta/s} - 1) (Trefethen & Weideman 2014, SIAM Review 56, Thm 5.1) with
 *    M/I = K_h(x cos beta)/K_h(x) <= e^{(1 - cos beta) x} (cos beta)^{-max(h, 1/2)}, x = 2 sqrt(ab) (the integral is
 *    2 e^{a+b} (b/a)^{h/2} K_h(x), DLMF 10.32.10 after e^u = sqrt(b/a) e^v; b = 0: Gamma(h) a^{-h} e^a, ratio (cos beta)^{-h};
 *    besselKLogSlope in ./bessel-bounded.ts), the best of a few beta = c/sqrt(a + b) (at most 1.5);
 *  - truncation: the integrand is log-concave, so past the last node u_j the terms fall at least by the last ratio q:
 *    tail <= v_j q/(1 - q);
 *  - rounding: each term's exponent by a running error bound (the node's rounding through the exponent's slope), exp one
 *    ulp, the positive sum by a running bound (Higham 2002, sec. 4.2), all as weighted sums over the terms themselves.
 * T's log1p(x) - x (x = d/nu >= 0) by its alternating series to below 2^-60 of x^2/2 (remainder below the first
 * omitted term) for x < 1/2, else log1p; x's rounding (and that of e1 = nu + d) through |dT/dx| = h x/(1 + x).
 */
import type { Bounded } from "./bessel-bounded";

const U = Number.EPSILON / 2;
/** strip half-widths beta tried: c / sqrt(a + b) (the log-ratio is about beta^2 (a + b), the exponent 8 pi beta sqrt(a + b)) */
const BETA_C = [2, 4, 8, 12.5, 20, 30];

/** log I(a, b) (module note) with its bound; m: a bound on |d log I / db| */
function peakBounded(half: number, a: number, b: number): Bounded & { m: number } {
  const h = 1 / (4 * Math.sqrt(a + b));
  let s = 1; // the u = 0 term: exp(0)
  let run = 0;
  let werr = 2 * U;
  let wm = 0;
  let tail = 0;
  for (const dir of [1, -1]) {
    let prev = 1;
    let j = 1;
    for (; j < 100000; j++) {
      const u = dir * j * h;
      const em = Math.expm1(u);
      const ep = Math.expm1(-u);
      const p1 = half * u;
      const p2 = a * em;
      const p3 = b * ep;
      const f = p1 - p2 - p3;
      const slope = Math.abs(half - a * (em + 1) + b * (ep + 1));
      const df = U * (Math.abs(p1) + 3 * Math.abs(p2) + 3 * Math.abs(p3) + Math.abs(p1 - p2) + Math.abs(f)) + U * Math.abs(u) * slope;
      const v = Math.exp(f);
      s += v;
      run += U * s;
      werr += v * (1.01 * df + 2 * U);
      wm += v * Math.abs(ep);
      if (v < 1e-18) {
        const q = (v / prev) * (1 + 8 * (df + U));
        tail += q < 1 ? (v * q) / (1 - q) : Infinity;
        break;
      }
      prev = v;
    }
    if (j >= 100000) tail = Infinity;
  }
  const x = 2 * Math.sqrt(a * b);
  let disc = Infinity;
  for (const cb of BETA_C) {
    const beta = Math.min(1.5, cb * 4 * h);
    const c = Math.cos(beta);
    const lr = (1 - c) * x - Math.max(half, 0.5) * Math.log(c);
    // in logs: both factors overflow for large h
    const E = (2 * Math.PI * beta) / h;
    disc = Math.min(disc, Math.exp(Math.LN2 + lr - E - Math.log1p(-Math.exp(-E))));
  }
  const ls = Math.log(s * h);
  const rel = disc + (tail + werr + run) / s;
  const e = rel < 0.5 ? (1.01 * rel) / (1 - rel) + U * (1 + 2 * Math.abs(ls)) : Infinity;
  return { v: ls, e, m: (1.01 * wm) / s };
}

/** log1p(x) - x for x >= 0 with a bound on its absolute error */
function log1pmx(x: number): Bounded {
  if (x >= 0.5) {
    const l = Math.log1p(x);
    const v = l - x;
    return { v, e: U * (2 * Math.abs(l) + Math.abs(v)) };
  }
  let pw = x;
  let v = 0;
  let e = 0;
  let sign = -1;
  for (let k = 2; k < 200; k++) {
    pw *= x;
    const term = pw / k;
    if (term < 2 ** -60 * (x * x) * 0.5) return { v, e: e + term };
    v += sign * term;
    e += term * (k + 1) * U + U * Math.abs(v);
    sign = -sign;
  }
  return { v, e: Infinity };
}

/** the mixture form's log phi at z (z > 0 finite) for nu = 2 half, with its bound; log0: peakBounded(half, half, 0) */
export function studentMixtureLogCf(half: number, z: number, log0: Bounded): Bounded {
  const nu = 2 * half;
  const z2 = z * z;
  const d = (2 * z2) / (nu + Math.sqrt(nu * nu + 4 * z2));
  const e1 = nu + d;
  const x = d / nu;
  const l = log1pmx(x);
  const q = (0.5 * z2) / e1;
  const top = half * l.v - q;
  // x against (e1 - nu)/nu: its rounding and that of e1; T's slope in x is h x/(1 + x)
  const dx = U * x + (U * e1) / nu;
  const topErr = half * (l.e + (1.01 * x * dx) / (1 + x)) + U * Math.abs(half * l.v) + 2 * U * q + U * Math.abs(top);
  const p = peakBounded(half, 0.5 * e1, q);
  const v = top + p.v - log0.v;
  // q is b and enters T: its 2u (z2, the division) moves T by q 2u (above) and log I by m q 2u
  const e = topErr + p.e + p.m * 2.02 * U * q + log0.e + U * (Math.abs(top + p.v) + Math.abs(v));
  return { v, e: 1.01 * e };
}

export function studentMixtureLog0(half: number): Bounded {
  return peakBounded(half, half, 0);
}
