/**
 * Bounds of a claim density's analytic continuation on complex discs, for the derived remainder of the layer's Filon
 * rule (../filon-remainder.ts). For a family with density f, `logBound(m, R)` is an upper bound on log |f(z)| over
 * |z - m| <= R, f continued from the real piece of the support that holds m (formulas: Klugman, Panjer & Willmot, Loss
 * Models, app. A; JKB vols. 1-2), or Infinity where the disc leaves the region where that continuation is analytic
 * (the principal branches of log z, z^p off (-inf, 0]). The moduli used (common practice): on such a disc, with
 * m - R > 0, |z| lies in [m - R, m + R] and |arg z| <= asin(R / m); Re z >= m - R; Re(1/z) >= 1 / (m + R) (1/z maps the
 * disc onto the disc with that real range); |e^w| = e^{Re w}; |(z - mu)^2| gives Re((z - mu)^2) >= (x - mu)^2 - R^2.
 * `breaks` are the points where the density's formula changes (support ends, a triangular mode): panels are cut there.
 * Each bound carries a margin of 1e-9 (1 + the sum of its terms' sizes) on the log for its own rounding (a few ulps per
 * step, lgamma within lgammaErr).
 */
import type { Model } from "../schema";
import { lgamma, lgammaErr } from "./special";
import { normalCdfBounded } from "./normal-bounded";

export interface DensityDisc {
  logBound(m: number, R: number): number;
  breaks: number[];
}

const LOG_SQRT_2PI = 0.5 * Math.log(2 * Math.PI);
const EPS = Number.EPSILON;

/** the log with its rounding margin: terms summed, plus 1e-9 (1 + sum |term|) */
function sumLog(...terms: number[]): number {
  let s = 0;
  let a = 0;
  for (const t of terms) {
    if (Number.isNaN(t)) return Infinity;
    s += t;
    a += Math.abs(t);
  }
  return Number.isFinite(s) ? s + 1e-9 * (1 + a) : s === -Infinity ? -Infinity : Infinity;
}

/** the moduli on a disc in the right half plane: |z| in [lo, hi], |arg z| <= th; null if the disc reaches 0 or below */
function right(m: number, R: number): { lo: number; hi: number; lnLo: number; lnHi: number; th: number } | null {
  const lo = m - R;
  if (!(lo > 0)) return null;
  const hi = m + R;
  return { lo, hi, lnLo: Math.log(lo), lnHi: Math.log(hi), th: Math.asin(Math.min(1, R / m)) };
}

/** log max |z|^p over the disc (|z| in [lo, hi]) */
const powLog = (p: number, lnLo: number, lnHi: number) => (p >= 0 ? p * lnHi : p * lnLo);

/** log Gamma(x) raised by its bound */
const lgUp = (x: number) => lgamma(x) + lgammaErr(x);
const lgDown = (x: number) => lgamma(x) - lgammaErr(x);

function gammaDisc(k: number, rate: number): DensityDisc {
  const c = k * Math.log(rate) - lgDown(k);
  const entire = Number.isInteger(k) && k >= 1;
  return {
    breaks: [0],
    logBound(m, R) {
      // f = rate^k z^{k-1} e^{-rate z} / Gamma(k); an integer shape is entire
      if (entire) return sumLog(c, (k - 1) * Math.log(Math.abs(m) + R), -rate * (m - R));
      const d = right(m, R);
      return d ? sumLog(c, powLog(k - 1, d.lnLo, d.lnHi), -rate * d.lo) : Infinity;
    },
  };
}

function betaDisc(al: number, be: number, a: number, b: number): DensityDisc {
  const lB = lgUp(al) + lgUp(be) - lgDown(al + be);
  const lw = Math.log(b - a);
  return {
    breaks: [a, b],
    logBound(m, R) {
      // f = (z - a)^{al-1} (b - z)^{be-1} / (B(al, be) (b - a)^{al+be-1}), analytic off (-inf, a] and [b, inf)
      const l = m - R - a;
      const r = b - m - R;
      if (!(l > 0 && r > 0)) return Infinity;
      return sumLog(powLog(al - 1, Math.log(l), Math.log(m + R - a)), powLog(be - 1, Math.log(r), Math.log(b - m + R)), -lB, -(al + be - 1) * lw);
    },
  };
}

