import { gamma, lgamma } from "./families/special";
import { majorant, type LogMajorant, type Slope } from "./majorant";
import { least, powerMajorant, type PowerBounds } from "./power-majorant";
import { lognormalMajorant } from "./lognormal-majorant";
import { betaSingularMajorant, burrSingularMajorant } from "./singular-majorants";
import { truncatedNormalMajorant } from "./layer-majorant";

const EPS = Number.EPSILON;

/**
 * Pareto(alpha, xm) (and lomax(alpha, theta), the same shape moved to 0): f jumps by J = alpha / s at the lower end and
 * falls to 0, f' rises from -alpha (alpha + 1) / s^2 to 0: |phi| <= 2 J / t and J / t + 2 alpha (alpha + 1) / (s^2 t^2).
 */
export function paretoMajorant(alpha: number, xm: number): LogMajorant {
  const m = 1 + 16 * EPS;
  const J = alpha / xm;
  // x f = alpha xm^alpha x^-alpha: jump alpha at xm, (x f)' from -alpha^2 / xm up to 0
  const slope = alpha > 1 ? { center: 0, bounds: [[((alpha * xm) / (alpha - 1)) * m], [0, 2 * alpha * m], [0, alpha * m, ((2 * alpha * alpha) / xm) * m]] } : undefined;
  return powerMajorant([[1], [0, 2 * J * m], [0, J * m, ((2 * alpha * (alpha + 1)) / (xm * xm)) * m]], slope);
}

/**
 * Lomax(alpha, theta): as pareto for |phi|; x f = (alpha / theta) x (1 + x / theta)^{-alpha-1} is 0 at 0 and unimodal
 * (peak (1 + 1/alpha)^{-alpha-1} at theta / alpha), (x f)' = (alpha / theta) (1 + y)^{-alpha-2} (1 - alpha y), y = x / theta,
 * jumps by alpha / theta at 0 and has its least value at y = 2 / alpha.
 */
export function lomaxMajorant(alpha: number, theta: number): LogMajorant {
  const m = 1 + 32 * EPS;
  const J = alpha / theta;
  const peak = Math.pow(1 + 1 / alpha, -alpha - 1);
  const low = J * Math.pow(1 + 2 / alpha, -alpha - 2);
  const slope = alpha > 1 ? { center: 0, bounds: [[(theta / (alpha - 1)) * m], [0, 2 * peak * m], [0, 0, (2 * J + 2 * low) * m]] } : undefined;
  return powerMajorant([[1], [0, 2 * J * m], [0, J * m, ((2 * alpha * (alpha + 1)) / (theta * theta)) * m]], slope);
}

/**
 * Triangular(a, c, b), w = b - a: TV(f) = 4 / w; f' is piecewise constant with jumps summing to 4 / ((c - a)(b - c));
 * with the mode at an end f jumps by 2 / w there and TV(f' 1_(a,b)) = 4 / w^2.
 */
export function triangularMajorant(a: number, c: number, b: number): LogMajorant {
  const w = b - a;
  const m = 1 + 16 * EPS;
  const inner = c > a && c < b;
  const second = inner ? [0, 0, (4 / ((c - a) * (b - c))) * m] : [0, (2 / w) * m, (4 / (w * w)) * m];
  return powerMajorant([[1], [0, (4 / w) * m], second], triangularSlope(a, c, b));
}

/**
 * The slope about the midpoint p: |phi'| = |int g e^{itx}|, g = (x - p) f, |x - p| <= w / 2. E|X - p| <= w / 2;
 * by parts once TV(g) <= int f + (w / 2) TV(f) = 3; twice, g' = f + (x - p) f' with f' piecewise constant: g'' = 2 f' inside
 * the pieces (int |g''| = 2 TV(f inside) <= 8 / w), the jumps of g' at most those of f (2 / w, mode at an end) plus w / 2
 * times those of f' (4 / ((c - a)(b - c)) inside, 4 / w^2 with the mode at an end), and g's own jump (1, mode at an end).
 */
