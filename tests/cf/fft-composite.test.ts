// Transforms of composite size m 2^p (lib/cf/fftplan.ts forwardRange, the damped grids' periods) against the DFT by its
// definition, and the sizes compositeSize picks.
import { describe, expect, it } from "vitest";
import { combineRounding, compositeSize, forwardRange, splitSize } from "@/lib/cf/fftplan";

const u = Number.EPSILON / 2;

/**
 * X_j = sum_n x_n e^{-2 pi i j n / N} by its definition (common practice): the twiddles from a table of cos and sin of
 * 2 pi k / N, k = j n mod N an exact integer (each within 21 u: the angle's three roundings below 2 pi and the functions'
 * ulp), the sum compensated (Neumaier), so within 32 u of sum |x_n|
 */
function definition(x: Float64Array, N: number, j: number, cs: Float64Array, sn: Float64Array): [number, number] {
  let sr = 0;
  let cr = 0;
  let si = 0;
  let ci = 0;
  const add = (s: number, c: number, v: number): [number, number] => {
    const t = s + v;
    return [t, c + (Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s)];
  };
  for (let n = 0; n < N; n++) {
    const k = (j * n) % N;
    const wr = cs[k];
    const wi = -sn[k];
    [sr, cr] = add(sr, cr, x[2 * n] * wr - x[2 * n + 1] * wi);
    [si, ci] = add(si, ci, x[2 * n] * wi + x[2 * n + 1] * wr);
  }
  return [sr + cr, si + ci];
}

describe("forwardRange", () => {
  // [N, first output, count]: powers of two, every odd factor, outputs from the start, the middle and the end
  const CASES: [number, number, number][] = [
    [16, 0, 16],
    [12, 0, 12],
    [20, 3, 10],
    [28, 0, 28],
    [36, 30, 6],
    [44, 0, 44],
    [52, 7, 40],
    [60, 0, 60],
    [3 * 1024, 100, 1000],
    [15 * 512, 7000, 680],
    [5 * 2048, 0, 1000],
  ];
  it.each(CASES)("N = %i, outputs %i + %i: within the transform's allowance of the definition", (N, j0, count) => {
    // a deterministic spread of sizes and signs (a linear congruential sequence)
    let seed = 12345 + N;
    const next = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
    const input = new Float64Array(2 * N);
    let abs = 0;
    for (let n = 0; n < N; n++) {
      input[2 * n] = next() * Math.exp(3 * next());
      input[2 * n + 1] = next();
      abs += Math.hypot(input[2 * n], input[2 * n + 1]);
    }
    const cs = new Float64Array(N);
    const sn = new Float64Array(N);
    for (let k = 0; k < N; k++) {
      cs[k] = Math.cos((2 * Math.PI * k) / N);
      sn[k] = Math.sin((2 * Math.PI * k) / N);
    }
    const before = Float64Array.from(input);
    const out = new Float64Array(2 * count);
    forwardRange(N, input, j0, count, out);
    const { P } = splitSize(N);
    // 16 u a radix-2 level (the allowance ../../lib/cf/invert/fft.ts GRID_REL takes), the combining step, and the
    // definition's own 32 u
    const tol = (16 * Math.log2(P) + combineRounding(N) + 32) * u * abs;
    let worst = 0;
    let at = -1;
    for (let q = 0; q < count; q++) {
      const [er, ei] = definition(input, N, j0 + q, cs, sn);
      const d = Math.hypot(out[2 * q] - er, out[2 * q + 1] - ei);
      if (d > worst) {
        worst = d;
        at = j0 + q;
      }
    }
    expect(worst, `N ${N}: worst |X_j - definition| ${worst.toExponential(3)} at j = ${at}, tolerance ${tol.toExponential(3)}`).toBeLessThanOrEqual(tol);
    expect(Array.from(input)).toEqual(Array.from(before));
  });
});

describe("compositeSize", () => {
  it.each([1, 2, 3, 4, 5, 9, 17, 33, 100, 1000, 1025, 9748, 16385, 1 << 20])("n = %i: a size forwardRange takes, at least n, at most 9/8 n past 32", (n) => {
    const N = compositeSize(n);
    const { m, P } = splitSize(N);
    expect(N).toBeGreaterThanOrEqual(n);
    expect(m % 2).toBe(1);
    expect(m).toBeLessThanOrEqual(15);
    expect(P === N || P >= 4).toBe(true);
    if (n > 32) expect(N, `n ${n}: N ${N}`).toBeLessThanOrEqual((9 / 8) * n);
    // the least such size: no m' 2^p' in [n, N) (brute force over the odd factors and powers; powers of two from 2)
    for (let mm = 1; mm <= 15; mm += 2)
      for (let p = mm === 1 ? 2 : 4; mm * p < N; p *= 2) expect(mm * p < n, `n ${n}: ${mm} * ${p} fits below ${N}`).toBe(true);
  });
});
