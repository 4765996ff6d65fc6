/**
 * Expansions of the numerical severities' transforms for large frequency (Watson's lemma for Fourier and Laplace
 * integrals: the density's expansion at the lower end of the support, termwise; Erdelyi, Asymptotic Expansions, ch. 2).
 */
import { lgamma } from "./special";
import type { EndpointSeries } from "../damped-kernels";

/**
 * Large-|z| expansion of the Weibull CF from the density's expansion at 0 (Watson's lemma for Fourier integrals,
 * Erdelyi, Asymptotic Expansions, ch. 2): phi(z) ~ sum_j (-1)^j / j! k Gamma(k(j+1)) (-i z lambda)^{-k(j+1)},
 * (-i a)^{-p} = a^{-p} e^{i pi p / 2}; Burr XII's series (burrSeries) has the same form.
 */
export interface WeibullSeries {
  /** log of k Gamma(k(j+1)) / j! */
  lc: Float64Array;
  /** (-1)^j cos and sin of pi k (j+1) / 2 */
  cr: Float64Array;
  ci: Float64Array;
  k: number;
}

export function weibullSeries(k: number, terms = 400): WeibullSeries {
  const lc = new Float64Array(terms);
  const cr = new Float64Array(terms);
  const ci = new Float64Array(terms);
  for (let j = 0; j < terms; j++) {
    const p = k * (j + 1);
    lc[j] = Math.log(k) + lgamma(p) - lgamma(j + 1);
    const sign = j % 2 === 0 ? 1 : -1;
    cr[j] = sign * Math.cos((Math.PI * p) / 2);
    ci[j] = sign * Math.sin((Math.PI * p) / 2);
  }
  return { lc, cr, ci, k };
}

/** the series is summed until its remainder bound is below SERIES_REMAINDER, and used only where that and its rounding
 *  bound together are below SERIES_TOLERANCE (a fifth of the stated error of the CFs that use it) */
export const SERIES_REMAINDER = 1e-17;
export const SERIES_TOLERANCE = 2e-14;
const U = Number.EPSILON / 2;
/** log SERIES_REMAINDER plus a margin far above exp's and log's rounding: exp(x) > SERIES_REMAINDER for every x above it */
const LOG_REMAINDER_HI = Math.log(SERIES_REMAINDER) + 1e-6;

/**
 * The series of `ser` at |z| = a, arg z = -rot in [0, pi/2], summed until its remainder bound falls below
 * SERIES_REMAINDER, used where that and the rounding are below SERIES_TOLERANCE (that bound to err[0] where given); false
 * otherwise (then quadrature). Remainder: on the ray x = r e^{i w}, w = min(pi/2 + rot, pi/(2k)),
 * the density's variable v = (x/scale)^k has Re v >= 0, where the remainders of e^{-v} (Weibull) and (1 + v)^{-alpha-1}
 * (Burr) after N terms are at most the first omitted term's modulus (Taylor's integral form: |e^{-sv}| <= 1 and
 * |1 + sv| >= 1 for Re v >= 0), and |e^{i z x}| = e^{-a r sin(w - rot)}: the error is at most term N with a replaced by
 * a sin(w - rot) (Cauchy's theorem turns the real path to the ray; the density is analytic in the sector swept). Where the
 * ray cannot be turned to the steepest direction (k > 1 and arg z < pi/2 - pi/(2k)) this is much larger than term N itself:
 * the poles of the Burr density at arg x = pi/k, and the Weibull saddle, add terms of size e^{-a sin(pi/k)} the series
 * does not hold (log-logistic(4.947) at t = 22 was off by 1.5e-10 when the first omitted term was taken as the bound).
 * Rounding: term j is exp(X_j) with X_j = lc_j - (j+1) k log a, rounded within u (|lc_j| (4, for lgamma) + 3 (j+1) k |log a|),
 * times the precomputed phase (2 u) and a rotation by k (j+1) rot (2 u + u k (j+1) |rot|), summed within (J+1) u of the
 * sum of the moduli (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 4.2).
 */
