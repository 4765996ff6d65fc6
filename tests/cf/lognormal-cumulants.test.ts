// Lognormal cumulants to order 40 against tests/fixtures/lognormal-cumulants/lognormal-cumulants.json (generate.py beside
// it: mpmath at 400 digits, the moment-cumulant recursion and the connected-graph sum with exact counts): each value
// within 1e-13 relative of the reference, its actual error never above the stated bound, the looseness printed.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";

type Pair = [number, number] | null;
interface Case {
  model: { family: "lognormal"; mu: number; sigma: number };
  cumulants: Pair[];
  crossCheck: { maxRelativeDifference: number };
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/lognormal-cumulants/lognormal-cumulants.json"), "utf8")) as { order: number; cases: Case[] };

/** relative tolerance on each cumulant: every term of the graph sum is non-negative, so the error stays a few hundred ulps */
const REL = 1e-13;
const ratios: number[] = [];

describe("lognormal cumulants (mpmath, two methods: tests/fixtures/lognormal-cumulants/generate.py)", () => {
  for (const c of fixture.cases) {
    it(`mu ${c.model.mu}, sigma ${c.model.sigma}, orders 1..${fixture.order}`, () => {
      expect(c.crossCheck.maxRelativeDifference, "the generator's two methods disagree").toBeLessThan(1e-30);
      // the compiled model's cumulants and their bounds to order 40 (the moments endpoint stops at 12; the tail bounds of
      // compounds ask for more)
      const m = compile(c.model);
      const r = { cumulants: m.cumulants(fixture.order), cumulantError: m.cumulantErrors!(fixture.order) };
      let checked = 0;
      c.cumulants.forEach((ref, i) => {
        const got = r.cumulants[i];
        const bound = r.cumulantError[i];
        const label = `${JSON.stringify(c.model)} kappa_${i + 1}: value ${got}, reference ${ref?.[0]} + ${ref?.[1]}, bound ${bound}`;
        // past the double range the reference is null and the engine's value is not finite
        if (ref === null) return expect(got === null || !Number.isFinite(got), label).toBe(true);
        expect(got, label).not.toBeNull();
        expect(bound, label).not.toBeNull();
        const act = Math.abs((got as number) - ref[0] - ref[1]);
        const refUnc = 1e-30 * Math.abs(ref[0]);
        expect(act, `${label}: error ${act} beyond ${REL} relative`).toBeLessThanOrEqual(REL * Math.abs(ref[0]));
        expect(act, `${label}: error ${act} above the bound (+ reference uncertainty ${refUnc})`).toBeLessThanOrEqual((bound as number) + refUnc);
        if (act > refUnc) ratios.push((bound as number) / act);
        checked++;
      });
      expect(checked, "cumulants compared").toBeGreaterThan(10);
    });
  }
  afterAll(() => {
    const s = [...ratios].sort((a, b) => a - b);
    if (s.length) console.log(`lognormal cumulants: ${s.length} values, bound/actual median ${s[s.length >> 1].toExponential(1)}, worst ${s[s.length - 1].toExponential(1)}`);
  });
});