function triangularSlope(a: number, c: number, b: number): { center: number; bounds: number[][] } {
  const w = b - a;
  const m = 1 + 32 * EPS;
  const second = c > a && c < b ? [0, 0, ((2 * w) / ((c - a) * (b - c)) + 8 / w) * m] : [0, m, (12 / w) * m];
  return { center: 0.5 * (a + b), bounds: [[0.5 * w * m], [0, 3 * m], second] };
}

/**
 * Weibull(k, lambda), y = (x / lambda)^k, f = (k / x) y e^{-y}, f' = k y e^{-y} (k - 1 - k y) / x^2.
 * k >= 1: TV(f) = 2 f(mode) (k = 1: the jump 1 / lambda at 0 and the fall); k >= 2: f' is bounded, its extrema where
 * k^2 y^2 - 3 k (k - 1) y + (k - 1)(k - 2) = 0 (and f'(0+) = 2 / lambda^2 at k = 2), TV(f') = 2 (max f' + |min f'|);
 * k = 1: J / t + 2 / (lambda^2 t^2). 1 < k < 2: f' is unbounded at 0, only the first order.
 * k < 1: f is decreasing and unbounded at 0; by the second mean value theorem (Bonnet; e.g. Zygmund, Trigonometric Series,
 * ch. I) |int_d^inf f e^{itx}| <= 2 f(d) / t, so |phi(t)| <= F(d) + 2 f(d) / t for every d > 0, here d = 2 (1 - k) / t (the
 * minimiser of y (1 + 2 k / (d t))); past t, d_s = d t / s gives M(s) <= (d / lambda)^k (1 + 2 k / (d t)) (t / s)^k.
 * The slope about 0: x f = k y e^{-y} is unimodal with peak k / e, |phi'| <= E X = lambda Gamma(1 + 1/k).
 */
export function weibullMajorant(k: number, lambda: number): LogMajorant {
  const m = 1 + 64 * EPS;
  // gamma() carries far less than 1e-12 relative error (special.ts)
  const slope = { center: 0, bounds: [[lambda * gamma(1 + 1 / k) * (1 + 1e-12)], [0, ((2 * k) / Math.E) * m]] };
  if (k >= 1) {
    const ym = (k - 1) / k;
    const fmode = k === 1 ? 1 / lambda : (k / (lambda * Math.pow(ym, 1 / k))) * ym * Math.exp(-ym);
    const bs: PowerBounds = [[1], [0, 2 * fmode * m]];
    if (k === 1) bs.push([0, (1 / lambda) * m, (2 / (lambda * lambda)) * m]);
    else if (k >= 2) {
      const fp = (y: number) => (y > 0 ? (k * y * Math.exp(-y) * (k - 1 - k * y)) / Math.pow(lambda * Math.pow(y, 1 / k), 2) : 0);
      const r = Math.sqrt((k - 1) * (5 * k - 1));
      const cands = [fp((3 * (k - 1) + r) / (2 * k)), fp((3 * (k - 1) - r) / (2 * k)), k === 2 ? 2 / (lambda * lambda) : 0];
      const hi = Math.max(0, ...cands);
      const lo = Math.max(0, ...cands.map((v) => -v));
      bs.push([0, 0, 2 * (hi + lo) * m]);
    }
    if (k > 1 && k < 2) return weibullBelowTwo(k, lambda, fmode, slope);
    return powerMajorant(bs, slope);
  }
  const at = (t: number) => {
    const d = (2 * (1 - k)) / t;
    const y = Math.pow(d / lambda, k);
    const F = -Math.expm1(-y);
    const f = (k / d) * y * Math.exp(-y);
    return { v: Math.min(1, (F + (2 * f) / t) * m), tail: y * (1 + (2 * k) / (d * t)) * m };
  };
  return majorant(
    (t, out) => {
      for (let i = 0; i < t.length; i++) out[i] = Math.log(at(Math.abs(t[i])).v);
    },
    (t) => ({ log: Math.log(at(t).tail), q: k }),
    {
      center: 0,
      at: (t, out) => {
        for (let i = 0; i < t.length; i++) out[i] = least(slope.bounds, Math.abs(t[i])).v;
      },
    },
  );
}

