// The Richardson exponents of the power-tail ladders (lib/cf/invert/richardson.ts): the set
// {sum_k j_k b_k + i + shift : j_k >= 0, sum_k j_k >= 1, i >= 0}, positive, increasing, the first `count`. Expected
// lists written out by hand from that definition (common practice: the aliasing expansion of power tails).
import { describe, expect, it } from "vitest";
import { richardsonExponents, richardsonExponentsMulti } from "@/lib/cf/invert/richardson";

const CASES: { bases: number[]; shift: number; count: number; expected: number[]; why: string }[] = [
  // j 1.5 + i: 1.5, 2.5, 3 (2 x 1.5), 3.5, 4 (3 + 1), 4.5 (3 x 1.5 or 3.5 + 1)
  { bases: [1.5], shift: 0, count: 6, expected: [1.5, 2.5, 3, 3.5, 4, 4.5], why: "one base" },
  // 1.2, 2, 2.2, 2.4, 3, 3.2, 3.4, 3.6, 4 less 1, the non-positive left out
  { bases: [1.2, 2], shift: -1, count: 5, expected: [0.2, 1, 1.2, 1.4, 2], why: "two bases, shifted down" },
  // 0.7, 1.4, 1.7, 2.1, 2.4, 2.7 (0.7 + 2) plus 1
  { bases: [0.7], shift: 1, count: 6, expected: [1.7, 2.4, 2.7, 3.1, 3.4, 3.7], why: "shifted up (the density's exponents)" },
  // duplicates, non-finite and non-positive bases are ignored: the same as [1.5]
  { bases: [1.5, 1.5, Infinity, NaN, -2, 0], shift: 0, count: 4, expected: [1.5, 2.5, 3, 3.5], why: "bases cleaned" },
  { bases: [], shift: 0, count: 4, expected: [], why: "no base" },
];

describe("Richardson exponents of several power terms", () => {
  for (const c of CASES) {
    it(`${c.why}: bases ${JSON.stringify(c.bases)}, shift ${c.shift}`, () => {
      const got = richardsonExponentsMulti(c.bases, c.shift, c.count);
      // exact to the 1e-9 grid the exponents are rounded to
      expect(got.length, `got ${JSON.stringify(got)}`).toBe(c.expected.length);
      got.forEach((v, i) => expect(Math.abs(v - c.expected[i]), `${i}: ${v} vs ${c.expected[i]}`).toBeLessThanOrEqual(1e-9));
    });
  }

  it("one base gives the single-index list (richardsonExponents)", () => {
    for (const alpha of [0.5, 1.1, 1.7, 2.5])
      for (const shift of [-1, 0, 1]) {
        const a = richardsonExponentsMulti([alpha], shift, 10);
        const b = richardsonExponents(alpha, shift, 10);
        expect(a.length).toBe(b.length);
        a.forEach((v, i) => expect(Math.abs(v - b[i]), `alpha ${alpha} shift ${shift}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`).toBeLessThanOrEqual(1e-9));
      }
  });
});
