// The two-claim law of a lognormal compound (the sum of two iid lognormal claims), which the damped inversion takes
// out of the transform and adds back by Gauss-Legendre panels with a Bernstein-ellipse bound: against mpmath
// quadrature at 30 digits, two methods (tests/fixtures/lognormal-pair/generate.py). Every value within its bound.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { lognormalPair } from "@/lib/cf/lognormal-pair";

interface Case {
  mu: number;
  sigma: number;
  points: { x: number; F: number; f: number; I: number }[];
  crossCheck: { maxAbsoluteDifference: { F: number; f: number; I: number } };
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/lognormal-pair/lognormal-pair.json"), "utf8")) as { cases: Case[] };

describe("sum of two lognormal claims: cdf, density and integrated cdf within their bounds (mpmath.quad reference)", () => {
  const worst: Record<string, number> = {};
  it.each(fixture.cases.map((c) => [c.mu, c.sigma, c] as const))("lognormal(%s, %s)", (_mu, _s, c) => {
    const pair = lognormalPair(c.mu, c.sigma);
    for (const p of c.points) {
      const v = pair.at(p.x);
      for (const [k, got, want, bound] of [
        ["F", v.F, p.F, v.errF],
        ["f", v.f, p.f, v.errf],
        ["I", v.I, p.I, v.errI],
      ] as const) {
        const d = Math.abs(got - want);
        const ref = c.crossCheck.maxAbsoluteDifference[k];
        if (!(d <= bound + ref)) expect.fail(`${k}(${p.x}) mu ${c.mu} sigma ${c.sigma}: got ${got}, reference ${want}, difference ${d}, bound ${bound}, reference uncertainty ${ref}`);
        // bounds must stay useful: within 1e-12 absolute (relative to I's scale x for the integral)
        expect(bound).toBeLessThanOrEqual(k === "I" ? 1e-12 * Math.max(p.x, 1) : k === "f" ? 1e-12 * Math.max(1, p.f * 1e3) : 1e-12);
        worst[k] = Math.max(worst[k] ?? 0, d / bound);
      }
    }
  });
  // the damped route asks the quadrature for tol / 1000 a panel and only the parts it needs: the values asked for stay
  // within their (larger) bounds against the same mpmath references; the parts not asked for are NaN with an Infinity bound
  // (a compound with little mass at two claims asks for tol / (1000 P(N = 2)) a panel, up to 1e-3: the looser target
  // leaves out panels whose integrands are below it and takes fewer nodes; the values stay within their bounds)
  it.each(fixture.cases.map((c) => [c.mu, c.sigma, c] as const))("lognormal(%s, %s), panel targets 1e-12 and 1e-6, cdf alone and cdf with density", (_mu, _s, c) => {
    const pair = lognormalPair(c.mu, c.sigma);
    for (const p of c.points) {
      for (const [wantPdf, target] of [[false, 1e-12], [true, 1e-12], [false, 1e-6], [true, 1e-6]] as const) {
        const v = pair.at(p.x, wantPdf, false, target);
        const checks: [string, number, number, number, number][] = [["F", v.F, p.F, v.errF, c.crossCheck.maxAbsoluteDifference.F]];
        if (wantPdf) checks.push(["f", v.f, p.f, v.errf, c.crossCheck.maxAbsoluteDifference.f]);
        for (const [k, got, want, bound, ref] of checks) {
          const d = Math.abs(got - want);
          if (!(d <= bound + ref)) expect.fail(`${k}(${p.x}) mu ${c.mu} sigma ${c.sigma} (panel target ${target}): got ${got}, reference ${want}, difference ${d}, bound ${bound}`);
          // 46 panels at most, each within the target: the bound stays below 100 times it (times the density's scale for f)
          expect(bound).toBeLessThanOrEqual(k === "f" ? 100 * target * Math.max(1, p.f * 1e3) : 100 * target);
        }
        expect(v.I).toBeNaN();
        expect(v.errI).toBe(Infinity);
        if (!wantPdf) expect(v.errf).toBe(Infinity);
      }
    }
  });
  it("prints the worst actual/bound ratios", () => {
    console.log("worst actual/bound ratios (lognormal-pair):", JSON.stringify(worst));
    expect(Object.keys(worst).length).toBe(3);
  });
});
