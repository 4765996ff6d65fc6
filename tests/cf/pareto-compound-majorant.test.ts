// The damped majorant of compounds of claims that start above 0 (pareto claims: lib/cf/claims-from.ts, the shift theorem,
// taken into lib/cf/damped-majorant.ts compoundDampedMajorant) and of a sum of one with a gamma term: rest >= |psi| and
// slope >= |psi'| of the transform past the atom against mpmath at 30 digits (tests/fixtures/damped-majorant/
// generate_pareto_compound.py: the exponential integral, checked by the incomplete gamma form).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf";
import type { Model } from "@/lib/cf/types";
import { majorantRowHolds, type MajorantRow } from "../support/damped-majorant-rows";

interface Row extends MajorantRow {
  count: Record<string, unknown>;
  alpha: number;
  xm: number;
  gamma?: [number, number];
}
const rows = (JSON.parse(readFileSync(new URL("../fixtures/damped-majorant/pareto-compound.json", import.meta.url), "utf8")) as { rows: Row[] }).rows;

const modelOf = (r: Row): Model => {
  const compound = { compound: { count: r.count, each: { family: "pareto", alpha: r.alpha, xm: r.xm } } };
  return (r.gamma ? { sum: [{ family: "gamma", shape: r.gamma[0], rate: r.gamma[1] }, compound] } : compound) as Model;
};

describe("compounds of pareto claims: damped majorant vs mpmath (tests/fixtures/damped-majorant/pareto-compound.json)", () => {
  const cases = new Map<string, Row[]>();
  for (const r of rows) {
    const key = JSON.stringify(modelOf(r));
    cases.set(key, [...(cases.get(key) ?? []), r]);
  }
  for (const [key, rs] of cases) {
    it(`${key}: rest >= |psi|, slope >= |psi'| at every row; within 50x far out`, () => {
      const c = compile(JSON.parse(key) as Model);
      const m = c.dampedMajorant;
      expect(m, "a damped majorant").toBeDefined();
      // the compound's atom P(N = 0) (the sum's: 0)
      let tight = 0;
      for (const r of rs) {
        const ratio = majorantRowHolds(m!, r, `beta ${r.beta} t ${r.t}`);
        if (Number(r.t) >= 100 && Number(r.beta) === 0) tight = Math.max(tight, ratio.rest);
      }
      // far out the transform is p_1 times the claim's (~ alpha / (xm t)), the bound 2 alpha / (xm t) times (1 - p_0)
      expect(tight, "largest |psi| / rest at t >= 100, beta = 0").toBeGreaterThan(0.02);
    });
  }
});
