import { cotm, cotmPrime, logSinc } from "./stable-trig";

/**
 * The function V(theta) of the stable integral representation (Nolan 1997, "Numerical calculation of stable
 * densities and distribution functions", Commun. Statist. Stochastic Models 13(4), Theorem 1; Zolotarev 1986,
 * One-dimensional Stable Distributions, Theorem 2.2.3), for one sign of beta, with the inverse map w -> theta of
 * w = log V(theta), which is monotone in theta.
 *
 * alpha != 1 (S0 standard, x > zeta), theta in (-theta0, pi/2), theta0 = atan(beta tan(pi alpha/2)) / alpha:
 *   log V = log cos(alpha theta0)/(alpha-1) + log cos(theta)/(alpha-1) - alpha/(alpha-1) log sin(alpha(theta0+theta))
 *           + log cos(alpha theta0 + (alpha-1) theta)
 * alpha = 1 (S1 standard, beta > 0), theta in (-pi/2, pi/2):
 *   log V = log(2/pi) + log(pi/2 + beta theta) - log cos(theta) + (pi/2 + beta theta) tan(theta) / beta
 *
 * Points are kept as a distance u from the end of the interval where V is smallest ("low" end) or largest
 * ("high" end), so that measures near either end keep full relative precision.
 */

export interface StableSide {
  alpha: number;
  beta: number;
  /** length of the theta interval */
  L: number;
  /** log V at the low end when it is finite (|beta| = 1 on the light side), else -Infinity */
  wLowEnd: number;
  /** every w of this side (logV's lv, wMid, the targets of solveTheta) is log V - wRef: wLowEnd when finite, else 0 */
  wRef: number;
  /** log V at the middle of the interval */
  wMid: number;
  /** log V and d log V / du at distance u from the low end (from = 0) or the high end (from = 1) */
  logV(from: 0 | 1, u: number, out: { lv: number; d: number; mag: number }): void;
  /**
   * bounds on Re log V (not less wRef) and |Im log V| over the rectangle [x1, x2] x [-Y, Y] of complex u (alpha != 1,
   * see factorBox); false when the rectangle reaches a zero of a factor
   */
  box?(from: 0 | 1, x1: number, x2: number, Y: number, out: { rLo: number; rHi: number; iMax: number }): boolean;
  /** alpha != 1: log V = K + sum of coef log sin(p + q u) over the factors [p, q, coef] from the left or right end */
  factors?: { K: number; left: number[][]; right: number[][]; lowIsLeft: boolean };
  /** alpha != 1: (pi/2 - theta0)/pi as a / pi (no cancellation next to alpha = 1) and a bound on its rounding */
  F0?: [number, number];
}

/**
 * Bounds on log sin(p + q u) over u in [x1, x2] x [-Y, Y] (q real), added times coef to acc = [Re low, Re high, |Im|]:
 * with phi = p + q x in (0, pi) and eta = q y, |sin(phi + i eta)|^2 = sin^2 phi + sinh^2 eta and
 * arg sin(phi + i eta) = atan(cot(phi) tanh(eta)) (Abramowitz & Stegun 4.3.55); |cot| is largest at an end of the
 * phi interval. False when sin(phi) reaches 0 (a zero of the factor on the real segment).
 */
function factorBox(p: number, q: number, x1: number, x2: number, Y: number, coef: number, acc: number[]): boolean {
  const a = Math.min(p + q * x1, p + q * x2);
  const b = Math.max(p + q * x1, p + q * x2);
  if (!(a > 0 && b < Math.PI)) return false;
  const sa = Math.sin(a);
  const sb = Math.sin(b);
  const sLo = Math.min(sa, sb);
  const sHi = a < HALF_PI && b > HALF_PI ? 1 : Math.max(sa, sb);
  const H = Math.abs(q) * Y;
  const sh = Math.sinh(H);
  const lo = Math.log(sLo);
  const hi = 0.5 * Math.log(sHi * sHi + sh * sh);
  const cot = Math.max(Math.abs(Math.cos(a) / sa), Math.abs(Math.cos(b) / sb));
  if (coef >= 0) {
    acc[0] += coef * lo;
    acc[1] += coef * hi;
  } else {
    acc[0] += coef * hi;
    acc[1] += coef * lo;
  }
  acc[2] += Math.abs(coef) * Math.atan(cot * Math.tanh(H));
  acc[3] += Math.abs(coef) * (Math.abs(lo) + Math.abs(hi));
  return true;
}

