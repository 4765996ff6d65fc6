// The damped majorant of lomax and pareto terms (lib/cf/damped-majorant.ts lomaxDampedMajorant: |psi| <= 2 g(0) / |s| and g(0) / |s| + 2 |g'(0)| / |s|^2,
// |psi'| <= 2 (alpha / (alpha + 1))^{alpha + 1} / t, E Y and 1 / (e beta)) against |psi| and |psi'| of the damped transform
// by mpmath at 30 digits (tests/fixtures/damped-majorant/generate_lomax.py: the exponential integral, checked by the
// incomplete gamma form), and the inversion that uses it: pareto + lognormal answers with derived truncation bounds (no
// sampled-envelope note) within its bounds of the mpmath convolution (tests/fixtures/positive-sums).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { compile, density, quantiles } from "@/lib/cf";
import { DAMPED_SAMPLED_NOTE } from "@/lib/cf/invert/damped-psi";
import type { Model } from "@/lib/cf/types";
import { majorantRowHolds } from "../support/damped-majorant-rows";

interface Row {
  alpha: number;
  theta: number;
  beta: string;
  t: string;
  abs: string;
  slope: string;
  check: number;
}
const rows = (JSON.parse(readFileSync(new URL("../fixtures/damped-majorant/lomax.json", import.meta.url), "utf8")) as { rows: Row[] }).rows;

describe("lomax and pareto damped majorants vs mpmath (tests/fixtures/damped-majorant/lomax.json)", () => {
  for (const family of ["lomax", "pareto"] as const) {
    it(`${family}: rest >= |psi| and slope >= |psi'| at every row, tight far out`, () => {
      let tightRest = 0;
      let tightSlope = 0;
      for (const r of rows) {
        const model = (family === "lomax" ? { family, alpha: r.alpha, theta: r.theta } : { family, alpha: r.alpha, xm: r.theta }) as Model;
        const m = compile(model).dampedMajorant;
        expect(m, `${family}(${r.alpha}, ${r.theta}): a damped majorant`).toBeDefined();
        const ratio = majorantRowHolds(m!, r, `${family}(${r.alpha}, ${r.theta}) beta ${r.beta} t ${r.t}`);
        if (Number(r.t) >= 100) {
          tightRest = Math.max(tightRest, ratio.rest);
          tightSlope = Math.max(tightSlope, ratio.slope);
        }
      }
      // far out |psi| ~ g(0) / t and the bound g(0) / t + 2 |g'(0)| / t^2 (by parts twice); the slope's constant is the
      // maximum of y g(y)
      expect(tightRest, `${family}: largest |psi| / rest at t >= 100`).toBeGreaterThan(0.9);
      expect(tightSlope, `${family}: largest |psi'| / slope at t >= 100`).toBeGreaterThan(0.05);
    });
  }
});

describe("pareto + lognormal: derived truncation on the damped route (tests/fixtures/positive-sums)", () => {
  const c = (
    JSON.parse(readFileSync(new URL("../fixtures/positive-sums/positive-sums.json", import.meta.url), "utf8")) as {
      cases: { name: string; model: Model; points: { x: string; pdf: string; pdf_check: number; cdf: string; check: number }[]; quantiles: { p: string; q: string; check: number }[] }[];
    }
  ).cases.find((k) => k.name.startsWith("pareto(3.935) + lognormal"))!;
  it("density and quantiles within their bounds, no sampled-envelope note", () => {
    const model = compile(c.model);
    const r = density(model, { x: c.points.map((p) => Number(p.x)) });
    expect(r.diagnostics.notes).not.toContain(DAMPED_SAMPLED_NOTE);
    expect(r.diagnostics.tolerance?.met, "the default 1e-10 reached").toBe(true);
    c.points.forEach((p, j) => {
      expect(Math.abs(r.pdf![j] - Number(p.pdf)), `x = ${p.x} pdf`).toBeLessThanOrEqual(r.diagnostics.pointError!.pdf[j] + p.pdf_check);
      expect(Math.abs(r.cdf[j] - Number(p.cdf)), `x = ${p.x} cdf`).toBeLessThanOrEqual(r.diagnostics.pointError!.cdf[j] + p.check);
    });
    const q = quantiles(model, c.quantiles.map((l) => Number(l.p)));
    expect(q.diagnostics.notes).not.toContain(DAMPED_SAMPLED_NOTE);
    c.quantiles.forEach((l, i) => {
      expect(Math.abs(q.x[i] - Number(l.q)), `p = ${l.p}`).toBeLessThanOrEqual(q.diagnostics.quantileError[i] + l.check);
    });
  });
});
