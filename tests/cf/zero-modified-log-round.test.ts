// Zero-modified and zero-truncated counts as claims: their log rounding (lib/cf/families/log-round-table.ts
// withPeriodicLogRound: the argument's total variation over one period from floors on |phi|) against their CF from the
// base pgf and by their series (mpmath 30 digits), the argument unwrapped on a fine grid:
// tests/fixtures/arg-rounding/zero-modified-log.json, generate_zero_modified_log.py beside it. The Poisson count's factor from its pgf's derivative lambda e^{lambda (z - 1)} (Loss Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { expectClaimRoundingCovers, expectLogCfOnBranch, type LogRoundRow } from "../support/claim-log-round";

const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/zero-modified-log.json"), "utf8")) as { cases: { model: { family: string }; mean: number; rows: LogRoundRow[] }[] };

describe("zero-modified and zero-truncated count claims: the log rounding (mpmath reference)", () => {
  it("the fixture's two methods agree within 1e-25", () => {
    for (const c of fx.cases) for (const r of c.rows) expect(r.crossCheck, `${c.model.family} ${r.t}`).toBeLessThan(1e-25);
    expect(fx.cases.length).toBe(4);
  });
  it("a law whose CF comes near 0 on the circle keeps the note (zero-truncated Poisson(2 pi - 0.08): no positive floor)", () => {
    const node = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: { family: "zero_truncated_poisson", lambda: 6.2 } } } as unknown as Model);
    expect(node.notes.some((n) => n.includes("not derived for this claim law"))).toBe(true);
  });
  for (const c of fx.cases) {
    const model = c.model as unknown as Model;
    const name = JSON.stringify(c.model);
    it(`${name}: 8 u |phi| |L| (continuous and principal branch) within the Poisson(1) compound's cfArgErrAt and slope, within 30x where largest`, () => {
      expectClaimRoundingCovers(model, c.rows, 30);
    });
    it(`${name}: the law's e^L within its allowance plus the claim rounding of the reference, its phase on the continuous branch`, () => {
      expectLogCfOnBranch(model, c.rows);
    });
  }
});
