import { lgamma, lgammaErr } from "../families/special";
import { tanHalfPi } from "./stable-kernel";

/**
 * Tail series of the standard S1 stable law (scale 1, location 0), alpha != 1, at z > 0 (Zolotarev 1986,
 * One-dimensional Stable Distributions, sec. 2.5; Feller vol. II, XVII.6), obtained by expanding
 * exp(-c t^alpha e^{-i alpha theta0}) under the Fourier integral, with tan(alpha theta0) = beta tan(pi alpha/2) and
 * c = 1/cos(alpha theta0):
 *   f(z)  = (1/pi) sum_{k>=1} (-1)^{k+1} c^k Gamma(k alpha + 1)/k! sin(k alpha (pi/2 + theta0)) z^{-k alpha - 1}
 *   sf(z) = (1/pi) sum_{k>=1} (-1)^{k+1} c^k Gamma(k alpha)/k!     sin(k alpha (pi/2 + theta0)) z^{-k alpha}
 * Convergent for alpha < 1, asymptotic for alpha > 1.
 *
 * Remainder bound (derived here, for both): f(z) = (1/pi) Re int_0^inf e^{-izt} phi(t) dt, and the ray t = r e^{-i psi}
 * may replace the real axis for every psi in (0, psi*], psi* = min(pi/2, pi/(2 alpha) - theta0): on the sector between
 * them |e^{-izt}| <= 1 and s = c t^alpha e^{-i alpha theta0} keeps Re s >= 0 (alpha (arg + theta0) stays within
 * [-pi/2, pi/2]), so the arc at infinity vanishes. On the ray, e^{-s} = sum_{k<n} (-s)^k/k! + R_n with
 * |R_n| <= |s|^n / n! (Taylor's remainder in integral form, |e^{-us}| <= 1 for Re s >= 0); the polynomial terms give the
 * series' first n - 1 terms (their ray integrals do not depend on psi), and the rest is at most
 *   (1/pi) int_0^inf e^{-z r sin psi} c^n r^{n alpha} / n! dr = (1/pi) c^n Gamma(n alpha + 1) / n! (z sin psi*)^{-n alpha - 1},
 * the size of the first omitted term times (sin psi*)^{-(n alpha + 1)}; integrated over (z, inf) it bounds the sf's
 * remainder by the sf term's size times the same factor, and once more the stop-loss transform's. The sum stops where
 * this bound is below the rounding of the sum (or, for the asymptotic series, where it stops falling) and is accepted
 * when the bound plus the terms' rounding is below 1e-10 of the value (the default tolerance), else the integral serves.
 * For alpha < 1 (convergent) the omitted terms' sizes also have a geometric majorant, which is far smaller where
 * sin psi* is small (beta next to 1): by Wendel's inequality Gamma(x + s) <= x^s Gamma(x) (0 < s < 1; Wendel 1948,
 * Amer. Math. Monthly 55) the ratio of consecutive sizes is at most c (k alpha)^alpha / (k + 1) z^-alpha for the sf
 * (largest at k = alpha / (1 - alpha), falling beyond) and c (k alpha + 1)^alpha / (k + 1) z^-alpha for the pdf
 * (falling in k), so from term k on the sizes sum to at most the k-th over (1 - the largest ratio from k on).
 */
export interface SeriesValue {
  pdf: number;
  sf: number;
  pdfErr: number;
  sfErr: number;
}

const MAX_TERMS = 60;

