import type { Atom } from "../types";
import { type PartSolution } from "./continuous";
import { gridNode } from "./shared";
import { incGamma } from "./incgamma";
import { truncationAt } from "./nodes";
import { type EndpointKernels } from "./part";
import { integrateSf } from "./pointwise";
import type { StopLossBounds } from "./tail-moments";

/**
 * Expected shortfall ES_p = q_p + E[(X - q_p)^+] / (1 - p) (Acerbi & Tasche 2002): the tail integral
 * E[(X - q)^+] = int_q^inf S(y) dy from the same frequency nodes as the quantile, with its error bound.
 */

/**
 * int_y^inf of a kernel's sf: for G ~ Gamma(a, lambda), E[(G - v)^+] = (a/lambda) Q(a+1, lambda v) - v Q(a, lambda v);
 * for side -1 (X = at - G) the integral over (y, at] of P(G <= at - u) is v - a/lambda + E[(G - v)^+], v = at - y.
 */
export function kernelSfIntegral(k: EndpointKernels, y: number): number {
  let s = 0;
  for (let q = 0; q < k.b.length; q++) {
    const a = k.power + q;
    const excess = (v: number) => (v <= 0 ? a / k.rate - v : (a / k.rate) * incGamma(a + 1, k.rate * v).Q - v * incGamma(a, k.rate * v).Q);
    if (k.side === 1) s += k.b[q] * excess(y - k.at);
    else {
      const v = k.at - y;
      s += k.b[q] * (v <= 0 ? 0 : v - a / k.rate + excess(v));
    }
  }
  return s;
}

/**
 * int of |F| left of a plus int of |S| right of u0 for the endpoint kernels (|b| times gamma laws at `at`, side +1:
 * at + G, side -1: at - G): the kernels' share of the inverted measure's images in the ES integral. For G ~ Gamma(A, lambda)
 * the tail integrals are E[(G - v)^+] (as kernelSfIntegral) or at most the distance to the kernel's end.
 */
function kernelImages(kernels: readonly EndpointKernels[], a: number, u0: number): number {
  let s = 0;
  for (const k of kernels) {
    for (let q = 0; q < k.b.length; q++) {
      const A = k.power + q;
      const mean = A / k.rate;
      // E[(G - v)^+] plus the two terms' derived bounds (./incgamma.ts) and the rounding of the products and the
      // difference (k.rate v within u moves each Q by at most its density times u k.rate v, below u (a + k.rate v))
      const excess = (v: number) => {
        if (v <= 0) return mean - v;
        const g1 = incGamma(A + 1, k.rate * v);
        const g0 = incGamma(A, k.rate * v);
        const t1 = mean * g1.Q;
        const t0 = v * g0.Q;
        const u = Number.EPSILON / 2;
        return Math.max(t1 - t0, 0) + mean * g1.eQ + v * g0.eQ + 4 * u * (t1 + t0) + u * (A + 1 + k.rate * v) * (mean + v);
      };
      const left = k.side === 1 ? Math.max(a - k.at, 0) : excess(k.at - a);
      const right = k.side === 1 ? excess(u0 - k.at) : Math.max(k.at - u0, 0);
      s += Math.abs(k.b[q]) * (left + right);
    }
  }
  return s;
}

/**
 * The node values' own errors in the integral of the sf over [q, q + d]: node k of the cdf sum carries |phi_k| /
 * (pi (k + 1/2)), of the integrated sum |phi_k| |e^{-i t_k (q + d)} - e^{-i t_k q}| / (pi (k + 1/2) t_k), at most
 * min(d, 2 / t_k) times the cdf's. The CF values' errors d_k (./nodes.ts cfErrAt) take that weight node by node; the
 * other node-value errors of the cdf's bound (./shared.ts roundingOf valuesCdf: the atoms' and kernels' subtraction, the
 * nodes' own rounding) min(d, 4 / h) (t_k >= h / 2) times over (the sums' arithmetic is integrateSf's own, bounded
 * beside). They were left out: a compound of layered claims (CF errors near 1e-13 relative from its Filon-type rule) had
 * ES(0.999) off by 2.4e-10 against a bound of 1.2e-10 once the tail past the window was bounded from the higher moments.
 */
function nodeValueErrors(sol: PartSolution, d: number): number {
  const { h, K, cfErrAt, cfErrCdf } = sol.nodes;
  const values = sol.valuesCdf ?? sol.sumErrCdf;
  if (!cfErrAt || cfErrCdf === undefined || sol.valuesCdf === undefined) return Math.min(d, 4 / h) * values;
  // node by node also the other parts where their form is known (./shared.ts ValuesSplit: node k's cdf term A / (pi (k +
  // 1/2)) + G), each weighted by its own min(d, 2 / t_k) rather than all by the first node's: the nodes' rounding, which
  // grows with t_k, then counts about 2 ln K / h instead of K 4 / h times its per-node share
  const sp = sol.valuesSplit;
  const G = sp ? sp.B + gridNode(sol.part, sol.nodes, sp.fft) : NaN;
  const byNode = !!sp && Number.isFinite(sp.A) && Number.isFinite(G) && Number.isFinite(sp.rest);
  let s = 0;
  let o = 0;
  for (let k = 0; k < K; k++) {
    const m = k + 0.5;
    const wk = Math.min(d, 2 / (m * h));
    s += (cfErrAt[k] * wk) / m;
    if (byNode) o += (sp!.A / (Math.PI * m) + G) * wk;
  }
  const cf = (s * (1 + (K + 8) * Number.EPSILON)) / Math.PI;
  const rest = Math.max(values - cfErrCdf, 0) + 4 * Number.EPSILON * values;
  const whole = Math.min(d, 4 / h) * rest * (1 + 2 * Number.EPSILON);
  const split = byNode ? (o * (1 + (K + 8) * Number.EPSILON) + Math.min(d, 4 / h) * (sp!.rest + 4 * Number.EPSILON * values)) * (1 + 2 * Number.EPSILON) : Infinity;
  return cf + Math.min(whole, split);
}

