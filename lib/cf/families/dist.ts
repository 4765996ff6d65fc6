/** Closed-form pdf, cdf and sf of named continuous laws (used by the per-claim layer and the severity discretiser). */
import { incGamma } from "../invert/incgamma";
import { lgamma } from "./special";
import betainc from "@stdlib/math-base-special-betainc";
import { affineLayerMoment, type LayerMoment } from "./layer-moments";

export interface DirectLaw {
  pdf(x: number): number;
  cdf(x: number): number;
  sf(x: number): number;
  /** support ends */
  lo: number;
  hi: number;
  /** E[min((X - d)_+, l)^k] in closed form with a derived bound, where the family has one (layer-moments.ts) */
  layerMoment?: LayerMoment;
}

/** Standard normal cdf Phi(z) = erfc(-z/sqrt 2)/2, with erfc(y) = Q(1/2, y^2) for y >= 0 (A&S 7.1.2, 6.5.17). */
export function normalCdf(z: number): number {
  if (z === -Infinity) return 0;
  if (z === Infinity) return 1;
  const y = z / Math.SQRT2;
  const g = incGamma(0.5, y * y);
  return z < 0 ? 0.5 * g.Q : 1 - 0.5 * g.Q;
}

/** log Phi(z), kept accurate deep in the lower tail (continued fraction of Q, then its log). */
export function logNormalCdf(z: number): number {
  if (z > -5) return Math.log(normalCdf(z));
  // Q(1/2, y^2) underflows below about z = -38: Mills ratio series Phi(z) ~ phi(z)/|z| (1 - 1/z^2 + 3/z^4 - ...) (A&S 26.2.12)
  if (z < -37) {
    const z2 = z * z;
    const s = 1 - 1 / z2 + 3 / (z2 * z2) - 15 / (z2 * z2 * z2) + 105 / (z2 * z2 * z2 * z2);
    return -0.5 * z2 - Math.log(-z) - 0.5 * Math.log(2 * Math.PI) + Math.log(s);
  }
  return Math.log(normalCdf(z));
}

export const normalPdf = (z: number) => Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);


export function normalDist(mu: number, sigma: number): DirectLaw {
  return {
    pdf: (x) => normalPdf((x - mu) / sigma) / sigma,
    cdf: (x) => normalCdf((x - mu) / sigma),
    sf: (x) => normalCdf((mu - x) / sigma),
    lo: -Infinity,
    hi: Infinity,
  };
}

export function uniformDist(a: number, b: number): DirectLaw {
  const w = b - a;
  const cl = (v: number) => Math.min(1, Math.max(0, v));
  return { pdf: (x) => (x >= a && x <= b ? 1 / w : 0), cdf: (x) => cl((x - a) / w), sf: (x) => cl((b - x) / w), lo: a, hi: b };
}

/** Gamma(shape, rate): regularised incomplete gamma P and Q (JKB vol. 1, ch. 17). */
export function gammaDist(shape: number, rate: number): DirectLaw {
  const lc = shape * Math.log(rate) - lgamma(shape);
  return {
    pdf: (x) => (x > 0 ? Math.exp(lc + (shape - 1) * Math.log(x) - rate * x) : x === 0 && shape === 1 ? rate : 0),
    cdf: (x) => (x > 0 ? incGamma(shape, rate * x).P : 0),
    sf: (x) => (x > 0 ? incGamma(shape, rate * x).Q : 1),
    lo: 0,
    hi: Infinity,
  };
}

/** Lognormal: F = Phi((log x - mu)/sigma) (JKB vol. 1, ch. 14). */
export function lognormalDist(mu: number, sigma: number): DirectLaw {
  return {
    pdf: (x) => (x > 0 ? normalPdf((Math.log(x) - mu) / sigma) / (x * sigma) : 0),
    cdf: (x) => (x > 0 ? normalCdf((Math.log(x) - mu) / sigma) : 0),
    sf: (x) => (x > 0 ? normalCdf((mu - Math.log(x)) / sigma) : 1),
    lo: 0,
    hi: Infinity,
  };
}

/** Pareto type I: S = (xm/x)^alpha on [xm, inf) (JKB vol. 1, ch. 20). */
export function paretoDist(alpha: number, xm: number): DirectLaw {
  return {
    pdf: (x) => (x >= xm ? (alpha / xm) * Math.exp(-(alpha + 1) * Math.log(x / xm)) : 0),
    cdf: (x) => (x > xm ? -Math.expm1(-alpha * Math.log(x / xm)) : 0),
    sf: (x) => (x > xm ? Math.exp(-alpha * Math.log(x / xm)) : 1),
    lo: xm,
    hi: Infinity,
  };
}

/** Weibull: S = exp(-(x/lambda)^k) (JKB vol. 1, ch. 21). */
export function weibullDist(k: number, lambda: number): DirectLaw {
  return {
    pdf: (x) => (x > 0 ? (k / lambda) * (x / lambda) ** (k - 1) * Math.exp(-((x / lambda) ** k)) : 0),
    cdf: (x) => (x > 0 ? -Math.expm1(-((x / lambda) ** k)) : 0),
    sf: (x) => (x > 0 ? Math.exp(-((x / lambda) ** k)) : 1),
    lo: 0,
    hi: Infinity,
  };
}

