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
