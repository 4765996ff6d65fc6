/**
 * Richardson extrapolation in the period T of a periodised sum whose error expands in powers T^{-p_1}, T^{-p_2}, ...
 * (increasing p_j), each level doubling T (Richardson's deferred approach to the limit; e.g. Dahlquist & Bjorck,
 * Numerical Methods in Scientific Computing, section on repeated Richardson extrapolation). One module for every caller:
 * the grid and point inversion of power tails, the pointwise ladder used by quantiles, and expected shortfall.
 */

/**
 * What an answer says wherever its error bound rests on richardsonLastStep or richardsonChange: the error left after the
 * extrapolation is estimated, not derived (the parts around it, truncation, rounding and the images taken out of the sums
 * from direct laws, ./images.ts, are bounded). Answers whose aliasing bound is derived (./heavy-residual.ts,
 * ./heavy-residual2.ts) do not carry it.
 */
export const RICHARDSON_ESTIMATE_NOTE =
  "error bound partly estimated, not derived: the aliasing left after Richardson extrapolation in the period (power tails) is estimated as twice the last extrapolation step; frequency truncation, rounding and the images of the heaviest terms are bounded";

/**
 * Exponents {j alpha + i + shift : j >= 1, i >= 0}, distinct, increasing, the first `count`, for tails
 * ~ sum_j c_j y^{-j alpha} whose images at x + mT are expanded in x/T (integer steps i).
 */
export function richardsonExponents(alpha: number, shift: number, count: number): number[] {
  const set = new Set<number>();
  const n = Math.max(12, count);
  for (let j = 1; j <= n; j++) for (let i = 0; i <= n; i++) set.add(Math.round((j * alpha + i + shift) * 1e9) / 1e9);
  return [...set].filter((v) => v > 0).sort((u, v) => u - v).slice(0, count);
}

/**
 * Exponents {sum_k j_k b_k + i + shift : j_k >= 0, sum_k j_k >= 1, i >= 0}, distinct, increasing, the first `count`:
 * the same expansion when the tails hold several power terms y^{-b_k} (a sum of terms with different tail indices)
 * and their products.
 */
export function richardsonExponentsMulti(bases: readonly number[], shift: number, count: number): number[] {
  const bs = [...new Set(bases.filter((b) => Number.isFinite(b) && b > 0).map((b) => Math.round(b * 1e9) / 1e9))].sort((u, v) => u - v);
  if (bs.length === 0) return [];
  // the closure of the bases under adding a base or 1 (each sum rounded to 1e-9), smallest first: every value enters the
  // queue when a smaller one leaves it, so the first `count` taken (those positive after the shift) are the smallest
  const steps = [...bs, 1];
  const seen = new Set<number>(bs);
  const queue = [...bs];
  const out: number[] = [];
  while (out.length < count && queue.length) {
    const v = queue.shift()!;
    const e = Math.round((v + shift) * 1e9) / 1e9;
    if (e > 0) out.push(e);
    for (const b of steps) {
      const w = Math.round((v + b) * 1e9) / 1e9;
      if (seen.has(w)) continue;
      seen.add(w);
      let i = queue.length;
      while (i > 0 && queue[i - 1] > w) i--;
      queue.splice(i, 0, w);
    }
  }
  return out;
}

/** One elimination step for period ratio 2: R = fine + (fine - coarse) / (2^p - 1). */
export function richardsonStep(fine: number, coarse: number, p: number): number {
  return fine + (fine - coarse) / (2 ** p - 1);
}

/** richardsonStep applied elementwise (a fresh array). */
export function richardsonArrays(fine: Float64Array, coarse: Float64Array, p: number): Float64Array {
  const d = 2 ** p - 1;
  const out = new Float64Array(fine.length);
  for (let i = 0; i < fine.length; i++) out[i] = fine[i] + (fine[i] - coarse[i]) / d;
  return out;
}

/**
 * The row of level `lev` of the extrapolation table from the new raw value and the previous row:
 * row[0] = value, row[j] = step(row[j-1], prev[j-1], exps[j-1]).
 */
export function richardsonRow(value: number, prev: readonly number[] | undefined, exps: readonly number[]): number[] {
  const row = [value];
  if (prev) for (let j = 1; j <= prev.length; j++) row.push(richardsonStep(row[j - 1], prev[j - 1], exps[j - 1]));
  return row;
}

/** Same as richardsonRow on arrays. */
export function richardsonRowArrays(value: Float64Array, prev: readonly Float64Array[] | undefined, exps: readonly number[]): Float64Array[] {
  const row = [value];
  if (prev) for (let j = 1; j <= prev.length; j++) row.push(richardsonArrays(row[j - 1], prev[j - 1], exps[j - 1]));
  return row;
}

/**
 * Factor by which an error common to the raw values of every level (truncation, rounding) can grow through the
 * table after `levels` levels: prod_j (2^{p_j} + 1) / (2^{p_j} - 1).
 */
export function richardsonAmplification(exps: readonly number[], levels: number): number {
  let amp = 1;
  for (let j = 0; j < levels - 1 && j < exps.length; j++) amp *= (2 ** exps[j] + 1) / (2 ** exps[j] - 1);
  return amp;
}

/** Error estimate of the last diagonal entry: 2 max(|R_LL - R_{L-1,L-1}|, |R_LL - R_{L,L-1}|); Infinity before two levels. */
export function richardsonChange(rows: readonly (readonly number[])[]): number {
  const b = rows.length - 1;
  if (b < 1) return Infinity;
  const d = rows[b][b];
  return 2 * Math.max(Math.abs(d - rows[b - 1][b - 1]), Math.abs(d - rows[b][b - 1]));
}

/**
 * Error estimate of the last diagonal entry from its own last elimination step: 2 |R_LL - R_{L,L-1}|, the correction
 * that step made (the error of R_{L,L-1} in the asymptotic regime, an order above that of R_LL); Infinity before two
 * levels. Tighter than richardsonChange, which also counts the change from the previous diagonal entry (the error of
 * R_{L-1,L-1}, two orders above).
 */
export function richardsonLastStep(rows: readonly (readonly number[])[]): number {
  const b = rows.length - 1;
  if (b < 1) return Infinity;
  return 2 * Math.abs(rows[b][b] - rows[b][b - 1]);
}
