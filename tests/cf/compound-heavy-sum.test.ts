// A compound of a heavy-tailed severity inside a sum (with a gamma term): the sum's damped transform gets gamma kernels
// rebuilt from the whole law's endpoint expansion (the terms' expansions multiplied), so it stays on the damped route
// with a fast-decaying remainder. References: tests/fixtures/compound/heavy-sums.json (generate.py --sums-only: the
// rounded-down lattice compound convolved with the gamma law in closed form, extrapolated in the span; cross-checked
// by mpmath.invertlaplace, de Hoog, of the product of the terms' Laplace transforms at 30 digits, the differences
// written). Every value within the bound the engine states.
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  points: { x: number; cdf: number; sf: number; cdfErr: number }[];
  levels: { p: number; q: number; qErr: number; es: number; esErr: number }[];
  crossCheck: { maxCdfDifference: number; independent: { maxCdfDifference: number }; independentEs: { difference: number; es: number } };
}
const path = join(__dirname, "../fixtures/compound/heavy-sums.json");
const cases = existsSync(path) ? (JSON.parse(readFileSync(path, "utf8")) as { cases: Case[] }).cases : [];

function within(label: string, got: number, want: number, bound: number, refErr: number) {
  const d = Math.abs(got - want);
  expect(Number.isFinite(bound), `${label}: bound ${bound}`).toBe(true);
  if (!(d <= bound + refErr)) expect.fail(`${label}: got ${got}, reference ${want}, difference ${d}, stated bound ${bound}, reference uncertainty ${refErr}`);
}

describe("compounds of heavy severities inside sums: damped route with kernels, every bound honest", () => {
  it("has its reference cases", () => expect(cases.length).toBeGreaterThanOrEqual(2));
  it.each(cases.map((c) => [JSON.stringify(c.model), c] as const))("%s", (name, c) => {
    const m = compile(c.model);
    expect(m.dampedKernels?.length ?? 0, `${name}: kernels`).toBeGreaterThan(0);
    // the two methods of the fixture agree (de Hoog's inversion is the coarser of the two)
    expect(c.crossCheck.independent.maxCdfDifference).toBeLessThan(1e-10);
    expect(c.crossCheck.independentEs.difference).toBeLessThan(1e-10 * c.crossCheck.independentEs.es);
    const d = density(m, { x: c.points.map((p) => p.x) });
    expect(d.diagnostics.method).toMatch(/damped/);
    c.points.forEach((p, i) => {
      within(`cdf ${name} x=${p.x}`, d.cdf[i], p.cdf, d.diagnostics.error.cdf, p.cdfErr);
      within(`sf ${name} x=${p.x}`, d.sf[i], p.sf, d.diagnostics.error.cdf, p.cdfErr);
    });
    const q = quantiles(m, c.levels.map((l) => l.p), { expectedShortfall: true });
    expect(q.diagnostics.method).toBe("gil-pelaez-damped");
    expect(q.diagnostics.notes.some((n) => /gamma kernels/.test(n))).toBe(true);
    c.levels.forEach((l, i) => {
      within(`quantile ${name} p=${l.p}`, q.x[i], l.q, q.diagnostics.quantileError[i], l.qErr);
      within(`ES ${name} p=${l.p}`, q.expectedShortfall![i], l.es, q.diagnostics.expectedShortfallError![i], l.esErr);
    });
  }, 180_000);
});
