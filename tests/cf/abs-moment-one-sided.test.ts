// E|X - c| for one-sided laws with a mean but no variance (Pareto and Lomax of tail index in (1, 2]): the compiled family
// carries it from its mean and lower end (lib/cf/compile.ts, ../abs-moment.ts cumulantAbsMoment), so a sum holding such a term
// bounds its rounded frequency nodes' move and no longer says that move is left out. Reference:
// tests/fixtures/abs-moment/one-sided.json (generate_one_sided.py beside it: mpmath, the closed form E X - c + 2 E(c - X)+ and
// tanh-sinh quadrature).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import { NODE_ROUNDING_NOTE } from "@/lib/cf/invert/grid-rounding";
import type { Model } from "@/lib/cf/types";

const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/abs-moment/one-sided.json"), "utf8")) as {
  rows: { kind: string; alpha: number; scale: number; c: number; value: number; rel_diff: number }[];
};
const law = (r: { kind: string; alpha: number; scale: number }) =>
  (r.kind === "pareto" ? { family: "pareto", alpha: r.alpha, xm: r.scale } : { family: "lomax", alpha: r.alpha, theta: r.scale }) as unknown as Model;

describe("E|X - c| of Pareto and Lomax laws without a variance (mpmath fixture)", () => {
  it("the two methods agree; the bound is at or above the reference, within 2x of it where c is inside the bulk", () => {
    for (const r of fx.rows) {
      expect(r.rel_diff).toBeLessThan(1e-15);
      const m = compile(law(r));
      const b = m.absMomentAbout!(r.c);
      expect(b, `${r.kind}(${r.alpha}, ${r.scale}) c = ${r.c}`).toBeGreaterThanOrEqual(r.value);
      // E X - lo + |lo - c| is exact for c at or below the lower end, 2 (c - lo) above E|X - c| at most past it
      expect(b, `${r.kind}(${r.alpha}, ${r.scale}) c = ${r.c}`).toBeLessThanOrEqual(2 * r.value);
    }
    // the closest row: the bound is exact below the lower end, so a bound cut by 10x fails there
    const tight = Math.max(...fx.rows.map((r) => r.value / compile(law(r)).absMomentAbout!(r.c)));
    expect(tight).toBeGreaterThan(0.99);
  });
  it("a sum of such a Pareto and a normal no longer leaves its nodes' rounding out; with a Cauchy (no mean) it still does", () => {
    const notes = (m: object) => quantiles(compile(m as Model), [0.1, 0.5, 0.9]).diagnostics.notes;
    const pareto = { family: "pareto", alpha: 1.548, xm: 0.601 };
    expect(notes({ sum: [pareto, { family: "normal", mu: -0.588, sigma: 2.095 }] })).not.toContain(NODE_ROUNDING_NOTE);
    expect(notes({ sum: [pareto, { family: "cauchy", loc: 0, scale: 1 }] })).toContain(NODE_ROUNDING_NOTE);
  });
});
