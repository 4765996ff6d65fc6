import { bernoulliNumbers, factorial } from "./special";
import { NONE_MOMENT, type Node } from "../node";
import { gammaDamped } from "../damped-cf";
import { linearLogRound, shiftLogRound } from "./log-round";

const B = bernoulliNumbers(40);
const CONT = { type: "continuous" } as const;
const ALL = Infinity;

export function base(p: Partial<Node> & Pick<Node, "logCf" | "cumulants" | "location" | "scale" | "support">): Node {
  return { kind: CONT, momentIndex: ALL, tails: { left: ALL, right: ALL }, nodes: 1, notes: [], ...p };
}

/** Normal: log phi = i mu t - sigma^2 t^2 / 2 (Johnson, Kotz & Balakrishnan vol. 1, ch. 13). */
export function normal(mu: number, sigma: number): Node {
  const s2 = sigma * sigma;
  return base({
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const x = t[k];
        re[k] = -0.5 * s2 * x * x;
        im[k] = mu * x;
      }
    },
    cumulants: (n) => Array.from({ length: n }, (_, i) => (i === 0 ? mu : i === 1 ? s2 : 0)),
    location: mu,
    scale: sigma,
    support: [-Infinity, Infinity],
    // v e^-v, v = (sigma t)^2 / 2: (w / 2) e^(-w^2 / 2) <= e^(-1/2) / 2 < 0.3033 per unit w = sigma |t| (largest at w = 1)
    ...shiftLogRound(mu, 0.3033 * sigma, (x) => -0.5 * s2 * x * x),
  });
}

/** Cauchy: log phi = i loc t - scale |t| (Johnson, Kotz & Balakrishnan vol. 1, ch. 16). */
export function cauchy(loc: number, scale: number): Node {
  return base({
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        re[k] = -scale * Math.abs(t[k]);
        im[k] = loc * t[k];
      }
    },
    momentIndex: 1,
    cumulants: NONE_MOMENT,
    location: loc,
    scale,
    support: [-Infinity, Infinity],
    tails: { left: 1, right: 1 },
    // v e^-v <= v = scale |t|
    ...shiftLogRound(loc, scale, (x) => -scale * Math.abs(x)),
  });
}

/**
 * Uniform(a, b): phi = e^{i c t} sin(h t)/(h t), c = (a+b)/2, h = (b-a)/2 (JKB vol. 2, ch. 26); the phase steps by
 * pi at each zero of sin, counted from t = 0, so that the branch is the limit of continuous branches.
 */
export function uniform(a: number, b: number): Node {
  const c = 0.5 * (a + b);
  const h = 0.5 * (b - a);
  const w = b - a;
  return base({
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const x = t[k];
        const y = h * x;
        const s = y === 0 ? 1 : Math.sin(y) / y;
        re[k] = Math.log(Math.abs(s));
        const ay = Math.abs(y);
        im[k] = c * x + (x < 0 ? -1 : 1) * Math.PI * Math.floor(ay / Math.PI);
      }
    },
    // kappa_n = B_n (b-a)^n / n for n >= 2 (Kendall & Stuart vol. 1, ch. 3, recalled from memory)
    cumulants: (n) => Array.from({ length: n }, (_, i) => (i === 0 ? c : (B[i + 1] * w ** (i + 1)) / (i + 1))),
    location: c,
    scale: w / Math.sqrt(12),
    support: [a, b],
    // E e^{-sX} = (e^{-s a} - e^{-s b}) / ((b - a) s) exactly: the density's two jumps (JKB vol. 2, ch. 26)
    transformSeries: [
      { at: a, series: new Map([[1, 1 / w]]) },
      { at: b, series: new Map([[1, -1 / w]]) },
    ],
    ...uniformLogRound(c, h),
  });
}

/**
 * Node.logRoundSlope of uniform(c - h, c + h): its log L = log|sinc(y)| + i (c t + pi floor(|y| / pi)), y = h t, is computed
 * within 8 ulps relative to |L| (the tree's allowance per node, ../invert/part.ts cfUlps). |Im L| <= (|c| + h) |t|; with
 * x = |phi| = |sinc y| in [0, 1], x |log x| <= 1 - x (equality at 1, derivative log x <= 0), and sinc y >= 1 - y^2 / 6 (sin y
 * >= y - y^3 / 6, y >= 0), so |phi| |Re L| <= min(1/e, y^2 / 6) <= |y| / sqrt(6). R = 8 u (|c| + h (1 + 1/sqrt(6))).
 * Per frequency, falling with t: |phi| <= min(1, 1/|y|), so |phi| |L| <= min(1/e, y^2 / 6) + min(1, 1/|y|) (|c| + h) |t|
 * (majorants only, not the computed sin, whose value near its zeros is off relative to itself). No damped transform declared.
 */
