// The pareto severity's E exp(i z X) at complex z = t + i beta (the damped transform of compounds with pareto claims):
// on the damped route's equispaced frequencies those at t >= beta come from the fixed-node rule summed by recurrence,
// those below beta (and a lone frequency) from the per-frequency rule. Both against alpha E_(alpha+1)(-i xm z)
// (DLMF 8.19.3; mpmath.expint at 30 digits, cross-checked by mpmath.quad on a rotated ray:
// tests/fixtures/severity-cf/generate-pareto.py), within the node's per-frequency CF error bound (dampedErrorAt, at most
// the stated constant one); the rectangular transform (a Poisson compound's route) likewise, and lomax(alpha, theta) =
// pareto(alpha, xm = theta) - theta against the same reference times e^{-(i t - beta) theta} (the shift, exact in law; its
// products in double add 8 eps of |phi|).
import { describe, expect, it } from "vitest";
import { checkDampedRow } from "./cx-helpers";
import { readFileSync } from "node:fs";
import { pareto } from "@/lib/cf/families/numeric";
import { lomax } from "@/lib/cf/families/severities";

interface Case { alpha: number; xm: number; k: number; beta: number; re: string; im: string; abs_diff: number }
const ref = JSON.parse(readFileSync(new URL("../fixtures/severity-cf/pareto.json", import.meta.url), "utf8")) as { cases: Case[] };

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
      const at = node.dampedErrorAt!;
      expect(at.cf).toBe(node.dampedLogCf);
      checkDampedRow(node, beta, cs.map((c) => ({ index: c.k - 1, re: c.re, im: c.im })), expect, (t) => at.at(beta, t));
    });
    it(`alpha ${alpha}, xm ${xm}, beta ${beta}: the rectangular transform and lomax(${alpha}, ${xm}), within the per-frequency bound`, () => {
      const t = Float64Array.from({ length: 80 }, (_, i) => (i + 1) / 10);
      const re = new Float64Array(t.length);
      const im = new Float64Array(t.length);
      const node = pareto(alpha, xm);
      node.dampedCf!(beta, t, re, im);
      const lx = lomax(alpha, xm);
      expect(lx.dampedErrorAt!.cf).toBe(lx.dampedLogCf);
      const lr = new Float64Array(t.length);
      const li = new Float64Array(t.length);
      lx.dampedLogCf!(beta, t, lr, li);
      for (const c of cs) {
        const k = c.k - 1;
        const [wr, wi] = [Number(c.re), Number(c.im)];
        const d = Math.hypot(re[k] - wr, im[k] - wi);
        const tol = node.dampedErrorAt!.at(beta, t[k]);
        expect(d, `rect, t = ${t[k]}: ${re[k]} + ${im[k]} i, expected ${c.re} + ${c.im} i, difference ${d}, bound ${tol}`).toBeLessThanOrEqual(tol);
        // lomax: the reference times e^{beta xm} e^{-i t xm}
        const g = Math.exp(beta * xm);
        const [cs_, sn] = [Math.cos(t[k] * xm), Math.sin(t[k] * xm)];
        const [vr, vi] = [g * (wr * cs_ + wi * sn), g * (wi * cs_ - wr * sn)];
        const m = Math.exp(lr[k]);
        const [pr, pi] = [m * Math.cos(li[k]), m * Math.sin(li[k])];
        const dl = Math.hypot(pr - vr, pi - vi);
        const tl = lx.dampedErrorAt!.at(beta, t[k]) + 8 * Number.EPSILON * Math.hypot(vr, vi);
        expect(lx.dampedErrorAt!.at(beta, t[k])).toBeLessThanOrEqual(lx.cfAbsError!);
        expect(dl, `lomax, t = ${t[k]}: ${pr} + ${pi} i, expected ${vr} + ${vi} i, difference ${dl}, bound ${tl}`).toBeLessThanOrEqual(tl);
      }
    });
    it(`alpha ${alpha}, xm ${xm}, beta ${beta}: the modulus bound (dampedErrorAt.modulus) holds the reference's modulus, pareto and lomax`, () => {
      const pm = pareto(alpha, xm).dampedErrorAt!.modulus!;
      const lm = lomax(alpha, xm).dampedErrorAt!.modulus!;
      for (const c of cs) {
        const t = c.k / 10;
        const m = Math.hypot(Number(c.re), Number(c.im));
        expect(m, `pareto t = ${t}`).toBeLessThanOrEqual(pm(beta, t));
        // lomax: the same transform times e^{beta xm} in modulus
        expect(m * Math.exp(beta * xm), `lomax t = ${t}`).toBeLessThanOrEqual(lm(beta, t));
      }
    });
  }
});
