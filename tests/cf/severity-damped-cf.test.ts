// Inverse gamma severities in compounds are continuous by default (the damped transform), like lognormal and pareto.
// Checks: (1) the severity's E exp(i z X) at complex z = t + i beta against the Bessel closed form
// 2 (-i theta z)^(alpha/2) K_alpha(2 sqrt(-i theta z)) / Gamma(alpha) (Gradshteyn & Ryzhik 3.471.9; mpmath.besselk at
// 30 digits, cross-checked by mpmath.quad of the density: tests/fixtures/severity-cf/generate.py), within the node's
// stated CF error; (2) compounds whose law is known in closed form from the severity's: one claim for sure (S = X) and a
// Bernoulli(p) count (F_S = 1 - p + p F_X), against the mpmath inverse gamma cdf of tests/fixtures/direct/families.json
// (Loss Models, 5th ed., app. A.2.3.3: F(x) = Q(alpha, theta/x)), within the reported bound and 1e-9 absolute.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, density } from "@/lib/cf";
import { inverseGamma } from "@/lib/cf/families/severities";
import type { Model } from "@/lib/cf/types";

interface Case { alpha: number; theta: number; t: number; beta: number; re: string; im: string; abs_diff: number }
const cf = JSON.parse(readFileSync(new URL("../fixtures/severity-cf/inverse-gamma.json", import.meta.url), "utf8")) as { cases: Case[] };
interface Fam { model: { family: string; alpha?: number; theta?: number }; points: { x: string; cdf: string; sf: string }[] }
const direct = JSON.parse(readFileSync(new URL("../fixtures/direct/families.json", import.meta.url), "utf8")) as { families: Fam[] };

describe("inverse gamma: E exp(i z X) at complex z (the damped transform)", () => {
  it("the fixture's two methods agree within 1e-14", () => {
    for (const c of cf.cases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-14);
    expect(cf.cases.length).toBeGreaterThanOrEqual(15);
  });
  it.each(cf.cases.map((c) => [`alpha ${c.alpha}, theta ${c.theta}, z = ${c.t} + ${c.beta} i`, c] as const))("%s", (_n, c) => {
    const node = inverseGamma(c.alpha, c.theta);
    const re = new Float64Array(1);
    const im = new Float64Array(1);
    node.dampedLogCf!(c.beta, Float64Array.of(c.t), re, im);
    const m = Math.exp(re[0]);
    const pr = m * Math.cos(im[0]);
    const pi = m * Math.sin(im[0]);
    const diff = Math.hypot(pr - Number(c.re), pi - Number(c.im));
    // the node's stated CF error (derived: lib/cf/families/severities.ts, inverseGammaRuleError) and the reference's own
    const tol = node.cfAbsError! + c.abs_diff;
    expect(diff, `phi = ${pr} + ${pi} i, expected ${c.re} + ${c.im} i, difference ${diff}, tolerance ${tol}`).toBeLessThanOrEqual(tol);
    expect(node.cfAbsError!).toBeLessThanOrEqual(2e-13);
  });
});

describe("inverse gamma: the same values on equispaced frequencies (the batch rule summed by recurrence)", () => {
  for (const [alpha, theta] of [[3, 2], [1.5, 0.5], [4.99, 0.502]] as const) {
    for (const beta of [0, 0.2, 0.3, 1]) {
      const cs = cf.cases.filter((c) => c.alpha === alpha && c.theta === theta && c.beta === beta && c.t > 0);
      if (cs.length === 0) continue;
      it(`alpha ${alpha}, theta ${theta}, beta ${beta}: t = 0.1, 0.2, ..., 8`, () => {
        const node = inverseGamma(alpha, theta);
        const t = Float64Array.from({ length: 80 }, (_, k) => (k + 1) / 10);
        const re = new Float64Array(t.length);
        const im = new Float64Array(t.length);
        node.dampedLogCf!(beta, t, re, im);
        for (const c of cs) {
          const k = Math.round(c.t * 10) - 1;
          const m = Math.exp(re[k]);
          const diff = Math.hypot(m * Math.cos(im[k]) - Number(c.re), m * Math.sin(im[k]) - Number(c.im));
          // the node's stated CF error (the rule's plus the recurrence's, lib/cf/families/severities.ts)
          expect(diff, `t = ${t[k]}, beta ${beta}: phi = ${m * Math.cos(im[k])} + ${m * Math.sin(im[k])} i, expected ${c.re} + ${c.im} i, difference ${diff}, tolerance ${node.cfAbsError}`).toBeLessThanOrEqual(node.cfAbsError!);
        }
      });
    }
  }
});

describe("compounds of an inverse gamma severity stay continuous", () => {
  const fam = direct.families.find((f) => f.model.family === "inverse_gamma" && f.model.alpha === 3 && f.model.theta === 2)!;
  const pts = fam.points.filter((p) => Number(p.x) > 0.05 && Number(p.x) < 200);
  for (const [label, count, p] of [
    ["one claim for sure", { family: "point", at: 1 }, 1],
    ["a Bernoulli(0.3) count", { family: "bernoulli", p: 0.3 }, 0.3],
  ] as const) {
    it(`${label}: F_S(x) = 1 - p + p F_X(x)`, () => {
      const model = { compound: { count, each: { family: "inverse_gamma", alpha: 3, theta: 2 } } } as Model;
      const m = compile(model);
      const xs = pts.map((q) => Number(q.x));
      const r = density(m, { x: xs });
      expect(r.diagnostics.method, JSON.stringify(r.diagnostics.notes)).not.toMatch(/discret|lattice/);
      expect(r.pdf, "a density, not a table").toBeDefined();
      for (let i = 0; i < xs.length; i++) {
        const ref = 1 - p + p * Number(pts[i].cdf);
        const diff = Math.abs(r.cdf[i] - ref);
        const msg = `${JSON.stringify(model)} at ${xs[i]}: cdf ${r.cdf[i]}, expected ${ref}, difference ${diff}, bound ${r.diagnostics.error.cdf}`;
        expect(diff, msg).toBeLessThanOrEqual(r.diagnostics.error.cdf);
        expect(diff, msg).toBeLessThanOrEqual(1e-9);
      }
    });
  }
});