function uniformLogRound(c: number, h: number): Pick<Node, "logRoundSlope" | "logRoundAt"> {
  const slope = 8 * Number.EPSILON * (Math.abs(c) + h * (1 + 1 / Math.sqrt(6))) * (1 + 8 * Number.EPSILON);
  return {
    logRoundSlope: slope,
    logRoundAt: (t) => {
      const y = h * Math.abs(t);
      const v = Math.min(1 / Math.E, (y * y) / 6) + Math.min(1, 1 / y) * (Math.abs(c) + h) * Math.abs(t);
      return Math.min(slope * Math.abs(t), 8 * Number.EPSILON * v * (1 + 16 * Number.EPSILON));
    },
  };
}

/** Gamma(shape, rate): log phi = -shape log(1 - i t / rate) (JKB vol. 1, ch. 17); principal log is continuous. */
export function gammaLaw(shape: number, rate: number): Node {
  return base({
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const y = -t[k] / rate;
        re[k] = -shape * 0.5 * Math.log1p(y * y);
        im[k] = -shape * Math.atan(y);
      }
    },
    // kappa_n = shape (n-1)! / rate^n (JKB vol. 1, ch. 17)
    cumulants: (n) => Array.from({ length: n }, (_, i) => (shape * factorial(i)) / rate ** (i + 1)),
    location: shape / rate,
    scale: Math.sqrt(shape) / rate,
    support: [0, Infinity],
    dampedLogCf: gammaDamped(shape, rate),
    laplaceExpansion: gammaExpansion(shape, rate),
    logRoundSlope: gammaLogRoundSlope(shape, rate),
    logRoundAt: gammaLogRoundAt(shape, rate),
    ...gammaLogRoundDamped(shape, rate),
  });
}

/**
 * Node.logRoundSlope of gamma(k, r): its log is computed within 8 ulps relative to |L| (the tree's allowance per node,
 * ../invert/part.ts cfUlps), and |phi| |L| <= c E X |s|: |Im L| = k |atan(s / r)| <= k |s| / r with |phi| <= 1, and
 * |phi| |Re L| = v e^-v (v = k log1p(y^2) / 2, y = s / r) <= min(1/e, k y^2 / 2) <= k |y| / sqrt(2 e k); damped at
 * z = (beta - i t) / r: |log(1 + z)| <= |Re log| + |arg| <= 2 |z| (Re z >= 0) with |phi~| <= 1. So c = max(2, 1 + 1/sqrt(2 e k)).
 */
function gammaLogRoundSlope(shape: number, rate: number): number {
  const c = Math.max(2, 1 + 1 / Math.sqrt(2 * Math.E * shape));
  return 8 * Number.EPSILON * c * (shape / rate) * (1 + 8 * Number.EPSILON);
}

/** the same at t: 8 ulps of |phi| |L| <= (1 + y^2)^(-k/2) k (atan |y| + log1p(y^2) / 2), y = t / r, with its own roundings */
function gammaLogRoundAt(shape: number, rate: number): (t: number) => number {
  const slope = gammaLogRoundSlope(shape, rate);
  return (t) => {
    const y = Math.abs(t) / rate;
    const l = Math.log1p(y * y);
    const v = Math.exp(-0.5 * shape * l) * shape * (Math.atan(y) + 0.5 * l);
    return Math.min(slope * Math.abs(t), 8 * Number.EPSILON * v * (1 + 64 * Number.EPSILON));
  };
}

/** damped at z = (beta - i t) / r: |phi~| = |1 + z|^-k, |L~| <= k (log |1 + z| + atan(t / (r + beta))) */
/**
 * the same damped, over [t0, t1]: e^{-k lm} at t0, lm + atan(t / (r + beta)) and the slope's t + beta at t1 (each monotone
 * in t); at one frequency the run [t, t]
 */
function gammaLogRoundDamped(shape: number, rate: number): Pick<Node, "logRoundDampedAt" | "logRoundDampedOn"> {
  const slope = gammaLogRoundSlope(shape, rate);
  const on = (beta: number, t0: number, t1: number) => {
    const a0 = Math.abs(t0);
    const a1 = Math.max(Math.abs(t1), a0);
    const lm0 = 0.5 * Math.log(((rate + beta) * (rate + beta) + a0 * a0) / (rate * rate));
    const lm1 = a1 === a0 ? lm0 : 0.5 * Math.log(((rate + beta) * (rate + beta) + a1 * a1) / (rate * rate));
    const v = Math.exp(-shape * lm0) * shape * (lm1 + Math.atan(a1 / (rate + beta)));
    return Math.min(slope * (a1 + beta), 8 * Number.EPSILON * v * (1 + 64 * Number.EPSILON));
  };
  return { logRoundDampedAt: (beta, t) => on(beta, t, t), logRoundDampedOn: on };
}

