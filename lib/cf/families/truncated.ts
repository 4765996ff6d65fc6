/** Truncated normal on [lower, upper] (either end may be absent: unbounded). */
import { rawToCumulants, type Node } from "../node";
import { principalLogRound } from "./log-round-principal";
import { normalCdfBounded } from "./normal-bounded";
import { normalCdf, normalPdf, type DirectLaw } from "./dist";
import { truncatedNormalLayerMoment } from "./layer-moments";
import { truncatedNormalCf } from "./truncated-cf";
import { checkDeadline } from "../deadline";



/**
 * X ~ N(mu, sigma^2) conditioned on [lower, upper]: density phi((x - mu)/sigma) / (sigma Z), Z = Phi(beta) - Phi(alpha)
 * (JKB vol. 1, ch. 13, sec. 10.1). The CF int e^{itx} f(x) dx by composite Gauss-Legendre and, far out, the boundary
 * expansion, with a derived bound for every t (./truncated-cf.ts).
 * Raw moments by the recursion m_k = mu m_{k-1} + (k-1) sigma^2 m_{k-2} - sigma (b^{k-1} phi(beta) - a^{k-1} phi(alpha)) / Z
 * (common practice; JKB vol. 1, ch. 13, sec. 10.1).
 */
export function truncatedNormal(mu: number, sigma: number, lower?: number, upper?: number): Node {
  const a = lower ?? -Infinity;
  const b = upper ?? Infinity;
  const al = (a - mu) / sigma;
  const be = (b - mu) / sigma;
  // Z without cancellation: both ends in the upper tail use the sf difference
  const Z = al > 0 ? normalCdf(-al) - normalCdf(-be) : normalCdf(be) - normalCdf(al);
  const lo = Math.max(a, mu - 40 * sigma);
  const hi = Math.min(b, mu + 40 * sigma);
  // the law may sit far in a tail: integrate around its own bulk
  const from = Number.isFinite(a) ? a : lo;
  const to = Number.isFinite(b) ? b : hi;
  const logZ = Math.log(Z);
  const pdf = (x: number) => (x < a || x > b ? 0 : Math.exp(-0.5 * ((x - mu) / sigma) ** 2 - logZ) / (sigma * Math.sqrt(2 * Math.PI)));
  const phiA = Number.isFinite(a) ? normalPdf(al) : 0;
  const phiB = Number.isFinite(b) ? normalPdf(be) : 0;
  // raw moments by the recurrence m_k = mu m_{k-1} + (k - 1) sigma^2 m_{k-2} - sigma (b^{k-1} phi(beta) - a^{k-1} phi(alpha)) / Z,
  // extended on demand (every order exists; a sum asks for as many as its other terms give)
  const raw: number[] = [1];
  const rawUpTo = (n: number) => {
    for (let k = raw.length; k <= n; k++) {
      const ta = Number.isFinite(a) ? a ** (k - 1) * phiA : 0;
      const tb = Number.isFinite(b) ? b ** (k - 1) * phiB : 0;
      raw.push(mu * raw[k - 1] + (k > 1 ? (k - 1) * sigma * sigma * raw[k - 2] : 0) - (sigma * (tb - ta)) / Z);
    }
    return raw;
  };
  rawUpTo(2);
  const mean = raw[1];
  const sd = Math.sqrt(Math.max(raw[2] - mean * mean, 0)) || sigma;
  const dist: DirectLaw = {
    pdf,
    cdf: (x) => (x <= a ? 0 : x >= b ? 1 : al > 0 ? (normalCdf(-al) - normalCdf(-(x - mu) / sigma)) / Z : (normalCdf((x - mu) / sigma) - normalCdf(al)) / Z),
    sf: (x) => (x <= a ? 1 : x >= b ? 0 : al > 0 ? (normalCdf(-(x - mu) / sigma) - normalCdf(-be)) / Z : (normalCdf(be) - normalCdf((x - mu) / sigma)) / Z),
    lo: a,
    hi: b,
    // built from the normal Phi and its derived bound (./normal-bounded.ts), not from the conditioned cdf above
    layerMoment: truncatedNormalLayerMoment(mu, sigma, a, b),
  };
  // the CF with its derived bound for every t (./truncated-cf.ts)
  const cf = truncatedNormalCf(mu, sigma, a, b, mean);
  const phi = cf.phi;
  return {
    ...principalLogRound(absMeanBound(mu, sigma, a, b), 0, densityVariation(mu, sigma, al, be)),
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [`truncated_normal CF computed by composite Gauss-Legendre quadrature and, far out, by its boundary expansion (absolute error <= ${cf.absError.toExponential(2)}, derived)`],
    cfAbsError: cf.absError,
    dist,
    location: mean,
    scale: sd,
    support: [a, b],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        // a quadrature per frequency (its panels grow with |t|): the deadline is checked every 64 of them
        if ((k & 63) === 0) checkDeadline("truncated-normal-cf");
        const [r, i] = t[k] === 0 ? [1, 0] : phi(t[k]);
        re[k] = Math.log(Math.hypot(r, i));
        // the principal argument, no unwrap: its size is then bounded whatever the grid (./log-round-principal.ts)
        im[k] = Math.atan2(i, r);
      }
    },
    cumulants: (n) => rawToCumulants(rawUpTo(n).slice(1, n + 1)),
  };
}