/**
 * Weibull 1 < k < 2: f(0) = 0 and f' = k y e^{-y} (k - 1 - k y) / x^2 is unbounded at 0, falls to its least value at the
 * one inflection y+ = (3 (k - 1) + sqrt((k - 1)(5 k - 1))) / (2 k) and rises to 0. phi(t) = -(1 / (i t)) int f' e^{itx};
 * for d below the mode (f' >= 0 on (0, d)), |int_0^d f' e^{itx}| <= f(d) and |int_d^inf f' e^{itx}| <= (f'(d) + TV_(d,inf) f') / t =
 * (2 f'(d) + 2 |f'(x+)|) / t, so |phi| <= f(d) / t + (2 f'(d) + 2 |f'(x+)|) / t^2, here d = 2 (2 - k) / t (the minimiser
 * of the leading terms). Past t, d_s = d t / s with f(d) <= (k / lambda) (d / lambda)^{k-1} and f'(d) <= k (k - 1) y / d^2
 * gives the tail power k. Below the frequencies where d reaches the mode, the first order 2 f(mode) / t.
 */
function weibullBelowTwo(k: number, lambda: number, fmode: number, slope: { center: number; bounds: PowerBounds }): LogMajorant {
  const m = 1 + 64 * EPS;
  const yp = (3 * (k - 1) + Math.sqrt((k - 1) * (5 * k - 1))) / (2 * k);
  const xp = lambda * Math.pow(yp, 1 / k);
  const lowest = (k * yp * Math.exp(-yp) * Math.abs(k - 1 - k * yp)) / (xp * xp);
  // f' >= 0 on (0, d) needs d below the mode
  const xmode = lambda * Math.pow((k - 1) / k, 1 / k);
  const at = (t: number) => {
    const first = Math.min(1, (2 * fmode) / t);
    const d = (2 * (2 - k)) / t;
    if (!(d < xmode)) return { v: first * m, tail: first * m, q: first < 1 ? 1 : 0 };
    const y = Math.pow(d / lambda, k);
    const f = (k / d) * y * Math.exp(-y);
    const fp = (k * y * Math.exp(-y) * (k - 1 - k * y)) / (d * d);
    const second = f / t + (2 * fp + 2 * lowest) / (t * t);
    const tail = ((k / lambda) * Math.pow(d / lambda, k - 1)) / t + (2 * k * (k - 1) * y) / (d * d * t * t) + (2 * lowest) / (t * t);
    return second < first ? { v: second * m, tail: tail * m, q: k } : { v: first * m, tail: first * m, q: first < 1 ? 1 : 0 };
  };
  return majorant(
    (t, out) => {
      for (let i = 0; i < t.length; i++) out[i] = Math.log(at(Math.abs(t[i])).v);
    },
    (t) => {
      const r = at(t);
      return { log: Math.log(r.tail), q: r.q };
    },
    {
      center: 0,
      at: (t, out) => {
        for (let i = 0; i < t.length; i++) out[i] = least(slope.bounds, Math.abs(t[i])).v;
      },
    },
  );
}

