// The pareto severity's E exp(i z X) at complex z = t + i beta (the damped transform of compounds with pareto claims):
// on the damped route's equispaced frequencies those at t >= beta come from the fixed-node rule summed by recurrence,
// those below beta (and a lone frequency) from the per-frequency rule. Both against alpha E_(alpha+1)(-i xm z)
// (DLMF 8.19.3; mpmath.expint at 30 digits, cross-checked by mpmath.quad on a rotated ray:
// tests/fixtures/severity-cf/generate-pareto.py), within the node's stated CF error.
import { describe, expect, it } from "vitest";
import { checkDampedRow } from "./cx-helpers";
import { readFileSync } from "node:fs";
import { pareto } from "@/lib/cf/families/numeric";

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
      checkDampedRow(pareto(alpha, xm), beta, cs.map((c) => ({ index: c.k - 1, re: c.re, im: c.im })), expect);
    });
  }
});
