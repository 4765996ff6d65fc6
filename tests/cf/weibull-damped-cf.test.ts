// The weibull severity's E exp(i z X) at complex z = t + i beta (the damped transform of compounds with weibull claims),
// on a row of equispaced frequencies as the damped route asks and at each frequency alone, against mpmath.quad along
// the real axis at 30 digits, cross-checked on a rotated ray and, at shape 1, by the exponential law's
// 1 / (1 - i lambda z) (tests/fixtures/severity-cf/generate-weibull.py), within the node's stated CF error.
import { describe, expect, it } from "vitest";
import { checkDampedRow } from "./cx-helpers";
import { readFileSync } from "node:fs";
import { weibull } from "@/lib/cf/families/numeric";

interface Case { k: number; lambda: number; j: number; beta: number; re: string; im: string; abs_diff: number; closed_diff?: number }
const ref = JSON.parse(readFileSync(new URL("../fixtures/severity-cf/weibull.json", import.meta.url), "utf8")) as { cases: Case[] };

describe("weibull: E exp(i z X) at complex z (mpmath reference)", () => {
  it("the fixture's methods agree within 1e-25", () => {
    for (const c of ref.cases) {
      expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-25);
      if (c.closed_diff !== undefined) expect(c.closed_diff, JSON.stringify(c)).toBeLessThan(1e-25);
    }
    expect(ref.cases.length).toBeGreaterThanOrEqual(80);
  });
  const groups = new Map<string, Case[]>();
  for (const c of ref.cases) {
    const key = `${c.k} ${c.lambda} ${c.beta}`;
    groups.set(key, [...(groups.get(key) ?? []), c]);
  }
  for (const [key, cs] of groups) {
    const [k, lambda, beta] = key.split(" ").map(Number);
    it(`shape ${k}, scale ${lambda}, beta ${beta}: t = 0.1, 0.2, ..., 8 in one row, and each frequency alone`, () => {
      checkDampedRow(weibull(k, lambda), beta, cs.map((c) => ({ index: c.j - 1, re: c.re, im: c.im })), expect);
    });
  }
});
