// A damped grid that starts below the support's lower end (as a mixture with a law on the whole line asks) keeps the
// per-point image bound from its first point in the support: compound Poisson of exponential claims against its Erlang
// mixture F(x) = e^{-lambda} + sum_n e^{-lambda} lambda^n / n! P(n, r x) (Loss Models, compound models; common practice),
// P by @stdlib gammainc.
import gammainc from "@stdlib/math-base-special-gammainc";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";

const lambda = 19.2;
const rate = 1.86;
function erlangMixture(x: number): number {
  if (x < 0) return 0;
  let p = Math.exp(-lambda);
  let F = p;
  for (let n = 1; n < 200; n++) {
    p *= lambda / n;
    F += p * gammainc(rate * x, n);
  }
  return F;
}

describe("damped grid from below the support", () => {
  it("Poisson(19.2) x exponential(1.86) on [-29.2, 87.4]: the same bound as from 0, every cdf within it", () => {
    const m = compile({ compound: { count: { family: "poisson", lambda }, each: { family: "exponential", rate } } } as Model);
    const below = density(m, { grid: { from: -29.2, to: 87.4, count: 1000 } });
    const from0 = density(m, { grid: { from: 0, to: 87.4, count: 1000 } });
    expect(below.diagnostics.method).toBe("fft-damped");
    // before, 5.7e-4 (the uniform image bound kept for the first points in the support)
    expect(below.diagnostics.error.cdf).toBeLessThan(1e-10);
    expect(below.diagnostics.error.cdf).toBeLessThan(10 * from0.diagnostics.error.cdf);
    below.x.forEach((x, i) => {
      const want = erlangMixture(x);
      const e = below.diagnostics.pointError!.cdf[i];
      if (!(Math.abs(below.cdf[i] - want) <= e + 1e-15)) expect.fail(`cdf at ${x}: ${below.cdf[i]} vs ${want}, bound ${e}`);
    });
  });
});