/** Burr XII in Loss Models' parameters: S = (1 + (x/theta)^gamma)^(-alpha) (Loss Models, app. A, transformed beta family). */
export function burrDist(alpha: number, gamma: number, theta: number): DirectLaw {
  const logS = (x: number) => -alpha * Math.log1p((x / theta) ** gamma);
  return {
    pdf: (x) => {
      if (!(x > 0)) return 0;
      const u = (x / theta) ** gamma;
      return (alpha * gamma * u) / (x * (1 + u) ** (alpha + 1));
    },
    cdf: (x) => (x > 0 ? -Math.expm1(logS(x)) : 0),
    sf: (x) => (x > 0 ? Math.exp(logS(x)) : 1),
    lo: 0,
    hi: Infinity,
  };
}

/** Inverse gamma: F = Q(alpha, theta/x) (Loss Models, app. A). */
export function inverseGammaDist(alpha: number, theta: number): DirectLaw {
  const lc = alpha * Math.log(theta) - lgamma(alpha);
  return {
    pdf: (x) => (x > 0 ? Math.exp(lc - (alpha + 1) * Math.log(x) - theta / x) : 0),
    cdf: (x) => (x > 0 ? incGamma(alpha, theta / x).Q : 0),
    sf: (x) => (x > 0 ? incGamma(alpha, theta / x).P : 1),
    lo: 0,
    hi: Infinity,
  };
}

/**
 * Inverse Gaussian (mu, lambda): F = Phi(r (x/mu - 1)) + e^{2 lambda/mu} Phi(-r (x/mu + 1)), r = sqrt(lambda/x)
 * (JKB vol. 1, ch. 15, eq. 15.6); the second term is formed in logs so that e^{2 lambda/mu} cannot overflow.
 */
export function inverseGaussianDist(mu: number, lambda: number): DirectLaw {
  const second = (x: number) => Math.exp((2 * lambda) / mu + logNormalCdf(-Math.sqrt(lambda / x) * (x / mu + 1)));
  return {
    pdf: (x) => (x > 0 ? Math.sqrt(lambda / (2 * Math.PI * x * x * x)) * Math.exp((-lambda * (x - mu) ** 2) / (2 * mu * mu * x)) : 0),
    cdf: (x) => (x > 0 ? Math.min(1, normalCdf(Math.sqrt(lambda / x) * (x / mu - 1)) + second(x)) : 0),
    sf: (x) => (x > 0 ? Math.max(0, normalCdf(-Math.sqrt(lambda / x) * (x / mu - 1)) - second(x)) : 1),
    lo: 0,
    hi: Infinity,
  };
}

/** Triangular(a, c, b) (JKB vol. 2, ch. 26, sec. 9). */
export function triangularDist(a: number, c: number, b: number): DirectLaw {
  const w = b - a;
  return {
    pdf: (x) => (x < a || x > b ? 0 : x < c ? (2 * (x - a)) / (w * (c - a)) : x > c ? (2 * (b - x)) / (w * (b - c)) : 2 / w),
    cdf: (x) => (x <= a ? 0 : x >= b ? 1 : x <= c ? (x - a) ** 2 / (w * (c - a)) : 1 - (b - x) ** 2 / (w * (b - c))),
    sf: (x) => (x <= a ? 1 : x >= b ? 0 : x <= c ? 1 - (x - a) ** 2 / (w * (c - a)) : (b - x) ** 2 / (w * (b - c))),
    lo: a,
    hi: b,
  };
}

/**
 * Beta(alpha, beta) on [a, b]: F(x) = I_z(alpha, beta), z = (x - a)/(b - a), the regularised incomplete beta
 * (JKB vol. 2, ch. 25, eq. 25.2; @stdlib/math-base-special-betainc, lower and upper tails each computed directly).
 */
export function betaDist(alpha: number, beta: number, a: number, b: number): DirectLaw {
  const w = b - a;
  const logB = lgamma(alpha) + lgamma(beta) - lgamma(alpha + beta);
  return {
    pdf: (x) => {
      if (x < a || x > b) return 0;
      const z = (x - a) / w;
      if ((z === 0 && alpha < 1) || (z === 1 && beta < 1)) return Infinity;
      return Math.exp((alpha - 1) * Math.log(z) + (beta - 1) * Math.log1p(-z) - logB) / w;
    },
    cdf: (x) => (x <= a ? 0 : x >= b ? 1 : betainc((x - a) / w, alpha, beta, true, false)),
    sf: (x) => (x <= a ? 1 : x >= b ? 0 : betainc((x - a) / w, alpha, beta, true, true)),
    lo: a,
    hi: b,
  };
}

/** The law of b + s X for a direct law X (s != 0); for s > 0 its layer moments follow X's (affineLayerMoment). */
export function affineDist(d: DirectLaw, s: number, b: number): DirectLaw {
  const inv = (y: number) => (y - b) / s;
  if (s > 0)
    return {
      pdf: (y) => d.pdf(inv(y)) / s,
      cdf: (y) => d.cdf(inv(y)),
      sf: (y) => d.sf(inv(y)),
      lo: b + s * d.lo,
      hi: b + s * d.hi,
      ...(d.layerMoment ? { layerMoment: affineLayerMoment(d.layerMoment, s, b) } : {}),
    };
  return { pdf: (y) => d.pdf(inv(y)) / -s, cdf: (y) => d.sf(inv(y)), sf: (y) => d.cdf(inv(y)), lo: b + s * d.hi, hi: b + s * d.lo };
}
