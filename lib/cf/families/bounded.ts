/** Laws on a bounded interval: beta on [a, b] (and PERT), triangular. */
import { rawToCumulants, type Node } from "../node";
import { sortedAnchor, unwrapFrom } from "../complex";
import { lgamma } from "./special";
import { triangularDist } from "./dist";
import { checkDeadline } from "../deadline";
import { arithmeticNodes, expSumArithmetic } from "./cf-quadrature";

/** Stated absolute accuracy of the beta CF (series, shifted-line and endpoint-contour quadratures below). */
export const BETA_CF_ABS_ERROR = 1e-13;
/** the most the recurrence of the batched rays (raysBatch) may add: a batch whose own bound is larger is not used */
const BETA_BATCH_ERROR = 2e-14;

/**
 * Beta(alpha, beta) on [0, 1] at tau > 0, three routes, each within 1e-13 absolute:
 *  - tau <= 2: Kummer's series phi = sum_k (alpha)_k / (alpha+beta)_k (i tau)^k / k! (A&S 13.1.2; JKB vol. 2, ch. 25),
 *    terms below tau^k/k!, no cancellation beyond e^2;
 *  - large tau: the path [0, 1] is replaced by the two vertical rays from 0 and from 1 (Cauchy's theorem; the arcs
 *    vanish by Jordan's lemma), each a Laplace integral computed with y = e^w / tau by the trapezoidal rule;
 *  - in between: x = 1/(1 + e^{-s}) on the real line (the integrand x^alpha (1-x)^beta e^{i tau x} / B decays
 *    like e^{-alpha|s|}, e^{-beta s}), trapezoidal rule with the step set from the strip |Im s| < a, where
 *    |e^{i tau x}| <= e^{tau tan(a/2)/2} (Trefethen & Weideman 2014, SIAM Review 56, sec. 5).
 * The route is picked by the size of its cancellation: the contour's terms grow like the bound `contourLog` below.
 */