const HALF_PI = Math.PI / 2;

/**
 * tan(pi alpha / 2) with full relative precision next to alpha = 1: there it equals -1 / tan(pi (alpha - 1) / 2), whose
 * argument is exact (alpha - 1 has no rounding error for alpha in [1/2, 2]); tan(pi alpha / 2) itself loses the
 * rounding of pi alpha / 2 times 1 / |pi (alpha - 1) / 2| (1e-13 relative at alpha = 1.001), and log V multiplies
 * that by 1 / (alpha - 1) again.
 */
export function tanHalfPi(alpha: number): number {
  return alpha >= 0.5 && alpha <= 1.5 ? -1 / Math.tan(HALF_PI * (alpha - 1)) : Math.tan(HALF_PI * alpha);
}

export function stableSide(alpha: number, beta: number): StableSide {
  if (alpha === 1) return sideOne(beta);
  const am1 = alpha - 1;
  const tb = beta * tanHalfPi(alpha);
  // theta0 = atan(tb) / alpha, and the distances a = pi/2 - theta0 (theta = pi/2 to the left end), c = pi - alpha
  // (theta0 + pi/2) and the interval's length L = pi/2 + theta0 written through atan(1/|tb|) and x = pi (alpha - 1)/2,
  // which carry no cancellation: next to alpha = 1 the plain forms are differences of numbers near pi/2 (c ~ 1e-4 with
  // an absolute rounding of 4e-16), and log V multiplies their relative error by 1 / (alpha - 1)
  const x = HALF_PI * am1;
  const at1 = Math.atan(1 / Math.abs(tb));
  let theta0 = Math.atan(tb) / alpha;
  let a: number;
  let c: number;
  let L: number;
  // the rounding of a: x (2 eps), at1 (6 eps: 1/|tb| within 5 eps, atan within 1), their sum and the division
  let aErr: number;
  if (tb >= 0) {
    a = (x + at1) / alpha;
    aErr = (8 * Number.EPSILON * (Math.abs(x) + at1)) / alpha;
    c = at1 - x;
    L = HALF_PI + theta0;
  } else {
    a = HALF_PI - theta0;
    aErr = 8 * Number.EPSILON * (HALF_PI + Math.abs(theta0) + 4);
    c = Math.PI - at1 - x;
    L = (x + at1) / alpha;
  }
  // ends where two factors of V vanish together: |beta| = 1 on the light side (exact zeros, not rounded ones)
  if (alpha < 1 && beta === 1) {
    theta0 = HALF_PI;
    a = 0;
    aErr = 0;
    c = Math.PI * (1 - alpha);
    L = Math.PI;
  }
  if (alpha > 1 && beta === -1) {
    theta0 = Math.PI / alpha - HALF_PI;
    a = (Math.PI * am1) / alpha;
    aErr = 4 * Number.EPSILON * a;
    c = 0;
    L = Math.PI / alpha;
  }
  if (alpha < 1 && beta === -1) {
    theta0 = -HALF_PI; // the interval is empty: no mass above zeta
    L = 0;
  }
  const K = (-0.5 * Math.log1p(tb * tb)) / am1;
  const e1 = 1 / am1;
  const ea = alpha / am1;
  const ea2 = (alpha * alpha) / am1;
  // low end: the left end (theta = -theta0) when alpha < 1, the right end (theta = pi/2) when alpha > 1
  const lowIsLeft = alpha < 1;
  const bounded = (alpha < 1 && beta === 1) || (alpha > 1 && beta === -1);
  const wLowEnd = bounded ? K - ea * Math.log(alpha) + Math.log(Math.abs(am1)) : -Infinity;
  const raw = (left: boolean, u: number, out: { lv: number; d: number; mag: number }) => {
    let cosT: number, sinT: number, S: number, C: number, Cw: number, Sw: number;
    if (left) {
      cosT = Math.sin(a + u);
      sinT = -Math.cos(a + u);
      S = Math.sin(alpha * u);
      C = Math.cos(alpha * u);
      Cw = Math.sin(a - am1 * u);
      Sw = Math.cos(a - am1 * u);
    } else {
      cosT = Math.sin(u);
      sinT = Math.cos(u);
      S = Math.sin(c + alpha * u);
      C = -Math.cos(c + alpha * u);
      Cw = Math.sin(c + am1 * u);
      Sw = Math.cos(c + am1 * u);
    }
    const l1 = e1 * Math.log(cosT);
    const l2 = ea * Math.log(S);
    const l3 = Math.log(Cw);
    out.lv = K + l1 - l2 + l3;
    out.mag = Math.abs(K) + Math.abs(l1) + Math.abs(l2) + Math.abs(l3);
    // d log V / d theta
    const dth = -e1 * (sinT / cosT) - ea2 * (C / S) - am1 * (Sw / Cw);
    out.d = left ? dth : -dth;
  };
  const am = Math.abs(am1);
  const wRef = bounded ? wLowEnd : 0;
  const acc = [0, 0, 0, 0];
  // log V = K + e1 log(cos theta) - ea log(sin(alpha (theta0 + theta))) + log(cos(alpha theta0 + (alpha - 1) theta)), each
  // factor sin(p + q u) from the end as in raw() below
  const box = (from: 0 | 1, x1: number, x2: number, Y: number, out: { rLo: number; rHi: number; iMax: number }): boolean => {
    // at a finite end log V - w_end = e1 ls(u) - ea ls(alpha u) + ls(|alpha - 1| u), ls(z) = log(sin z / z)
    // = sum_k log(1 - z^2 / (k pi)^2) (A&S 4.3.89), so |ls(z)| <= log(r / sin r) for |z| <= r < pi; where this applies
    // the bounds below are intersected with it (both hold)
    let B = Infinity;
    if (from === 0 && bounded) {
      const r = Math.hypot(Math.max(-x1, x2), Y);
      B = 0;
      for (const [coef, q] of [[e1, 1], [ea, alpha], [1, am]]) {
        const rq = q * r;
        B = rq < 3 ? B + Math.abs(coef) * -logSinc(rq) : Infinity;
      }
      B = B * (1 + 1e-12) + 4 * Number.EPSILON * Math.abs(wLowEnd);
    }
    if (x1 <= 0) {
      if (!(B < Infinity)) return false;
      out.rLo = wLowEnd - B;
      out.rHi = wLowEnd + B;
      out.iMax = B;
      return true;
    }
    const left = from === 0 ? lowIsLeft : !lowIsLeft;
    acc[0] = acc[1] = K;
    acc[2] = 0;
    acc[3] = Math.abs(K);
    const ok = left
      ? factorBox(a, 1, x1, x2, Y, e1, acc) && factorBox(0, alpha, x1, x2, Y, -ea, acc) && factorBox(a, -am1, x1, x2, Y, 1, acc)
      : factorBox(0, 1, x1, x2, Y, e1, acc) && factorBox(c, alpha, x1, x2, Y, -ea, acc) && factorBox(c, am1, x1, x2, Y, 1, acc);
    if (!ok) return false;
    // the bounds' own rounding: a few eps of the magnitudes summed
    const r = 16 * Number.EPSILON * acc[3];
    out.rLo = acc[0] - r;
    out.rHi = acc[1] + r;
    out.iMax = acc[2] * (1 + 16 * Number.EPSILON);
    if (B < Infinity) {
      out.rLo = Math.max(out.rLo, wLowEnd - B);
      out.rHi = Math.min(out.rHi, wLowEnd + B);
      out.iMax = Math.min(out.iMax, B);
    }
    return true;
  };
  const side: StableSide = {
    alpha,
    beta,
    L,
    wLowEnd,
    wRef,
    wMid: 0,
    box,
    F0: [a / Math.PI, aErr / Math.PI + 2 * Number.EPSILON * (a / Math.PI)],
    factors: { K, left: [[a, 1, e1], [0, alpha, -ea], [a, -am1, 1]], right: [[0, 1, e1], [c, alpha, -ea], [c, am1, 1]], lowIsLeft },
    logV(from, u, out) {
      if (from === 0 && bounded) {
        // at a finite end the factors of V vanish together; log V - w_end = e1 ls(u) - ea ls(alpha u) + ls(|alpha-1| u)
        // with ls(x) = log(sin x / x), so the difference keeps its relative precision near the end
        const l1 = e1 * logSinc(u);
        const l2 = ea * logSinc(alpha * u);
        const l3 = logSinc(am * u);
        out.lv = l1 - l2 + l3;
        out.d = e1 * cotm(u) - ea2 * cotm(alpha * u) + am * cotm(am * u);
        out.mag = Math.abs(l1) + Math.abs(l2) + Math.abs(l3);
        return;
      }
      raw(from === 0 ? lowIsLeft : !lowIsLeft, u, out);
      out.lv -= wRef;
    },
  };
  const o = { lv: 0, d: 0, mag: 0 };
  side.logV(0, L / 2, o);
  side.wMid = o.lv;
  return side;
}

