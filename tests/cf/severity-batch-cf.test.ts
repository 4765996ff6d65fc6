// The Burr XII / log-logistic and inverse gamma CFs on the inversion's equispaced frequencies, where the contour rule's
// terms are summed across t by recurrence instead of a full rule per frequency (lib/cf/families/cf-quadrature.ts,
// contourLogCfArithmetic; Burr's damped transform at z = t + i beta in lib/cf/families/burr.ts). References: Burr XII by mpmath.quad on a turned ray, cross-checked by mpmath.quad/quadosc on
// the real line (tests/fixtures/severity-cf/generate-burr.py); inverse gamma by the Bessel closed form
// 2 (-i theta t)^(alpha/2) K_alpha(2 sqrt(-i theta t)) / Gamma(alpha) (Gradshteyn & Ryzhik 3.471.9; mpmath.besselk,
// cross-checked by mpmath.quad: tests/fixtures/severity-cf/generate.py). Tolerance: the node's stated CF error.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { burr } from "@/lib/cf/families/burr";
import { inverseGamma } from "@/lib/cf/families/severities";
import type { Node } from "@/lib/cf/node";

interface Case { alpha: number; gamma?: number; theta: number; t: number; beta?: number; re: string; im: string; abs_diff: number }
const load = (f: string) => (JSON.parse(readFileSync(new URL(`../fixtures/severity-cf/${f}`, import.meta.url), "utf8")) as { cases: Case[] }).cases;
const burrCases = load("burr.json");
const igCases = load("inverse-gamma.json").filter((c) => c.beta === 0 && c.t > 0 && Number.isInteger(c.t * 20));

/**
 * phi on t = 0.05, 0.1, ..., 8 (160 equispaced frequencies, the batch route; up to 20 where a case asks) and at each t
 * alone (the rule per t); at beta > 0 the damped transform E exp(i (t + i beta) X) on the same frequencies and alone
 */
function check(node: Node, cases: Case[], label: string) {
  // 160 frequencies (to t = 8), or as many as the farthest case needs (to t = 20 for the far damped cases)
  const t = Float64Array.from({ length: Math.max(160, ...cases.map((c) => Math.round(c.t * 20))) }, (_, k) => (k + 1) / 20);
  const one = new Float64Array(1);
  const oneIm = new Float64Array(1);
  let worst = 0;
  for (const c of cases) {
    const beta = c.beta ?? 0;
    const re = new Float64Array(t.length);
    const im = new Float64Array(t.length);
    if (beta === 0) node.logCf(t, re, im);
    else node.dampedLogCf!(beta, t, re, im);
    const k = Math.round(c.t * 20) - 1;
    const routes: (readonly [string, number, number])[] = [[beta === 0 ? "equispaced" : `equispaced, damped by ${beta}`, re[k], im[k]]];
    if (beta === 0) routes.push(["alone", (node.logCf(Float64Array.of(c.t), one, oneIm), one[0]), oneIm[0]]);
    else routes.push([`alone, damped by ${beta}`, (node.dampedLogCf!(beta, Float64Array.of(c.t), one, oneIm), one[0]), oneIm[0]]);
    for (const [route, lr, li] of routes) {
      const m = Math.exp(lr);
      const pr = m * Math.cos(li);
      const pi = m * Math.sin(li);
      const diff = Math.hypot(pr - Number(c.re), pi - Number(c.im));
      expect(diff, `${label}, t = ${c.t} (${route}): phi = ${pr} + ${pi} i, expected ${c.re} + ${c.im} i, difference ${diff}, tolerance ${node.cfAbsError}`).toBeLessThanOrEqual(node.cfAbsError!);
      worst = Math.max(worst, diff);
    }
  }
  // the derived bound (rule, ends, rounding, the series' tolerance, the batch's shortcuts) stays useful
  expect(node.cfAbsError, label).toBeLessThanOrEqual(2e-13);
  console.log(`${label}: stated CF error ${node.cfAbsError!.toExponential(2)}, worst actual ${worst.toExponential(2)}`);
}

describe("Burr XII and log-logistic CFs on equispaced frequencies (and their damped transforms)", () => {
  it("the fixture's two methods agree within 1e-16", () => {
    for (const c of burrCases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-16);
    expect(burrCases.length).toBeGreaterThanOrEqual(54);
  });
  const params = [...new Set(burrCases.map((c) => `${c.alpha},${c.gamma},${c.theta}`))];
  it.each(params)("alpha, gamma, theta = %s", (p) => {
    const [alpha, gamma, theta] = p.split(",").map(Number);
    const cs = burrCases.filter((c) => `${c.alpha},${c.gamma},${c.theta}` === p);
    check(burr(alpha, gamma, theta), cs, `burr(${p})`);
  });
});

describe("inverse gamma CF on equispaced real frequencies", () => {
  const params = [...new Set(igCases.map((c) => `${c.alpha},${c.theta}`))];
  it("has cases", () => expect(params.length).toBeGreaterThanOrEqual(3));
  it.each(params)("alpha, theta = %s", (p) => {
    const [alpha, theta] = p.split(",").map(Number);
    check(inverseGamma(alpha, theta), igCases.filter((c) => `${c.alpha},${c.theta}` === p), `inverse_gamma(${p})`);
  });
});
