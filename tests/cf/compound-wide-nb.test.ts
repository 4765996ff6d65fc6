// Negative binomial compounds of lognormal claims with sigma 2 and 2.5 against numerical Laplace inversion in mpmath (de
// Hoog at 24 digits, every cdf and quantile cross-checked by Cohen's method; tests/fixtures/compound/generate.py
// --heavy-lognormal-nb). The atom at 0, the cdf at the fixture's points, and the quantiles and ES of every level the
// damped route takes, each within the bound the engine states and within the accuracy targets (cdf 1e-9 absolute,
// quantiles 1e-7 and ES 1e-6 relative): every level of the fixture, 0.9999 included (the truncated sums bounded by parts
// with the severity's sampled slope, lib/cf/invert/damped-slope.ts, keep the plans within the damped route's budget).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  atom0: number;
  points: { x: number; pdf: number; cdf: number }[];
  levels: { p: number; q: number; es: number | null }[];
  crossCheck: { maxCdfDifference: number };
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/compound-wide-nb.json"), "utf8")) as { lognormal: Case[] };

const ratios: Record<string, number> = {};

function within(label: string, got: number, want: number, bound: number, refErr: number, target: number, relative: boolean) {
  const d = Math.abs(got - want);
  if (!(d <= bound + refErr)) expect.fail(`${label}: got ${got}, reference ${want}, difference ${d}, stated bound ${bound}, reference uncertainty ${refErr}`);
  ratios[label.split(" ")[0]] = Math.max(ratios[label.split(" ")[0]] ?? 0, bound > 0 ? d / bound : d > 0 ? Infinity : 0);
  const err = relative ? d / Math.abs(want) : d - refErr;
  if (!(err <= target)) expect.fail(`${label}: error ${err.toExponential(2)} above the target ${target}`);
}

describe("negative binomial compounds of lognormal(0, 2 and 2.5) claims (mpmath Laplace inversion)", () => {
  it.each(fixture.lognormal.map((c) => [JSON.stringify(c.model), c] as const))("%s", (_name, c) => {
    const m = compile(c.model);
    const refErr = c.crossCheck.maxCdfDifference;
    const r = density(m, { x: c.points.map((p) => p.x) });
    // P(S = 0) = P(N = 0) = p^r (the claims have no atom)
    expect(r.atoms.length).toBe(1);
    expect(Math.abs(r.atoms[0].p - c.atom0)).toBeLessThanOrEqual(1e-15);
    c.points.forEach((p, i) => within(`cdf x=${p.x}`, r.cdf[i], p.cdf, r.diagnostics.error.cdf, refErr, 1e-9, false));
    const levels = c.levels.filter((l) => l.q > 0);
    const q = quantiles(
      m,
      levels.map((l) => l.p),
      { expectedShortfall: true },
    );
    expect(q.diagnostics.method).toBe("gil-pelaez-damped");
    levels.forEach((l, i) => {
      within(`quantile p=${l.p}`, q.x[i], l.q, q.diagnostics.quantileError[i], 0, 1e-7, true);
      within(`ES p=${l.p}`, q.expectedShortfall![i], l.es!, q.diagnostics.expectedShortfallError![i], 0, 1e-6, true);
    });
  }, 300_000);

  it("far in the tail (x up to the 0.9999 quantile) the damped route still answers with a derived bound, and says the tolerance was not met", () => {
    // at x = q_p the cdf is p (the fixture's quantiles: de Hoog at 24 digits, cross-checked by Cohen's method)
    const c = fixture.lognormal.find((k) => JSON.stringify(k.model).includes('"sigma":2.5'))!;
    const far = c.levels.filter((l) => l.p >= 0.99);
    const r = density(compile(c.model), { x: far.map((l) => l.q) });
    expect(r.diagnostics.method).toBe("gil-pelaez-damped");
    const e = r.diagnostics.error.cdf;
    far.forEach((l, i) => {
      if (!(Math.abs(r.cdf[i] - l.p) <= e + 1e-15)) expect.fail(`cdf at q_${l.p} = ${l.q}: ${r.cdf[i]} vs ${l.p}, bound ${e}`);
    });
    // before, this request fell back to the undamped route with a cdf bound of 4e-2 and a density bound of 18; the cdf and
    // sf now come from a second solution without the density (its truncation needs fewer terms)
    expect(e).toBeLessThan(1e-8);
    expect(r.diagnostics.notes.join("\n")).toMatch(/cdf and sf from a second damped solution without the density/);
    expect(r.diagnostics.error.pdf).toBeLessThan(1e-4);
    expect(r.diagnostics.tolerance).toEqual({ target: 1e-10, met: false });
    expect(r.diagnostics.notes.join("\n")).toMatch(/no damped plan reaches 1e-10 within the route's frequency budget/);
  }, 300_000);

  it("prints the worst actual/bound ratios", () => {
    console.log("worst actual/bound ratios (compound-wide-nb):", JSON.stringify(ratios));
    expect(Object.keys(ratios).length).toBe(3);
  });
});