/** Per-law coefficients of the series (the lgamma and sine of each term do not depend on z). */
interface Coeffs {
  /** log(c^k Gamma(k alpha) / k!) and log(c^k Gamma(k alpha + 1) / k!), k = 1 .. MAX_TERMS + 1 */
  lSf: Float64Array;
  lPdf: Float64Array;
  /** (-1)^(k+1) sin(k alpha (pi/2 + theta0)) */
  sgn: Float64Array;
  /** |k log c| + lgamma(k + 1) + |lgamma(k alpha + 1)|: the size of the parts of each exponent (their rounding) */
  size: Float64Array;
  /** alpha (pi/2 + theta0): the sine of k times it is off by up to k eps phase */
  phase: number;
  /** log sin psi*, psi* = min(pi/2, pi/(2 alpha) - theta0): the remainder's factor per power (see above) */
  lsin: number;
  /** log c */
  logc: number;
  /**
   * bounds on the absolute error of lSf[k] and lPdf[k] beyond the rounding of their sum: lgamma's own (lgammaErr) and
   * k times that of log c (tan(pi alpha/2), beta times it and log1p: 4 u relative in tb, moving log c by <= 4 u)
   */
  eSf: Float64Array;
  ePdf: Float64Array;
  /** (sin psi*)^{-(k alpha + 1)}; for alpha < 1 the ratio factors of the geometric majorant (z^-alpha c left out) */
  grow: Float64Array;
  rSf: Float64Array;
  rPdf: Float64Array;
}
const cache = new Map<string, Coeffs>();
// the last few laws asked for, compared as numbers (the map's string key costs more than the series at far points)
const recent: { alpha: number; beta: number; c: Coeffs }[] = [];

function coeffsFor(alpha: number, beta: number): Coeffs {
  for (const r of recent) if (r.alpha === alpha && r.beta === beta) return r.c;
  const key = `${alpha}:${beta}`;
  let c = cache.get(key);
  if (c) {
    remember(alpha, beta, c);
    return c;
  }
  const tb = beta * tanHalfPi(alpha);
  const theta0 = alpha < 1 && beta === 1 ? Math.PI / 2 : alpha > 1 && beta === -1 ? Math.PI / alpha - Math.PI / 2 : Math.atan(tb) / alpha;
  const logc = 0.5 * Math.log1p(tb * tb);
  const phase = alpha * (Math.PI / 2 + theta0);
  // psi* rounded down by a few eps (a smaller angle keeps the sector condition; its sine is then a lower bound)
  const psi = Math.min(Math.PI / 2, Math.PI / (2 * alpha) - theta0) * (1 - 8 * Number.EPSILON);
  const lsin = psi > 0 ? Math.log(Math.sin(psi)) * (1 + 8 * Number.EPSILON) : -Infinity;
  const n = MAX_TERMS + 2;
  c = { lSf: new Float64Array(n), lPdf: new Float64Array(n), sgn: new Float64Array(n), size: new Float64Array(n), phase, lsin, logc, eSf: new Float64Array(n), ePdf: new Float64Array(n), grow: new Float64Array(n), rSf: new Float64Array(n), rPdf: new Float64Array(n) };
  const kTop = alpha < 1 ? alpha / (1 - alpha) : 0;
  for (let k = 1; k < n; k++) {
    const base = k * logc - lgamma(k + 1);
    c.lSf[k] = base + lgamma(k * alpha);
    c.lPdf[k] = base + lgamma(k * alpha + 1);
    c.sgn[k] = (k % 2 ? 1 : -1) * Math.sin(k * phase);
    c.size[k] = Math.abs(k * logc) + lgamma(k + 1) + Math.abs(lgamma(k * alpha)) + Math.abs(lgamma(k * alpha + 1));
    const eBase = lgammaErr(k + 1) + 2 * k * Number.EPSILON;
    c.eSf[k] = eBase + lgammaErr(k * alpha);
    c.ePdf[k] = eBase + lgammaErr(k * alpha + 1);
    // rounded up: the factor's own rounding (exp of a product, 3 eps relative at most) is absorbed in 1 + 4 eps
    c.grow[k] = Math.exp(-(k * alpha + 1) * lsin) * (1 + 4 * Number.EPSILON * (1 + Math.abs((k * alpha + 1) * lsin)));
    if (alpha < 1) {
      const kk = Math.max(k, kTop);
      c.rSf[k] = (Math.pow(kk * alpha, alpha) / (kk + 1)) * (1 + 8 * Number.EPSILON);
      c.rPdf[k] = (Math.pow(k * alpha + 1, alpha) / (k + 1)) * (1 + 8 * Number.EPSILON);
    }
  }
  if (cache.size > 64) cache.clear();
  cache.set(key, c);
  remember(alpha, beta, c);
  return c;
}