/**
 * Gamma(a, r) Laplace transform at large s: (1 + s/r)^{-a} = (r/s)^a (1 + r/s)^{-a} = sum_j (-1)^j (a)_j / j! r^{a+j}
 * s^{-a-j} (binomial series, |r/s| < 1); compounds of gamma severities subtract gamma kernels from it.
 */
function gammaExpansion(a: number, r: number): { at: number; exps: number[]; coefs: number[]; rate: number } {
  const exps: number[] = [];
  const coefs: number[] = [];
  let c = Math.pow(r, a);
  for (let j = 0; a + j <= 8; j++) {
    exps.push(a + j);
    coefs.push(c);
    c *= (-(a + j) * r) / (j + 1);
  }
  return { at: 0, exps, coefs, rate: r };
}

/** Laplace(loc, b): phi = e^{i loc t} / (1 + b^2 t^2) (JKB vol. 2, ch. 24). */
export function laplace(loc: number, b: number): Node {
  return base({
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const y = b * t[k];
        re[k] = -Math.log1p(y * y);
        im[k] = loc * t[k];
      }
    },
    // kappa_{2m} = 2 (2m-1)! b^{2m}, odd orders >= 3 vanish (expansion of -log(1 + b^2 t^2))
    cumulants: (n) => Array.from({ length: n }, (_, i) => (i === 0 ? loc : (i + 1) % 2 === 0 ? 2 * factorial(i) * b ** (i + 1) : 0)),
    location: loc,
    scale: Math.SQRT2 * b,
    support: [-Infinity, Infinity],
    // v e^-v = log1p(y^2) / (1 + y^2) <= y^2 / (1 + y^2) <= |y| / 2, y = b t
    ...shiftLogRound(loc, 0.5 * b, (x) => -Math.log1p(b * x * b * x)),
  });
}

/** log(x / sinh x) for real x, accurate near 0 (series) and for large |x|. */
function logXOverSinh(x: number): number {
  const a = Math.abs(x);
  if (a < 0.5) {
    // sinh(x)/x - 1 = sum_{k>=1} x^{2k} / (2k+1)!
    const x2 = a * a;
    let term = 1;
    let s = 0;
    for (let k = 1; k < 20; k++) {
      term *= x2 / ((2 * k) * (2 * k + 1));
      s += term;
      if (term < 1e-18 * s) break;
    }
    return -Math.log1p(s);
  }
  // sinh a = e^a (1 - e^{-2a}) / 2
  return Math.log(2 * a) - a - Math.log1p(-Math.exp(-2 * a));
}

/** Logistic(loc, s): phi = e^{i loc t} pi s t / sinh(pi s t) (JKB vol. 2, ch. 23). */
export function logistic(loc: number, s: number): Node {
  return base({
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        re[k] = logXOverSinh(Math.PI * s * t[k]);
        im[k] = loc * t[k];
      }
    },
    // kappa_{2n} = |B_{2n}| 2^{2n} (pi s)^{2n} / (2n) (from log(sinh x / x) = sum 2^{2n} B_{2n} x^{2n} / (2n (2n)!), via Bernoulli numbers, A&S ch. 4 and ch. 23, recalled from memory)
    cumulants: (n) =>
      Array.from({ length: n }, (_, i) => {
        const m = i + 1;
        if (m === 1) return loc;
        if (m % 2 === 1) return 0;
        return (Math.abs(B[m]) * 2 ** m * (Math.PI * s) ** m) / m;
      }),
    location: loc,
    scale: (Math.PI * s) / Math.sqrt(3),
    support: [-Infinity, Infinity],
    // v = log(sinh x / x) <= x^2 / 6 (sinh x / x = sum x^2k / (2k+1)! <= sum (x^2 / 6)^k / k!), x = pi s t, and v e^-v <= 1/e,
    // so v e^-v <= min(1, x^2 / 6) <= |x| / sqrt(6)
    ...shiftLogRound(loc, (Math.PI * s) / Math.sqrt(6), (x) => logXOverSinh(Math.PI * s * x)),
  });
}

/**
 * Variance-gamma: log phi = i loc t - (1/nu) log(1 - i theta nu t + sigma^2 nu t^2 / 2) (Madan, Carr & Chang 1998,
 * Eur. Finance Review 2, recalled from memory); the argument has real part >= 1, so the principal log is the continuous branch.
 */