function betaUnit(alpha: number, beta: number) {
  const ab = alpha + beta;
  const lB = lgamma(alpha) + lgamma(beta) - lgamma(ab);
  // log of the largest term of the two ray integrals at tau (their sum is at most 1)
  const contourLog = (tau: number) => ab * Math.log(ab) - ab - lB - (Math.min(alpha, beta) + Math.max(alpha, beta) - 1) * Math.log(tau) + 2;
  const series = (tau: number, out: Float64Array) => {
    let cr = 1;
    let sr = 1;
    let si = 0;
    // term k = c_k (i tau)^k, c_k real
    let c = 1;
    for (let k = 1; k < 200; k++) {
      c *= ((alpha + k - 1) / (ab + k - 1)) * (tau / k);
      const m = k % 4;
      if (m === 0) sr += c;
      else if (m === 1) si += c;
      else if (m === 2) sr -= c;
      else si -= c;
      if (c < 1e-18) break;
      cr = c;
    }
    void cr;
    out[0] = sr;
    out[1] = si;
  };
  // rays: I1 = i e^{i pi (alpha-1)/2} tau^{-alpha} / B int exp(alpha w - e^w) (1 - i e^w/tau)^{beta-1} dw
  //       I2 = e^{i tau} i e^{-i pi (beta-1)/2} tau^{-beta} / B int exp(beta w - e^w) (1 + i e^w/tau)^{alpha-1} dw
  const rayIntegral = (p: number, q: number, tau: number, sign: number, out: Float64Array) => {
    // int exp(p w - e^w) (1 + sign i e^w / tau)^{q-1} dw, strip |Im w| < pi/4
    const logM = p * Math.log(Math.SQRT2 * (p + Math.abs(q - 1)) + 1) + Math.abs(q - 1) * Math.log(2 + 64 / tau) + 2;
    const h = (2 * Math.PI * (Math.PI / 4)) / (40 + Math.max(logM, 0));
    const wLo = (-42 - Math.max(0, logM)) / p;
    const wHi = Math.log(60 + 4 * (p + Math.abs(q - 1)));
    let sr = 0;
    let si = 0;
    for (let w = wLo; w <= wHi; w += h) {
      const e = Math.exp(w);
      const u = (sign * e) / tau; // 1 + i u
      const lr = 0.5 * Math.log1p(u * u) * (q - 1);
      const li = Math.atan(u) * (q - 1);
      const m = Math.exp(p * w - e + lr);
      sr += m * Math.cos(li);
      si += m * Math.sin(li);
    }
    out[0] = sr * h;
    out[1] = si * h;
  };
  const tmp = new Float64Array(2);
  const rays = (tau: number, out: Float64Array) => {
    rayIntegral(alpha, beta, tau, -1, tmp);
    let f = Math.exp(-alpha * Math.log(tau) - lB);
    let ph = Math.PI / 2 + (Math.PI * (alpha - 1)) / 2;
    const r1 = f * (tmp[0] * Math.cos(ph) - tmp[1] * Math.sin(ph));
    const i1 = f * (tmp[0] * Math.sin(ph) + tmp[1] * Math.cos(ph));
    rayIntegral(beta, alpha, tau, 1, tmp);
    f = Math.exp(-beta * Math.log(tau) - lB);
    ph = tau + Math.PI / 2 - (Math.PI * (beta - 1)) / 2;
    const r2 = f * (tmp[0] * Math.cos(ph) - tmp[1] * Math.sin(ph));
    const i2 = f * (tmp[0] * Math.sin(ph) + tmp[1] * Math.cos(ph));
    out[0] = r1 - r2;
    out[1] = i1 - i2;
  };
  const line = (tau: number, out: Float64Array) => {
    const a = Math.min(Math.PI / 2, 2 / tau);
    const logM = (tau * Math.tan(a / 2)) / 2 + ab * Math.log(1 / Math.cos(a / 2)) - lB + 1;
    const h = (2 * Math.PI * a) / (40 + Math.max(logM, 0));
    const sLo = (-42 - Math.max(0, -lB)) / alpha;
    const sHi = (42 + Math.max(0, -lB)) / beta;
    let sr = 0;
    let si = 0;
    for (let s = sLo; s <= sHi; s += h) {
      // log x = -log(1 + e^{-s}), log(1 - x) = -log(1 + e^{s}), x = 1/(1 + e^{-s})
      const lx = s < 0 ? s - Math.log1p(Math.exp(s)) : -Math.log1p(Math.exp(-s));
      const l1x = s > 0 ? -s - Math.log1p(Math.exp(-s)) : -Math.log1p(Math.exp(s));
      const x = Math.exp(lx);
      const m = Math.exp(alpha * lx + beta * l1x - lB);
      sr += m * Math.cos(tau * x);
      si += m * Math.sin(tau * x);
    }
    out[0] = sr * h;
    out[1] = si * h;
  };
  const useRays = (tau: number) => tau > 2 && (contourLog(tau) < 3 * Math.LN10 || tau > 4000);
  const at = (tau: number, out: Float64Array) => {
    if (tau <= 2) return series(tau, out);
    if (useRays(tau)) return rays(tau, out);
    return line(tau, out);
  };
  return { at, useRays, raysBatch: (tau0: number, dtau: number, K: number, re: Float64Array, im: Float64Array, allowance: number) => raysBatch(alpha, beta, lB, tau0, dtau, K, re, im, allowance) };
}