export function shortfallLight(
  sol: PartSolution,
  atoms: Atom[],
  w: number,
  q: number,
  p: number,
  errCdf: number,
  errQ: number,
  tails: StopLossBounds | null = null,
): { value: number; error: number } {
  if (p >= 1) return { value: q, error: 0 };
  const b = sol.window.b;
  let part = 0;
  let intRound = 0;
  if (q < b) {
    const r = integrateSf(sol.nodes, sol.part.center, q, b);
    part = r.value;
    // integrateSf's rounding (./pointwise.ts) per unit of its absSum (the terms' moduli 2 |phi_k| w_k / pi, u = eps/2):
    // each phase t_k y (t_k, y = x - center and the product: 3 u |t_k y|) at both ends with cos and sin within an ulp,
    // the differences, the complex product and the weight w_k (12 u with the ends' cos/sin), the blocked, compensated
    // sum (66 u of the moduli's sum, see integrateSf; Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
    // eq. 4.4 and sec. 4.3; the compensation's second-order term below K u^2) and the division by pi:
    // u (1.5 (|y_q| + |y_b|) phaseSum + (79 + K eps) absSum), phaseSum the moduli weighted by t_k
    const K = sol.nodes.K;
    const c = sol.part.center;
    const nodeValues = nodeValueErrors(sol, b - q);
    intRound =
      (Number.EPSILON / 2) * (1.5 * (Math.abs(q - c) + Math.abs(b - c)) * r.phaseSum + (79 + K * Number.EPSILON) * r.absSum) * (1 + 1e-10) +
      8 * Number.EPSILON * Math.abs(b - q) +
      nodeValues;
    for (const k of sol.part.kernels) part += kernelSfIntegral(k, q) - kernelSfIntegral(k, b);
  }
  let atomPart = 0;
  for (const a of atoms) if (a.x > q) atomPart += a.p * (a.x - q);
  // images: for y in [q, b] the sf error is within [-S(y + T), F(y - T)], both below F(a) <= aliasCore + sum error
  const alias = sol.aliasCore + 2 * sol.sumErrCdf;
  const trunc = truncationAt(sol.envelope, sol.nodes.K * sol.nodes.h).cdf * 2 * Math.abs(b - q);
  // past b (and past q when q >= b) the inverted sums say nothing: the law's own E[(X - max(q, b))^+] bounds what is left
  // there (the continuous part's share, weighted, is at most the law's), from its moments (tail-moments.ts); without them
  // no bound
  // the moments' bounds past the window aim below 1e-9 (1 - p) max(1, |q|) (ES's 1e-6 relative with room): where the 12th
  // order's bound is above that the higher orders are formed (./tail-moments.ts)
  const goal = 1e-9 * (1 - p) * Math.max(1, Math.abs(q));
  const tailBeyond = tails ? tails.right(Math.max(q, b), goal) : Infinity;
  const excess = atomPart + w * part;
  const value = q + excess / (1 - p);
  // dES/dq = 1 - S(q)/(1 - p) vanishes at the exact quantile, so errQ enters at second order (bounded by errCdf errQ)
  let body = w * (Math.max(b - q, 0) * alias + intRound + trunc) + tailBeyond;
  if (tails && q < b) {
    const a = sol.window.a;
    const T = b - a;
    // images: the sf error at y in [q, b] comes from F(y - mT) and S(y + mT), m >= 1; over y the shifted intervals are
    // disjoint, so their integral is at most int_{-inf}^a |F| + int_{q+T}^inf |S|: the law's stop-loss bounds (the
    // continuous part's mass is below the law's) plus the kernels'; the part beyond b is at most E[(X - b)^+]
    // (no larger than the window-wide term above, which stays where it is smaller)
    const images = Math.min(tails.left(a, goal) + tails.right(q + T, goal) + w * kernelImages(sol.part.kernels, a, q + T), w * Math.max(b - q, 0) * alias);
    const beyond = tails.right(b, goal);
    // truncation: the terms t_k > t* = (K - 1/2) h of the integrated sum carry |phi_k| |e^{-i t_k b} - e^{-i t_k q}| / t_k^2
    // <= 2 E(t_k) / t_k^2 with E non-increasing (h g(t_k) <= int_{t_k - h}^{t_k} g for a non-increasing g), so their sum is
    // at most (2/pi) int_{t*}^inf E/t^2 <= 2 trunc_cdf(t*) / t*
    const tStar = (sol.nodes.K - 0.5) * sol.nodes.h;
    const truncInt = Math.min(trunc, (2 * truncationAt(sol.envelope, tStar).cdf) / tStar);
    const derived = images + beyond + w * (intRound + truncInt);
    if (Number.isFinite(derived)) body = derived;
  }
  const error = (body + errCdf * errQ) / (1 - p) + 4 * Number.EPSILON * Math.abs(value);
  return { value, error };
}
