import { compositeInput, forwardRange, getFftPlan, splitSize } from "../fftplan";
import type { Nodes } from "./nodes";
import { checkDeadline } from "../deadline";

/**
 * Rounding of sumOnGrid per unit of sum |c_k| (u = eps/2), the part that does not depend on the grid: the transform and
 * the post-rotation, each radix-2 level at most about 4.5 u of the inputs' absolute sum (Higham, Accuracy and Stability
 * of Numerical Algorithms, 2nd ed., sec. 24.1, componentwise), taken as 16 u a level for N up to 2^22 plus 32 u; the
 * pre-rotation's drift, each block of 64 terms starting from cos and sin of its angle (2 sqrt(2) u) and each step
 * rotating by (cos h y0, sin h y0), whose rounding and the complex product add at most 6 u (Higham sec. 3.6), 63 steps
 * a block; the term's product 3 u. The angle's own rounding, 3 u t_k |y0|, and the bins' sums (ceil(K/N) terms a bin,
 * Higham eq. 4.4) depend on the grid: the caller adds them (damped-eval.ts dampedGrid).
 */
export const GRID_REL = ((16 * 22 + 32 + 6 * 63 + 3 + 3) * Number.EPSILON) / 2;

/**
 * The mid-point Gil-Pelaez / density sums of ./pointwise evaluated on a whole grid x_j = x0 + j dx (j < N)
 * with one FFT each, when h dx = 2 pi / N:
 *   e^{-i t_k x_j} = e^{-i t_k (x0 - c)} e^{-i pi j / N} e^{-2 pi i k j / N},
 * so with c_k = phi_k e^{-i t_k (x0 - c)} the sum over k is a forward DFT of c (nodes with k >= N fold
 * onto k mod N, which leaves the phase unchanged). Plans and buffers come from the shared cache.
 * Writes the first `count` grid values starting at grid index `offset`.
 */
export function sumOnGrid(
  nodes: Nodes,
  center: number,
  x0: number,
  N: number,
  offset: number,
  count: number,
  pdf: Float64Array | null,
  cdf: Float64Array | null,
  sf: Float64Array | null,
): void {
  const { h, K, re, im, wre, wim, mass } = nodes;
  // N a power of two (one transform) or m 2^p (forwardRange: only the outputs asked for, from m transforms of 2^p)
  const odd = splitSize(N).m > 1;
  const plan = odd ? null : getFftPlan(N);
  const inp = plan ? plan.a : compositeInput(N);
  const out = plan ? plan.b : new Float64Array(2 * count);
  // where output j is read: out[2 (j - base)]
  const base = odd ? offset : 0;
  const y0 = x0 - center;
  const th = h * y0;
  const passes: Array<[Float64Array, Float64Array, boolean]> = [];
  if (pdf) passes.push([re, im, true]);
  if (cdf || sf) passes.push([wre, wim, false]);
  for (const [pr, pi, isPdf] of passes) {
    checkDeadline("fft");
    inp.fill(0);
    const rc = Math.cos(th);
    const rs = -Math.sin(th);
    let k = 0;
    // the bin of node k: k mod N, kept by a wrapping counter
    let bin = 0;
    while (k < K) {
      const a0 = (k + 0.5) * th;
      let zr = Math.cos(a0);
      let zi = -Math.sin(a0);
      const end = Math.min(K, k + 64);
      for (; k < end; k++) {
        const m = bin << 1;
        inp[m] += zr * pr[k] - zi * pi[k];
        inp[m + 1] += zr * pi[k] + zi * pr[k];
        const nr = zr * rc - zi * rs;
        zi = zr * rs + zi * rc;
        zr = nr;
        if (++bin === N) bin = 0;
      }
    }
    if (plan) plan.forward(inp, out);
    else forwardRange(N, inp, offset, count, out);
    const step = Math.PI / N;
    for (let q = 0; q < count; q++) {
      const j = q + offset;
      const a = j * step;
      const er = Math.cos(a);
      const ei = -Math.sin(a);
      const cr = out[2 * (j - base)];
      const ci = out[2 * (j - base) + 1];
      if (isPdf) {
        pdf![q] = (h / Math.PI) * (er * cr - ei * ci);
      } else {
        const s = (er * ci + ei * cr) / Math.PI;
        if (cdf) cdf[q] = mass / 2 - s;
        if (sf) sf[q] = mass / 2 + s;
      }
    }
  }
}