/** The rule's terms of one ray of betaUnit in v = log y (nodes independent of tau; step and ends of the smallest tau0). */
function rayNodes(p: number, q: number, sign: number, lB: number, tau0: number) {
  // step: rayIntegral's at tau0 (its logM only grows as tau falls)
  const logM = p * Math.log(Math.SQRT2 * (p + Math.abs(q - 1)) + 1) + Math.abs(q - 1) * Math.log(2 + 64 / tau0) + 2;
  const h = (2 * Math.PI * (Math.PI / 4)) / (40 + Math.max(logM, 0));
  // ends in w = log(tau0) + v as rayIntegral's at tau0: the part left of them is the same for every tau (exp(-tau y) ~ 1
  // there), the part right of them only smaller for a larger tau
  const vLo = (-42 - Math.max(0, logM)) / p - Math.log(tau0);
  const vHi = Math.log(60 + 4 * (p + Math.abs(q - 1))) - Math.log(tau0);
  const n = Math.ceil((vHi - vLo) / h) + 1;
  const cRe = new Float64Array(n);
  const cIm = new Float64Array(n);
  const e = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const v = vLo + j * h;
    const y = Math.exp(v);
    const u = sign * y; // 1 + i u
    const mag = h * Math.exp(p * v + 0.5 * Math.log1p(u * u) * (q - 1) - lB);
    const ph = Math.atan(u) * (q - 1);
    cRe[j] = mag * Math.cos(ph);
    cIm[j] = mag * Math.sin(ph);
    e[j] = y;
  }
  return { cRe, cIm, e };
}

/** expSumArithmetic's bound for these terms from tau0 on, before summing (each term's drift counted at |c_j|, O(n)) */
function predictedBound(r: { cRe: Float64Array; cIm: Float64Array; e: Float64Array }, tau0: number): number {
  let b = 0;
  for (let j = 0; j < r.e.length; j++) b += Math.hypot(r.cRe[j], r.cIm[j]) * (2e-25 + 80 * Number.EPSILON * Math.exp(-tau0 * r.e[j]));
  return b + r.e.length * 1e-21;
}

/**
 * The two ray integrals of betaUnit at equispaced tau_k = tau0 + k dtau, k < K, all at once: with e^w = tau y, y = e^v,
 *   I1 = i e^{i pi (alpha-1)/2} / B int e^{alpha v} (1 - i e^v)^{beta-1} exp(-tau e^v) dv,
 *   I2 = e^{i tau} i e^{-i pi (beta-1)/2} / B int e^{beta v} (1 + i e^v)^{alpha-1} exp(-tau e^v) dv,
 * the same trapezoidal rule on nodes that do not depend on tau, so each sum over j of c_j exp(-tau e_j) goes to
 * expSumArithmetic. The batch starts at the first k whose predicted bound is within `allowance` (the terms' sizes at tau0
 * fall as tau0 grows); writes phi = I1 - I2 from there and returns that k (K when none), or -1 when the bound came out
 * above the allowance after all.
 */
function raysBatch(alpha: number, beta: number, lB: number, tau0: number, dtau: number, K: number, re: Float64Array, im: Float64Array, allowance: number): number {
  let k0 = 0;
  let r1 = rayNodes(alpha, beta, -1, lB, tau0);
  let r2 = rayNodes(beta, alpha, 1, lB, tau0);
  while (predictedBound(r1, tau0 + k0 * dtau) + predictedBound(r2, tau0 + k0 * dtau) > allowance) {
    // start where tau is twice as large (and rebuild the nodes for that tau: a shorter range, a longer step)
    const tNext = 2 * (tau0 + k0 * dtau);
    k0 = Math.max(k0 + 1, Math.ceil((tNext - tau0) / dtau));
    if (K - k0 < 16) return K;
    r1 = rayNodes(alpha, beta, -1, lB, tau0 + k0 * dtau);
    r2 = rayNodes(beta, alpha, 1, lB, tau0 + k0 * dtau);
  }
  const n = K - k0;
  const tk = Float64Array.from({ length: n }, (_, k) => tau0 + (k0 + k) * dtau);
  const sr1 = new Float64Array(n);
  const si1 = new Float64Array(n);
  const sr2 = new Float64Array(n);
  const si2 = new Float64Array(n);
  const bound = expSumArithmetic(r1.cRe, r1.cIm, r1.e, -1, 0, tk, sr1, si1) + expSumArithmetic(r2.cRe, r2.cIm, r2.e, -1, 0, tk, sr2, si2);
  if (!(bound <= allowance)) return -1;
  const ph1 = Math.PI / 2 + (Math.PI * (alpha - 1)) / 2;
  const c1 = Math.cos(ph1);
  const s1 = Math.sin(ph1);
  for (let k = 0; k < n; k++) {
    const ph2 = tk[k] + Math.PI / 2 - (Math.PI * (beta - 1)) / 2;
    const c2 = Math.cos(ph2);
    const s2 = Math.sin(ph2);
    re[k0 + k] = sr1[k] * c1 - si1[k] * s1 - (sr2[k] * c2 - si2[k] * s2);
    im[k0 + k] = sr1[k] * s1 + si1[k] * c1 - (sr2[k] * s2 + si2[k] * c2);
  }
  return k0;
}

