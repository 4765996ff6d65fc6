// The beta CF on the inversion's equispaced frequencies: where the two ray integrals are summed across t by recurrence
// (lib/cf/families/bounded.ts, raysBatch) instead of a quadrature per frequency. Reference: Kummer's function
// 1F1(alpha; alpha + beta; i tau) (A&S 13.1.2; mpmath.hyp1f1 at 40 digits), cross-checked by mpmath.quad of the density
// (tests/fixtures/beta-cf/generate.py). Tolerance: the node's stated CF error.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { betaLaw } from "@/lib/cf/families/bounded";

interface Case { alpha: number; beta: number; tau: number; re: string; im: string; abs_diff: number }
const cases = (JSON.parse(readFileSync(new URL("../fixtures/beta-cf/beta.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

describe("beta CF on equispaced frequencies (the rays summed across t)", () => {
  it("the fixture's two methods agree within 1e-20", () => {
    for (const c of cases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-20);
    expect(cases.length).toBeGreaterThanOrEqual(24);
  });
  const params = [...new Set(cases.map((c) => `${c.alpha},${c.beta}`))];
  it.each(params)("alpha, beta = %s: t = 0.5, 1, ..., 1200 on [0, 1] and on [-1, 3]", (p) => {
    const [alpha, beta] = p.split(",").map(Number);
    for (const [a, b] of [[0, 1], [-1, 3]] as const) {
      const node = betaLaw(alpha, beta, a, b);
      const w = b - a;
      // tau = w t on a grid through every tau of the fixture
      const t = Float64Array.from({ length: 2400 }, (_, k) => (k + 1) / (2 * w));
      const re = new Float64Array(t.length);
      const im = new Float64Array(t.length);
      node.logCf(t, re, im);
      for (const c of cases.filter((x) => `${x.alpha},${x.beta}` === p)) {
        const k = Math.round(2 * c.tau) - 1;
        // phi_X(t) = e^{i a t} phi_Y(w t)
        const m = Math.exp(re[k]);
        const ph = im[k] - a * t[k];
        const pr = m * Math.cos(ph);
        const pi = m * Math.sin(ph);
        const diff = Math.hypot(pr - Number(c.re), pi - Number(c.im));
        expect(diff, `beta(${p}) on [${a}, ${b}], tau = ${c.tau}: phi = ${pr} + ${pi} i, expected ${c.re} + ${c.im} i, difference ${diff}, tolerance ${node.cfAbsError}`).toBeLessThanOrEqual(node.cfAbsError!);
      }
    }
  });
});
