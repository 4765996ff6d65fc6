import { directQuantile } from "../direct/answer";
import { directPoint, type DirectLaw } from "../direct/types";
import type { Atom, CompiledModel } from "../types";

/**
 * max |q_p - center| over the levels, from the direct laws of the sum's power-tailed terms: the heaviest term G's
 * quantiles, or with two or more such terms (G.images) the levels where their tails add up to the level's tail
 * (sumOfTails) where these lie beyond G's by more than the margin; plus 8 spreads; null without a tail term. Only the
 * first period of the heavy route is chosen from it (the quantiles found are checked to lie well inside that period,
 * ./quantile.ts heavyQuantiles).
 */
export function tailTermExtent(model: CompiledModel, atoms: Atom[], p: Float64Array, center: number, spread: number): number | null {
  const G = model.tailTerm;
  if (!G || atoms.length) return null;
  const laws = G.images && G.images.laws.length > 1 ? G.images.laws : null;
  // q_p is non-decreasing in p, so |q_p - center| is largest at the smallest or the largest level: only those two are solved
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < p.length; i++) {
    if (!(p[i] > 0 && p[i] < 1)) continue;
    lo = Math.min(lo, p[i]);
    hi = Math.max(hi, p[i]);
  }
  let ext = 0;
  let extSum = 0;
  for (const level of lo <= hi ? (lo === hi ? [lo] : [lo, hi]) : []) {
    const q = directQuantile(G.direct, level).x;
    if (!Number.isFinite(q)) return null;
    ext = Math.max(ext, Math.abs(q - center));
    if (laws) extSum = Math.max(extSum, Math.abs(sumOfTails(laws, level, q, G.direct.center) - center));
  }
  // the 8 spreads cover the other terms' share where it is small (the period is then the same as from G alone); where the
  // sum of the tails reaches beyond them, it takes G's place with the same 8 spreads
  return extSum > ext + 8 * spread ? extSum + 8 * spread : ext + 8 * spread;
}

/**
 * Power-tailed terms are subexponential: far out the sum's tail is about the sum of the terms' tails (common practice;
 * a property of regularly varying tails, Embrechts, Kluppelberg & Mikosch 1997, Modelling Extremal Events, sec. 1.3,
 * section recalled from memory). From G's quantile x (where
 * G's tail alone is the level's), while the laws' tails s_i at x add up to more than the level's, x moves out about G's
 * bulk (`center`) by the factor r solving sum_i s_i r^(-a_i) = level (each tail taken as a power y^(-a_i) of its own index,
 * by bisection; a light tail, a_i infinite, drops out); three steps at most, never inward.
 */
function sumOfTails(laws: { direct: DirectLaw; tails: { left: number; right: number } }[], p: number, x: number, center: number): number {
  const upper = p > 0.5;
  const tail = upper ? 1 - p : p;
  const a = laws.map((g) => (upper ? g.tails.right : g.tails.left));
  const aMin = Math.min(...a);
  if (!(aMin > 0 && Number.isFinite(aMin))) return x;
  const pt = directPoint();
  const s = new Float64Array(laws.length);
  for (let k = 0; k < 3; k++) {
    let sum = 0;
    for (let i = 0; i < laws.length; i++) {
      laws[i].direct.at(x, pt);
      s[i] = upper ? pt.sf : pt.cdf;
      sum += s[i];
    }
    if (!(sum > tail * 1.01) || !Number.isFinite(sum)) break;
    const d = x - center;
    if (!(upper ? d > 0 : d < 0)) break;
    // sum_i s_i r^(-a_i) falls from sum > level at r = 1 to at most the level at r = (sum / level)^(1 / aMin)
    let lo = 0;
    let hi = Math.log(sum / tail) / aMin;
    for (let it = 0; it < 40; it++) {
      const m = 0.5 * (lo + hi);
      let v = 0;
      for (let i = 0; i < laws.length; i++) if (Number.isFinite(a[i])) v += s[i] * Math.exp(-a[i] * m);
      if (v > tail) lo = m;
      else hi = m;
    }
    x = center + d * Math.exp(hi);
  }
  return x;
}