function remember(alpha: number, beta: number, c: Coeffs): void {
  recent.unshift({ alpha, beta, c });
  if (recent.length > 4) recent.pop();
}

/** the sum stops once the remainder's bound is below this fraction of it (under the sum's own rounding) */
const STOP = 2 ** -56;
/** accepted when the whole bound is below this fraction of the value (else the integral serves the point) */
const ACCEPT = 1e-10;

/** the series' state for remainderBound: its inputs at one z, and the remainder's bound it sets */
interface BoundState {
  alpha: number;
  absLz: number;
  cz: number;
  size: Float64Array;
  eSf: Float64Array;
  ePdf: Float64Array;
  grow: Float64Array;
  rSf: Float64Array;
  rPdf: Float64Array;
  remSf: number;
  remPdf: number;
}

/**
 * The remainder's bound when the sum stops before term k (see the module notes); an exponent off by at most d (d <= 1)
 * moves its exponential by at most e^d - 1 <= d (1 + d) of it. A module function, not a closure per call: the series
 * runs once per point of every stable term's law.
 */
function remainderBound(st: BoundState, k: number, mSf: number, mPdf: number): void {
  const { alpha, absLz, cz } = st;
  const d = 4 * Number.EPSILON * (st.size[k] + k * alpha * absLz + absLz);
  const dSf = d + st.eSf[k];
  const dPdf = d + st.ePdf[k];
  const upSf = 1 + dSf * (1 + dSf) * (1 + Number.EPSILON);
  const upPdf = 1 + dPdf * (1 + dPdf) * (1 + Number.EPSILON);
  st.remSf = upSf * mSf * st.grow[k];
  st.remPdf = upPdf * mPdf * st.grow[k];
  if (alpha < 1) {
    const rhoSf = cz * st.rSf[k];
    const rhoPdf = cz * st.rPdf[k];
    if (rhoSf < 1) st.remSf = Math.min(st.remSf, ((upSf * mSf) / (1 - rhoSf)) * (1 + 8 * Number.EPSILON));
    if (rhoPdf < 1) st.remPdf = Math.min(st.remPdf, ((upPdf * mPdf) / (1 - rhoPdf)) * (1 + 8 * Number.EPSILON));
  }
}

