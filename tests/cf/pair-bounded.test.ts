// Two power-tailed terms plus a bounded one (uniform, triangular): the sum's density bends at interior points (the uniform's
// upper end plus the paretos' starts), where the power-tail route takes kernels out from the model's transform series
// (lib/cf/invert/continuous.ts maybeKernels, Node.transformSeries of the uniform and triangular families), so that its
// frequency cut-off falls from thousands to tens. Checked against mpmath numerical convolution at 24 digits
// (tests/fixtures/pair-bounded/generate.py: two integration orders, their difference `check`), cdf and density within the
// answer's bounds at points and on the quantiles' levels.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, density, quantiles } from "@/lib/cf";

type Case = { name: string; model: unknown; points: { x: string; cdf: string; check: number; pdf: string; pdf_check: number }[] };
const cases = (JSON.parse(readFileSync(new URL("../fixtures/pair-bounded/pair-bounded.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

describe("two power tails plus a bounded term vs mpmath convolution (tests/fixtures/pair-bounded)", () => {
  it.each(cases.map((c) => [c.name, c] as const))("%s: cdf and density at points within their bounds", (_n, c) => {
    const model = compile(c.model as never);
    const xs = c.points.map((p) => Number(p.x));
    for (const tolerance of [1e-8, 1e-10]) {
      const r = density(model, { x: xs, tolerance });
      const d = r.diagnostics;
      // the kernels at the series' points (more than the lower end) were taken out
      expect(d.notes.some((n) => /density behaviour at .*, .* handled by subtracting/.test(n)), `${c.name}: kernels at the interior points`).toBe(true);
      c.points.forEach((p, i) => {
        const ec = Math.abs(r.cdf[i] - Number(p.cdf));
        const ep = Math.abs(r.pdf![i] - Number(p.pdf));
        expect(ec, `${c.name} tol ${tolerance} x = ${p.x}: cdf ${r.cdf[i]} vs ${p.cdf}, bound ${d.error.cdf}`).toBeLessThanOrEqual(d.error.cdf + p.check);
        expect(ep, `${c.name} tol ${tolerance} x = ${p.x}: pdf ${r.pdf![i]} vs ${p.pdf}, bound ${d.error.pdf}`).toBeLessThanOrEqual(d.error.pdf + p.pdf_check);
      });
    }
  });

  it.each(cases.map((c) => [c.name, c] as const))("%s: the quantiles at the fixture's cdf values", (_n, c) => {
    const model = compile(c.model as never);
    // levels p = F(x) at the fixture's points: each answered quantile within its bound of x (the cdf's bound over the
    // density there, as the answer states it)
    const pts = c.points.filter((p) => Number(p.cdf) > 1e-3 && Number(p.cdf) < 1 - 1e-3);
    const q = quantiles(model, pts.map((p) => Number(p.cdf)));
    pts.forEach((p, i) => {
      const err = Math.abs(q.x[i] - Number(p.x));
      expect(err, `${c.name} p = ${p.cdf}: q ${q.x[i]} vs ${p.x}, bound ${q.diagnostics.quantileError[i]}`).toBeLessThanOrEqual(q.diagnostics.quantileError[i]);
    });
  });
});
