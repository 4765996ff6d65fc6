// Sums of gamma terms and compounds of pareto (and exponential) claims on the damped route with derived truncation bounds
// (the claims' majorant from 0, lib/cf/claims-from.ts; the kernels above the lower end in the kernel rest,
// lib/cf/damped-kernel-rest.ts): no sampled-envelope note, and every cdf, quantile and ES within its stated bound of the
// mpmath Laplace inversion (tests/fixtures/pareto-compound-sums/generate.py: de Hoog, checked by Cohen's method).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { compile, density, quantiles } from "@/lib/cf";
import { DAMPED_SAMPLED_NOTE } from "@/lib/cf/invert/damped-psi";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  points: { x: number; cdf: number; cdfErr: number }[];
  levels: { p: number; q: number; qErr: number; es: number; esErr: number }[];
}
const cases = (JSON.parse(readFileSync(new URL("../fixtures/pareto-compound-sums/pareto-compound-sums.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

describe("gamma + pareto-compound sums: derived truncation bounds, answers within them (tests/fixtures/pareto-compound-sums)", () => {
  it.each(cases.map((c, i) => ({ name: `case ${i}: ${JSON.stringify(c.model).slice(0, 120)}`, c })))("$name", ({ c }) => {
    const r = density(compile(c.model), { x: c.points.map((p) => p.x) });
    expect(r.diagnostics.notes).not.toContain(DAMPED_SAMPLED_NOTE);
    c.points.forEach((p, j) => {
      expect(Math.abs(r.cdf[j] - p.cdf), `x = ${p.x} cdf`).toBeLessThanOrEqual(r.diagnostics.pointError!.cdf[j] + p.cdfErr);
    });
    const q = quantiles(compile(c.model), c.levels.map((l) => l.p), { expectedShortfall: true });
    expect(q.diagnostics.notes).not.toContain(DAMPED_SAMPLED_NOTE);
    c.levels.forEach((l, i) => {
      expect(Math.abs(q.x[i] - l.q), `p = ${l.p} quantile`).toBeLessThanOrEqual(q.diagnostics.quantileError[i] + l.qErr);
      expect(Math.abs(q.expectedShortfall![i] - l.es), `p = ${l.p} ES`).toBeLessThanOrEqual(q.diagnostics.expectedShortfallError![i] + l.esErr);
    });
  });
});
