/**
 * The CF of Beta(alpha, beta) on [0, 1] at tau > 0 by three routes, each with a derived bound on its error that holds
 * over the route's whole range of tau (the family states the largest, `cfError`):
 *  - tau <= 2: Kummer's series phi = sum_k (alpha)_k / (alpha+beta)_k (i tau)^k / k! (A&S 13.1.2; JKB vol. 2, ch. 25),
 *    terms below tau^k/k!, no cancellation beyond e^2 (its bound: ./beta-bounds.ts, seriesBound);
 *  - large tau (tau > tRays): the path [0, 1] is replaced by the two vertical rays from 0 and from 1 (Cauchy's theorem;
 *    the arcs vanish by Jordan's lemma), each a Laplace integral in v = log y:
 *      I1 = i e^{i pi (alpha-1)/2} / B int e^{alpha v} (1 - i e^v)^{beta-1} exp(-tau e^v) dv,
 *      I2 = e^{i tau} i e^{-i pi (beta-1)/2} / B int e^{beta v} (1 + i e^v)^{alpha-1} exp(-tau e^v) dv,
 *    phi = I1 - I2, by the trapezoidal rule on nodes fixed once at tRays (./beta-bounds.ts, raySet): every tau takes the
 *    same terms c_j exp(-tau y_j), whose sizes only fall as tau grows;
 *  - in between: x = 1/(1 + e^{-s}) on the real line (the integrand x^alpha (1-x)^beta e^{i tau x} / B decays like
 *    e^{-alpha|s|}, e^{-beta s}) by the trapezoidal rule on nodes fixed once for the route's largest tau (lineSet).
 * The rays start where their cancellation is small enough for their derived bound to be within twice the line's.
 */
import { lgamma, lgammaErr } from "./special";
import { lineSet, raySet, seriesBound, type RaySet } from "./beta-bounds";
import { expSumArithmetic } from "./cf-quadrature";
import { KahanComplex } from "./kahan";

const U = Number.EPSILON / 2;

