import { cabs } from "../complex";
import { checkDeadline } from "../deadline";
import type { Nodes } from "./nodes";

/** nodes between exact phases (cos and sin of the node's angle); the recurrence drifts between them */
export const RESYNC = 64;

/**
 * Gil-Pelaez (1951) inversion by the mid-point trapezoid rule with nodes t_k = (k + 1/2) h, at arbitrary points:
 *   F(x) = M/2 - (1/pi) sum_k Im(e^{-i t_k y} phi_k) / (k + 1/2),   S(x) = M/2 + (same sum)/pi,
 *   f(x) = (h/pi) sum_k Re(e^{-i t_k y} phi_k),                       y = x - center, M = phi(0).
 * With the infinite sum, F_h(x) = F(x) - F(x-T) + S(x+T) + ... (alternating, T = 2 pi / h), so the error is
 * bounded by max(F(x - T), S(x + T)); f_h(x) = sum_m (-1)^m f(x + mT) (Poisson summation).
 * The phase e^{-i t_k y} is advanced by one complex multiply per node and recomputed every 64 nodes.
 * sf is summed directly (not 1 - cdf) so upper-tail probabilities keep their absolute accuracy.
 */
export function sumPointwise(
  nodes: Nodes,
  center: number,
  x: ArrayLike<number>,
  pdf: Float64Array | null,
  cdf: Float64Array | null,
  sf: Float64Array | null,
): void {
  const { h, K, re, im, wre, wim, mass } = nodes;
  const half = mass / 2;
  const n = x.length;
  for (let j = 0; j < n; j++) {
    checkDeadline("pointwise");
    const y = x[j] - center;
    const th = h * y;
    const rc = Math.cos(th);
    const rs = -Math.sin(th);
    let accP = 0;
    let accC = 0;
    let k = 0;
    while (k < K) {
      // one point may take millions of nodes (densities with kinks): the deadline is checked every 2^16 of them
      if (k > 0 && (k & 0xffff) === 0) checkDeadline("pointwise");
      const a0 = (k + 0.5) * th;
      let zr = Math.cos(a0);
      let zi = -Math.sin(a0);
      const end = Math.min(K, k + RESYNC);
      // each block summed on its own, then added: worst-case rounding gamma_{RESYNC + K / RESYNC} (shared.ts roundingOf)
      let bP = 0;
      let bC = 0;
      if (pdf) {
        for (; k < end; k++) {
          bP += zr * re[k] - zi * im[k];
          bC += zr * wim[k] + zi * wre[k];
          const nr = zr * rc - zi * rs;
          zi = zr * rs + zi * rc;
          zr = nr;
        }
      } else {
        for (; k < end; k++) {
          bC += zr * wim[k] + zi * wre[k];
          const nr = zr * rc - zi * rs;
          zi = zr * rs + zi * rc;
          zr = nr;
        }
      }
      accP += bP;
      accC += bC;
    }
    if (pdf) pdf[j] = (h / Math.PI) * accP;
    if (cdf) cdf[j] = half - accC / Math.PI;
    if (sf) sf[j] = half + accC / Math.PI;
  }
}

/**
 * Partial expectation int_u^v S_part(y) dy of the mid-point trapezoid approximation, term by term:
 * int_u^v Im(e^{-i t y} phi)/t... integrates exactly, giving
 *   (v - u) M/2 + (1/pi) sum_k Re(phi_k (e^{-i t_k v} - e^{-i t_k u})) / ((k+1/2) t_k).
 */
export function integrateSf(nodes: Nodes, center: number, u: number, v: number): { value: number; absSum: number; phaseSum: number } {
  const { h, K, re, im, mass } = nodes;
  checkDeadline("partial-expectation");
  const yu = u - center;
  const yv = v - center;
  let acc = 0;
  let comp = 0;
  let abs = 0;
  let absT = 0;
  // blocks of 64 terms summed in turn, the block sums compensated (Neumaier): rounding at most 65 u of the moduli's
  // sum plus O(K u^2) (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., eq. 4.4 and sec. 4.3)
  for (let k0 = 0; k0 < K; k0 += 64) {
    const end = Math.min(K, k0 + 64);
    let blk = 0;
    for (let k = k0; k < end; k++) {
      const tk = (k + 0.5) * h;
      const cu = Math.cos(tk * yu);
      const su = -Math.sin(tk * yu);
      const cv = Math.cos(tk * yv);
      const sv = -Math.sin(tk * yv);
      const dr = cv - cu;
      const di = sv - su;
      const wk = 1 / ((k + 0.5) * tk);
      blk += (re[k] * dr - im[k] * di) * wk;
      const a = 2 * cabs(re[k], im[k]) * wk;
      abs += a;
      absT += a * tk;
    }
    const t = acc + blk;
    comp += Math.abs(acc) >= Math.abs(blk) ? acc - t + blk : blk - t + acc;
    acc = t;
  }
  acc += comp;
  // absSum: the terms' moduli over pi; phaseSum: the same weighted by t_k (the phases' rounding grows with t_k |y|)
  return { value: ((v - u) * mass) / 2 + acc / Math.PI, absSum: abs / Math.PI, phaseSum: absT / Math.PI };
}
