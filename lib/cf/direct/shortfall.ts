import type { CompiledModel } from "../types";
import { stopLossBounds } from "../invert/tail-moments";
import { directPoint, type DirectLaw } from "./types";
import { tailSweep, type RestBound, type TailIntegral } from "./shortfall-sweep";

// Expected shortfall of a directly evaluated law, with a derived bound on its tail integral.

export type { RestBound } from "./shortfall-sweep";

/**
 * The model's derived stop-loss bounds from its central moments (../invert/tail-moments.ts: E[(X - u)^+] and
 * E[(u - X)^+] by the best even order), as a RestBound; undefined where the moments or their bounds are missing.
 */
export function momentRest(model: CompiledModel): RestBound | undefined {
  const sl = stopLossBounds(model);
  return sl ? (u, side) => (side === 1 ? sl.right(u) : sl.left(u)) : undefined;
}

/** directShortfalls at one level */
export function directShortfall(
  law: DirectLaw,
  q: number,
  qErr: number,
  p: number,
  index: { left: number; right: number },
  mean: number | null,
  meanErr: number,
  rest?: RestBound,
): { value: number; error: number } {
  const r = directShortfalls(law, [q], [qErr], [p], index, mean, meanErr, rest);
  return { value: r.value[0], error: r.error[0] };
}

/**
 * Expected shortfall ES_p = q + E[(X - q)^+]/(1 - p) (Acerbi & Tasche 2002) at each level p[i] with its quantile q[i]
 * (within qErr[i]). Above the median E[(X - q)^+] = int_q^inf S(y) dy; below it, where that integral would be most of the
 * mean and ES a small difference, E[(X - q)^+] = (mean - q) + int_-inf^q F(y) dy, the mean within meanErr (its derived
 * bound: a mean taken as exact left ES below the median up to 4x its bound, weibull(0.7, 3) at 1e-4; where no bound is
 * known, Infinity, the levels below the median take the upper integral too). A law with its own stop-loss transform
 * at q (DirectLaw.stopLoss) gives the tail integral and its bound. Else the levels on each side share one sweep of
 * derived brackets (./shortfall-sweep.ts) with a node at each level's quantile: the value is its panels' corrected
 * trapezoid sum, the error the distance to the farther end of its bracket, never an estimate.
 * `allow`: per level, an absolute width its tail integral's bracket may take (0: none), which the sweep spends on fewer
 * panels where it exceeds the level's own allowance (a mixture's component far in its tail, ../invert/mixture.ts).
 * Also returned: E[(X - q)^+] itself at the q given (`excess`, within `excessError`: the tail integral's bracket and the
 * mean's part, no quantile move), for a caller that sums it over components (a mixture) instead of taking ES - q back.
 * A law whose upper tail has no finite mean (index.right <= 1) has no ES: NaN. One without a mean only through its lower
 * tail (stable, alpha < 1, beta = -1: bounded above) has it, by the upper integral at every level (it was NaN).
 */