/** E Y^k = prod_{j<k} (alpha + j)/(alpha + beta + j) for Y ~ Beta(alpha, beta) (JKB vol. 2, ch. 25, eq. 25.13). */
function betaRaw(alpha: number, beta: number, n: number): number[] {
  const out: number[] = [];
  let m = 1;
  for (let k = 0; k < n; k++) {
    m *= (alpha + k) / (alpha + beta + k);
    out.push(m);
  }
  return out;
}

/**
 * Beta(alpha, beta) on [a, b]: X = a + (b - a) Y (JKB vol. 2, ch. 25, the four-parameter form);
 * phi(t) = e^{i a t} phi_Y((b - a) t).
 */
export function betaLaw(alpha: number, beta: number, a: number, b: number, name = "beta"): Node {
  const w = b - a;
  const unit = betaUnit(alpha, beta);
  const tmp = new Float64Array(2);
  const mean = a + (w * alpha) / (alpha + beta);
  const sd = (w * Math.sqrt((alpha * beta) / (alpha + beta + 1))) / (alpha + beta);
  return {
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [`${name} CF computed by series and quadrature (absolute error <= ${(BETA_CF_ABS_ERROR + BETA_BATCH_ERROR).toPrecision(2)})`],
    cfAbsError: BETA_CF_ABS_ERROR + BETA_BATCH_ERROR,
    location: mean,
    scale: sd,
    support: [a, b],
    logCf(t, re, im) {
      // equispaced t: from the first frequency on the rays' route every later one is on it too (contourLog falls with
      // tau); the rays are summed across t (raysBatch) from where the shortcuts' bound is within BETA_BATCH_ERROR
      checkDeadline("beta-cf");
      let k0 = t.length;
      if (arithmeticNodes(t, 16)) {
        let kr = 0;
        while (kr < t.length && !unit.useRays(t[kr] * w)) kr++;
        if (t.length - kr >= 16) {
          const K = t.length - kr;
          const d = ((t[t.length - 1] - t[kr]) / (K - 1)) * w;
          const br = new Float64Array(K);
          const bi = new Float64Array(K);
          const kb = unit.raysBatch(t[kr] * w, d, K, br, bi, BETA_BATCH_ERROR);
          if (kb >= 0 && kb < K) {
            k0 = kr + kb;
            for (let k = kb; k < K; k++) {
              re[kr + k] = Math.log(Math.hypot(br[k], bi[k]));
              im[kr + k] = Math.atan2(bi[k], br[k]);
            }
          }
        }
      }
      for (let k = 0; k < k0; k++) {
        // a series or a quadrature per frequency: the deadline is checked every 64 of them
        if ((k & 63) === 0) checkDeadline("beta-cf");
        const x = t[k];
        if (x === 0) {
          re[k] = 0;
          im[k] = 0;
          continue;
        }
        unit.at(Math.abs(x) * w, tmp);
        re[k] = Math.log(Math.hypot(tmp[0], tmp[1]));
        im[k] = (x < 0 ? -1 : 1) * Math.atan2(tmp[1], tmp[0]);
      }
      const anchor = sortedAnchor(t);
      if (anchor >= 0) unwrapFrom(im, anchor);
      for (let k = 0; k < t.length; k++) im[k] += a * t[k];
    },
    cumulants: (n) => {
      const k = rawToCumulants(betaRaw(alpha, beta, n)).map((v, i) => (v === null ? null : v * w ** (i + 1)));
      if (n > 0 && k[0] !== null) k[0] = mean;
      return k;
    },
  };
}

