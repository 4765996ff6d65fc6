// Watson remainders of the pareto and weibull transforms: e^{s a} E e^{-s X} less its endpoint expansion, bounded.
import { KERNEL_ORDER, type EndpointSeries } from "./damped-kernels";
import { lgamma, lgammaErr } from "./families/special";

const EPS = Number.EPSILON;
/** exponents this close are one term in the kernels' series (as in ./damped-kernels.ts) */
export const SAME_EXPONENT = 1e-9;
/** the sums below are of a few dozen terms whose exp and log arguments stay below 710 in size: 1e-10 covers their rounding */
const ROUND = 1 + 1e-10;

/**
 * A severity's Laplace transform at s = beta - i t (beta >= 0) written as e^{-s a} (A_J(s) + R_J(s)), A_J = sum_{j<J} c_j
 * s^{-p_j} the first J terms of its endpoint expansion (a compound's gamma kernels match those with p_j <= KERNEL_ORDER),
 * with the floats the kernels were built from (`series`, as the family declares it), how far each is from the true
 * coefficient and exponent, and a derived bound rho(beta, t, J) on |R_J| that is non-increasing in t.
 */
export interface EndpointRemainder {
  series: EndpointSeries;
  /** per term j of the series: |true c_j - coefs[j]| and |true p_j - exps[j]| */
  coefErr: number[];
  expErr: number[];
  rho(beta: number, t: number, J: number): number;
}

/** the number of leading terms of the series with exponents up to `order` (compoundSeries keeps them to KERNEL_ORDER) */
export function keptTerms(s: EndpointSeries, order = KERNEL_ORDER): number {
  let J = 0;
  while (J < s.exps.length && s.exps[J] <= order + SAME_EXPONENT) J++;
  return J;
}

/** min over J >= J0 of sum_{j = J0}^{J - 1} e^{l_j} + e^{last_J}, from the logs of the terms (l) and of the closing terms */
function leastClosing(l: (j: number) => number, last: (J: number) => number, J0: number, Jmax: number): number {
  let best = Math.exp(last(J0));
  let sum = 0;
  for (let J = J0 + 1; J <= Jmax; J++) {
    const lj = l(J - 1);
    sum += Math.exp(lj);
    if (!(sum < best)) break;
    const close = Math.exp(last(J));
    const v = sum + close;
    if (v < best) best = v;
    // the candidates past here are at least sum, already within 1e-16 of the best
    if (close < 1e-16 * sum) break;
  }
  return best * ROUND;
}

/**
 * Pareto(alpha, xm): phi(s) = int_xm^inf f(x) e^{-s x} dx with f = alpha xm^alpha x^{-alpha-1}; integrating by parts J
 * times (the boundary terms vanish at infinity, |e^{-s x}| <= 1), phi(s) = e^{-s xm} sum_{j<J} f^{(j)}(xm) s^{-j-1} +
 * s^{-J} int f^{(J)} e^{-s x} (Watson's lemma with its remainder; Olver, Asymptotics and Special Functions, ch. 3 section
 * 3). f^{(j)} = (-1)^j alpha (alpha+1)_j xm^alpha x^{-alpha-1-j} keeps one sign and decreases in size, so
 * |int f^{(J)} e^{-s x}| <= e^{-beta xm} int |f^{(J)}| = e^{-beta xm} |f^{(J-1)}(xm)|. With A the terms j < 4:
 * |R| <= min_{J >= 4} sum_{j=4}^{J-1} |f^{(j)}(xm)| sigma^{-j-1} + |f^{(J-1)}(xm)| sigma^{-J}, sigma = |s|, each candidate
 * non-increasing in t. The coefficients are paretoExpansion's (c_{j+1} = -c_j (alpha+1+j)/xm: four roundings a step, one
 * for c_0); the exponents are integers, exact.
 */