export function stableTailSeries(alpha: number, beta: number, z: number): SeriesValue | null {
  if (!(z > 0) || alpha === 1) return null;
  // beta = -1 leaves no power tail on this side (the law's right tail is lighter than any power)
  if (beta === -1) return null;
  const { lSf, lPdf, sgn, size, phase, lsin, logc, eSf, ePdf, grow, rSf, rPdf } = coeffsFor(alpha, beta);
  if (!(lsin > -Infinity)) return null;
  const lz = Math.log(z);
  const cz = Math.exp(logc - alpha * lz) * (1 + 4 * Number.EPSILON * (1 + Math.abs(logc) + Math.abs(alpha * lz)));
  const absLz = Math.abs(lz);
  let sf = 0;
  let pdf = 0;
  // rounding of the summed terms: each exponent is off by eps times the size of its parts (plus lgamma's own error),
  // each sine by k eps phase (absolute, so a sine near zero still counts), each product and sum by a few eps
  let errSf = 0;
  let errPdf = 0;
  // the sizes of term k (computed once: as the remainder's bound before k, then as the term)
  let magSf = Math.exp(lSf[1] - alpha * lz);
  let magPdf = Math.exp(lPdf[1] - alpha * lz - lz);
  // the remainder's bound when the sum stops before term k, set by remainderBound
  const st: BoundState = { alpha, absLz, cz, size, eSf, ePdf, grow, rSf, rPdf, remSf: 0, remPdf: 0 };
  remainderBound(st, 1, magSf, magPdf);
  for (let k = 1; ; k++) {
    if (!(st.remSf < Infinity && st.remPdf < Infinity)) return null;
    // stop once the remainder is below the sum's rounding (or an eighth of the terms' rounding bound so far)
    if (k > 1 && st.remSf <= Math.max(STOP * Math.abs(sf), errSf / 8) && st.remPdf <= Math.max(STOP * Math.abs(pdf), errPdf / 8)) break;
    if (k > MAX_TERMS) break;
    const kal1 = (k + 1) * alpha * lz;
    const nSf = Math.exp(lSf[k + 1] - kal1);
    const nPdf = Math.exp(lPdf[k + 1] - kal1 - lz);
    const prevSf = st.remSf;
    const prevPdf = st.remPdf;
    remainderBound(st, k + 1, nSf, nPdf);
    // the asymptotic series (alpha > 1): the bound falls to a least value, then grows; stop at the least
    if (k > 1 && (st.remSf > prevSf || st.remPdf > prevPdf)) {
      st.remSf = prevSf;
      st.remPdf = prevPdf;
      break;
    }
    // the size of a term regardless of its sine (which may vanish by accident)
    const tSf = sgn[k] * magSf;
    const tPdf = sgn[k] * magPdf;
    const termRel = 4 * Number.EPSILON * (size[k] + k * alpha * absLz + absLz);
    const sineAbs = 4 * Number.EPSILON * k * Math.abs(phase);
    const dSf = termRel + eSf[k];
    const dPdf = termRel + ePdf[k];
    sf += tSf;
    pdf += tPdf;
    errSf += Math.abs(tSf) * (8 * Number.EPSILON + dSf * (1 + dSf)) + magSf * sineAbs;
    errPdf += Math.abs(tPdf) * (8 * Number.EPSILON + dPdf * (1 + dPdf)) + magPdf * sineAbs;
    magSf = nSf;
    magPdf = nPdf;
  }
  if (!(sf > 0) || !(pdf > 0)) return null;
  const sfErr = ((st.remSf + errSf) / Math.PI) * (1 + 4 * Number.EPSILON);
  const pdfErr = ((st.remPdf + errPdf) / Math.PI) * (1 + 4 * Number.EPSILON);
  sf /= Math.PI;
  pdf /= Math.PI;
  if (!(sfErr <= ACCEPT * sf && pdfErr <= ACCEPT * pdf)) return null;
  return { pdf, sf, pdfErr, sfErr };
}

/**
 * The stop-loss transform of the standard S1 law far in its right tail, pi(z) = int_z^inf sf(y) dy, from the tail series
 * above integrated term by term (int_z^inf y^{-k alpha} dy = z^{1 - k alpha} / (k alpha - 1)); alpha > 1. Used only where
 * the sf series itself is accepted at z. The remainder after n - 1 terms is the sf remainder's bound integrated over
 * (z, inf): (1/pi) c^n Gamma(n alpha) / n! (sin psi*)^{-(n alpha + 1)} z^{1 - n alpha} / (n alpha - 1) (module notes);
 * the sum stops as the series above does.
 */
export function stableTailStopLoss(alpha: number, beta: number, z: number): { v: number; e: number } | null {
  if (!(alpha > 1) || !stableTailSeries(alpha, beta, z)) return null;
  const { lSf, sgn, size, phase, lsin, eSf } = coeffsFor(alpha, beta);
  const lz = Math.log(z);
  let v = 0;
  let err = 0;
  const bound = (k: number) => {
    const d = k * alpha - 1;
    const grow = -(k * alpha + 1) * lsin;
    const lm = lSf[k] - d * lz - Math.log(d) + grow;
    return (1 + Math.expm1(eSf[k] + 4 * Number.EPSILON * (size[k] + Math.abs(lm) + Math.abs(grow)))) * Math.exp(lm);
  };
  let rem = bound(1);
  for (let k = 1; ; k++) {
    if (!Number.isFinite(rem)) return null;
    if (k > 1 && rem <= STOP * Math.abs(v)) break;
    if (k > MAX_TERMS) break;
    const nextRem = bound(k + 1);
    if (k > 1 && nextRem > rem) break;
    const d = k * alpha - 1;
    const lm = lSf[k] - d * lz - Math.log(d);
    const mag = Math.exp(lm);
    const t = sgn[k] * mag;
    v += t;
    err += 8 * Number.EPSILON * Math.abs(t) + Math.abs(t) * Math.expm1(eSf[k] + 4 * Number.EPSILON * (size[k] + Math.abs(lm) + Math.abs(Math.log(d)))) + mag * 4 * Number.EPSILON * k * Math.abs(phase);
    rem = nextRem;
  }
  const e = (rem + err) / Math.PI;
  v /= Math.PI;
  return v > 0 && e <= 1e-9 * v ? { v, e } : null;
}