/**
 * Triangular(a, c, b): phi(t) = 2 f[a, c, b] / (i t)^2 with f = e^{i t x} and f[.] its divided difference (the
 * density is the B-spline with knots a, c, b; Hermite-Genocchi formula, de Boor, A Practical Guide to Splines,
 * ch. IX). For |t| (b - a) <= 2 the moment series about a is used: E(X - a)^k = 2 sum_{j<=k} (c-a)^j (b-a)^{k-j} /
 * ((k+1)(k+2)), a sum of positive terms.
 */
export function triangular(a: number, c: number, b: number): Node {
  const h1 = c - a;
  const w = b - a;
  const momA = (k: number) => {
    let s = 0;
    for (let j = 0; j <= k; j++) s += h1 ** j * w ** (k - j);
    return (2 * s) / ((k + 1) * (k + 2));
  };
  const MOM = Array.from({ length: 60 }, (_, k) => momA(k));
  // f[u, v] for f = e^{i t x}: i t e^{i t u} E1(i t (v - u)), E1(iy) = sin y / y + i (1 - cos y)/y
  const dd = (u: number, v: number, t: number, out: Float64Array) => {
    const y = t * (v - u);
    let er: number;
    let ei: number;
    if (Math.abs(y) < 1e-4) {
      er = 1 - (y * y) / 6;
      ei = y / 2 - (y * y * y) / 24;
    } else {
      er = Math.sin(y) / y;
      ei = (2 * Math.sin(y / 2) ** 2) / y;
    }
    // i t e^{i t u} (er + i ei)
    const cr = Math.cos(t * u);
    const ci = Math.sin(t * u);
    const pr = cr * er - ci * ei;
    const pi = cr * ei + ci * er;
    out[0] = -t * pi;
    out[1] = t * pr;
  };
  const d1 = new Float64Array(2);
  const d2 = new Float64Array(2);
  const phi = (t: number, out: Float64Array) => {
    if (Math.abs(t) * w <= 2) {
      // e^{i t a} sum_k (i t)^k m_k / k!
      let sr = 0;
      let si = 0;
      let f = 1;
      for (let k = 0; k < 60; k++) {
        if (k > 0) f *= t / k;
        const v = f * MOM[k];
        const m = k % 4;
        if (m === 0) sr += v;
        else if (m === 1) si += v;
        else if (m === 2) sr -= v;
        else si -= v;
        if (Math.abs(v) < 1e-18 && k > 4) break;
      }
      const cr = Math.cos(t * a);
      const ci = Math.sin(t * a);
      out[0] = sr * cr - si * ci;
      out[1] = sr * ci + si * cr;
      return;
    }
    dd(a, c, t, d1);
    dd(c, b, t, d2);
    // f[a,c,b] = (f[c,b] - f[a,c]) / (b - a); phi = 2 f[a,c,b] / (i t)^2 = -2 f[a,c,b] / t^2
    const s = -2 / (w * t * t);
    out[0] = s * (d2[0] - d1[0]);
    out[1] = s * (d2[1] - d1[1]);
  };
  const tmp = new Float64Array(2);
  return {
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
    dist: triangularDist(a, c, b),
    location: (a + b + c) / 3,
    scale: Math.sqrt((a * a + b * b + c * c - a * b - a * c - b * c) / 18),
    support: [a, b],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        phi(t[k], tmp);
        re[k] = Math.log(Math.hypot(tmp[0], tmp[1]));
        im[k] = Math.atan2(tmp[1], tmp[0]);
      }
      const anchor = sortedAnchor(t);
      if (anchor >= 0) unwrapFrom(im, anchor);
    },
    cumulants: (n) => {
      const k = rawToCumulants(Array.from({ length: n }, (_, i) => momA(i + 1)));
      if (n > 0 && k[0] !== null) k[0] = (a + b + c) / 3;
      return k;
    },
  };
}