export function weibullAsymptotic(ser: WeibullSeries, a: number, out: Float64Array, rot = 0, err?: Float64Array): boolean {
  const k = ser.k;
  const w = Math.min(Math.PI / 2 + rot, Math.PI / (2 * k));
  const f = Math.sin(w - rot);
  if (!(f > 0)) return false;
  const la = Math.log(a);
  const kla = k * la;
  const klf = k * Math.log(a * f);
  let sr = 0;
  let si = 0;
  let prev = Infinity;
  let round = 0;
  let mSum = 0;
  const { lc, cr, ci } = ser;
  for (let j = 0; j < lc.length; j++) {
    // remainder bound after terms 0..j-1
    const lb = lc[j] - (j + 1) * klf;
    if (lb > prev) return false;
    prev = lb;
    // (exp(lb) is above SERIES_REMAINDER wherever lb is above LOG_REMAINDER_HI: the test below only where it may pass)
    const rem = lb <= LOG_REMAINDER_HI ? Math.exp(lb) : Infinity;
    if (rem <= SERIES_REMAINDER) {
      const bound = rem + U * (round + (j + 1) * mSum);
      if (!(bound <= SERIES_TOLERANCE)) return false;
      if (err) err[0] = bound;
      out[0] = sr;
      out[1] = si;
      return true;
    }
    const m = Math.exp(lc[j] - (j + 1) * kla);
    mSum += m;
    round += m * (4 * Math.abs(lc[j]) + 3 * (j + 1) * Math.abs(kla) + k * (j + 1) * Math.abs(rot) + 12);
    if (rot === 0) {
      sr += m * cr[j];
      si += m * ci[j];
    } else {
      const ang = k * (j + 1) * rot;
      const c = Math.cos(ang);
      const sn = Math.sin(ang);
      sr += m * (cr[j] * c - ci[j] * sn);
      si += m * (cr[j] * sn + ci[j] * c);
    }
  }
  return false;
}

/**
 * An upper bound at every a > 4 on the bound weibullAsymptotic returns where it answers, whatever rot (so that a
 * per-frequency error bound need not sum the series again): on the cell [a_i, a_{i+1}) of a geometric grid, each term
 * m_j(a) = e^{lc_j} a^{-k(j+1)} is at most m_j(a_i); the remainder test's exponent lc_j - (j+1) k log(a f) is at most its
 * value at a_i and f_min (f = sin(w - rot) >= sin(pi / (2k)) for k > 1, f = 1 otherwise), so the series stops by the first
 * J* where that is below log SERIES_REMAINDER, if not earlier or not at all; |log a| is at most its larger value on the
 * cell and |rot| <= pi/2. So the bound is at most SERIES_REMAINDER + u (sum_{j < J*} m_j(a_i) (4 |lc_j| + 3 (j + 1) k L +
 * k (j + 1) pi/2 + 12) + (J* + 1) sum_{j < J*} m_j(a_i)), 1% added for this sum's own rounding; 0 where no J* is within
 * the terms (the series then never answers); the largest over the cells from a on (non-increasing in a). Past the grid
 * (a >= 2^26) the last cell's where k log a >= 1 there, else no bound (Infinity). Built at the first call.
 */