export function paretoRemainder(alpha: number, xm: number, series: EndpointSeries): EndpointRemainder {
  const n = series.exps.length;
  const coefErr = series.coefs.map((c, j) => Math.abs(c) * (4 * j + 2) * EPS);
  const expErr = new Array<number>(n).fill(0);
  // log |f^{(j)}(xm)| = log(alpha / xm) + sum_{i<j} log((alpha + 1 + i) / xm)
  const L: number[] = [Math.log(alpha / xm)];
  for (let j = 1; j <= n + 60; j++) L.push(L[j - 1] + Math.log((alpha + j) / xm));
  return {
    series,
    coefErr,
    expErr,
    rho(beta, t, J0) {
      const ls = Math.log(Math.hypot(beta, t));
      if (!(ls > -Infinity) || !(J0 >= 1 && J0 <= n)) return Infinity;
      return leastClosing((j) => L[j] - (j + 1) * ls, (J) => L[J - 1] - J * ls, J0, J0 + 60);
    },
  };
}

/**
 * Weibull(k, lambda): f(x) = sum_{j<J} a_j x^{p_j - 1} + r_J(x), p_j = k (j + 1), a_j = (-1)^j k lambda^{-p_j} / j!, and
 * |r_J(x)| <= |a_J| |x|^{p_J - 1} wherever Re (x / lambda)^k >= 0 (Taylor's remainder of e^{-y} in integral form is at most
 * |y|^J / J! for Re y >= 0); then rayRemainder. The coefficients are weibullExpansion's (k exp(lgamma(p) - lgamma(j + 1) -
 * p log lambda)).
 */
export function weibullRemainder(k: number, lambda: number, series: EndpointSeries): EndpointRemainder {
  const ll = Math.log(lambda);
  // log |a_j Gamma(p_j)| = log k + lgamma(k (j + 1)) - lgamma(j + 1) - k (j + 1) log lambda
  return rayRemainder(k, series, (j) => [Math.log(k), lgamma(j + 1), j > 0 ? lgammaErr(j + 1) : 0], ll, () => 0);
}

/**
 * Burr XII(alpha, gamma, theta): f(x) = alpha gamma theta^{-gamma} x^{gamma-1} (1 + y)^{-alpha-1}, y = (x/theta)^gamma, and the
 * binomial series' remainder after J terms is binom(-alpha-1, J) J y^J int_0^1 (1 - u)^{J-1} (1 + u y)^{-alpha-1-J} du (Taylor
 * in integral form), at most |binom(-alpha-1, J)| |y|^J where Re y >= 0 (|1 + u y| >= 1): so |r_J(x)| <= |a_J| |x|^{p_J - 1},
 * a_j = alpha gamma (-1)^j (alpha+1)_j / j! theta^{-p_j}, p_j = gamma (j + 1); f is analytic in |arg x| < pi/gamma (its poles
 * sit on arg x = pi/gamma) and falls like |x|^{-alpha gamma - 1}, so rayRemainder applies with k = gamma. The coefficients are
 * burrExpansion's (c_{j+1} = -c_j (alpha + 1 + j) / (j + 1), four roundings a step, times exp(lgamma(p) - p log theta)).
 */
export function burrRemainder(alpha: number, gamma: number, theta: number, series: EndpointSeries): EndpointRemainder {
  // log((alpha + 1)_j / j!) by the same recursion (the 1e-12 slack of rayRemainder covers its roundings)
  const lp: number[] = [0];
  for (let j = 1; j <= series.exps.length + 61; j++) lp.push(lp[j - 1] + Math.log((alpha + j) / j));
  return rayRemainder(gamma, series, (j) => [Math.log(alpha * gamma) + lp[j], 0, 0], Math.log(theta), (j) => (4 * j + 2) * EPS);
}

