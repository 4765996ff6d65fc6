import type { Bounded } from "./families/normal-bounded";
import { normalCdfFast } from "./families/normal-table";
import { lognormalPair, type PairValues } from "./lognormal-pair";
import { lognormalDampedBounds } from "./lognormal-majorant";

/**
 * The one-claim term of a compound, P(N = 1) times the severity's law, taken out of the damped transform and added
 * back in closed form. Far out in frequency the severity's transform phi is small, so psi_c = sum_n p_n phi^n is
 * dominated by p_1 phi: a severity whose transform decays slowly (lognormal with a large sigma decays slower than
 * any power) leaves a remainder of the order p_2 phi^2 that needs far fewer frequency terms. The subtraction is
 * exact, so the inversion's bounds hold as before; the term's own values carry the closed form's rounding.
 */
export interface SeverityKernel {
  /** weight P(N = 1) */
  w: number;
  /** log E[e^{(i t - beta) X}] of the severity (its damped transform) */
  dampedLogCf(beta: number, t: Float64Array, re: Float64Array, im: Float64Array): void;
  /** w F_X(x), w f_X(x), w int_0^x F_X and bounds on their errors (a part not asked for may be NaN, bound Infinity) */
  at(x: number, wantPdf?: boolean, wantInt?: boolean): { F: number; f: number; I: number; err: number; errf: number; errI: number };
  /** a bound on w f_X(y) for every y >= from */
  densityBeyond(from: number): number;
  /** for the notes */
  name: string;
  /** E X and E X^2 of the severity (unweighted), for the images of the integrated cdf */
  moments: readonly [number, number];
  /** bound on the absolute error of the severity's damped transform values */
  cfAbsError: number;
  /**
   * the count's cumulant function log P_N(e^w) and E N (set by the compound): psi is then computed from the same
   * severity transform values as the one-claim term, so an error d in phi moves the remainder P_N(phi) - p_1 phi by at
   * most sup |P_N'(z) - p_1| d <= E N (|phi| + d) d (|z| <= 1), not by (E N + p_1) d
   */
  count?: {
    cgf(wr: Float64Array, wi: Float64Array, re: Float64Array, im: Float64Array): void;
    /** log P_N(z) at z = zr + i zi, where the count has it without a log or exp of z */
    logPgf?(zr: Float64Array, zi: Float64Array, re: Float64Array, im: Float64Array): void;
    /** a bound on |P_N'(z)| over |z - z0| <= d given |P_N(z0)| (steep counts: far below E N where |P_N| is small) */
    slopeNear?(absPgf: number, d: number): number;
    /**
     * an upper bound on sum_{n >= from} n p_n s^{n-1} at 0 <= s <= 1, which bounds |sum_{n >= from} n p_n z^{n-1}| for
     * |z| <= s (far below (sum_{n >= from} n p_n) s^{from - 1} for a count with little mass at from where s is small)
     */
    derivTail?(s: number, from: number): number;
    mean: number;
    absError: number;
    relError: number;
  };
  /**
   * the severity's damped transform itself, E[e^{(i t - beta) X}] as re + i im (not its log), where the family sums it
   * directly: with a count's logPgf the compound's transform then needs no log and exp of it. Returns the bound on
   * these values' absolute error (at most cfAbsError; smaller where the route taken rounds less)
   */
  dampedCf?(beta: number, t: Float64Array, re: Float64Array, im: Float64Array): number;
  /** a bound at frequency t, damping beta, on the errors of dampedLogCf's and dampedCf's values (at most cfAbsError, non-increasing in |t|) */
  cfErrorAt?(beta: number, t: number): number;
  /**
   * a bound on |d/dt E[e^{(i t - beta) X}]| = |E[X e^{(i t - beta) X}]| at t > 0, for every beta >= 0: it bounds the
   * steps between the remainder's coefficients, which bound the truncated sums far from the period's ends (./invert/damped.ts)
   */
  slope?(t: number): number;
  /**
   * |E[X e^{(i t - beta) X}]| at each t (out), the values' own error included, where the family has that transform from
   * its own (lognormal: x f(x) is E X times the density of e^{sigma^2} X), at most slope(t); sampled like the transform's
   * envelope
   */
  slopeAt?(beta: number, t: Float64Array, out: Float64Array): void;
  /** a bound on |E[e^{(i t - beta) X}]| at t > 0 for every beta >= 0, in closed form (it falls to 0 where values cannot) */
  absBound?(t: number): number;
  /**
   * derived bounds at t > 0 for the damping beta on |E[e^{(i t - beta) X}]| (abs) and |E[X e^{(i t - beta) X}]| (slope), each
   * non-increasing in t (so it bounds every frequency past t): the inversion's envelopes are never below them, whatever
   * the probes sampled (./invert/damped-psi.ts, ./invert/damped-slope.ts)
   */
  dampedBounds?: { abs(beta: number, t: number): number; slope(beta: number, t: number): number };
  /**
   * upper bounds on sup_y y f_X(y) (yf), sup_y y |f_X'(y)| (yfp) and sup f_X (fmax) of the severity (unweighted, its density
   * unimodal): how far its values move when their argument is rounded, which a scaled compound needs
   * (./severity-kernel-scale.ts)
   */
  scaleSensitivity?: { yf: number; yfp: number; fmax: number };
  /**
   * the two-claim term P(N = 2) times the law of X_1 + X_2 (transform phi^2), when the severity has a computable
   * one (values weighted by w, with their bounds); the inversion takes it out too where that saves more terms than
   * its evaluation costs at the points asked for
   */
  pair?: {
    w: number;
    /** w2 F_2(x), w2 f_2(x), w2 int_0^x F_2 with bounds; parts not asked NaN (bound Infinity); panelTol: the quadrature's target */
    at(x: number, wantPdf?: boolean, wantInt?: boolean, panelTol?: number): PairValues;
    densityBeyond(from: number): number;
    moments: readonly [number, number];
  };
}

