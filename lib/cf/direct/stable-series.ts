import { lgamma } from "../families/special";
import { tanHalfPi } from "./stable-kernel";

/**
 * Tail series of the standard S1 stable law (scale 1, location 0), alpha != 1, at z > 0 (Zolotarev 1986,
 * One-dimensional Stable Distributions, sec. 2.5; Feller vol. II, XVII.6), obtained by expanding
 * exp(-c t^alpha e^{-i alpha theta0}) under the Fourier integral, with tan(alpha theta0) = beta tan(pi alpha/2) and
 * c = 1/cos(alpha theta0):
 *   f(z)  = (1/pi) sum_{k>=1} (-1)^{k+1} c^k Gamma(k alpha + 1)/k! sin(k alpha (pi/2 + theta0)) z^{-k alpha - 1}
 *   sf(z) = (1/pi) sum_{k>=1} (-1)^{k+1} c^k Gamma(k alpha)/k!     sin(k alpha (pi/2 + theta0)) z^{-k alpha}
 * Convergent for alpha < 1, asymptotic for alpha > 1. Accepted only when the first omitted term is below
 * 1e-13 of the sum (and the sum is positive); the error bound is 10 times the first omitted term plus the
 * rounding of the terms, checked against the mpmath references in tests/fixtures/stable.
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
  const n = MAX_TERMS + 2;
  c = { lSf: new Float64Array(n), lPdf: new Float64Array(n), sgn: new Float64Array(n), size: new Float64Array(n), phase };
  for (let k = 1; k < n; k++) {
    const base = k * logc - lgamma(k + 1);
    c.lSf[k] = base + lgamma(k * alpha);
    c.lPdf[k] = base + lgamma(k * alpha + 1);
    c.sgn[k] = (k % 2 ? 1 : -1) * Math.sin(k * phase);
    c.size[k] = Math.abs(k * logc) + lgamma(k + 1) + Math.abs(lgamma(k * alpha)) + Math.abs(lgamma(k * alpha + 1));
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

export function stableTailSeries(alpha: number, beta: number, z: number): SeriesValue | null {
  if (!(z > 0) || alpha === 1) return null;
  // beta = -1 leaves no power tail on this side (the law's right tail is lighter than any power)
  if (beta === -1) return null;
  const { lSf, lPdf, sgn, size, phase } = coeffsFor(alpha, beta);
  const lz = Math.log(z);
  let sf = 0;
  let pdf = 0;
  // rounding of the summed terms: each exponent is off by eps times the size of its parts (plus lgamma's own error),
  // each sine by k eps phase (absolute, so a sine near zero still counts), each product and sum by a few eps
  let errSf = 0;
  let errPdf = 0;
  let prevSf = Infinity;
  let lastSf = 0;
  let lastPdf = 0;
  let converged = false;
  for (let k = 1; k <= MAX_TERMS; k++) {
    const kal = k * alpha * lz;
    // the size of a term regardless of its sine (which may vanish by accident)
    const mag = Math.exp(lSf[k] - kal);
    const magPdf = Math.exp(lPdf[k] - kal - lz);
    const tSf = sgn[k] * mag;
    const tPdf = sgn[k] * magPdf;
    // a series whose terms grow from the start (z too small) or overflow is not used
    if (!Number.isFinite(mag) || (k === 2 && mag > prevSf)) return null;
    const termRel = 2e-14 + 4 * Number.EPSILON * (size[k] + Math.abs(kal) + Math.abs(lz));
    const sineAbs = 4 * Number.EPSILON * k * Math.abs(phase);
    if (mag > prevSf && alpha > 1) break; // asymptotic series: stop before the terms grow
    if (k > 1 && mag <= 1e-13 * Math.abs(sf) && magPdf <= 1e-13 * Math.abs(pdf)) {
      lastSf = Math.abs(tSf) + mag * 1e-3;
      lastPdf = Math.abs(tPdf) + magPdf * 1e-3;
      // one more term's size as the omitted part (the sine may be small at this k but not at the next)
      const kal2 = (k + 1) * alpha * lz;
      lastSf = Math.max(lastSf, Math.exp(lSf[k + 1] - kal2));
      lastPdf = Math.max(lastPdf, Math.exp(lPdf[k + 1] - kal2 - lz));
      converged = true;
      break;
    }
    sf += tSf;
    pdf += tPdf;
    errSf += 8 * Number.EPSILON * Math.abs(tSf) + Math.abs(tSf) * termRel + mag * sineAbs;
    errPdf += 8 * Number.EPSILON * Math.abs(tPdf) + Math.abs(tPdf) * termRel + magPdf * sineAbs;
    prevSf = mag;
  }
  if (!converged || !(sf > 0) || !(pdf > 0)) return null;
  const sfErr = (10 * lastSf + errSf) / Math.PI;
  const pdfErr = (10 * lastPdf + errPdf) / Math.PI;
  sf /= Math.PI;
  pdf /= Math.PI;
  if (sfErr > 1e-9 * sf || pdfErr > 1e-9 * pdf) return null;
  return { pdf, sf, pdfErr, sfErr };
}

/**
 * The stop-loss transform of the standard S1 law far in its right tail, pi(z) = int_z^inf sf(y) dy, from the tail series
 * above integrated term by term (int_z^inf y^{-k alpha} dy = z^{1 - k alpha} / (k alpha - 1)); alpha > 1. Used only where
 * the sf series itself is accepted at z (then at every y >= z too, its terms falling faster there), with the same rule:
 * stop once a term is below 1e-13 of the sum, error 10 times the next term's size plus the terms' rounding.
 */
export function stableTailStopLoss(alpha: number, beta: number, z: number): { v: number; e: number } | null {
  if (!(alpha > 1) || !stableTailSeries(alpha, beta, z)) return null;
  const { lSf, sgn, size, phase } = coeffsFor(alpha, beta);
  const lz = Math.log(z);
  let v = 0;
  let err = 0;
  let prev = Infinity;
  for (let k = 1; k <= MAX_TERMS; k++) {
    const d = k * alpha - 1;
    const lm = lSf[k] - (k * alpha - 1) * lz - Math.log(d);
    const mag = Math.exp(lm);
    if (!Number.isFinite(mag) || mag > prev) return null;
    if (k > 1 && mag <= 1e-13 * Math.abs(v)) {
      const d2 = (k + 1) * alpha - 1;
      const next = Math.max(mag, Math.exp(lSf[k + 1] - d2 * lz - Math.log(d2)));
      const e = (10 * next + err) / Math.PI;
      v /= Math.PI;
      return v > 0 && e <= 1e-9 * v ? { v, e } : null;
    }
    const t = sgn[k] * mag;
    v += t;
    err += 8 * Number.EPSILON * Math.abs(t) + Math.abs(t) * (2e-14 + 4 * Number.EPSILON * (size[k] + Math.abs(lm) + Math.abs(Math.log(d)))) + mag * 4 * Number.EPSILON * k * Math.abs(phase);
    prev = mag;
  }
  return null;
}
