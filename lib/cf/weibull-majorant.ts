// The damped majorant of a weibull term (./damped-majorant.ts DampedMajorant): |psi| and |psi'| bounded from its density.
import { lgamma, lgammaErr } from "./families/special";

const EPS = Number.EPSILON;
const up = (v: number, k = 8) => v * (1 + k * EPS);

/**
 * Weibull(k, lambda), density f(x) = (k / lambda) u^{k-1} e^{-u^k}, u = x / lambda (JKB vol. 1, ch. 21), s = beta - i t,
 * sigma = |s|, psi(s) = int_0^inf e^{-s x} f:
 *  - by parts, k <= 1 (f decreasing from +inf at 0: the singularity integrable): for any eps = lambda u > 0,
 *    |int_0^eps| <= F(eps) <= u^k, and int_eps^inf = e^{-s eps} f(eps) / s + (1 / s) int_eps^inf e^{-s x} f', at most
 *    2 f(eps) / sigma <= 2 k u^{k-1} / (lambda sigma); at the best u = 2 (1 - k) / (lambda sigma) the sum is
 *    2 (2 (1 - k))^{k-1} (lambda sigma)^{-k} (k = 1: 2 / (lambda sigma), the exponential's 2 f(0) / sigma);
 *  - by parts, k > 1 (f(0) = 0, one maximum at u^k = (k - 1) / k): psi = (1 / s) int e^{-s x} f', at most TV(f) / sigma =
 *    2 f_max / sigma;
 *  - along the ray x = r e^{i th}, th = min(arg(-i s), th0), th0 = min(pi/2, pi/(2k)) (f analytic in |arg x| < th0 with
 *    Re x^k >= 0, the arcs' share vanishing by Jordan's lemma; the rotation of ./endpoint-remainder.ts rayRemainder):
 *    |f(r e^{i th})| <= (k / lambda) (r / lambda)^{k-1} and |e^{-s x}| = e^{-g r}, g = sigma cos(psi - th), so
 *    |psi| <= Gamma(k + 1) (lambda g)^{-k}, which is the first term of the expansion in size (tight far out);
 *  - psi'(t) = i int x e^{-s x} f: h = x f = k u^k e^{-u^k} is 0 at both ends with one maximum k / e (at u = 1), so
 *    |psi'| <= 2 k / (e sigma); along the ray k Gamma(k + 1) lambda^{-k} g^{-k-1}; and E X = lambda Gamma(1 + 1/k), 1 / (e beta).
 * Past t0 (g >= t sin th0): rest <= R (t0 / t)^k with R = Gamma(k + 1) (lambda t0 sin th0)^{-k}; k = 1 is exponential(1 /
 * lambda), whose transform is wholly a jump of 1 / lambda then a fall (split: tv = 2 / lambda, as ./damped-majorant.ts's).
 */
export function weibullDampedMajorant(k: number, lambda: number) {
  if (!(k > 0 && lambda > 0 && Number.isFinite(k) && Number.isFinite(lambda))) return undefined;
  // Gamma(k + 1) and Gamma(k + 2) raised past lgamma's own bound
  const gam = (x: number) => Math.exp(lgamma(x) + lgammaErr(x)) * (1 + 4 * EPS);
  const G1 = gam(k + 1);
  const mean = up(lambda * gam(1 + 1 / k), 4);
  const th0 = Math.min(Math.PI / 2, Math.PI / (2 * k));
  const c0 = Math.cos(th0);
  const s0 = Math.sin(th0) * (1 - 4 * EPS);
  // by parts: C (lambda sigma)^{-k} (k <= 1) or 2 f_max / sigma (k > 1)
  const C = k < 1 ? up(2 * Math.pow(2 * (1 - k), k - 1), 16) : k === 1 ? 2 : NaN;
  const fmax = k > 1 ? up((k / lambda) * Math.exp(((k - 1) / k) * Math.log((k - 1) / k) - (k - 1) / k), 16) : NaN;
  const g = (beta: number, t: number) => {
    const sigma = Math.hypot(beta, t);
    const psi = Math.atan2(t, beta);
    return { sigma, g: (psi <= th0 ? sigma : beta * c0 + t * s0) * (1 - 1e-12) };
  };
  const rest = (beta: number, t: number) => {
    const { sigma, g: gg } = g(beta, t);
    const parts = k <= 1 ? up(C * Math.pow(lambda * sigma, -k), 16) : up((2 * fmax) / sigma, 4);
    const ray = gg > 0 ? up(G1 * Math.pow(lambda * gg, -k), 16) : Infinity;
    return Math.min(1, parts, ray);
  };
  const slope = (beta: number, t: number) => {
    const { sigma, g: gg } = g(beta, t);
    const parts = sigma > 0 ? up((2 * k) / (Math.E * sigma), 4) : Infinity;
    const ray = gg > 0 ? up(((k * G1) / gg) * Math.pow(lambda * gg, -k), 16) : Infinity;
    return Math.min(mean, beta > 0 ? up(1 / (Math.E * beta), 4) : Infinity, parts, ray);
  };
  return {
    atom: 0,
    rest,
    slope,
    decay: (_beta: number, t0: number) => ({
      R: up(G1 * Math.pow(lambda * t0 * s0 * (1 - 1e-12), -k), 16),
      q: k,
      ...(k === 1 ? { split: { R: 0, q: Infinity, tv: up(2 / lambda) } } : {}),
    }),
  };
}
