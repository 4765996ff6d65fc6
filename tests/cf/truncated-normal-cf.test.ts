// The truncated normal CF with its derived bound (lib/cf/families/truncated-cf.ts) against mpmath: the boundary expansion
// at 50 digits cross-checked by mpmath.quad split at every period (tests/fixtures/reference-truncnorm/generate_cf_far.py,
// |t| sigma from 36 to 3e5), and the quadrature of the density at |t| <= 40 (generate.py). Every value within the
// engine's stated cfAbsError, which is derived, not assumed; the worst actual/bound ratio is printed.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";

interface Row {
  t: number;
  phi: [number, number];
}
const far = JSON.parse(readFileSync("tests/fixtures/reference-truncnorm/cf-far.json", "utf8")) as { cases: { model: Model; cf: Row[]; crossCheck: { maxDifference: number } }[] };
const near = JSON.parse(readFileSync("tests/fixtures/reference-truncnorm/truncnorm.json", "utf8")) as { cases: { model: Model; cf: Row[] }[] };

describe("truncated normal CF: every value within its derived bound, near and far", () => {
  it.each(far.cases.map((c, i) => [JSON.stringify(c.model), c, near.cases[i]] as const))("%s", (_n, c, n) => {
    expect(JSON.stringify(n.model)).toBe(JSON.stringify(c.model));
    const m = compile(c.model);
    const bound = m.cfAbsError!;
    // derived, and far below the 1e-12 that used to be stated
    expect(bound).toBeGreaterThan(0);
    expect(bound).toBeLessThan(1e-12);
    const rows = [...n.cf, ...c.cf];
    const t = Float64Array.from(rows, (r) => r.t);
    const re = new Float64Array(t.length);
    const im = new Float64Array(t.length);
    m.logCf(t, re, im);
    let worst = 0;
    rows.forEach((r, i) => {
      const a = Math.exp(re[i]);
      const d = Math.hypot(a * Math.cos(im[i]) - r.phi[0], a * Math.sin(im[i]) - r.phi[1]);
      // the reference's own uncertainty: its two methods' largest difference
      if (!(d <= bound + c.crossCheck.maxDifference)) expect.fail(`t = ${r.t}: |phi - reference| = ${d} above the bound ${bound}`);
      worst = Math.max(worst, d / bound);
    });
    console.log(`worst |phi - reference| / bound: ${worst.toExponential(2)} (bound ${bound.toExponential(2)})`);
  });
});
