// Lattice tables as claims: their log rounding (lib/cf/families/log-round-table.ts withLatticeLogRound: the argument over
// one period 2 pi / step from floors on |phi|, with the drift origin t) against their CF term by term and by polyval
// (mpmath 30 digits), the argument unwrapped on a fine grid: tests/fixtures/arg-rounding/lattice-log.json,
// generate_lattice_log.py beside it. The Poisson count's factor from its pgf's derivative lambda e^{lambda (z - 1)} (Loss Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { expectClaimRoundingCovers, expectLogCfOnBranch, type LogRoundRow } from "../support/claim-log-round";

const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/lattice-log.json"), "utf8")) as { cases: { model: object; rows: LogRoundRow[] }[] };

describe("lattice table claims: the log rounding (mpmath reference)", () => {
  it("the fixture's two methods agree within 1e-25", () => {
    for (const c of fx.cases) for (const r of c.rows) expect(r.crossCheck, `${JSON.stringify(c.model)} ${r.t}`).toBeLessThan(1e-25);
    expect(fx.cases.length).toBe(2);
  });
  it("a table whose CF vanishes on the circle keeps the note (0.1 + 0.3 z + 0.4 z^2 + 0.2 z^3 = 0 at z = -1)", () => {
    const node = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: { lattice: { origin: 0, step: 1, p: [0.1, 0.3, 0.4, 0.2] } } } } as unknown as Model);
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
