// The claim-law log rounding of Weibull shape > 1 (lib/cf/families/log-round-table.ts: the phase table from the law's own
// evaluation, |phi'| <= E X, and the large-t expansion past W*), against the Weibull CF by its power series and by quadrature
// on a rotated ray (mpmath 30 digits), its argument unwrapped on a fine grid (scipy): tests/fixtures/arg-rounding/
// weibull-log.json, generate_weibull_log.py beside it. The compounds' count factors from the closed-form pgf derivatives
// (Poisson lambda e^{lambda (z - 1)}, negative binomial r q p^r / (1 - q z)^{r + 1}; Loss Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { weibull } from "@/lib/cf/families/numeric";
import { weibullPhaseTail } from "@/lib/cf/families/log-round-table";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { expectCompoundCarriesRounding, expectLogRoundCovers, expectNodeLogCfOnGrid } from "../support/claim-log-round";

interface Row { t: number; re: string; im: string; absPhi: number; logAbs: number; theta: number; phiTimesLog: number; absDeriv: number; crossCheck: number }
interface Damped { beta: number; t: number; absPhi: number; principalLog: number; crossCheck: number }
const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/weibull-log.json"), "utf8")) as {
  cases: { shape: number; scale: number; mean: number; rows: Row[]; damped: Damped[] }[];
};
const U8 = 8 * Number.EPSILON;

describe("Weibull shape > 1: the claim law's log rounding (mpmath reference)", () => {
  it("the fixture's two methods agree within 1e-28", () => {
    for (const c of fx.cases) for (const r of [...c.rows, ...c.damped]) expect(r.crossCheck, `${c.shape} ${r.t}`).toBeLessThan(1e-28);
    expect(fx.cases.map((c) => c.shape)).toEqual([1.5, 2.5, 3.5]);
  });

  for (const c of fx.cases) {
    const k = c.shape;
    it(`shape ${k}: the large-t expansion's claims (modulus past W*, argument within pi / 3 there, |phi'| bound)`, () => {
      const tail = weibullPhaseTail(k, c.scale)!;
      let past = 0;
      const thetas: number[] = [];
      for (const r of c.rows) {
        expect(r.absDeriv, `t ${r.t}`).toBeLessThanOrEqual(tail.slope(r.t) + 1e-300);
        if (r.t < tail.from) continue;
        past++;
        expect(r.absPhi, `t ${r.t}`).toBeLessThanOrEqual(tail.modulus(r.t));
        thetas.push(r.theta);
      }
      expect(past).toBeGreaterThanOrEqual(4);
      expect(Math.max(...thetas) - Math.min(...thetas)).toBeLessThanOrEqual(Math.PI / 3);
      // the first term's argument k pi / 2, mod 2 pi, within pi / 6 of the continuous one
      for (const th of thetas) {
        const d = th - (k * Math.PI) / 2;
        expect(Math.abs(d - 2 * Math.PI * Math.round(d / (2 * Math.PI)))).toBeLessThanOrEqual(Math.PI / 6);
      }
    });

    it(`shape ${k}: 8 u |phi| |L| (continuous and principal branch) within logRoundAt and the slope, within 10x where largest`, () => {
      expectLogRoundCovers(weibull(k, c.scale), c.rows, 10);
    });

    it(`shape ${k}: the damped transform's principal log rounding within logRoundDampedAt`, () => {
      const node = weibull(k, c.scale);
      let closest = 0;
      for (const r of c.damped) {
        const need = U8 * r.principalLog;
        const b = node.logRoundDampedAt!(r.beta, r.t, node);
        expect(b, `beta ${r.beta} t ${r.t}`).toBeGreaterThanOrEqual(need);
        expect(b).toBeLessThanOrEqual(node.logRoundSlope! * (r.t + r.beta) * (1 + 1e-12));
        closest = Math.max(closest, need / b);
      }
      expect(closest).toBeGreaterThan(0.1);
    });

    it(`shape ${k}: the node's e^L on an equispaced grid within its CF error plus logRoundAt of the reference, its phase on the continuous branch`, () => {
      expectNodeLogCfOnGrid(weibull(k, c.scale), c.rows);
    });
  }
});

describe("compounds of Weibull claims of shape > 1 carry the claim law's rounding", () => {
  const cases: { count: object; shape: number; dP: (re: number, im: number) => number }[] = [
    { count: { family: "poisson", lambda: 2 }, shape: 1.5, dP: (re) => 2 * Math.exp(2 * (re - 1)) },
    {
      count: { family: "negative_binomial", r: 3, p: 0.4 },
      shape: 2.5,
      dP: (re, im) => (3 * 0.6 * 0.4 ** 3) / Math.hypot(1 - 0.6 * re, -0.6 * im) ** 4,
    },
  ];
  for (const cc of cases)
    it(`${JSON.stringify(cc.count)} of weibull(${cc.shape}, 1): no "left out" note, |P_N'(phi_X)| 8 u |phi_X| |L_X| within cfArgErrAt`, () => {
      const m = compile({ compound: { count: cc.count, each: { family: "weibull", shape: cc.shape, scale: 1 } } } as unknown as Model);
      const c = fx.cases.find((x) => x.shape === cc.shape)!;
      expectCompoundCarriesRounding(m, c.rows, cc.dP);
    });
});