/** The decay power q(t) (|phi(s)| s^q non-increasing on [t, inf)) and slope of the families with monotone |phi|. */
export function monotoneExtras(family: string, p: Record<string, number>): { q?: (t: number) => number; slope?: Slope } {
  const r = (v: number) => v * (1 + 16 * EPS);
  // |phi| = P(t^2)^{-e}, P with positive coefficients: u P'(u) / P(u) grows with u, so q = 2 e u P'(u) / P(u) at u = t^2
  const gammaType = (k: number, rate: number, center: number) => ({
    q: (t: number) => (k * t * t) / (rate * rate + t * t) * (1 - 8 * EPS),
    // |d/dt (phi e^{-i t k / rate})| = (k / rate^2) t (1 + t^2 / rate^2)^{-(k+1)/2}, largest at t = rate / sqrt(k)
    slope: {
      center,
      at: (t: Float64Array, out: Float64Array) => {
        for (let i = 0; i < t.length; i++) {
          const s = Math.max(Math.abs(t[i]), rate / Math.sqrt(k));
          out[i] = r((k / (rate * rate)) * s * Math.pow(1 + (s * s) / (rate * rate), -(k + 1) / 2));
        }
      },
    },
  });
  switch (family) {
    case "normal": {
      const s = p.sigma;
      return {
        q: (t) => s * s * t * t * (1 - 8 * EPS),
        slope: {
          center: p.mu,
          at: (t, out) => {
            for (let i = 0; i < t.length; i++) {
              const x = Math.max(Math.abs(t[i]), 1 / s);
              out[i] = r(s * s * x * Math.exp(-0.5 * s * s * x * x));
            }
          },
        },
      };
    }
    case "cauchy":
      return { q: (t) => p.scale * t * (1 - 8 * EPS) };
    case "gamma":
      return gammaType(p.shape, p.rate, p.shape / p.rate);
    case "exponential":
      return gammaType(1, p.rate, 1 / p.rate);
    case "chi_squared":
      return gammaType(p.k / 2, 0.5, p.k);
    case "laplace": {
      const b = p.scale;
      return {
        q: (t) => ((2 * b * b * t * t) / (1 + b * b * t * t)) * (1 - 8 * EPS),
        slope: {
          center: p.loc,
          at: (t, out) => {
            for (let i = 0; i < t.length; i++) {
              const x = Math.max(Math.abs(t[i]), 1 / (b * Math.sqrt(3)));
              out[i] = r((2 * b * b * x) / Math.pow(1 + b * b * x * x, 2));
            }
          },
        },
      };
    }
    case "logistic":
      // d/dx log(x / sinh x) = 1/x - coth x: q = x coth x - 1 at x = pi s t, growing with x
      return {
        q: (t) => {
          const x = Math.PI * p.scale * t;
          return x > 1e-4 ? (x / Math.tanh(x) - 1) * (1 - 1e-12) : 0;
        },
      };
    default:
      return {};
  }
}

/**
 * Unimodal densities vanishing at both ends (or jumping at the lower end and falling): TV(f) = 2 f(mode), |phi| <=
 * 2 f(mode) / t, with the closed-form modes (Klugman, Panjer & Willmot, Loss Models, app. A; JKB vol. 1 ch. 15 for the
 * inverse gaussian): burr (gamma >= 1; below 1, and beta shapes below 1, in singular-majorants.ts) at theta ((gamma - 1) / (alpha gamma + 1))^{1/gamma}; loglogistic the burr with
 * alpha = 1; inverse gaussian at mu (sqrt(1 + 9 mu^2 / (4 lambda^2)) - 3 mu / (2 lambda)); inverse gamma at
 * theta / (alpha + 1). Generalized pareto (xi > -1): f falls from 1 / sigma at its lower end (a jump) to 0, so
 * TV(f) = 2 / sigma (xi = -1, the uniform on [mu, mu + sigma]: two jumps of 1 / sigma, the same); for xi >= 0 f' rises monotonically from -(1 + xi) / sigma^2 to 0: J / t + 2 (1 + xi) / (sigma^2 t^2).
 */