export function seriesBoundEnvelope(ser: WeibullSeries): (a: number) => number {
  const k = ser.k;
  const fMin = k > 1 ? Math.sin(Math.PI / (2 * k)) : 1;
  const STEPS = 8;
  const CELLS = 24 * STEPS;
  let env: Float64Array | null = null;
  const build = () => {
    const out = new Float64Array(CELLS);
    for (let i = 0; i < CELLS; i++) {
      const a0 = 4 * 2 ** (i / STEPS);
      const L = Math.max(Math.abs(Math.log(a0)), Math.abs(Math.log(4 * 2 ** ((i + 1) / STEPS))));
      const la = Math.log(a0);
      const lf = Math.log(a0 * fMin);
      let round = 0;
      let mSum = 0;
      let J = -1;
      for (let j = 0; j < ser.lc.length; j++) {
        if (ser.lc[j] - (j + 1) * k * lf <= Math.log(SERIES_REMAINDER)) {
          J = j;
          break;
        }
        const m = Math.exp(ser.lc[j] - (j + 1) * k * la);
        mSum += m;
        round += m * (4 * Math.abs(ser.lc[j]) + 3 * (j + 1) * k * L + (k * (j + 1) * Math.PI) / 2 + 12);
      }
      // no J* within the terms: the series never answers on the cell (it returns false past its last term)
      out[i] = J < 0 ? 0 : (SERIES_REMAINDER + U * (round + (J + 1) * mSum)) * 1.01;
    }
    // the largest from each cell on: non-increasing in a (so are the per-frequency bounds built on it), still a bound
    for (let i = CELLS - 2; i >= 0; i--) out[i] = Math.max(out[i], out[i + 1]);
    env = out;
  };
  // past the grid the last cell's bound holds where each term's m_j(a) (c + d log a) does not increase, k log a >= 1
  const aLast = 4 * 2 ** (CELLS / STEPS);
  const pastGrid = k * Math.log(aLast) >= 1;
  return (a: number) => {
    if (!env) build();
    // below a = 4 the series is never taken: the first cell's bound there keeps the envelope non-increasing
    if (!(a > 4)) return env![0];
    let i = Math.max(0, Math.floor(STEPS * Math.log2(a / 4)));
    if (i >= CELLS) return pastGrid ? env![CELLS - 1] : Infinity;
    if (i > 0 && 4 * 2 ** (i / STEPS) > a) i--;
    return env![i];
  };
}

/**
 * Large-t expansion of the Pareto CF from the density's expansion at xm (Watson's lemma):
 * phi(t) ~ e^{i tau} (i alpha / tau) sum_j (alpha+1)_j (-i/tau)^j, tau = xm t; the terms decrease while
 * j < tau - alpha - 1 and the smallest is about e^{-tau} tau^alpha; used when a term falls below 1e-16 first.
 */
export function paretoAsymptotic(alpha: number, tau: number, out: Float64Array): boolean {
  // sum_j c_j (-i)^j with c_j = (alpha+1)_j / tau^j
  let c = 1;
  let sr = 0;
  let si = 0;
  for (let j = 0; j < 10000; j++) {
    switch (j % 4) {
      case 0:
        sr += c;
        break;
      case 1:
        si -= c;
        break;
      case 2:
        sr -= c;
        break;
      default:
        si += c;
    }
    const next = (c * (alpha + 1 + j)) / tau;
    if (next < 1e-16) break;
    if (next > c) return false;
    c = next;
  }
  // multiply by (i alpha / tau) e^{i tau}
  const f = alpha / tau;
  const ar = -f * si;
  const ai = f * sr;
  const cs = Math.cos(tau);
  const sn = Math.sin(tau);
  out[0] = ar * cs - ai * sn;
  out[1] = ar * sn + ai * cs;
  return true;
}

/**
 * sum_j (alpha+1)_j (-i / tau)^j at complex tau = r e^{i arg} (the series of paretoAsymptotic before its prefactor):
 * term j is (alpha+1)_j r^{-j} e^{-i j (pi/2 + arg)}; false when the terms grow before falling below 1e-16.
 */
export function paretoSeries(alpha: number, r: number, arg: number, out: Float64Array): boolean {
  let c = 1;
  let sr = 0;
  let si = 0;
  const step = -(Math.PI / 2 + arg);
  for (let j = 0; j < 10000; j++) {
    sr += c * Math.cos(j * step);
    si += c * Math.sin(j * step);
    const next = (c * (alpha + 1 + j)) / r;
    if (next < 1e-16) {
      out[0] = sr;
      out[1] = si;
      return true;
    }
    if (next > c) return false;
    c = next;
  }
  return false;
}

/** exponents of the endpoint expansions kept (compounds subtract gamma kernels up to a lower order) */
const EXPANSION_MAX = 12;
/** an expansion whose exponents step by less than this needs over 1024 terms to reach EXPANSION_MAX: none is declared
 *  (a shape of 1e-300 looped for ever building it) */
const MIN_STEP = EXPANSION_MAX / 1024;

