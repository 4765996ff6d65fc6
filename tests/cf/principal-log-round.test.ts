// Claim laws whose log-CF is principal at each frequency (no unwrap along the grid) and whose log rounding is bounded from
// that (lib/cf/families/log-round-principal.ts): beta, PERT, triangular, truncated normal and per-claim layers. A compound of any of them
// no longer says the claim law's rounding is left out. Reference: tests/fixtures/principal-log/principal-log.json
// (generate.py beside it: mpmath at 40 digits, two methods per value: Kummer's function and quadrature for beta and PERT,
// the closed form and quadrature for the triangular, the complex erfc form and quadrature for the truncated normal, closed form or quadrature in x and in log x for layers).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { expectClaimRoundingCovers, type LogRoundRow } from "../support/claim-log-round";
import { cfValueErrors, tightestWithinBound } from "../support/cf-value-errors";

const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/principal-log/principal-log.json"), "utf8")) as {
  cases: { name: string; model: Model; rows: LogRoundRow[] }[];
};
const poissonOne = (claim: Model) => compile({ compound: { count: { family: "poisson", lambda: 1 }, each: claim } } as unknown as Model);
const one = (m: ReturnType<typeof compile>, t: number) => {
  const re = new Float64Array(1);
  const im = new Float64Array(1);
  m.logCf(Float64Array.of(t), re, im);
  return [re[0], im[0]] as const;
};

describe("claim laws with a principal log: the log rounding is derived (mpmath fixtures)", () => {
  for (const c of fx.cases) {
    it(`${c.name}: the two methods agree; the engine's phase is the principal one (plus a t) and e^L is within its declared error`, () => {
      const m = compile(c.model);
      const node = poissonOne(c.model);
      for (const r of c.rows) {
        expect(r.crossCheck, `t ${r.t}`).toBeLessThan(1e-30);
        const [re, im] = one(m, r.t);
        expect(Math.abs(im - r.theta), `t ${r.t}: engine phase ${im}, reference ${r.theta}`).toBeLessThan(1e-9 * Math.max(1, Math.abs(r.theta)));
        // the law's own value: its allowance, its argument slope, and the claim rounding as the Poisson(1) compound carries it
        const { err, own, slope } = cfValueErrors(m, re, im, r.t, [Number(r.re), Number(r.im)]);
        const claimRound = node.cfArgErrAt!(r.t) / Math.exp(Number(r.re) - 1);
        expect(err, `t ${r.t}`).toBeLessThanOrEqual(own + slope + claimRound + r.crossCheck);
      }
    });
    it(`${c.name}: 8 u |phi| |L| of the reference lies within the compound's per-frequency bound and its slope, the closest within 10x`, () => {
      // Poisson(1) compound: |P_N'(phi)| = e^{Re phi - 1} (Loss Models, app. B); within 100x where |phi| |L| > 0.01 (the issue's aim)
      expectClaimRoundingCovers(c.model, c.rows, 100);
    });
    it(`${c.name}: the Poisson(1) compound's CF exp(phi - 1) is within its stated allowance plus the carried rounding`, () => {
      const node = poissonOne(c.model);
      const tightest = tightestWithinBound(c.rows, (r) => {
        const [re, im] = one(node, r.t);
        // the reference compound value from the fixture's phi (one exp and one cos/sin in doubles: 4 u more)
        const e = Math.exp(Number(r.re) - 1);
        const ref = [e * Math.cos(Number(r.im)), e * Math.sin(Number(r.im))];
        const v = cfValueErrors(node, re, im, r.t, ref);
        return { ...v, own: v.own + 4 * Number.EPSILON * e + r.crossCheck * e };
      });
      expect(tightest).toBeGreaterThan(1);
    });
  }
  it("a compound of a mixture claim (its log still unwrapped along the grid) keeps the note; beta, PERT, triangular, truncated normal and layers do not", () => {
    const noted = (each: object) => poissonOne(each as Model).notes.some((n) => n.includes("not derived for this claim law"));
    expect(noted({ mix: [{ weight: 0.7, of: { family: "gamma", shape: 2, rate: 1 } }, { weight: 0.3, of: { family: "lognormal", mu: 1, sigma: 1 } }] })).toBe(true);
    for (const c of fx.cases) expect(noted(c.model), c.name).toBe(false);
  });
});
