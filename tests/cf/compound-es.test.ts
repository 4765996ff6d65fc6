// Far-tail expected shortfall of a Poisson-lognormal compound against tests/fixtures/compound/compound-es.json
// (generate_es.py beside it: mpmath.invertlaplace at 30 digits, de Hoog and Talbot, their difference written as esErr).
// compound.json's ES at these levels comes from a double-precision FFT and is off by 8e-3 at p = 0.9999 (1/(1 - p) times
// its summation's rounding), more than a tight bound: these references judge the bound itself.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  levels: { p: number; q: string; es: string; esErr: number }[];
}
const f = JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/compound-es.json"), "utf8")) as { cases: Case[] };

describe("far-tail ES of Poisson-lognormal compounds within their bounds (mpmath Laplace inversion, 30 digits)", () => {
  expect(f.cases.length).toBeGreaterThanOrEqual(1);
  for (const c of f.cases) {
    it(JSON.stringify(c.model), () => {
      const r = quantiles(compile(c.model), c.levels.map((l) => l.p), { expectedShortfall: true });
      c.levels.forEach((l, i) => {
        const q = Number(l.q);
        const es = Number(l.es);
        // the reference's own uncertainty: the two inversions' difference and its rounding to a double
        const ref = l.esErr + 2.3e-16 * es;
        const eq = r.diagnostics.quantileError[i];
        const ee = r.diagnostics.expectedShortfallError![i];
        const msg = `${JSON.stringify(c.model)} p=${l.p}: q ${r.x[i]} reference ${q} bound ${eq}; ES ${r.expectedShortfall![i]} reference ${es} bound ${ee}`;
        expect(Math.abs(r.x[i] - q), msg).toBeLessThanOrEqual(eq + 2.3e-16 * q);
        expect(Math.abs(r.expectedShortfall![i] - es), msg).toBeLessThanOrEqual(ee + ref);
        // and the bound says something: below 1e-6 of the value
        expect(ee, msg).toBeLessThan(1e-6 * es);
      });
    });
  }
});

// A level at most P(N = 0) of a compound of positive claims has quantile 0 exactly, and ES_p = E S / (1 - p) with
// E S = lambda e^{mu + sigma^2/2} (Loss Models, compound Poisson mean; lognormal mean, JKB vol. 1, ch. 14). Asked with
// far-tail levels, Poisson(1)-lognormal(0, 2.5) went by the heavy route, which answered -2170 +- 2170 at p = 0.001; the
// damped route now takes all ten levels.
describe("levels inside the atom at 0 of a compound (closed form)", () => {
  it("Poisson(1)-lognormal(0, 2.5): q = 0 exactly and ES = E S / (1 - p) below P(N = 0) = e^-1", () => {
    const model = { compound: { count: { family: "poisson", lambda: 1 }, each: { family: "lognormal", mu: 0, sigma: 2.5 } } } as Model;
    // compound-wide.json's levels, the far ones included
    const levels = [0.001, 0.01, 0.1, 0.5, 0.9, 0.95, 0.99, 0.995, 0.999, 0.9999];
    const r = quantiles(compile(model), levels, { expectedShortfall: true });
    expect(r.diagnostics.method).toBe("gil-pelaez-damped");
    const mean = Math.exp(2.5 ** 2 / 2);
    levels.forEach((p, i) => {
      const q = r.x[i];
      const eq = r.diagnostics.quantileError[i];
      const ee = r.diagnostics.expectedShortfallError![i];
      const msg = `p=${p}: q ${q} bound ${eq}, ES ${r.expectedShortfall![i]} bound ${ee}`;
      // every answer in the support [0, inf) with its bound
      expect(q, msg).toBeGreaterThanOrEqual(0);
      if (p < Math.exp(-1)) {
        expect(q, msg).toBe(0);
        expect(eq, msg).toBe(0);
        const want = mean / (1 - p);
        expect(Math.abs(r.expectedShortfall![i] - want), msg).toBeLessThanOrEqual(ee + 4e-16 * want);
        expect(ee, msg).toBeLessThan(1e-12 * want);
      }
    });
    // the far levels take a few seconds of CPU on a shared machine
  }, 240_000);
});
