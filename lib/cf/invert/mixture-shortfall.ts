// A mixture's stop-loss E[(X - q)^+] = sum_j w_j E[(X_j - q)^+] at its quantiles, each component by its own route; see
// ./mixture.ts, which forms the expected shortfall from it.
import type { Component } from "./mixture-component";

/**
 * share of the error the components before it have at a level that a directly evaluated component may add there: its
 * tail sweep (../direct/shortfall-sweep.ts) then spends the allowance on fewer panels where its own tail is a small part
 * of the mixture's (a gamma at the mixture's 0.999 quantile, 1e-13 of its mass past it against the mixture's 1e-3)
 */
const ALLOW_SHARE = 1 / 32;

/**
 * value[i] and error[i] (sums of w_j E[(X_j - x_i)^+] and of w_j times their bounds) at the levels `asked`, false where a
 * component has no mean. The components without a sweep of their own (damped, Gil-Pelaez) first; then the direct laws,
 * each in two parts, the levels below its own median and those above (its two sweeps, ../direct/shortfall.ts), the parts
 * holding the larger share of the mixture's tail at their levels first: each takes as its allowance at a level
 * ALLOW_SHARE of the error summed so far there (over its weight), so that the bound grows by about that share at most
 * per part; a law's own accuracy still holds where it is the coarser (a level deep in its own tail keeps its relative
 * accuracy when that is the wider).
 */
export function mixtureExcesses(cs: Component[], x: Float64Array, p: Float64Array, asked: number[], value: Float64Array, error: Float64Array): boolean {
  const parts: { c: Component; idx: number[]; share: number }[] = [];
  for (const c of cs) {
    if (!c.excesses) {
      parts.push({ c, idx: asked, share: Infinity });
      continue;
    }
    const sides: Record<"lo" | "hi", { idx: number[]; share: number }> = { lo: { idx: [], share: 0 }, hi: { idx: [], share: 0 } };
    for (const i of asked) {
      const v = c.at(x[i]);
      const lower = v.F < 0.5;
      const g = Math.max(lower ? v.F : v.S, 0);
      const part = sides[lower ? "lo" : "hi"];
      part.idx.push(i);
      // the part's share of the mixture's tail on the level's side (upper above the median)
      part.share = Math.max(part.share, (c.w * g) / (p[i] >= 0.5 ? 1 - p[i] : p[i]));
    }
    for (const part of [sides.lo, sides.hi]) if (part.idx.length) parts.push({ c, ...part });
  }
  parts.sort((a, b) => b.share - a.share);
  for (const { c, idx } of parts) {
    const qs = idx.map((i) => x[i]);
    const rs = c.excesses ? c.excesses(qs, idx.map((i) => (ALLOW_SHARE * error[i]) / c.w)) : [];
    if (!c.excesses) for (let k = 0; k < qs.length && (k === 0 || rs[k - 1]); k++) rs.push(c.excess(qs[k]));
    rs.length = qs.length;
    let exists = true;
    idx.forEach((i, k) => {
      const r = rs[k];
      if (!r) exists = false;
      else {
        value[i] += c.w * r.value;
        error[i] += c.w * r.error;
      }
    });
    if (!exists) return false;
  }
  return true;
}
