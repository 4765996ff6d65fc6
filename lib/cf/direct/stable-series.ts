import { lgamma } from "../families/special";

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
}
const cache = new Map<string, Coeffs>();

function coeffsFor(alpha: number, beta: number): Coeffs {
  const key = `${alpha}:${beta}`;
  let c = cache.get(key);
  if (c) return c;
  const tb = beta * Math.tan((Math.PI * alpha) / 2);
  const theta0 = alpha < 1 && beta === 1 ? Math.PI / 2 : alpha > 1 && beta === -1 ? Math.PI / alpha - Math.PI / 2 : Math.atan(tb) / alpha;
  const logc = 0.5 * Math.log1p(tb * tb);
  const phase = alpha * (Math.PI / 2 + theta0);
  const n = MAX_TERMS + 2;
  c = { lSf: new Float64Array(n), lPdf: new Float64Array(n), sgn: new Float64Array(n) };
  for (let k = 1; k < n; k++) {
    const base = k * logc - lgamma(k + 1);
    c.lSf[k] = base + lgamma(k * alpha);
    c.lPdf[k] = base + lgamma(k * alpha + 1);
    c.sgn[k] = (k % 2 ? 1 : -1) * Math.sin(k * phase);
  }
  if (cache.size > 64) cache.clear();
  cache.set(key, c);
  return c;
}

export function stableTailSeries(alpha: number, beta: number, z: number): SeriesValue | null {
  if (!(z > 0) || alpha === 1) return null;
  // beta = -1 leaves no power tail on this side (the law's right tail is lighter than any power)
  if (beta === -1) return null;
  const { lSf, lPdf, sgn } = coeffsFor(alpha, beta);
  const lz = Math.log(z);
  let sf = 0;
  let pdf = 0;
  let absSf = 0;
  let absPdf = 0;
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
    // each term is exp(argument): its relative error is about eps times the argument's size (plus lgamma's ~1e-15)
    const termRel = 2e-14 + 4 * Number.EPSILON * Math.abs(lPdf[k] - kal);
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
    absSf += Math.abs(tSf) * (1 + termRel / (8 * Number.EPSILON));
    absPdf += Math.abs(tPdf) * (1 + termRel / (8 * Number.EPSILON));
    prevSf = mag;
  }
  if (!converged || !(sf > 0) || !(pdf > 0)) return null;
  const eps = Number.EPSILON;
  const sfErr = (10 * lastSf + 8 * eps * absSf) / Math.PI;
  const pdfErr = (10 * lastPdf + 8 * eps * absPdf) / Math.PI;
  sf /= Math.PI;
  pdf /= Math.PI;
  if (sfErr > 1e-9 * sf || pdfErr > 1e-9 * pdf) return null;
  return { pdf, sf, pdfErr, sfErr };
}
