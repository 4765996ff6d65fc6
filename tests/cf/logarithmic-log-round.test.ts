// The logarithmic law as a claim: its log rounding (lib/cf/families/counts.ts logarithmicLogRound: the continuous argument
// t + arg G(p e^{it}) with Re G > 0) against the logarithmic CF in closed form and by its series (mpmath 30 digits), its
// argument unwrapped on a fine grid: tests/fixtures/arg-rounding/logarithmic-log.json, generate_logarithmic_log.py beside
// it. The Poisson count's factor from its pgf's derivative lambda e^{lambda (z - 1)} (Loss Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import type { Model } from "@/lib/cf/types";
import { expectClaimRoundingCovers, expectLogCfOnBranch, type LogRoundRow } from "../support/claim-log-round";

const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/logarithmic-log.json"), "utf8")) as { cases: { p: number; mean: number; rows: LogRoundRow[] }[] };

describe("logarithmic claims: the log rounding (mpmath reference)", () => {
  it("the fixture's two methods agree within 1e-20 (the series converges slowest at p 0.99 near t = 2 pi)", () => {
    for (const c of fx.cases) for (const r of c.rows) expect(r.crossCheck, `${c.p} ${r.t}`).toBeLessThan(1e-20);
    expect(fx.cases.map((c) => c.p)).toEqual([0.3, 0.8, 0.99]);
  });
  for (const c of fx.cases) {
    const model = { family: "logarithmic", p: c.p } as unknown as Model;
    it(`p ${c.p}: 8 u |phi| |L| (continuous and principal branch) within the Poisson(1) compound's cfArgErrAt and slope, within 20x where largest`, () => {
      expectClaimRoundingCovers(model, c.rows, 20);
    });
    it(`p ${c.p}: the law's e^L within its allowance plus the claim rounding of the reference, its phase on the continuous branch`, () => {
      expectLogCfOnBranch(model, c.rows);
    });
  }
});