const U = Number.EPSILON / 2;

/**
 * Lognormal(mu, sigma) (JKB vol. 1, ch. 14): F = Phi(z), z = (log x - mu)/sigma; f = phi(z)/(x sigma);
 * int_0^x F = x F(x) - E[X; X <= x] = x Phi(z) - e^{mu + sigma^2/2} Phi(z - sigma) (the limited expected value,
 * Klugman, Panjer & Willmot, Loss Models, app. A). The density decreases beyond its mode e^{mu - sigma^2}. Phi with its
 * derived bound (the tabled series of ./families/normal-table.ts, as the two-claim term takes it: a tenth of the incomplete
 * gamma route's cost at every point of a grid); z's rounding (log within one ulp, the project's standing assumption; the
 * difference and the division u each) is at most 2u |log x| / sigma + 2u |z| to first order, z - sigma adds u |z - sigma|,
 * each moving Phi by phi times it.
 */
export function lognormalKernel(
  w: number,
  mu: number,
  sigma: number,
  dampedLogCf: (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => void,
  cfAbsError: number,
  w2 = 0,
  dampedCf?: (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => number,
  cfErrorAt?: (beta: number, t: number) => number,
): SeverityKernel {
  const m1 = Math.exp(mu + (sigma * sigma) / 2);
  // m1's relative error: the exponent within u (sigma^2 + |mu + sigma^2/2|), exp one ulp
  const m1Rel = 1.01 * (U * (sigma * sigma + Math.abs(mu + (sigma * sigma) / 2)) + 2 * U);
  const pF: Bounded = { v: NaN, e: NaN };
  const pF2: Bounded = { v: NaN, e: NaN };
  const mode = Math.exp(mu - sigma * sigma);
  const slopeOf = (t: number) => Math.min(m1, 2 / (sigma * Math.sqrt(2 * Math.PI) * t)) * (1 + 4 * Number.EPSILON);
  const pdf = (x: number) => (x > 0 ? Math.exp(-0.5 * ((Math.log(x) - mu) / sigma) ** 2) / (x * sigma * Math.sqrt(2 * Math.PI)) : 0);
  return {
    w,
    dampedLogCf,
    ...(dampedCf ? { dampedCf } : {}),
    ...(cfErrorAt ? { cfErrorAt } : {}),
    name: "lognormal",
    // E[X e^{(i t - beta) X}] = int g e^{itx} with g = x e^{-beta x} f(x) = e^{-beta x} phi((log x - mu)/sigma)/sigma, unimodal
    // (log-concave in log x) with sup g <= 1/(sigma sqrt(2 pi)): integrating by parts, |.| <= TV(g)/t = 2 sup g / t; and
    // |.| <= E X = m1
    slope: slopeOf,
    // likewise f e^{-beta x} is unimodal (x times its log's derivative, -1 - (log x - mu)/sigma^2 - beta x, falls) and at most
    // f(mode) = e^{sigma^2/2 - mu} / (sigma sqrt(2 pi)): |phi| <= 2 f(mode) / t
    absBound: (t) => ((2 * Math.exp(0.5 * sigma * sigma - mu)) / (sigma * Math.sqrt(2 * Math.PI) * t)) * (1 + 8 * Number.EPSILON),
    // and of every order, from the total variations of the density's derivatives (../lognormal-majorant.ts)
    dampedBounds: lognormalDampedBounds(mu, sigma),
    // with y = e^{mu + sigma z}: y f(y) = phi(z) / sigma; f(y) = e^{sigma^2/2 - mu} phi(z + sigma) / sigma and y f'(y) = -f(y) (1 + z / sigma),
    // so y |f'| <= e^{sigma^2/2 - mu} (1/sqrt(2 pi) + (phi(1) + sigma / sqrt(2 pi)) / sigma) / sigma (sup |w| phi(w) = phi(1))
    scaleSensitivity: (() => {
      const r = 1 / Math.sqrt(2 * Math.PI);
      const top = Math.exp(0.5 * sigma * sigma - mu);
      const g = 1 + 16 * Number.EPSILON;
      return { yf: (r / sigma) * g, yfp: ((top * (r + (r * Math.exp(-0.5) + sigma * r) / sigma)) / sigma) * g, fmax: ((top * r) / sigma) * g };
    })(),
    // x f(x) = m1 f_{X'}(x), X' = c X lognormal(mu + sigma^2, sigma), c = e^{sigma^2}: so E[X e^{(it - beta) X}] is m1 times the
    // transform at (c t, c beta); an error d in those values, and the arguments' rounding (eps relative each, which moves
    // the transform by at most E X' = c m1 times the argument's change), are added
    slopeAt(beta, t, out) {
      const c = Math.exp(sigma * sigma);
      const n = t.length;
      const tc = new Float64Array(n);
      const re = new Float64Array(n);
      const im = new Float64Array(n);
      for (let i = 0; i < n; i++) tc[i] = c * t[i];
      dampedLogCf(c * beta, tc, re, im);
      for (let i = 0; i < n; i++) {
        const v = Math.exp(re[i]) * (1 + 8 * Number.EPSILON) + cfAbsError + c * m1 * 4 * Number.EPSILON * (tc[i] + c * beta);
        out[i] = Math.min(slopeOf(t[i]), m1 * v * (1 + 4 * Number.EPSILON));
      }
    },
    // E X^n = exp(n mu + n^2 sigma^2 / 2) (JKB vol. 1, ch. 14)
    moments: [m1, Math.exp(2 * mu + 2 * sigma * sigma)],
    cfAbsError,
    at(x, wantPdf = true, wantInt = true) {
      if (!(x > 0)) return { F: 0, f: 0, I: 0, err: 0, errf: 0, errI: 0 };
      const lx = Math.log(x);
      const z = (lx - mu) / sigma;
      const dz = 1.01 * ((2 * U * Math.abs(lx)) / sigma + 2 * U * Math.abs(z));
      const q = 1 / Math.sqrt(2 * Math.PI);
      normalCdfFast(z, pF);
      const F = pF.v;
      // Phi's own bound plus phi(z) times z's rounding (phi(z) <= its computed value times 1 + 8u)
      const eF = pF.e + q * Math.exp(-0.5 * z * z) * dz * (1 + 8 * U);
      const f = wantPdf ? pdf(x) : NaN;
      let I = NaN;
      let errI = Infinity;
      if (wantInt) {
        // int_0^x F: the difference of x F and m1 F2, each with its value's error, the products' and m1's rounding,
        // the difference u (F2 only where asked: its Phi is the costly part)
        const z2 = z - sigma;
        const dz2 = dz + U * Math.abs(z2);
        normalCdfFast(z2, pF2);
        const F2 = pF2.v;
        const eF2 = pF2.e + q * Math.exp(-0.5 * z2 * z2) * dz2 * (1 + 8 * U);
        I = Math.max(x * F - m1 * F2, 0);
        errI = w * (x * eF + m1 * eF2 + (4 * U + m1Rel) * (x * F + m1 * F2)) * (1 + 4 * U) + U * w * I;
      }
      return {
        F: w * F,
        f: w * f,
        I: w * I,
        err: w * eF * (1 + 2 * U) + U * w * F,
        errf: wantPdf ? w * 16 * Number.EPSILON * (1 + Math.abs(z) * Math.abs(z)) * f : Infinity,
        errI,
      };
    },
    densityBeyond: (from) => w * pdf(Math.max(from, mode)),
    ...(w2 > 0 ? { pair: weightedPair(w2, lognormalPair(mu, sigma), m1, Math.exp(2 * mu + 2 * sigma * sigma)) } : {}),
  };
}

/** w2 times the two-claim law (values and bounds), with E[X_1 + X_2] = 2 m1 and E[(X_1 + X_2)^2] = 2 m2 + 2 m1^2 */
function weightedPair(w2: number, law: ReturnType<typeof lognormalPair>, m1: number, m2: number): NonNullable<SeverityKernel["pair"]> {
  return {
    w: w2,
    at(x, wantPdf, wantInt, panelTol) {
      const v = law.at(x, wantPdf, wantInt, panelTol);
      return { F: w2 * v.F, f: w2 * v.f, I: w2 * v.I, errF: w2 * v.errF, errf: w2 * v.errf, errI: w2 * v.errI };
    },
    densityBeyond: (from) => w2 * law.densityBeyond(from),
    moments: [2 * m1, 2 * m2 + 2 * m1 * m1],
  };
}