function burrDisc(alpha: number, g: number, theta: number): DensityDisc {
  return {
    breaks: [0],
    logBound(m, R) {
      // f = (alpha g / theta) (z / theta)^{g-1} (1 + v)^{-alpha-1}, v = (z / theta)^g: |v| in [(lo/theta)^g, (hi/theta)^g],
      // |arg v| <= g th; |1 + v| >= 1 + |v| cos(g th) while g th <= pi/2, else >= sin(g th) (distance from -1 to the sector)
      const d = right(m, R);
      if (!d) return Infinity;
      const phi = g * d.th;
      if (!(phi < Math.PI)) return Infinity;
      const vLo = Math.exp(g * (d.lnLo - Math.log(theta)));
      const low = phi <= Math.PI / 2 ? 1 + vLo * Math.cos(phi) : Math.sin(phi);
      return sumLog(Math.log((alpha * g) / theta), powLog(g - 1, d.lnLo - Math.log(theta), d.lnHi - Math.log(theta)), -(alpha + 1) * Math.log(low * (1 - 4 * EPS)));
    },
  };
}

function normalDisc(mu: number, sigma: number, logZ: number, breaks: number[]): DensityDisc {
  return {
    breaks,
    logBound(m, R) {
      // |e^{-(z - mu)^2 / (2 sigma^2)}| = e^{-((x - mu)^2 - y^2) / (2 sigma^2)}, |x - m| <= R, |y| <= R: entire
      const D = Math.max(0, Math.abs(m - mu) - R);
      return sumLog(-(D * D - R * R) / (2 * sigma * sigma), -Math.log(sigma), -LOG_SQRT_2PI, -logZ);
    },
  };
}

type P = Record<string, number>;

/** the disc bound of a named family's density, or null where none is formed */
function familyDisc(family: string, p: P): DensityDisc | null {
  switch (family) {
    case "exponential":
      return gammaDisc(1, p.rate);
    case "gamma":
      return gammaDisc(p.shape, p.rate);
    case "chi_squared":
      return gammaDisc(p.k / 2, 0.5);
    case "normal":
      return normalDisc(p.mu, p.sigma, 0, []);
    case "truncated_normal": {
      const a = p.lower ?? -Infinity;
      const b = p.upper ?? Infinity;
      // Z = Phi(beta) - Phi(alpha) lowered by both values' bounds (upper-tail form past the mean)
      const Phi = (z: number) => (z === Infinity ? { v: 1, e: 0 } : z === -Infinity ? { v: 0, e: 0 } : normalCdfBounded(z));
      const al = (a - p.mu) / p.sigma;
      const bb = (b - p.mu) / p.sigma;
      const [p1, p2] = al > 0 ? [Phi(-al), Phi(-bb)] : [Phi(bb), Phi(al)];
      // the ends' own rounding moves each value by at most phi(0) 2u |z|
      const slack = 0.4 * 2 * EPS * (Math.abs(Number.isFinite(al) ? al : 0) + Math.abs(Number.isFinite(bb) ? bb : 0));
      const Z = (p1.v - p1.e - (p2.v + p2.e) - slack) * (1 - 4 * EPS);
      if (!(Z > 0)) return null;
      return normalDisc(p.mu, p.sigma, Math.log(Z), [a, b].filter(Number.isFinite));
    }
    case "uniform":
      return { breaks: [p.a, p.b], logBound: () => sumLog(-Math.log(p.b - p.a)) };
    case "lognormal":
      return {
        breaks: [0],
        logBound(m, R) {
          // |f| = e^{-((ln|z| - mu)^2 - arg(z)^2) / (2 sigma^2)} / (|z| sigma sqrt(2 pi))
          const d = right(m, R);
          if (!d) return Infinity;
          const D = Math.max(0, p.mu - d.lnHi, d.lnLo - p.mu);
          return sumLog(-(D * D - d.th * d.th) / (2 * p.sigma * p.sigma), -d.lnLo, -Math.log(p.sigma), -LOG_SQRT_2PI);
        },
      };
    case "weibull": {
      const k = p.shape;
      const lam = p.scale;
      return {
        breaks: [0],
        logBound(m, R) {
          // f = (k / lam) w^{k-1} e^{-w^k}, w = z / lam; Re w^k >= |w|^k cos(min(k th, pi))
          const d = right(m, R);
          if (!d) return Infinity;
          const ll = Math.log(lam);
          const cmin = Math.cos(Math.min(k * d.th, Math.PI));
          const re = cmin >= 0 ? Math.exp(k * (d.lnLo - ll)) * cmin : Math.exp(k * (d.lnHi - ll)) * cmin;
          return sumLog(Math.log(k / lam), powLog(k - 1, d.lnLo - ll, d.lnHi - ll), -re);
        },
      };
    }
    case "pareto":
      return {
        breaks: [p.xm],
        logBound(m, R) {
          // f = alpha xm^alpha z^{-alpha-1}, continued from x > xm into Re z > 0
          const d = right(m, R);
          return d ? sumLog(Math.log(p.alpha), p.alpha * Math.log(p.xm), -(p.alpha + 1) * d.lnLo) : Infinity;
        },
      };
    case "lomax":
      return {
        breaks: [0],
        logBound(m, R) {
          // f = (alpha / theta) (1 + z / theta)^{-alpha-1}, |theta + z| >= theta + m - R
          const q = p.theta + m - R;
          return q > 0 ? sumLog(Math.log(p.alpha / p.theta), -(p.alpha + 1) * (Math.log(q) - Math.log(p.theta))) : Infinity;
        },
      };
    case "generalized_pareto": {
      const mu = p.mu ?? 0;
      const xi = p.xi;
      const s = p.sigma;
      if (xi === 0) return { breaks: [mu], logBound: (m, R) => sumLog(-Math.log(s), -(m - R - mu) / s) };
      const pw = -1 / xi - 1;
      return {
        breaks: xi < 0 ? [mu, mu - s / xi] : [mu],
        logBound(m, R) {
          // f = (1 / sigma) w^{-1/xi - 1}, w = 1 + xi (z - mu) / sigma: Re w >= w(m) - |xi| R / sigma, |w| <= |w(m)| + |xi| R / sigma
          const wm = 1 + (xi * (m - mu)) / s;
          const lo = wm - (Math.abs(xi) * R) / s;
          if (!(lo > 0)) return Infinity;
          return sumLog(-Math.log(s), powLog(pw, Math.log(lo), Math.log(Math.abs(wm) + (Math.abs(xi) * R) / s)));
        },
      };
    }
    case "burr":
      return burrDisc(p.alpha, p.gamma, p.theta);
    case "loglogistic":
      return burrDisc(1, p.gamma, p.theta);
    case "inverse_gamma":
      return {
        breaks: [0],
        logBound(m, R) {
          // f = theta^alpha z^{-alpha-1} e^{-theta / z} / Gamma(alpha)
          const d = right(m, R);
          return d ? sumLog(p.alpha * Math.log(p.theta), -lgDown(p.alpha), -(p.alpha + 1) * d.lnLo, -p.theta / d.hi) : Infinity;
        },
      };
    case "inverse_gaussian":
      return {
        breaks: [0],
        logBound(m, R) {
          // f = sqrt(lambda / (2 pi z^3)) e^{-lambda (z - 2 mu + mu^2 / z) / (2 mu^2)}
          const d = right(m, R);
          if (!d) return Infinity;
          const k = p.lambda / (2 * p.mu * p.mu);
          return sumLog(0.5 * Math.log(p.lambda), -LOG_SQRT_2PI, -1.5 * d.lnLo, -k * d.lo, 2 * k * p.mu, -k * ((p.mu * p.mu) / d.hi));
        },
      };
    case "beta":
      return betaDisc(p.alpha, p.beta, p.a ?? 0, p.b ?? 1);
    case "pert": {
      const lam = p.lambda ?? 4;
      return betaDisc(1 + (lam * (p.m - p.a)) / (p.b - p.a), 1 + (lam * (p.b - p.m)) / (p.b - p.a), p.a, p.b);
    }
    case "triangular": {
      const { a, b, c } = p;
      const w = b - a;
      return {
        breaks: [a, c, b],
        logBound(m, R) {
          // each side's formula is linear (entire): 2 (z - a) / (w (c - a)) left of c, 2 (b - z) / (w (b - c)) right of it
          if (m < c) return sumLog(Math.log(2 * (Math.abs(m - a) + R)), -Math.log(w * (c - a)));
          return sumLog(Math.log(2 * (Math.abs(b - m) + R)), -Math.log(w * (b - c)));
        },
      };
    }
    default:
      return null;
  }
}

