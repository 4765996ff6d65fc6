// The gamma kernels' binomial series past their kept terms as the compound remainder bound takes them (restPowers and
// restAt in lib/cf/compound-remainder-terms.ts: a few terms as plain powers, then one geometric closing) against mpmath's
// tails T(e, M, x) = sum_{m > M} (e)_m / m! x^m (tests/fixtures/kernel-rests/generate.py: the binomial series' closed form
// (1 - x)^-e less its partial sum, Abramowitz & Stegun 3.6.9, checked by mpmath.nsum, 50 digits): never below, and within
// a factor 4 for x = r / sigma <= 1/2, where the bound is used (sigma >= 2 r).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { restAt, restPowers } from "@/lib/cf/compound-remainder-terms";

const fx = JSON.parse(readFileSync(new URL("../fixtures/kernel-rests/rests.json", import.meta.url), "utf8")) as {
  rows: { e: number; M: number; x: number; tail: string; diff: number }[];
};

describe("kernel binomial tails (mpmath)", () => {
  it("the fixture's two methods agree", () => {
    expect(fx.rows.length).toBeGreaterThanOrEqual(100);
    for (const r of fx.rows) expect(r.diff).toBeLessThan(1e-25);
  });

  it("restAt is never below the tail and within 4 of it", () => {
    let worst = 0;
    for (const r of fx.rows) {
      const w = 0.37;
      const rp = restPowers([{ w, at: 1.5, e: r.e, r: 2, M: r.M }]);
      const bound = restAt(rp, -Math.log(r.x));
      const truth = w * Number(r.tail) * Math.pow(r.x, r.e);
      const label = JSON.stringify(r);
      expect(bound, label).toBeGreaterThanOrEqual(truth);
      expect(bound / truth, label).toBeLessThanOrEqual(4);
      worst = Math.max(worst, bound / truth);
    }
    console.log("kernel tails: worst bound / tail", worst.toFixed(3));
  });

  it("several kernels together: the sum of their tails, with the largest closing ratio", () => {
    const rows = fx.rows.filter((r) => r.x === 0.3 && r.M === 3);
    const rests = rows.map((r) => ({ w: 1, at: 0, e: r.e, r: 1, M: r.M }));
    const bound = restAt(restPowers(rests), -Math.log(0.3));
    const truth = rows.reduce((s, r) => s + Number(r.tail) * Math.pow(0.3, r.e), 0);
    expect(bound).toBeGreaterThanOrEqual(truth);
    expect(bound / truth).toBeLessThanOrEqual(4);
  });
});
