// The gamma law's transform as an endpoint expansion with a bounded remainder, for a sum's derived kernel remainder.
import type { EndpointSeries } from "./damped-kernels";
import type { EndpointRemainder } from "./endpoint-remainder";
import { binomRest, sumError } from "./compound-remainder-terms";

const EPS = Number.EPSILON;

/**
 * Gamma(a, rho): E e^{-s X} = (rho / (rho + s))^a = (rho / s)^a sum_m binom(-a, m) (rho / s)^m for |s| > rho, Re s >= 0 (the
 * binomial series; principal powers, arg s and arg(1 + rho / s) of opposite signs below pi / 2; JKB vol. 1, ch. 17), so
 * with A the terms m < J, |R| <= (rho / sigma)^a sum_{m >= J} (a)_m / m! (rho / sigma)^m (|binom(-a, m)| = (a)_m / m!),
 * summed by binomRest for sigma >= 2 rho (else no bound: Infinity). The coefficients are the family's (gammaExpansion in
 * ./families/continuous.ts: rho^a, then c_{j+1} = c_j (-(a + j) rho) / (j + 1), four roundings a step, pow within 4
 * ulps); its exponents a + j within their sum's rounding. Null where `series` is not that expansion.
 */
export function gammaEndpointRemainder(a: number, rho: number, series: EndpointSeries): EndpointRemainder | null {
  const n = series.exps.length;
  if (!(a > 0 && rho > 0) || series.at !== 0 || series.rate !== rho || n === 0 || series.exps[0] !== a) return null;
  for (let j = 0; j < n; j++) if (series.exps[j] !== a + j) return null;
  const coefErr = series.coefs.map((c, j) => Math.abs(c) * (4 + 4 * j) * EPS * (1 + 1e-10));
  const expErr = series.exps.map((_x, j) => sumError(a, j, a + j));
  return {
    series,
    coefErr,
    expErr,
    rho(beta, t, J) {
      const sigma = Math.hypot(beta, t);
      const x = rho / sigma;
      if (!(x <= 0.5) || !(J >= 0 && J <= n)) return Infinity;
      return Math.pow(x, a) * binomRest(a, J - 1, x) * (1 + 1e-10);
    },
  };
}
