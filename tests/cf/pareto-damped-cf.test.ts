// The pareto severity's E exp(i z X) at complex z = t + i beta (the damped transform of compounds with pareto claims):
// on the damped route's equispaced frequencies those at t >= beta come from the fixed-node rule summed by recurrence,
// those below beta (and a lone frequency) from the per-frequency rule. Both against alpha E_(alpha+1)(-i xm z)
// (DLMF 8.19.3; mpmath.expint at 30 digits, cross-checked by mpmath.quad on a rotated ray:
// tests/fixtures/severity-cf/generate-pareto.py), within the node's stated CF error.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { pareto } from "@/lib/cf/families/numeric";

interface Case { alpha: number; xm: number; k: number; beta: number; re: string; im: string; abs_diff: number }
const ref = JSON.parse(readFileSync(new URL("../fixtures/severity-cf/pareto.json", import.meta.url), "utf8")) as { cases: Case[] };

function value(re: Float64Array, im: Float64Array, k: number): [number, number] {
  const m = Math.exp(re[k]);
  return [m * Math.cos(im[k]), m * Math.sin(im[k])];
}

describe("pareto: E exp(i z X) at complex z (mpmath.expint reference)", () => {
  it("the fixture's two methods agree within 1e-25", () => {
    for (const c of ref.cases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-25);
    expect(ref.cases.length).toBeGreaterThanOrEqual(100);
  });
  const groups = new Map<string, Case[]>();
  for (const c of ref.cases) {
    const key = `${c.alpha} ${c.xm} ${c.beta}`;
    groups.set(key, [...(groups.get(key) ?? []), c]);
  }
  for (const [key, cs] of groups) {
    const [alpha, xm, beta] = key.split(" ").map(Number);
    it(`alpha ${alpha}, xm ${xm}, beta ${beta}: t = 0.1, 0.2, ..., 8 in one row, and each frequency alone`, () => {
      const node = pareto(alpha, xm);
      const tol = node.cfAbsError!;
      const t = Float64Array.from({ length: 80 }, (_, k) => (k + 1) / 10);
      const re = new Float64Array(t.length);
      const im = new Float64Array(t.length);
      node.dampedLogCf!(beta, t, re, im);
      const one = { re: new Float64Array(1), im: new Float64Array(1) };
      for (const c of cs) {
        const want = [Number(c.re), Number(c.im)];
        const [pr, pi] = value(re, im, c.k - 1);
        const diff = Math.hypot(pr - want[0], pi - want[1]);
        expect(diff, `row, t = ${t[c.k - 1]}: phi = ${pr} + ${pi} i, expected ${c.re} + ${c.im} i, difference ${diff}, stated ${tol}`).toBeLessThanOrEqual(tol);
        node.dampedLogCf!(beta, Float64Array.of(t[c.k - 1]), one.re, one.im);
        const [qr, qi] = value(one.re, one.im, 0);
        const d1 = Math.hypot(qr - want[0], qi - want[1]);
        expect(d1, `alone, t = ${t[c.k - 1]}: phi = ${qr} + ${qi} i, expected ${c.re} + ${c.im} i, difference ${d1}, stated ${tol}`).toBeLessThanOrEqual(tol);
      }
    });
  }
});
