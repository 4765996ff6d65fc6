// Per-point bounds of a density answer read from a table whose entries carry their own bounds (LatticeTable.pointErr).
import type { LatticeTable } from "../types";
import type { LatticeSolution } from "./lattice";
import type { PointErrors } from "./types";

const EPS = Number.EPSILON;

/**
 * Per-point bounds from per-entry bounds e_k (../table-rounding.ts pointErrOf) and the dropped mass m = tailMass, for the
 * answers latticeResult (./density.ts) gives: the pmf at lattice point k within e_k, the cdf (a Kahan sum of the entries
 * up to k) within sum_{j <= k} e_j + 2 eps F(k) (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec.
 * 4.3: Kahan's sum within 2u + O(n u^2) of the sum of its non-negative terms), the sf (summed from the right) within
 * sum_{j > k} e_j + 2 eps S(k). The dropped mass: where it may lie at or below a point (anywhere, or below the origin:
 * tailBelow) the cdf there moves by at most m, and the pmf where it may lie at the point (not tailBelow's); the sf answered with m added (not for tailBelow, whose sf misses
 * nothing) is within m of the truth; none where the table says its dropped mass lies from tailFrom > 0 on, or past the
 * end of a recursion's table (pointRel). Past the table and below it the pmf is answered 0, the cdf 0 or 1 - m, the sf 1 or m.
 * Every bound at most the whole answer's (sol.errorPmf, sol.errorCdf).
 */
export function tableEntryErrors(t: LatticeTable, e: Float64Array, xs: Float64Array, cdf: Float64Array, sf: Float64Array, sol: LatticeSolution): PointErrors {
  const n0 = t.p.length;
  const n = xs.length;
  const m = t.tailMass;
  const up = 1 + (n0 + 4) * EPS;
  // prefix and suffix sums of e (each rounded up at its use): pre[k] the entries below k, suf[k] those from k on
  const pre = new Float64Array(n0 + 1);
  const suf = new Float64Array(n0 + 1);
  for (let k = 0; k < n0; k++) pre[k + 1] = pre[k] + e[k];
  for (let k = n0 - 1; k >= 0; k--) suf[k] = suf[k + 1] + e[k];
  // the first index at which the dropped mass may lie (-1: below the origin too, so at or below every point); a tailFrom of
  // 0 (a convolution's) does not say the inputs' tails lie at or above their origins (a reversed or a bulk table's do not)
  const from = t.tailBelow ? -1 : t.tailFrom !== undefined ? (t.tailFrom > 0 ? t.tailFrom : -1) : t.pointRel ? n0 : -1;
  const out = { pdf: new Float64Array(n), cdf: new Float64Array(n), sf: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    const u = (xs[i] - t.origin) / t.step;
    const k = Math.floor(u + 1e-9);
    const onLattice = Math.abs(u - Math.round(u)) <= 1e-9 * Math.max(1, Math.abs(u));
    let ep: number;
    let ec: number;
    let es: number;
    if (k < 0) {
      // answered pmf 0, cdf 0, sf 1: only dropped mass below the origin lies here
      const below = from < 0 ? m : 0;
      ep = onLattice ? below : 0;
      ec = below;
      es = below;
    } else if (k >= n0) {
      // answered pmf 0, cdf 1 - m and sf m (0 for tailBelow, whose dropped mass lies below the origin)
      ep = onLattice && !t.tailBelow ? m : 0;
      ec = t.tailBelow ? 0 : m;
      es = ec;
    } else {
      const here = from <= k ? m : 0;
      // (a reversed table's dropped mass lies below the origin: at no point of the table)
      ep = onLattice ? e[Math.round(u)] * (1 + EPS) + (t.tailBelow ? 0 : here) : 0;
      ec = (pre[k + 1] * up + 2 * EPS * cdf[i] * up + here) * (1 + 2 * EPS);
      es = (suf[k + 1] * up + 2 * EPS * sf[i] * up + (t.tailBelow ? 0 : m)) * (1 + 4 * EPS);
    }
    out.pdf[i] = Math.min(sol.errorPmf, ep);
    out.cdf[i] = Math.min(sol.errorCdf, ec);
    out.sf[i] = Math.min(sol.errorCdf, es);
  }
  return out;
}