/**
 * A density f(x) = sum_{j<J} a_j x^{p_j - 1} + r_J(x), p_j = k (j + 1), |r_J(x)| <= |a_J| |x|^{p_J - 1} for |arg x| <= th0 =
 * min(pi/2, pi/(2k)), analytic there and bounded on its arcs by a power of |x|: the integral is turned onto the ray
 * x = rho e^{i th}, th = min(psi, th0), psi = -arg s = atan(t / beta), where |e^{-s x}| = exp(-sigma rho cos(th' - psi)) <= 1
 * on the arcs (Cauchy's theorem; the same rotation as the CFs' own quadratures, ./families/numeric.ts). Term by term
 * int a_j x^{p_j-1} e^{-s x} dx = a_j Gamma(p_j) s^{-p_j}, and the remainder is at most |a_J| Gamma(p_J) g^{-p_J},
 * g = sigma cos(psi - th) (= sigma while psi <= th0, else beta cos th0 + t sin th0: non-decreasing in t). So with A the first
 * J0 terms, |R| <= min_{J >= J0} sum_{j=J0}^{J-1} |a_j| Gamma(p_j) sigma^{-p_j} + |a_J| Gamma(p_J) g^{-p_J} (Watson's lemma with
 * its remainder; Olver, Asymptotics and Special Functions, ch. 3). `logs(j)` gives log |a_j| less the scale's
 * -p_j log(scale) and lgamma(p_j) as [added, subtracted, the subtracted part's own error]; `ls0` = log(scale). The series' coefficients are
 * sign * exp(added - subtracted + lgamma(p) - p ls) times the recursion's own rounding (`recRel(j)`): lgamma within
 * lgammaErr, the rest a few roundings of each argument, and p = k (j + 1) within half an ulp of the true exponent (exact
 * for j = 0), which moves lgamma(p) by |psi(p)| |dp| <= (1/p + p) |dp| and p log(scale) by |ls| |dp|.
 */
function rayRemainder(k: number, series: EndpointSeries, logs: (j: number) => [number, number, number], ls0: number, recRel: (j: number) => number): EndpointRemainder {
  const n = series.exps.length;
  const coefErr: number[] = [];
  const expErr: number[] = [];
  for (let j = 0; j < n; j++) {
    const p = series.exps[j];
    const dp = j === 0 ? 0 : 0.5 * EPS * p;
    const [add, sub, subErr] = logs(j);
    const g = lgamma(p);
    const arg = add - sub + g - p * ls0;
    const dArg =
      lgammaErr(p) + subErr + EPS * (Math.abs(add) + Math.abs(sub) + Math.abs(g) + 2 * Math.abs(p * ls0) + Math.abs(arg)) + (1 / p + p + Math.abs(ls0)) * dp;
    // exp within an ulp, the product with the recursion's factor one more
    coefErr.push(Math.abs(series.coefs[j]) * (Math.expm1(dArg * 1.01) + recRel(j) + 3 * EPS));
    expErr.push(dp);
  }
  // log |a_j Gamma(p_j)| for the true p_j, within 1e-10 (ROUND) of the values below; lgamma's error is far smaller
  const La = Array.from({ length: n + 61 }, (_, j) => {
    const [add, sub] = logs(j);
    const g = lgamma(k * (j + 1));
    return add - sub + g - k * (j + 1) * ls0 + 1e-12 * (1 + Math.abs(add) + Math.abs(sub) + Math.abs(g) + Math.abs(k * (j + 1) * ls0));
  });
  const th0 = Math.min(Math.PI / 2, Math.PI / (2 * k));
  const c0 = Math.cos(th0);
  const s0 = Math.sin(th0);
  return {
    series,
    coefErr,
    expErr,
    rho(beta, t, J0) {
      if (!(J0 >= 0 && J0 <= n)) return Infinity;
      const sigma = Math.hypot(beta, t);
      const psi = Math.atan2(t, beta);
      const g = (psi <= th0 ? sigma : beta * c0 + t * s0) * (1 - 1e-12);
      const ls = Math.log(sigma);
      const lg = Math.log(g);
      if (!(lg > -Infinity)) return Infinity;
      return leastClosing((j) => La[j] - k * (j + 1) * ls, (J) => La[J] - k * (J + 1) * lg, J0, J0 + 60);
    },
  };
}
