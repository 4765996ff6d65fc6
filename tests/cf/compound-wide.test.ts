// Compound Poisson-lognormal laws with a wide severity (sigma 1.5 and 2), where the damped inversion takes the
// one-claim and two-claim terms out of the transform: the cdf against numerical Laplace inversion in mpmath (de Hoog,
// cross-checked by Cohen's method; tests/fixtures/compound/generate-wide.py). Every value within its stated bound.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  atom0: number;
  points: { x: number; cdf: number }[];
  crossCheck: { maxCdfDifference: number };
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/wide.json"), "utf8")) as { cases: Case[] };

describe("wide lognormal severities: the cdf within its bound and within 1e-9 (mpmath Laplace inversion)", () => {
  const worst = { ratio: 0, diff: 0 };
  it.each(fixture.cases.map((c) => [JSON.stringify(c.model), c] as const))("%s", (_name, c) => {
    const m = compile(c.model);
    const r = density(m, { x: c.points.map((p) => p.x) });
    expect(r.atoms[0].x).toBe(0);
    expect(Math.abs(r.atoms[0].p - c.atom0)).toBeLessThanOrEqual(1e-15);
    // a handful of points: the two-claim term pays for itself and is taken out
    expect(r.diagnostics.notes.some((n) => n.includes("two-claim term"))).toBe(true);
    const bound = r.diagnostics.error.cdf;
    c.points.forEach((p, i) => {
      const d = Math.abs(r.cdf[i] - p.cdf);
      if (!(d <= bound + c.crossCheck.maxCdfDifference))
        expect.fail(`cdf(${p.x}): got ${r.cdf[i]}, reference ${p.cdf}, difference ${d}, bound ${bound}, reference uncertainty ${c.crossCheck.maxCdfDifference}`);
      // the accuracy target: 1e-9 absolute
      expect(d).toBeLessThanOrEqual(1e-9 + c.crossCheck.maxCdfDifference);
      worst.ratio = Math.max(worst.ratio, d / bound);
      worst.diff = Math.max(worst.diff, d);
    });
  });
  it("prints the worst actual/bound ratio", () => {
    console.log("worst actual/bound (compound-wide):", JSON.stringify(worst));
    expect(worst.ratio).toBeLessThanOrEqual(1);
  });
});
