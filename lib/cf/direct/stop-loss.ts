import { normalCdfBounded, type Bounded } from "../families/normal-bounded";
import { incGammaBounded, incGammaShape, type IncGamma } from "../families/incgamma-bounded";
import { lgamma, lgammaErr } from "../families/special";
import { directPoint, type DirectLaw } from "./types";
import { ELEM, EPS, SQRT2PI } from "./law";

// Closed-form stop-loss transforms (DirectLaw.stopLoss) of named families, each from the law's own bounded values at c.
// The expected shortfall takes them in place of its swept brackets (./shortfall.ts), whose O(panel^3) widths stay
// thousands of times the actual error of a corrected trapezoid sum.

const U = EPS / 2;

/**
 * The law with its stop-loss transforms in the form E[(X - c)^+] = B(c) f(c) + (mean - c) S(c) (side 1) and
 * E[(c - X)^+] = B(c) f(c) + (c - mean) F(c) (side -1; the two differ by c - mean, E[(c - X)^+] - E[(X - c)^+] = c - mean),
 * B(c) >= 0 within bErr (absolute), the mean within meanErr. Each term within its values' own bounds (pdfErr, sfErr or
 * cdfErr: the law's at bounds f, S and F at c itself), plus 16u of the terms' sizes for the subtraction, the two
 * products and the sum. Where B(c) = 0 the density's term is 0 (an infinite density at a support end).
 */
export function withPdfStopLoss(l: DirectLaw, mean: number, meanErr: number, B: (c: number) => Bounded): DirectLaw {
  const pt = directPoint();
  return {
    ...l,
    stopLoss(c: number, side: 1 | -1) {
      l.at(c, pt);
      const b = B(c);
      const d = side * (mean - c);
      const m = side === 1 ? pt.sf : pt.cdf;
      const em = side === 1 ? pt.sfErr : pt.cdfErr;
      const t1 = b.v === 0 ? 0 : b.v * pt.pdf;
      const t2 = d * m;
      const v = t1 + t2;
      const e1 = b.v === 0 ? (b.e === 0 ? 0 : b.e * pt.pdf) : b.v * pt.pdfErr + b.e * (pt.pdf + pt.pdfErr);
      const e = e1 + Math.abs(d) * em + meanErr * (m + em) + 16 * U * (Math.abs(t1) + Math.abs(t2));
      if (!(Number.isFinite(v) && Number.isFinite(e))) return null;
      return { v: Math.max(v, 0), e };
    },
  };
}

/** normal(mu, sigma): B = sigma^2 (E[(X - c)^+] = sigma [phi(z) - z Phi(-z)], z = (c - mu)/sigma; common practice) */
export function normalStopLoss(l: DirectLaw, mu: number, sigma: number): DirectLaw {
  const s2 = sigma * sigma;
  const b = { v: s2, e: U * s2 };
  return withPdfStopLoss(l, mu, 0, () => b);
}

/**
 * gamma(shape, rate): E[(X - c)^+] = (shape/rate) Q(shape + 1, rate c) - c Q(shape, rate c), and Q(shape + 1, y) =
 * Q(shape, y) + y^shape e^-y / Gamma(shape + 1) (A&S 6.5.21) turns it into (mean - c) S(c) + (c / rate) f(c): B = c / rate
 */
export function gammaStopLoss(l: DirectLaw, shape: number, rate: number): DirectLaw {
  const mean = shape / rate;
  return withPdfStopLoss(l, mean, U * mean, (c) => {
    const v = c > 0 ? c / rate : 0;
    return { v, e: U * v };
  });
}

/**
 * lognormal(mu, sigma): E[(X - c)^+] = M Phi(d1) - c S(c) and E[(c - X)^+] = c F(c) - M Phi(-d1), M = e^{mu + sigma^2/2},
 * d1 = (mu + sigma^2 - log c)/sigma (the Black-Scholes form; Klugman, Panjer & Willmot, Loss Models, Appendix A.4.1.1,
 * limited expected value). d1 within dd1 (the square, the sums, the log within 2u relative, the quotient), which moves
 * Phi by at most phi(d1) dd1 (1% for the density's change over so short a step); M within eM (its exponent's two
 * roundings and exp's own). Below the support (c <= 0) the upper transform is mean - c and the lower 0.
 */
export function lognormalStopLoss(l: DirectLaw, mu: number, sigma: number): DirectLaw {
  const s2 = sigma * sigma;
  const ex = mu + s2 / 2;
  const M = Math.exp(ex);
  const eM = M * (1.01 * Math.expm1(2 * U * (Math.abs(mu) + s2)) + 2 * U);
  const num0 = mu + s2;
  const pt = directPoint();
  const PHI: Bounded = { v: NaN, e: NaN };
  return {
    ...l,
    stopLoss(c: number, side: 1 | -1) {
      if (!(c > 0)) return side === 1 ? { v: M - c, e: eM + 2 * U * (M - c) } : { v: 0, e: 0 };
      l.at(c, pt);
      const lc = Math.log(c);
      const num = num0 - lc;
      const d1 = num / sigma;
      const dd1 = 1.01 * ((2 * U * (Math.abs(mu) + s2) + 2 * U * Math.abs(lc) + U * Math.abs(num)) / sigma + U * Math.abs(d1));
      normalCdfBounded(side * d1, PHI);
      const ePhi = PHI.e + (1.01 * Math.exp(-0.5 * Math.max(Math.abs(d1) - dd1, 0) ** 2) * dd1) / SQRT2PI;
      const t1 = M * PHI.v;
      const m = side === 1 ? pt.sf : pt.cdf;
      const em = side === 1 ? pt.sfErr : pt.cdfErr;
      const t2 = c * m;
      const v = side * (t1 - t2);
      const e = M * ePhi + eM * (PHI.v + ePhi) + c * em + 8 * U * (t1 + t2);
      if (!(Number.isFinite(v) && Number.isFinite(e))) return null;
      return { v: Math.max(v, 0), e };
    },
  };
}