/**
 * The disc bound of a claim model's density: a named family, or one scaled by a > 0 (f_Y(y) = f_X(y / a) / a) or
 * shifted (f_Y(y) = f_X(y - b)); the map's rounding widens the disc by a few ulps of its centre.
 */
export function densityDisc(model: Model): DensityDisc | null {
  const m = model as unknown as Record<string, unknown>;
  if (typeof m.family === "string") return familyDisc(m.family, m as unknown as P);
  if (typeof m.scale === "number" && m.scale > 0 && m.of) {
    const inner = densityDisc(m.of as Model);
    const a = m.scale;
    if (!inner) return null;
    return {
      breaks: inner.breaks.map((x) => a * x),
      logBound: (c, R) => inner.logBound(c / a, (R / a) * (1 + 4 * EPS) + 4 * EPS * Math.abs(c / a)) - Math.log(a) + 1e-15,
    };
  }
  if (typeof m.shift === "number" && Number.isFinite(m.shift) && m.of) {
    const inner = densityDisc(m.of as Model);
    const b = m.shift;
    if (!inner) return null;
    return { breaks: inner.breaks.map((x) => x + b), logBound: (c, R) => inner.logBound(c - b, R + 4 * EPS * (Math.abs(c) + Math.abs(b))) };
  }
  return null;
}