function sideOne(beta: number): StableSide {
  // beta > 0 here (beta < 0 is reflected by the caller, beta = 0 is Cauchy)
  const L = Math.PI;
  const lg = Math.log(2 / Math.PI);
  const wRef = beta === 1 ? lg - 1 : 0;
  const ib = 1 / beta;
  const raw = (left: boolean, u: number, out: { lv: number; d: number; mag: number }) => {
    const s = Math.sin(u);
    const co = Math.cos(u);
    const P = left ? HALF_PI * (1 - beta) + beta * u : HALF_PI * (1 + beta) - beta * u;
    const tanT = left ? -co / s : co / s;
    // log(P) - log(cos theta): for beta = 1 on the left P = u, so log(u / sin u) keeps precision
    const lr = left && beta === 1 ? Math.log(u / s) : Math.log(P) - Math.log(s);
    out.lv = lg + lr + P * tanT * ib;
    out.mag = 1 + Math.abs(lr) + Math.abs(P * tanT * ib);
    const dth = beta / P + 2 * tanT + (P * ib) / (s * s);
    out.d = left ? dth : -dth;
  };
  const side: StableSide = {
    alpha: 1,
    beta,
    L,
    wLowEnd: beta === 1 ? lg - 1 : -Infinity,
    wRef,
    wMid: 0,
    logV(from, u, out) {
      if (from === 0 && beta === 1) {
        // log V - (log(2/pi) - 1) = -ls(u) - u cotm(u), cotm(u) = cot u - 1/u
        const a1 = logSinc(u);
        const a2 = u * cotm(u);
        out.lv = -a1 - a2;
        out.d = -2 * cotm(u) - u * cotmPrime(u);
        out.mag = 1 + Math.abs(a1) + Math.abs(a2);
        return;
      }
      raw(from === 0, u, out);
      out.lv -= wRef;
    },
  };
  const o = { lv: 0, d: 0, mag: 0 };
  side.logV(0, L / 2, o);
  side.wMid = o.lv;
  return side;
}