/**
 * Weibull(k, lambda) density at 0: (k/lambda) (x/lambda)^{k-1} e^{-(x/lambda)^k} = sum_j (-1)^j/j! k lambda^{-k(j+1)}
 * x^{k(j+1)-1}; termwise Laplace transform (Watson's lemma): E e^{-sX} ~ sum_j (-1)^j/j! k Gamma(k(j+1))
 * lambda^{-k(j+1)} s^{-k(j+1)}.
 */
export function weibullExpansion(k: number, lambda: number): EndpointSeries | undefined {
  if (!(k >= MIN_STEP)) return undefined;
  const exps: number[] = [];
  const coefs: number[] = [];
  for (let j = 0; k * (j + 1) <= EXPANSION_MAX; j++) {
    const p = k * (j + 1);
    exps.push(p);
    coefs.push((j % 2 === 0 ? 1 : -1) * k * Math.exp(lgamma(p) - lgamma(j + 1) - p * Math.log(lambda)));
  }
  return { at: 0, exps, coefs };
}

/**
 * Pareto(alpha, xm) density at xm: (alpha/xm)(1 + y/xm)^{-alpha-1} = (alpha/xm) sum_j (-1)^j (alpha+1)_j/j! (y/xm)^j,
 * so E e^{-sX} ~ e^{-s xm} (alpha/xm) sum_j (-1)^j (alpha+1)_j xm^{-j} s^{-j-1} (Watson's lemma).
 */
export function paretoExpansion(alpha: number, xm: number): EndpointSeries {
  const exps: number[] = [];
  const coefs: number[] = [];
  let c = alpha / xm;
  for (let j = 0; j + 1 <= EXPANSION_MAX; j++) {
    exps.push(j + 1);
    coefs.push(c);
    c *= -(alpha + 1 + j) / xm;
  }
  return { at: xm, exps, coefs };
}

/**
 * Burr XII(alpha, gamma, theta) density at 0: alpha gamma theta^{-gamma} x^{gamma-1} (1 + (x/theta)^gamma)^{-alpha-1}
 * = alpha gamma sum_j (-1)^j (alpha+1)_j / j! theta^{-gamma(j+1)} x^{gamma(j+1)-1} (binomial series, |x| < theta), so
 * E e^{-sX} ~ sum_j alpha gamma (-1)^j (alpha+1)_j / j! Gamma(gamma(j+1)) (theta s)^{-gamma(j+1)} (Watson's lemma).
 */
export function burrExpansion(alpha: number, gamma: number, theta: number): EndpointSeries | undefined {
  if (!(gamma >= MIN_STEP)) return undefined;
  const exps: number[] = [];
  const coefs: number[] = [];
  let c = alpha * gamma;
  for (let j = 0; gamma * (j + 1) <= EXPANSION_MAX; j++) {
    const p = gamma * (j + 1);
    exps.push(p);
    coefs.push(c * Math.exp(lgamma(p) - p * Math.log(theta)));
    c *= -(alpha + 1 + j) / (j + 1);
  }
  return { at: 0, exps, coefs };
}

/**
 * The same large-|z| series for Burr XII (in the form weibullAsymptotic sums): term j of E exp(i z X) is
 * alpha gamma (-1)^j (alpha+1)_j / j! Gamma(gamma(j+1)) (-i z theta)^{-gamma(j+1)} (Watson's lemma on burrExpansion's
 * density series); the terms first fall, then grow (an asymptotic series), and it is used only where the remainder
 * bound of weibullAsymptotic falls below SERIES_REMAINDER.
 */
export function burrSeries(alpha: number, gamma: number, terms = 400): WeibullSeries {
  const lc = new Float64Array(terms);
  const cr = new Float64Array(terms);
  const ci = new Float64Array(terms);
  let lp = 0;
  for (let j = 0; j < terms; j++) {
    const p = gamma * (j + 1);
    // lp = log((alpha+1)_j / j!)
    lc[j] = Math.log(alpha * gamma) + lp + lgamma(p);
    lp += Math.log((alpha + 1 + j) / (j + 1));
    const sign = j % 2 === 0 ? 1 : -1;
    cr[j] = sign * Math.cos((Math.PI * p) / 2);
    ci[j] = sign * Math.sin((Math.PI * p) / 2);
  }
  return { lc, cr, ci, k: gamma };
}