/**
 * The split of the standard S1 law's tail at z > 0 into completely monotone powers and a remainder
 * (DirectLaw.monotoneSplit): the series' first n - 1 terms, each size c^k Gamma(k alpha)/k! z^{-k alpha} / pi (a power of
 * z; the sines are at most 1 in size), and the remainder's derived bound B(z') = the n-th size times
 * (sin psi*)^{-(n alpha + 1)} (module notes), which falls like z'^{-p} (p = n alpha for the sf, n alpha + 1 for the
 * density, n alpha - 1 for the stop-loss transform): summed over z + m step, m >= 0, at most B(z) (1 + z / ((p - 1) step))
 * (the sum of a decreasing function below its first value plus its integral). n: the first whose remainder is below
 * 2^-64 of the first term (far below the law's own bounds), else the least one. Each exponent within eps times its
 * parts' sizes plus lgamma's bounds (as the series above): the sizes are rounded up by that. The stop-loss sizes when
 * `stopLoss` (alpha > 1), else the sf's and density's (the others Infinity).
 */
export function stableTailSplit(alpha: number, beta: number, z: number, step: number, stopLoss: boolean) {
  if (!(z > 0) || !(step > 0) || alpha === 1 || beta === -1 || (stopLoss && !(alpha > 1))) return null;
  const { lSf, lPdf, size, lsin, eSf, ePdf } = coeffsFor(alpha, beta);
  if (!(lsin > -Infinity)) return null;
  const lz = Math.log(z);
  const up = (l: number, e: number, k: number) => Math.exp(l) * (1 + Math.expm1(e + 8 * Number.EPSILON * (size[k] + Math.abs(l) + (k * alpha + 2) * (Math.abs(lz) + Math.abs(lsin)))));
  // sizes of term k (sf, pdf, stop-loss), without the remainder's growth factor; sum over the images of z'^-p
  const mSf = (k: number) => up(lSf[k] - k * alpha * lz, eSf[k], k);
  const mPdf = (k: number) => up(lPdf[k] - (k * alpha + 1) * lz, ePdf[k], k);
  const mSl = (k: number) => up(lSf[k] - (k * alpha - 1) * lz - Math.log(k * alpha - 1), eSf[k] + 4 * Number.EPSILON, k);
  const grow = (k: number) => up(-(k * alpha + 1) * lsin, 0, k);
  const sum = (p: number) => (p > 1 ? 1 + z / ((p - 1) * step) : Infinity);
  const lead = stopLoss ? mSl : mSf;
  const shift = stopLoss ? -1 : 0;
  const first = lead(1);
  let best = Infinity;
  let n = 2;
  for (let k = 2; k <= MAX_TERMS + 1; k++) {
    const r = lead(k) * grow(k) * sum(k * alpha + shift);
    if (r < best) {
      best = r;
      n = k;
      if (r <= 2 ** -64 * first) break;
    } else if (r > 4 * best) break;
  }
  if (!Number.isFinite(best)) return null;
  const g = grow(n);
  const r = (1 + 16 * Number.EPSILON) / Math.PI;
  if (stopLoss) {
    let sl = 0;
    for (let k = 1; k < n; k++) sl += mSl(k);
    return { tail: Infinity, pdf: Infinity, stopLoss: sl * r, restTail: 0, restPdf: 0, restStopLoss: mSl(n) * g * sum(n * alpha - 1) * r };
  }
  let tail = 0;
  let pdf = 0;
  for (let k = 1; k < n; k++) {
    tail += mSf(k);
    pdf += mPdf(k);
  }
  return { tail: tail * r, pdf: pdf * r, stopLoss: Infinity, restTail: mSf(n) * g * sum(n * alpha) * r, restPdf: mPdf(n) * g * sum(n * alpha + 1) * r, restStopLoss: 0 };
}
