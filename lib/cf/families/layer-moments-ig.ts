/**
 * Partial moments M_j(a, b) = E[X^j; a < X <= b] of an inverse Gaussian(mu, lambda) claim, with derived bounds, for the
 * layer frame of ./layer-moments.ts. With r = sqrt(lambda/x), A = r (x/mu - 1), B = r (x/mu + 1) and
 * T = e^{2 lambda/mu} Phi(-B) = erfcx(B/sqrt2) e^{-A^2/2} / 2 (B^2 - A^2 = 4 lambda/mu, so nothing overflows):
 *   M_0(0, x) = Phi(A) + T                                  (JKB vol. 1, ch. 15, eq. 15.6)
 *   M_1(0, x) = mu (Phi(A) - T),  M_1(x, inf) = mu (Phi(-A) + T)
 * (x f(x)/mu is the size-biased law; the same as Loss Models app. A.5.1.3, E[X ^ x] - x S(x)). Higher orders by
 * integrating d/dx [x^{j+1} f(x)] over the interval: with f(x) = C x^{-3/2} e^{-alpha x - beta/x}, alpha = lambda/(2 mu^2),
 * beta = lambda/2,
 *   alpha M_{j+1} = (j - 1/2) M_j + beta M_{j-1} - [x^{j+1} f(x)]_a^b
 * (common practice: integration by parts of the generalised inverse Gaussian kernel). Every step is carried in
 * running-error arithmetic (../moment-error.ts). Below the mean the lower pieces are used, above it the upper ones, so
 * a tail interval keeps its digits. erfc and erfcx are taken at ELEM (32 eps) relative as in ../direct/severities.ts,
 * their arguments' rounding as there (the shared pieces: inverseGaussianTerms there).
 */
import erfc from "@stdlib/math-base-special-erfc";
import { add, div, exact, mul, powInt, sub, type Est } from "../moment-error";
import { ELEM, EPS } from "../direct/law";
import { inverseGaussianTerms, inverseGaussianUpper } from "../direct/severities";
import { INF_E, layerMomentFrom, type LayerMoment, type Partial } from "./layer-moments";

const SQ2PI = Math.sqrt(2 * Math.PI);

/** the pieces at one point x > 0 (finite): lower Phi(A) + T and mu (Phi(A) - T), upper Phi(-A) - T and mu (Phi(-A) + T), f(x) */
interface Point {
  low0: Est;
  low1: Est;
  up0: Est;
  up1: Est;
  pdf: Est;
}

function pointOf(mu: number, lambda: number, x: number): Point {
  const { r, a, ea, ga, rga, xb, rxb, T } = inverseGaussianTerms(mu, lambda, x);
  const eT = T * (rxb + rga + 2 * EPS);
  // Phi(-|A|) with its bound: the function's accuracy and the argument's move times the density
  const pm = 0.5 * erfc(Math.abs(a) / Math.SQRT2);
  const epm = ELEM * pm + (ga / SQ2PI) * ea + EPS * pm;
  const phiA: Est = a < 0 ? { v: pm, e: epm } : sub(exact(1), { v: pm, e: epm });
  const phiMinusA: Est = a < 0 ? sub(exact(1), { v: pm, e: epm }) : { v: pm, e: epm };
  const t: Est = { v: T, e: eT };
  let up0: Est;
  if (a >= 0) {
    // Phi(-A) - T = e^{-A^2/2} (erfcx(A/sqrt2) - erfcx(B/sqrt2)) / 2: both terms' bounds on the difference
    const { xa, exa } = inverseGaussianUpper(a, ea);
    const v = 0.5 * ga * (xa - xb);
    up0 = { v, e: 0.5 * ga * (exa + xb * rxb) + Math.abs(v) * (rga + 2 * EPS) + EPS * T };
  } else up0 = sub(phiMinusA, t);
  const pdf = (r / (x * SQ2PI)) * ga;
  return {
    low0: add(phiA, t),
    low1: mul(exact(mu), sub(phiA, t)),
    up0,
    up1: mul(exact(mu), add(phiMinusA, t)),
    pdf: { v: pdf, e: pdf * (rga + 8 * EPS) },
  };
}

/** inverse Gaussian(mu, lambda) partial moments and survival function (module comment) */
export function inverseGaussianPartial(mu: number, lambda: number): Partial {
  const alpha = div(exact(lambda), mul(exact(2 * mu), exact(mu)));
  const beta = exact(lambda / 2);
  const at = (x: number): Point | null => (x > 0 && x < Infinity ? pointOf(mu, lambda, x) : null);
  return {
    lo: 0,
    partial(j, a, b) {
      if (!(b > a)) return exact(0);
      const pa = at(a);
      const pb = at(b);
      // above the mean: differences of upper pieces (0 at infinity); below: of lower pieces (0 at 0, (1, mu) at infinity)
      const upper = a >= mu;
      const piece = (p: Point | null, x: number, k: 0 | 1): Est => {
        if (p) return upper ? (k === 0 ? p.up0 : p.up1) : k === 0 ? p.low0 : p.low1;
        if (x <= 0) return upper ? (k === 0 ? exact(1) : exact(mu)) : exact(0);
        return upper ? exact(0) : k === 0 ? exact(1) : exact(mu);
      };
      const m0 = upper ? sub(piece(pa, a, 0), piece(pb, b, 0)) : sub(piece(pb, b, 0), piece(pa, a, 0));
      if (j === 0) return m0;
      let prev = m0;
      let cur = upper ? sub(piece(pa, a, 1), piece(pb, b, 1)) : sub(piece(pb, b, 1), piece(pa, a, 1));
      // [x^{k+1} f(x)]_a^b, 0 at 0 and at infinity
      const edge = (k: number) => {
        const hi = pb ? mul(powInt(exact(b), k + 1), pb.pdf) : exact(0);
        const lo = pa ? mul(powInt(exact(a), k + 1), pa.pdf) : exact(0);
        return sub(hi, lo);
      };
      for (let k = 1; k < j; k++) {
        const next = div(sub(add(mul(exact(k - 0.5), cur), mul(beta, prev)), edge(k)), alpha);
        prev = cur;
        cur = next;
      }
      return Number.isFinite(cur.e) ? cur : INF_E;
    },
    sf(b) {
      const p = at(b);
      return p ? p.up0 : b <= 0 ? exact(1) : exact(0);
    },
  };
}

/** the layer moments of an inverse Gaussian claim */
export function inverseGaussianLayerMoment(mu: number, lambda: number): LayerMoment {
  return layerMomentFrom(inverseGaussianPartial(mu, lambda));
}