/**
 * weibull(shape k, scale theta): E[(X - c)^+] = theta Gamma(a, t) - c S(c), a = 1 + 1/k, t = (c/theta)^k (the upper
 * incomplete gamma Gamma(a, t) = Gamma(a) Q(a, t); Klugman, Panjer & Willmot, Loss Models, Appendix A.3.2.3, limited
 * expected value). Q by the bounded incomplete gamma at the rounded a; Gamma(a) = exp(lgamma(a)) within lgammaErr and
 * exp's 2u. a's rounding da <= 2u a moves Gamma(a, t) by at most da max |dGamma(s, t)/ds| = da int_t^inf |log y| y^(s-1)
 * e^-y dy, which for t >= 1 (log y <= log t + (y - t)/t) is at most Gamma(s, t)(log t + s/t - 1) + t^(s-1) e^-t, and for
 * t < 1 at most 1/s^2 (the part below 1) + (s - 1) Gamma(s) + 1/e (the part above, by the same at t = 1); 1% for s's
 * step. t within dt (as weibullDirect's at: 4u (1 + |k log u|) relative) moves Gamma(a, t) by t^(a-1) e^-t dt =
 * (c/theta) S(c) dt (1% for e^-t's change). Only the upper transform (the lower levels use it too, ./shortfall.ts).
 */
export function weibullStopLoss(l: DirectLaw, k: number, theta: number): DirectLaw {
  const a = 1 + 1 / k;
  const da = 2 * U * a;
  const lg = lgamma(a);
  const G = Math.exp(lg);
  const eG = G * (1.01 * Math.expm1(lgammaErr(a) + U * Math.abs(lg)) + 2 * U);
  const shape = incGammaShape(a);
  const r: IncGamma = { p: 0, q: 0, pErr: 0, qErr: 0 };
  const pt = directPoint();
  return {
    ...l,
    stopLoss(c: number, side: 1 | -1) {
      if (side !== 1) return null;
      if (!(c > 0)) {
        const m = theta * G;
        return { v: m - c, e: theta * eG + 4 * U * (m + Math.abs(c)) };
      }
      l.at(c, pt);
      const x = c / theta;
      const lu = Math.log(x);
      const t = Math.exp(k * lu);
      const dt = t * 4 * EPS * (1 + Math.abs(k * lu));
      incGammaBounded(shape, t, r);
      const up = G * r.q;
      const eUp = G * r.qErr + eG * (r.q + r.qErr);
      const sHi = pt.sf + pt.sfErr;
      const dA = t >= 1 ? (up + eUp) * Math.max(Math.log(t) + a / t - 1, 0) + x * sHi : 1 / (a * a) + (a - 1) * (G + eG) + 1 / Math.E;
      const t1 = theta * up;
      const t2 = c * pt.sf;
      const v = t1 - t2;
      const e = theta * (eUp + 1.01 * da * dA + 1.01 * x * sHi * dt) + c * pt.sfErr + 8 * U * (t1 + t2);
      if (!(Number.isFinite(v) && Number.isFinite(e))) return null;
      return { v: Math.max(v, 0), e };
    },
  };
}

/**
 * A law symmetric about loc whose stop-loss transform is max(-side d, 0) + g(|z|), d = c - loc, z = d / scale (the part
 * past loc on the integrated side, plus the transform at the mirrored point; E[(X - c)^+] - E[(c - X)^+] = loc - c):
 * Laplace g = (b/2) e^{-|z|} (E[(X - c)^+] = (b/2) e^{-z} for c >= loc; Kotz, Kozubowski & Podgorski, The Laplace
 * Distribution and Generalizations, 2001, ch. 2, recalled from memory; it is the integral of S = e^{-z}/2 over (c, inf)),
 * logistic g = s log1p(e^{-|z|}) (the integral of S = 1/(1 + e^z) over (c, inf) is s log(1 + e^{-z}); common practice).
 * d within u |d|, z within 2u |z|, so e^{-|z|} within ELEM + 2u |z| relative (exp's allowance ELEM, ./law.ts) and log1p
 * of it within the same plus ELEM (w / ((1 + w) log1p(w)) <= 1); the products and the sum 2u.
 */
export function symmetricStopLoss(l: DirectLaw, loc: number, scale: number, kind: "laplace" | "logistic"): DirectLaw {
  return {
    ...l,
    stopLoss(c: number, side: 1 | -1) {
      const d = c - loc;
      const z = Math.abs(d / scale);
      const e = Math.exp(-z);
      const rel = ELEM + 2 * U * z * (1 + 4 * U);
      const g = kind === "laplace" ? 0.5 * scale * e : scale * Math.log1p(e);
      const eg = g * (kind === "laplace" ? rel + 2 * U : 2 * rel + 2 * U);
      const past = Math.max(-side * d, 0);
      const v = past + g;
      const err = eg + U * past + 2 * U * v;
      if (!(Number.isFinite(v) && Number.isFinite(err))) return null;
      return { v, e: err };
    },
  };
}
