// The claim-law log rounding of Burr gamma > 1 and log-logistic gamma > 1 (lib/cf/families/log-round-table.ts: the phase
// table from the law's own evaluation, |phi'| <= E X, and the first term of the expansion at the origin past W*), against
// the Burr CF by quadrature on two rotated rays (mpmath 30 digits), its argument unwrapped on a fine grid (scipy):
// tests/fixtures/arg-rounding/burr-log.json, generate_burr_log.py beside it. The compounds' count factors from the closed-form pgf derivatives
// (Poisson lambda e^{lambda (z - 1)}, negative binomial r q p^r / (1 - q z)^{r + 1}; Loss Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { burr } from "@/lib/cf/families/burr";
import { burrPhaseTail } from "@/lib/cf/families/log-round-table";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { expectCompoundCarriesRounding, expectLogRoundCovers, expectNodeLogCfOnGrid } from "../support/claim-log-round";

interface Row { t: number; re: string; im: string; absPhi: number; logAbs: number; theta: number; phiTimesLog: number; absDeriv: number; crossCheck: number }
interface Damped { beta: number; t: number; absPhi: number; principalLog: number; crossCheck: number }
interface Law { family: string; alpha: number; gamma: number; theta: number }
const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/burr-log.json"), "utf8")) as {
  cases: { model: Law; mean: number; rows: Row[]; damped: Damped[] }[];
};
const build = (l: Law) => burr(l.alpha, l.gamma, l.theta, l.family);
const label = (l: Law) => `${l.family}(${l.alpha}, ${l.gamma}, ${l.theta})`;
const U8 = 8 * Number.EPSILON;

describe("Burr and log-logistic gamma > 1: the claim law's log rounding (mpmath reference)", () => {
  it("the fixture's two methods agree (1e-25 from t = 1 on)", () => {
    // (below t = 1, where exp(i t x) decays slowest on the heavy tail, the rays' quadratures agree to 4e-15 only: far
    // finer than the rows' |phi| |L| needs; the value check below adds the difference to its bound)
    for (const c of fx.cases) for (const r of [...c.rows, ...c.damped]) expect(r.crossCheck, `${label(c.model)} ${r.t}`).toBeLessThan(r.t >= 1 ? 1e-25 : 1e-14);
    expect(fx.cases.length).toBe(3);
  });

  for (const c of fx.cases) {
    const k = c.model.gamma;
    const name = label(c.model);
    it(`${name}: the large-t expansion's claims (modulus past W*, argument within pi / 3 there, |phi'| bound)`, () => {
      const tail = burrPhaseTail(c.model.alpha, k, c.model.theta)!;
      let past = 0;
      const thetas: number[] = [];
      for (const r of c.rows) {
        expect(r.absDeriv, `t ${r.t}`).toBeLessThanOrEqual(tail.slope(r.t) + 1e-300);
        if (r.t < tail.from) continue;
        past++;
        expect(r.absPhi, `t ${r.t}`).toBeLessThanOrEqual(tail.modulus(r.t));
        thetas.push(r.theta);
      }
      expect(past).toBeGreaterThanOrEqual(3);
      expect(Math.max(...thetas) - Math.min(...thetas)).toBeLessThanOrEqual(Math.PI / 3);
      // the first term's argument gamma pi / 2, mod 2 pi, within pi / 6 of the continuous one
      for (const th of thetas) {
        const d = th - (k * Math.PI) / 2;
        expect(Math.abs(d - 2 * Math.PI * Math.round(d / (2 * Math.PI)))).toBeLessThanOrEqual(Math.PI / 6);
      }
    });

    it(`${name}: 8 u |phi| |L| (continuous and principal branch) within logRoundAt and the slope, within 30x where largest`, () => {
      expectLogRoundCovers(build(c.model), c.rows, 30);
    });

    it(`${name}: the damped transform's principal log rounding within logRoundDampedAt`, () => {
      const node = build(c.model);
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

    it(`${name}: the node's e^L on an equispaced grid within its CF error plus logRoundAt of the reference, its phase on the continuous branch`, () => {
      expectNodeLogCfOnGrid(build(c.model), c.rows);
    });
  }
});

describe("compounds of Burr and log-logistic claims of gamma > 1 carry the claim law's rounding", () => {
  const cases: { count: object; law: number; dP: (re: number, im: number) => number }[] = [
    { count: { family: "poisson", lambda: 2 }, law: 0, dP: (re) => 2 * Math.exp(2 * (re - 1)) },
    {
      count: { family: "negative_binomial", r: 3, p: 0.4 },
      law: 1,
      dP: (re, im) => (3 * 0.6 * 0.4 ** 3) / Math.hypot(1 - 0.6 * re, -0.6 * im) ** 4,
    },
  ];
  for (const cc of cases)
    it(`${JSON.stringify(cc.count)} of ${label(fx.cases[cc.law].model)}: no "left out" note, |P_N'(phi_X)| 8 u |phi_X| |L_X| within cfArgErrAt`, () => {
      const c = fx.cases[cc.law];
      const { family, ...p } = c.model;
      const each = family === "loglogistic" ? { family, gamma: p.gamma, theta: p.theta } : { family, ...p };
      const m = compile({ compound: { count: cc.count, each } } as unknown as Model);
      expectCompoundCarriesRounding(m, c.rows, cc.dP);
    });
});