export function directShortfalls(
  law: DirectLaw,
  q: ArrayLike<number>,
  qErr: ArrayLike<number>,
  p: ArrayLike<number>,
  index: { left: number; right: number },
  mean: number | null,
  meanErr: number,
  rest?: RestBound,
  allow?: ArrayLike<number>,
): { value: Float64Array; error: Float64Array; excess: Float64Array; excessError: Float64Array } {
  const n = q.length;
  const value = new Float64Array(n).fill(NaN);
  const error = new Float64Array(n).fill(NaN);
  const excessV = new Float64Array(n).fill(NaN);
  const excessE = new Float64Array(n).fill(NaN);
  const tails = new Array<TailIntegral | null>(n).fill(null);
  // per level: its tail integral is the lower one, int_-inf^q F (else the upper, int_q^inf S)
  const lowerAt = new Uint8Array(n);
  const sides: Record<1 | -1, number[]> = { 1: [], [-1]: [] };
  // below the median through the lower tail only with a bounded mean
  const lowerOk = index.left > 1 && mean !== null && Number.isFinite(meanErr);
  for (let i = 0; i < n; i++) {
    if (p[i] >= 1) {
      value[i] = q[i];
      error[i] = qErr[i];
      continue;
    }
    if (index.right <= 1) continue;
    if (!Number.isFinite(q[i])) {
      error[i] = Infinity;
      continue;
    }
    const dir = p[i] < 0.5 && lowerOk ? -1 : 1;
    // a law with its own stop-loss transform at q answers the tail integral from it, value and bound; below the median
    // a law with only the upper one answers E[(X - q)^+] from it directly (no mean needed: the sweep's brackets are
    // O(panel^3) and stay thousands of times the closed form's rounding)
    let own = law.stopLoss?.(q[i], dir);
    let ownDir = dir;
    if (!(own && Number.isFinite(own.v) && Number.isFinite(own.e)) && dir === -1) [own, ownDir] = [law.stopLoss?.(q[i], 1), 1];
    if (own && Number.isFinite(own.v) && Number.isFinite(own.e)) {
      tails[i] = { val: own.v, lo: own.v - own.e, hi: own.v + own.e, whole: true };
      lowerAt[i] = ownDir === -1 ? 1 : 0;
    } else {
      sides[dir].push(i);
      lowerAt[i] = dir === -1 ? 1 : 0;
    }
  }
  for (const dir of [1, -1] as const) {
    // outwards from the median: ascending above it, descending below
    const idx = sides[dir].sort((i, j) => dir * (q[i] - q[j]));
    if (idx.length === 0) continue;
    const r = tailSweep(law, idx.map((i) => q[i]), dir, rest, allow ? idx.map((i) => allow[i]) : undefined);
    idx.forEach((i, k) => (tails[i] = r[k]));
  }
  const pt = directPoint();
  for (let i = 0; i < n; i++) {
    const t = tails[i];
    if (!t) continue;
    const lower = lowerAt[i] === 1;
    law.at(q[i], pt);
    const fq = pt.pdf + pt.pdfErr;
    // a sweep that ran out of panels (a law without its mode: monotone bounds only) or of a bound on what lies past
    // it keeps its derived bracket, but its sum is partial: the value is then estimated apart, inside the bracket
    const A = t.whole ? t.val : Math.min(Math.max(logTrapezoid(law, q[i], lower ? -1 : 1, lower ? index.left : index.right), t.lo), t.hi);
    const w = 1 - p[i];
    const excess = lower ? mean! - q[i] + A : A;
    value[i] = q[i] + excess / w;
    const meanPart = lower ? meanErr + 4 * Number.EPSILON * (Math.abs(mean!) + Math.abs(q[i])) : 0;
    const quad = Math.max(A - t.lo, t.hi - A) + 8 * Number.EPSILON * Math.abs(A);
    // ES(q') - ES(q) = (q' - q)(1 - S(xi)/(1 - p)) for xi between: second order in |q' - q| <= qErr
    // (an exact quantile adds nothing, even where the density is infinite there)
    const move = qErr[i] > 0 ? (2 * fq * qErr[i] * qErr[i]) / w : 0;
    error[i] = (quad + meanPart) / w + move + 4 * Number.EPSILON * Math.abs(value[i]);
    excessV[i] = excess;
    excessE[i] = quad + meanPart;
  }
  return { value, error, excess: excessV, excessError: excessE };
}

/**
 * An estimate of the tail integral past q (no bound: the caller clamps it into its derived bracket): the trapezoid sum
 * in t with y = q + dir s e^t (s the law's spread; towards a finite end at distance D, y = q + dir D e^t / (1 + e^t)),
 * the part within s e^t0 of q as half its largest size, stopped where the terms and the tail's rough size past them
 * are negligible.
 */
function logTrapezoid(law: DirectLaw, q: number, dir: 1 | -1, tailIndex: number): number {
  const lower = dir < 0;
  const pt = directPoint();
  const tailOf = () => (lower ? pt.cdf : pt.sf);
  const s = law.spread;
  const h = 0.25;
  const t0 = -32;
  const end = lower ? law.support[0] : law.support[1];
  const D = Math.abs(end - q);
  const finite = Number.isFinite(end);
  let A = 0;
  for (let t = t0; t < 400; t += h) {
    let d: number;
    let jac: number;
    if (finite) {
      const e = Math.exp(-Math.abs(t));
      const sg = t >= 0 ? 1 / (1 + e) : e / (1 + e);
      d = D * sg;
      jac = D * sg * (1 - sg);
    } else {
      d = s * Math.exp(t);
      jac = d;
    }
    law.at(q + dir * d, pt);
    const term = h * jac * tailOf();
    A += term;
    if (t > 0 && term <= 1e-17 * A) {
      const g = tailOf();
      const left = finite ? (D - d) * g : Number.isFinite(tailIndex) ? (4 * d * g) / (tailIndex - 1) : 8 * s * g;
      if (left <= 1e-13 * A) break;
    }
  }
  law.at(q, pt);
  return A + ((finite ? D : s) * Math.exp(t0) * tailOf()) / 2;
}
