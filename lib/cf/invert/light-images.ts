import type { CompiledModel } from "../types";
import type { EndpointKernels } from "./part";
import { roundingOf, type PartSolution } from "./shared";
import { truncationAt } from "./nodes";
import { incGamma } from "./incgamma";
import { markovTail, momentBounds, type MomentBounds } from "./moment-tails";

const EPS = Number.EPSILON;

/**
 * The light route's aliasing at one point, in place of the window's uniform bound (continuous.ts lightPath: twice the
 * computed F_h at the window's left end plus twice the sums' own error, since F_h(a) is only known to that error).
 * With period T the mid-point Gil-Pelaez sums at x carry sum_{m >= 1} (-1)^{m+1} [S_P(x + m T) - F_P(x - m T)] for
 * the inverted part P = (continuous part) / w - kernels.
 *   The law's share: S_c and F_c are non-increasing in m, so each alternating sum lies between 0 and its first term,
 *   and their difference is at most max(S_c(x + T), F_c(x - T)) / w; each tail at most Markov's bound on the even
 *   central moments (./moment-tails.ts), P(|X - mu| >= r) <= E (X - mu)^n / r^n, at the order best for the point's own
 *   distance; an image beyond the support's end (x - T below its start, x + T at or above its end) holds no mass.
 *   The kernels (signed weights b_j, no cancellation assumed): sum_j |b_j| sum_{m >= 1} G_j(r + (m - 1) T), G_j the
 *   gamma(a, rate) tail beyond the distance r from the kernel's endpoint, non-increasing, so the sum is at most
 *   G_j(r) + (1/T) int_r^inf G_j = Q(a, rate r) + (a / (rate T)) Q(a + 1, rate r) (the gamma law's stop-loss transform,
 *   Klugman, Panjer & Willmot, Loss Models, app. A, less its negative term). A kernel whose images reach its own side
 *   of the window is not covered: Infinity (the uniform bound stands).
 * Null when the model has no cumulants with bounds.
 */
export function lightAliasAt(model: CompiledModel, sol: PartSolution, w: number): ((x: number) => number) | null {
  if (!model.cumulantErrors || !(w > 0)) return null;
  const k1 = model.cumulants(1)[0];
  if (k1 === null || !Number.isFinite(k1)) return null;
  const T = sol.window.b - sol.window.a;
  const [slo, shi] = model.support;
  // every point of the window [a, b] is at least min(b - mu, mu - a) from its nearest image
  const near = Math.max(Math.min(sol.window.b - k1, k1 - sol.window.a), 0);
  const kernels = sol.part.kernels;
  return (x: number) => {
    // no mass below the support's start or above its end: that side's images add nothing
    const leftGone = x - T < slo;
    const rightGone = x + T >= shi;
    const right = x + T - k1;
    const left = k1 - (x - T);
    if (!((rightGone || right > 0) && (leftGone || left > 0))) return Infinity;
    // the moment orders are chosen for this point's own nearest image (./moment-tails.ts adds orders while the bound
    // there still falls; the orders computed are kept per model)
    const r0 = Math.max(near, Math.min(rightGone ? Infinity : right, leftGone ? Infinity : left));
    const mom: MomentBounds | null = leftGone && rightGone ? null : momentBounds(model, k1, Number.isFinite(r0) ? r0 : near);
    if (!mom && !(leftGone && rightGone)) return Infinity;
    const tailR = rightGone ? 0 : markovTail(mom!, right, true);
    const tailL = leftGone ? 0 : markovTail(mom!, left, true);
    let b = Math.max(tailR, tailL) / w;
    for (const k of kernels) b += kernelImages(k, x, T);
    return b * (1 + 8 * EPS);
  };
}

/** sum_j |b_j| sum_{m >= 1} of the kernel's mass beyond x + m T (side +1) or below x - m T (side -1); see above */
export function kernelImages(k: EndpointKernels, x: number, T: number): number {
  // images on the side the kernel lives: x + m T for side +1 at distance r from the endpoint; the other side's images
  // must fall where the kernel has no mass
  const r = k.side === 1 ? x + T - k.at : k.at - (x - T);
  const other = k.side === 1 ? x - T - k.at : k.at - (x + T);
  if (!(r > 0) || other > 0) return Infinity;
  let s = 0;
  const u = k.rate * r;
  for (let j = 0; j < k.b.length; j++) {
    const a = k.power + j;
    const g0 = incGamma(a, u);
    const g1 = incGamma(a + 1, u);
    // each Q plus its derived bound (./incgamma.ts)
    const q0 = g0.Q + g0.eQ;
    const q1 = g1.Q + g1.eQ;
    s += Math.abs(k.b[j]) * (q0 + (a / (k.rate * T)) * q1);
  }
  return s * (1 + 8 * EPS);
}

/**
 * Per-point cdf and sf bounds of a light-route answer from its pointwise sums (continuous.ts lightPath, method
 * gil-pelaez), each at most the window's uniform bound `wholeCdf` (which stands for points outside the window): the
 * truncation from the envelope's tail at (K - 1/2) h (the terms k >= K carry at most (h / pi) E(t_k) / t_k with E(t)/t
 * non-increasing, so their sum is at most (1/pi) int_{(K - 1/2) h}^inf E/t; the window's bound doubles the tail at K h),
 * the rounding at the point's own distance from the centre (shared.ts roundingOf) and the aliasing at the point
 * (lightAliasAt above), or the window's 2 |F_h(a)| plus twice the sums' own error there. Scaled by the continuous
 * part's weight w; points answered by the tail bounds (`beyond`) keep `wholeCdf`; null where the model gives no
 * per-point aliasing.
 */
export function lightPointErrors(
  model: CompiledModel,
  sol: PartSolution,
  w: number,
  xs: ArrayLike<number>,
  wholeCdf: number,
  beyond?: Uint8Array,
): Float64Array | null {
  const aliasAt = lightAliasAt(model, sol, w);
  if (!aliasAt) return null;
  const { nodes, envelope, part, window } = sol;
  const truncWindow = 2 * truncationAt(envelope, nodes.K * nodes.h).cdf;
  const roundWindow = Math.max(sol.sumErrCdf - truncWindow, 0);
  const trunc = Math.min(truncWindow, truncationAt(envelope, (nodes.K - 0.5) * nodes.h).cdf);
  const aliasWindow = sol.aliasCore + 2 * (trunc + roundWindow);
  const out = new Float64Array(xs.length);
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i];
    if (!(x >= window.a && x <= window.b) || beyond?.[i]) {
      out[i] = wholeCdf;
      continue;
    }
    const round = Math.min(roundWindow, roundingOf(part, nodes, Math.abs(x - part.center)).cdf);
    const alias = Math.min(aliasWindow, aliasAt(x));
    out[i] = Math.min(wholeCdf, w * (trunc + round + alias) * (1 + 4 * EPS) + 4 * EPS);
  }
  return out;
}