/** A quadrature node: log V - wRef = w, distances thLow / thHigh to the two ends, and the two weights per unit y. */
export interface ThetaNode {
  w: number;
  thLow: number;
  thHigh: number;
  /** d w / d y */
  dw: number;
  /** d theta / d y */
  dth: number;
  /** bound on the error of w at this node (residual plus rounding of log V) */
  res: number;
}

const LOG_TINY = -740;
/** weight of the log-odds of theta in the grid variable y = w + KAPPA (log thLow - log thHigh) */
export const KAPPA = 1;

/**
 * Solve y(theta) = w(theta) + KAPPA (log thLow - log thHigh) = y for theta. The grid variable y follows log V where
 * log V moves fast (so the kernel in w is resolved) and the log-odds of theta where log V is flat or has a finite
 * end (so theta itself is resolved). Bracketed Newton in t = log u, u the distance to the nearer end.
 * Returns false when the point lies closer than e^-740 to an end.
 */
export function solveY(side: StableSide, y: number, out: ThetaNode, hint: { from: 0 | 1; t: number }): boolean {
  const from: 0 | 1 = y <= side.wMid ? 0 : 1;
  const L = side.L;
  const o = { lv: 0, d: 0, mag: 0 };
  // g(t) = sgn (y(e^t) - y) is increasing in t
  const sgn = from === 0 ? 1 : -1;
  const yOf = (u: number) => {
    side.logV(from, u, o);
    const odds = Math.log(u) - Math.log(L - u);
    return o.lv + sgn * KAPPA * odds;
  };
  let tA = LOG_TINY;
  let tB = Math.log(L / 2);
  if (sgn * (yOf(Math.exp(tA)) - y) >= 0) return false;
  let t = hint.from === from && hint.t > tA && hint.t < tB ? hint.t : tB - 1;
  let gPrev = Infinity;
  let yv = 0;
  for (let it = 0; it < 300; it++) {
    const u = Math.exp(t);
    yv = yOf(u);
    const g = sgn * (yv - y);
    if (g > 0) tB = t;
    else tA = t;
    const dydu = o.d + sgn * KAPPA * (1 / u + 1 / (L - u));
    let tn = t - g / (sgn * dydu * u);
    // Newton inside the bracket while it at least halves the residual; bisection otherwise
    const slow = Math.abs(g) > 0.5 * gPrev;
    gPrev = Math.abs(g);
    if (slow || !(tn > tA && tn < tB) || !Number.isFinite(tn)) tn = 0.5 * (tA + tB);
    const step = Math.abs(tn - t);
    if (Math.abs(g) <= 4 * Number.EPSILON * (o.mag + Math.abs(y))) break; // at the rounding level of y
    t = tn;
    if (step < 1e-15 * Math.max(1, Math.abs(t)) || tB - tA < 1e-15 * Math.max(1, Math.abs(t))) break;
  }
  const u = Math.exp(t);
  yv = yOf(u);
  const dydu = Math.abs(o.d + sgn * KAPPA * (1 / u + 1 / (L - u)));
  out.w = o.lv;
  out.dw = Math.abs(o.d) / dydu;
  out.dth = 1 / dydu;
  // an error in y moves w by at most the same amount (dw/dy <= 1), plus the rounding of log V
  out.res = Math.abs(yv - y) + 8 * Number.EPSILON * (o.mag + Math.abs(y));
  if (from === 0) {
    out.thLow = u;
    out.thHigh = L - u;
  } else {
    out.thHigh = u;
    out.thLow = L - u;
  }
  hint.from = from;
  hint.t = t;
  return true;
}