function unimodalMajorant(family: string, p: Record<string, number>): LogMajorant | undefined {
  const m = 1 + 1e-12; // the densities' few exp, log and pow at the mode
  const burrPdf = (a: number, g: number, th: number, x: number) => {
    const y = Math.pow(x / th, g);
    return (a * g * y) / (x * Math.pow(1 + y, a + 1));
  };
  switch (family) {
    case "generalized_pareto": {
      const { xi, sigma } = p;
      // xi < -1: Beta(1, -1 / xi) on [mu, mu - sigma / xi], singular at the upper end (singular-majorants.ts)
      if (xi < -1) return betaSingularMajorant(1, -1 / xi, p.mu ?? 0, (p.mu ?? 0) - sigma / xi);
      // xi = -1: uniform on [mu, mu + sigma], |phi| <= 2 / (sigma t), the bound below
      if (!(xi >= -1)) return undefined;
      const bs: PowerBounds = [[1], [0, (2 / sigma) * m]];
      if (xi >= 0) bs.push([0, (1 / sigma) * m, ((2 * (1 + xi)) / (sigma * sigma)) * m]);
      return powerMajorant(bs);
    }
    case "burr":
    case "loglogistic": {
      const a = family === "burr" ? p.alpha : 1;
      const g = p.gamma;
      const th = p.theta;
      if (g < 1) return burrSingularMajorant(a, g, th);
      if (!(g >= 1)) return undefined;
      const fmax = g === 1 ? a / th : burrPdf(a, g, th, th * Math.pow((g - 1) / (a * g + 1), 1 / g));
      return powerMajorant([[1], [0, 2 * fmax * m]]);
    }
    case "beta":
    case "pert": {
      // beta on [a, b] with both shapes >= 1: unimodal, sup f at the mode y* = (alpha - 1) / (alpha + beta - 2) of
      // y^{alpha-1} (1 - y)^{beta-1} / (B(alpha, beta) (b - a)) (JKB vol. 2 ch. 25); pert is the beta with
      // alpha = 1 + lambda (m - a) / (b - a), beta = 1 + lambda (b - m) / (b - a)
      const a = family === "beta" ? (p.a ?? 0) : p.a;
      const b = family === "beta" ? (p.b ?? 1) : p.b;
      const lam = p.lambda ?? 4;
      const al = family === "beta" ? p.alpha : 1 + (lam * (p.m - a)) / (b - a);
      const be = family === "beta" ? p.beta : 1 + (lam * (b - p.m)) / (b - a);
      // a shape below 1 (beta only: pert's shapes are 1 + lambda (...) >= 1): singular-majorants.ts
      if (al > 0 && be > 0 && (al < 1 || be < 1)) return betaSingularMajorant(al, be, a, b);
      if (!(al >= 1 && be >= 1)) return undefined;
      const y = al + be > 2 ? (al - 1) / (al + be - 2) : 0.5;
      const lb = lgamma(al) + lgamma(be) - lgamma(al + be);
      const lf = (al > 1 ? (al - 1) * Math.log(y) : 0) + (be > 1 ? (be - 1) * Math.log(1 - y) : 0) - lb - Math.log(b - a);
      const fmax = Math.exp(lf) * (1 + 1e-11);
      // the slope about the midpoint p: |int (x - p) f e^{itx}| <= |x - p| <= w / 2, and by parts TV((x - p) f) <= int f +
      // (w / 2) TV(f) <= 1 + w fmax (f unimodal, its jumps from 0 at the ends included)
      const w = b - a;
      const slope = { center: 0.5 * (a + b), bounds: [[0.5 * w * (1 + 4 * EPS)], [0, (1 + w * fmax) * (1 + 8 * EPS)]] };
      return powerMajorant([[1], [0, 2 * fmax]], slope);
    }
    case "inverse_gaussian": {
      const { mu, lambda } = p;
      const x = mu * (Math.sqrt(1 + (9 * mu * mu) / (4 * lambda * lambda)) - (3 * mu) / (2 * lambda));
      const f = Math.sqrt(lambda / (2 * Math.PI * x * x * x)) * Math.exp((-lambda * (x - mu) * (x - mu)) / (2 * mu * mu * x));
      return powerMajorant([[1], [0, 2 * f * m]]);
    }
    case "inverse_gamma": {
      const { alpha, theta } = p;
      const f = Math.exp((alpha + 1) * Math.log(alpha + 1) - (alpha + 1) - Math.log(theta) - lgamma(alpha));
      return powerMajorant([[1], [0, 2 * f * m]]);
    }
    default:
      return undefined;
  }
}

/** The derived majorant of a continuous family whose |phi| is not monotone, where one is derived here. */
export function familyMajorant(family: string, p: Record<string, number>): LogMajorant | undefined {
  switch (family) {
    case "lognormal":
      return lognormalMajorant(p.mu, p.sigma);
    case "pareto":
      return paretoMajorant(p.alpha, p.xm);
    case "lomax":
      return lomaxMajorant(p.alpha, p.theta);
    case "weibull":
      return weibullMajorant(p.shape, p.scale);
    case "triangular":
      return triangularMajorant(p.a, p.c, p.b);
    case "truncated_normal":
      return truncatedNormalMajorant(p.mu, p.sigma, p.lower, p.upper);
    default:
      return unimodalMajorant(family, p);
  }
}
