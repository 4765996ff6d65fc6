// Per-claim layer moments and their derived bounds (lib/cf/families/layer-moments.ts) against
// tests/fixtures/layer-moments/layer-moments.json (generate.py beside it: mpmath at 40 digits, each moment by a density
// integral and a survival integral, their difference written as crossCheck). Each value within 1e-10 relative of the
// reference, the actual error never above the stated bound, the bound present (not null) and the looseness printed;
// compound Poisson of a layer: the cumulants lambda E[Y^k] with their bounds. Cases include normal, truncated normal and
// uniform claims and scaled or shifted claims (a X + b, a > 0).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { moments } from "@/lib/cf";

type Pair = [number, number] | null;
interface Fixture {
  cases: { model: unknown; raw: Pair[]; crossCheck: (number | null)[] }[];
  compounds: { model: unknown; cumulants: Pair[]; crossCheck: number[] }[];
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/layer-moments/layer-moments.json"), "utf8")) as Fixture;

/** accuracy target for moments (relative) */
const TARGET = 1e-10;
const looseness: number[] = [];

function check(name: string, value: number | null, bound: number | null, ref: Pair, cross: number | null) {
  if (ref === null) {
    expect(value, `${name}: the reference says the moment does not exist`).toBeNull();
    return;
  }
  expect(value, `${name}: value missing`).not.toBeNull();
  expect(bound, `${name}: bound missing (null error field)`).not.toBeNull();
  const v = value as number;
  const b = bound as number;
  // v - hi is exact near hi (Sterbenz), so hi + lo measures the error below an ulp
  const act = Math.abs(v - ref[0] - ref[1]);
  // the reference's own uncertainty: the two methods' difference and the 32 digits of the pair
  const refUnc = ((cross ?? 0) + 1e-30) * Math.abs(ref[0]);
  const tol = TARGET * Math.abs(ref[0]);
  expect(act, `${name}: value ${v}, reference ${ref[0]} + ${ref[1]}, error ${act} beyond ${tol} (1e-10 relative)`).toBeLessThanOrEqual(tol);
  expect(act, `${name}: value ${v}, reference ${ref[0]} + ${ref[1]}, actual error ${act} above the bound ${b} (+ reference uncertainty ${refUnc})`).toBeLessThanOrEqual(b + refUnc);
  // a bound that says nothing is a defect too: within the moment accuracy target
  expect(b, `${name}: bound ${b} looser than ${tol}`).toBeLessThanOrEqual(tol);
  if (act > refUnc) looseness.push(b / act);
}

describe("per-claim layer moments against mpmath (tests/fixtures/layer-moments/generate.py)", () => {
  for (const c of fixture.cases) {
    it(JSON.stringify(c.model), () => {
      const m = moments(c.model, 4);
      c.raw.forEach((ref, k) => check(`${JSON.stringify(c.model)} E Y^${k + 1}`, m.raw[k], m.rawError[k], ref, c.crossCheck[k]));
      expect(m.meanError, "the layer's mean carries a bound").not.toBeNull();
      expect(m.notes.join(" "), "no moment is left without a bound").not.toMatch(/no error bound is derived/);
    });
  }
  for (const c of fixture.compounds) {
    it(`${JSON.stringify(c.model)} (kappa_k = lambda E[Y^k])`, () => {
      const m = moments(c.model, 4);
      c.cumulants.forEach((ref, k) => check(`${JSON.stringify(c.model)} kappa_${k + 1}`, m.cumulants[k], m.cumulantError[k], ref, c.crossCheck[k]));
    });
  }
  it("a layer of a negatively scaled claim, or of a scaled sum, is still refused at /of", () => {
    expect(() => moments({ layer: { deductible: 1 }, of: { scale: -2, of: { family: "lognormal", mu: 0, sigma: 1 } } } as never, 2)).toThrow(/per-claim layer applies/);
    expect(() => moments({ layer: { deductible: 1 }, of: { scale: 2, of: { sum: [{ family: "exponential", rate: 1 }, { family: "exponential", rate: 2 }] } } } as never, 2)).toThrow(/per-claim layer applies/);
  });
  afterAll(() => {
    const s = [...looseness].sort((a, b) => a - b);
    if (s.length) console.log(`layer moments: ${s.length} values with a measurable error; bound/actual median ${s[s.length >> 1].toExponential(1)}, worst ${s[s.length - 1].toExponential(1)}`);
  });
});