/**
 * An upper bound on E|X| for X = mu + sigma Z, Z standard normal conditioned on [al, be]: |mu| + sigma E|Z|, where
 * E[Z | al <= Z <= be] <= E[Z | Z >= al] = phi(al) / (1 - Phi(al)) < (al + sqrt(al^2 + 4)) / 2 <= al + 1 for al >= 0 (Birnbaum,
 * Ann. Math. Statist. 13 (1942), the inverse Mills ratio's upper bound; cutting the law above lowers its mean), likewise |be| + 1
 * for be <= 0; for al < 0 < be each half's density decreases away from 0, so E[|Z| | Z in [0, be]] <= E[Z | Z > 0] = sqrt(2 / pi)
 * (truncating a decreasing density above lowers its mean) and E|Z| is at most that. Both ends finite: also max(|a|, |b|).
 */
function absMeanBound(mu: number, sigma: number, a: number, b: number): number {
  const al = (a - mu) / sigma;
  const be = (b - mu) / sigma;
  const ez = al >= 0 ? al + 1 : be <= 0 ? -be + 1 : Math.sqrt(2 / Math.PI);
  const byZ = (Math.abs(mu) + sigma * ez * (1 + 4 * Number.EPSILON)) * (1 + 4 * Number.EPSILON);
  return Number.isFinite(a) && Number.isFinite(b) ? Math.min(byZ, Math.max(Math.abs(a), Math.abs(b))) : byZ;
}

/**
 * 2 f_max of the truncated normal (unimodal, its jumps at the ends included): f_max = phi_N(z*) / (sigma Z), z* the point of
 * [al, be] nearest 0, Z = Phi(be) - Phi(al) from below by normalCdfBounded's bounds (in the upper tail as sf differences)
 */
function densityVariation(mu: number, sigma: number, al: number, be: number): number {
  const z = al > 0 ? al : be < 0 ? be : 0;
  const [p, q] = al > 0 ? [normalCdfBounded(-al), normalCdfBounded(-be)] : [normalCdfBounded(be), normalCdfBounded(al)];
  const Zlo = (p.v - p.e - (q.v + q.e)) * (1 - 4 * Number.EPSILON);
  if (!(Zlo > 0)) return Infinity;
  const f = (Math.exp(-(z * z) / 2) * (1 + 4 * Number.EPSILON * (2 + z * z))) / (Math.sqrt(2 * Math.PI) * sigma * Zlo);
  return 2 * f * (1 + 8 * Number.EPSILON);
}
