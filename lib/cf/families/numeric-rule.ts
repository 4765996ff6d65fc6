// Quadrature rules shared by the numerically computed CFs (lognormal, weibull, pareto): node limits, equispaced nodes, logs.
import { CfError } from "../errors";
import { unwrapFrom } from "../complex";

/** Stated accuracy of the numerically computed CFs below (absolute error in phi). */
export const NUMERIC_CF_ABS_ERROR = 1e-13;

/** The most nodes one quadrature rule of a CF may use; parameters that would need more are refused. */
export const MAX_QUADRATURE_NODES = 2 ** 20;

/** The node count n of a quadrature rule, or limit_exceeded naming the parameter that asks for too many. */
export function quadratureNodes(n: number, what: string, advice: string): number {
  if (n <= MAX_QUADRATURE_NODES) return n;
  throw new CfError(
    "limit_exceeded",
    "",
    `${what} needs ${Number.isFinite(n) ? n.toExponential(2) : "unboundedly many"} quadrature nodes for its CF (the limit is ${MAX_QUADRATURE_NODES}); ${advice}`,
  );
}

/** t equispaced and positive (within rounding), long enough for the recurrence to pay. */
export function arithmetic(t: Float64Array): boolean {
  const K = t.length;
  if (K < 64 || !(t[0] > 0)) return false;
  const d = (t[K - 1] - t[0]) / (K - 1);
  if (!(d > 0)) return false;
  for (let k = 1; k < K; k += Math.max(1, K >> 6)) if (Math.abs(t[k] - (t[0] + k * d)) > 1e-9 * t[k]) return false;
  return true;
}

/**
 * log phi at equispaced t > 0 from the sums S_k of expSumArithmetic: phi_k = scale S_k e^{i (phase0 + phaseSlope t_k)};
 * the imaginary part unwrapped along t. log|S| as (1/2) log(Re^2 + Im^2) where that sum is far from over- and underflow
 * (its rounding, 3u relative at most, moves the log by at most 1.5u, under Math.hypot's 2u relative that the callers'
 * allowances take; the log's own rounding u |log|S|| as before), else log(hypot): a quarter of the cost of hypot.
 */
export function logFromSums(
  t: Float64Array,
  sr: Float64Array,
  si: Float64Array,
  re: Float64Array,
  im: Float64Array,
  logScale: number,
  phase0: number,
  phaseSlope: number,
): void {
  for (let k = 0; k < t.length; k++) {
    const a = sr[k];
    const b = si[k];
    const s2 = a * a + b * b;
    re[k] = logScale + (s2 > 1e-290 && s2 < 1e290 ? 0.5 * Math.log(s2) : Math.log(Math.hypot(a, b)));
    im[k] = Math.atan2(si[k], sr[k]);
  }
  unwrapFrom(im, 0);
  for (let k = 0; k < t.length; k++) im[k] += phase0 + phaseSlope * t[k];
}

/**
 * Rounding of a quadrature rule's sum of n complex terms, relative to the terms' moduli' sum `absSum`, plus `termErrors`
 * (the sum over the terms of modulus times the term's own relative rounding in units of u = 2^-53):
 *  - per frequency and across the batch's frequencies the sums are compensated (Kahan): the real and imaginary parts
 *    each within (2u + O(n u^2)) of their parts' moduli (Higham, Accuracy and Stability of Numerical Algorithms, 2nd
 *    ed., sec. 4.3), |Re| + |Im| <= sqrt 2 |x|, the O(n u^2) taken as 8 n u^2 (its size is below 1e-27 here);
 *  - the equispaced sums' 24 moments (`momentUnits`: SUM_MOMENT_UNITS, complexShiftUnits where the shifted moments take a
 *    complex w) for the nodes summed through them.
 */
export function ruleRounding(n: number, absSum: number, termErrors: number, momentUnits = SUM_MOMENT_UNITS): number {
  const u = Number.EPSILON / 2;
  return u * ((2 * Math.SQRT2 + 8 * n * u + momentUnits) * absSum + termErrors);
}

/**
 * The moment routes of expSumArithmetic, in units of u times the moduli of the terms they take: moment m = sum_j c_j e_j^m
 * (compensated, 2 sqrt 2 u; e_j^m by m products, m u), divided by m! (m u), evaluated by Horner at z = t w (m u for the
 * powers of z, and (2 sqrt 2 + 1) u per complex multiply-add for m steps), so term m carries at most (7 m + 4) u of
 * |c_j| x^m / m!, x = t e_j |w| <= 1, whose sum over m is e^x (7 x + 4) <= 11 e. About a block's first frequency t_a
 * (real w < 0; cf-quadrature.ts shiftedMoments) the weight is c_j e^{-D}, D = t_a e_j |w|: exp of an argument within 2u of
 * itself, within 2u D + 2u of the value, and the products u, so within (2 D e^{-D} + 3) u <= 4u of |c_j|; z = (t - t_a) w
 * rounds twice (one m u more): (8 m + 8) u of |c_j| x^m / m!, summing to e^x (8 x + 8) <= 16 e, which is taken for both.
 */
export const SUM_MOMENT_UNITS = 16 * Math.E;

/**
 * The moment routes' units (as SUM_MOMENT_UNITS) where expSumArithmetic also takes the shifted moments with a complex
 * w = -sin(th) + i cos(th) (its `complexShift`; cot = cot th >= 0): about a block's first frequency t_a the weight
 * c_j e^{-D} e^{i phi}, D = t_a e_j sin th, phi = D cot th, each argument within 2u of itself (two products), exp, cos and
 * sin within 2u (one ulp), the products by e^{-D} u and the complex product with c_j 2 sqrt 2 u: within
 * (2 D + 2 sqrt 2 D cot + 2 + 5 sqrt 2) e^{-D} u <= (2 (1 + sqrt 2 cot) / e + 9.08) u of |c_j| (D e^{-D} <= 1/e); the
 * moments and Horner at the complex z = (t - t_a) w as the moments about 0 ((7 m + 4) u) with z's two roundings (m u
 * more): term m within (8 m + 13.08 + 2 (1 + sqrt 2 cot) / e) u of |c_j| x^m / m!, x <= 1, summing to at most
 * 21.08 e + 2 (1 + sqrt 2 cot); the larger of that and SUM_MOMENT_UNITS.
 */
export function complexShiftUnits(cot: number): number {
  return Math.max(SUM_MOMENT_UNITS, 21.1 * Math.E + 2 * (1 + Math.SQRT2 * cot));
}

/** the largest cot(th) for which a family takes the complex shifted moments (their units grow with it) */
export const COMPLEX_SHIFT_MAX_COT = 4;