export function betaUnit(alpha: number, beta: number, batchAllowance: number) {
  const ab = alpha + beta;
  const la = lgamma(alpha);
  const lb = lgamma(beta);
  const lB = la + lb - lgamma(ab);
  // log B's error: each lgamma's (lgammaErr), alpha + beta's rounding times |psi(ab)| <= |log ab| + 1/ab, two sums
  const eLB = 1.01 * (lgammaErr(alpha) + lgammaErr(beta) + lgammaErr(ab) + U * ab * (Math.abs(Math.log(ab)) + 1 / ab) + U * (Math.abs(la + lb) + Math.abs(lB)));
  // The rays' terms reach about e^{contourLog(tau)} (their sum is at most 1), so they start where that is below 1000
  // (ab > 1; else from tau = 2, where log B >= 0 keeps it below e^{2 + (1 - ab) log tau}); from there the start moves up
  // by 1.25 at a time while the rays' derived bound exceeds twice the line's up to it (at most to 4000), the line serving
  // (2, tRays]
  const C = ab * Math.log(ab) - ab - lB + 2;
  let tRays = ab > 1 ? Math.min(4000, Math.max(2, Math.exp((C - 3 * Math.LN10) / (ab - 1)))) : 2;
  let ray1 = raySet(alpha, beta, -1, lB, eLB, tRays);
  let ray2 = raySet(beta, alpha, 1, lB, eLB, tRays);
  let lineNodes = tRays > 2 ? lineSet(alpha, beta, lB, eLB, tRays) : null;
  if (ab > 1) {
    for (;;) {
      const lineB = lineNodes ? lineNodes.bound : lineSet(alpha, beta, lB, eLB, 2.5).bound;
      if (ray1.bound + ray2.bound <= 2 * lineB || tRays >= 4000) break;
      tRays = Math.min(4000, 1.25 * tRays);
      ray1 = raySet(alpha, beta, -1, lB, eLB, tRays);
      ray2 = raySet(beta, alpha, 1, lB, eLB, tRays);
      lineNodes = lineSet(alpha, beta, lB, eLB, tRays);
    }
  }
  const useRays = (tau: number) => tau > tRays;
  const cfError = Math.max(seriesBound(alpha, beta), lineNodes ? lineNodes.bound : 0, ray1.bound + ray2.bound + batchAllowance);

  const series = (tau: number, out: Float64Array) => {
    let sr = 1;
    let si = 0;
    // term k = c_k (i tau)^k, c_k real
    let c = 1;
    for (let k = 1; k < 200; k++) {
      c *= ((alpha + (k - 1)) / (ab + (k - 1))) * (tau / k);
      const m = k % 4;
      if (m === 0) sr += c;
      else if (m === 1) si += c;
      else if (m === 2) sr -= c;
      else si -= c;
      // past k = 4 the term ratios are below 2/5, so the rest is below 2/3 of the last term
      if (c < 1e-18 && k >= 4) break;
    }
    out[0] = sr;
    out[1] = si;
  };
  const acc = new KahanComplex();
  // compensated sums of c_j exp(-tau e_j) (real factors: no cos/sin per term)
  let sumRe = 0;
  let sumIm = 0;
  const raySum = (r: RaySet, tau: number) => {
    let cr = 0;
    let ci = 0;
    sumRe = 0;
    sumIm = 0;
    for (let j = 0; j < r.e.length; j++) {
      const x = tau * r.e[j];
      // y ascending: past here every term is below e^-745
      if (x - r.lcMax > 745) break;
      const d = Math.exp(r.lc[j] - x);
      const yr = r.cosP[j] * d - cr;
      const tr = sumRe + yr;
      cr = tr - sumRe - yr;
      sumRe = tr;
      const yi = r.sinP[j] * d - ci;
      const ti = sumIm + yi;
      ci = ti - sumIm - yi;
      sumIm = ti;
    }
  };
  const ph1 = Math.PI / 2 + (Math.PI * (alpha - 1)) / 2;
  const c1 = Math.cos(ph1);
  const s1 = Math.sin(ph1);
  const ph2 = Math.PI / 2 - (Math.PI * (beta - 1)) / 2;
  const c2 = Math.cos(ph2);
  const s2 = Math.sin(ph2);
  /** phi = S1 e^{i ph1} - S2 e^{i ph2} e^{i tau} (e^{i tau} apart: tau + ph2 would round by u tau) */
  const combine = (sr1: number, si1: number, sr2: number, si2: number, tau: number, out: Float64Array, k: number) => {
    const r2 = sr2 * c2 - si2 * s2;
    const i2 = sr2 * s2 + si2 * c2;
    const ct = Math.cos(tau);
    const st = Math.sin(tau);
    out[2 * k] = sr1 * c1 - si1 * s1 - (r2 * ct - i2 * st);
    out[2 * k + 1] = sr1 * s1 + si1 * c1 - (r2 * st + i2 * ct);
  };
  const rays = (tau: number, out: Float64Array) => {
    raySum(ray1, tau);
    const sr1 = sumRe;
    const si1 = sumIm;
    raySum(ray2, tau);
    combine(sr1, si1, sumRe, sumIm, tau, out, 0);
  };
  const line = (tau: number, out: Float64Array) => {
    const L = lineNodes!;
    acc.reset();
    for (let j = 0; j < L.x.length; j++) acc.addPolar(L.m[j], tau * L.x[j]);
    out[0] = acc.re;
    out[1] = acc.im;
  };
  const at = (tau: number, out: Float64Array) => {
    if (tau <= 2) return series(tau, out);
    if (tau > tRays) return rays(tau, out);
    return line(tau, out);
  };
  /**
   * The two rays at equispaced tau_k = tau0 + k dtau (tau0 on the rays' route), k < K, all at once: each sum over j of
   * c_j exp(-tau e_j) goes to expSumArithmetic. The batch starts at the first k whose predicted bound is within the
   * allowance (the terms' sizes fall as tau grows); writes phi (re, im) from there and returns that k (K when none), or
   * -1 when the bound came out above the allowance after all.
   */
  const raysBatch = (tau0: number, dtau: number, K: number, re: Float64Array, im: Float64Array): number => {
    let k0 = 0;
    let r1 = ray1;
    let r2 = ray2;
    while (predictedBound(r1, tau0 + k0 * dtau) + predictedBound(r2, tau0 + k0 * dtau) > batchAllowance) {
      // start where tau is twice as large, on nodes built for that tau (a shorter range, a longer step, smaller terms);
      // taken only if their derived bound is within the one the family states
      k0 = Math.max(k0 + 1, Math.ceil((2 * (tau0 + k0 * dtau) - tau0) / dtau));
      if (K - k0 < 16) return K;
      const n1 = raySet(alpha, beta, -1, lB, eLB, tau0 + k0 * dtau);
      const n2 = raySet(beta, alpha, 1, lB, eLB, tau0 + k0 * dtau);
      if (n1.bound + n2.bound <= ray1.bound + ray2.bound) {
        r1 = n1;
        r2 = n2;
      }
    }
    const n = K - k0;
    const tk = Float64Array.from({ length: n }, (_, k) => tau0 + (k0 + k) * dtau);
    const sr1 = new Float64Array(n);
    const si1 = new Float64Array(n);
    const sr2 = new Float64Array(n);
    const si2 = new Float64Array(n);
    const bound = expSumArithmetic(r1.cRe, r1.cIm, r1.e, -1, 0, tk, sr1, si1) + expSumArithmetic(r2.cRe, r2.cIm, r2.e, -1, 0, tk, sr2, si2);
    if (!(bound <= batchAllowance)) return -1;
    const pair = new Float64Array(2);
    for (let k = 0; k < n; k++) {
      combine(sr1[k], si1[k], sr2[k], si2[k], tk[k], pair, 0);
      re[k0 + k] = pair[0];
      im[k0 + k] = pair[1];
    }
    return k0;
  };
  return { at, useRays, cfError, raysBatch };
}

/** expSumArithmetic's bound for these terms from tau0 on, before summing (each term's drift counted at |c_j|, O(n)) */
function predictedBound(r: RaySet, tau0: number): number {
  let b = 0;
  for (let j = 0; j < r.e.length; j++) b += Math.hypot(r.cRe[j], r.cIm[j]) * (2e-25 + 80 * Number.EPSILON * Math.exp(-tau0 * r.e[j]));
  return b + r.e.length * 1e-21;
}