export function varianceGamma(sigma: number, nu: number, theta: number, loc: number): Node {
  const s2 = sigma * sigma;
  return base({
    logCf: vgLog,
    // factor 1 - theta nu u - sigma^2 nu u^2/2 = (1 - r1 u)(1 - r2 u); kappa_m = (m-1)! (r1^m + r2^m) / nu, with the
    // power sums p_m = theta nu p_{m-1} + (sigma^2 nu / 2) p_{m-2} (Newton's identities)
    cumulants: (n) => {
      const e1 = Math.abs(theta) * nu;
      const e2 = 0.5 * s2 * nu;
      const sign = theta < 0 ? -1 : 1;
      const out: number[] = [];
      let pm2 = 2;
      let pm1 = e1;
      for (let m = 1; m <= n; m++) {
        const pm = m === 1 ? e1 : e1 * pm1 + e2 * pm2;
        if (m > 1) {
          pm2 = pm1;
          pm1 = pm;
        }
        out.push((factorial(m - 1) * pm * sign ** m) / nu + (m === 1 ? loc : 0));
      }
      return out;
    },
    location: loc + theta,
    scale: Math.sqrt(s2 + theta * theta * nu),
    support: [-Infinity, Infinity],
    // L' = i loc + (i theta - sigma^2 t) / D, D = 1 - i theta nu t + sigma^2 nu t^2 / 2, |D| >= Re D >= max(1, sigma t sqrt(2 nu))
    // (AM-GM): |L'| <= |loc| + |theta| + sigma / sqrt(2 nu), L(0) = 0 on the continuous branch
    ...linearLogRound(Math.abs(loc) + Math.abs(theta) + sigma / Math.sqrt(2 * nu), vgLog),
  });
  function vgLog(t: Float64Array, re: Float64Array, im: Float64Array) {
    for (let k = 0; k < t.length; k++) {
      const x = t[k];
      const ur = 0.5 * s2 * nu * x * x;
      const ui = -theta * nu * x;
      re[k] = (-0.5 / nu) * Math.log1p(2 * ur + ur * ur + ui * ui);
      im[k] = loc * x - Math.atan2(ui, 1 + ur) / nu;
    }
  }
}

/**
 * Normal inverse Gaussian: log phi = i mu t + delta (gamma - sqrt(alpha^2 - (beta + i t)^2)), gamma = sqrt(alpha^2 -
 * beta^2) (Barndorff-Nielsen 1997, Scand. J. Statist. 24, sec. 2, recalled from memory); gamma - s is formed as (gamma^2 - s^2)/(gamma + s) to avoid cancellation.
 */
export function nig(alpha: number, beta: number, delta: number, mu: number): Node {
  const g = Math.sqrt(alpha * alpha - beta * beta);
  return base({
    logCf: nigLog,
    // K(u) = mu u + delta (g - sqrt(h(u))), h(u) = g^2 - 2 beta u - u^2: Taylor coefficients of sqrt(h) by the
    // square-root series recursion, kappa_m = -delta m! [u^m] sqrt(h)
    cumulants: (n) => {
      const h = [g * g, -2 * beta, -1];
      const c: number[] = [g];
      for (let m = 1; m <= n; m++) {
        let s = h[m] ?? 0;
        for (let j = 1; j < m; j++) s -= c[j] * c[m - j];
        c.push(s / (2 * g));
      }
      return Array.from({ length: n }, (_, i) => (i === 0 ? mu : 0) - delta * factorial(i + 1) * c[i + 1]);
    },
    location: mu + (delta * beta) / g,
    scale: Math.sqrt((delta * alpha * alpha) / (g * g * g)),
    support: [-Infinity, Infinity],
    // L' = i mu + i delta (beta + i t) / w^(1/2), w = g^2 + t^2 - 2 i beta t, |w| >= g^2 + t^2: |L'| <= |mu| + delta
    // sqrt((beta^2 + t^2) / (g^2 + t^2)) <= |mu| + delta max(1, |beta| / g), L(0) = 0 on the continuous branch
    ...linearLogRound(Math.abs(mu) + delta * Math.max(1, Math.abs(beta) / g), nigLog),
  });
  function nigLog(t: Float64Array, re: Float64Array, im: Float64Array) {
    for (let k = 0; k < t.length; k++) {
      const x = t[k];
      // s = sqrt(g^2 + x^2 - 2 i beta x), principal (Re > 0)
      const zr = g * g + x * x;
      const zi = -2 * beta * x;
      const m = Math.hypot(zr, zi);
      const sr = Math.sqrt(0.5 * (m + zr));
      const si = zi / (2 * sr);
      // (g - s) = (g^2 - s^2)/(g + s) = (-x^2 + 2 i beta x)/(g + s)
      const nr = -x * x;
      const ni = 2 * beta * x;
      const dr = g + sr;
      const di = si;
      const d2 = dr * dr + di * di;
      re[k] = (delta * (nr * dr + ni * di)) / d2;
      im[k] = mu * x + (delta * (ni * dr - nr * di)) / d2;
    }
  }
}