/** y of the point where log V - wRef = w (for locating a window); NaN when w is outside the range of log V. */
export function yAtW(side: StableSide, w: number, hint?: { from: 0 | 1; t: number }): number {
  const from: 0 | 1 = w <= side.wMid ? 0 : 1;
  const sgn = from === 0 ? 1 : -1;
  const o = { lv: 0, d: 0, mag: 0 };
  let tA = LOG_TINY;
  let tB = Math.log(side.L / 2);
  side.logV(from, Math.exp(tA), o);
  if (sgn * (o.lv - w) >= 0) return NaN;
  let t = hint && hint.from === from && hint.t > tA && hint.t < tB ? hint.t : tB - 1;
  let gPrev = Infinity;
  for (let it = 0; it < 300; it++) {
    const u = Math.exp(t);
    side.logV(from, u, o);
    const g = sgn * (o.lv - w);
    if (g > 0) tB = t;
    else tA = t;
    let tn = t - g / (sgn * o.d * u);
    const slow = Math.abs(g) > 0.5 * gPrev;
    gPrev = Math.abs(g);
    if (slow || !(tn > tA && tn < tB) || !Number.isFinite(tn)) tn = 0.5 * (tA + tB);
    const step = Math.abs(tn - t);
    t = tn;
    if (step < 1e-12 || tB - tA < 1e-12) break;
  }
  if (hint) {
    hint.from = from;
    hint.t = t;
  }
  const u = Math.exp(t);
  return w + sgn * KAPPA * (Math.log(u) - Math.log(side.L - u));
}
