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

// The expected shortfall of the same sums at the levels p = F(x): ES_p = x + E[(X - x)^+] / (1 - p) (common practice), the
// stop-loss transforms by mpmath convolution two ways (tests/fixtures/pair-bounded/generate_stoploss.py, their difference
// `check`). The ES sums share the quantiles' kernels, whose images there are bounded by the kernels' stop-loss tails
// (lib/cf/invert/kernel-images.ts), so the pair's derived bound answers (lib/cf/invert/heavy-residual2.ts), no estimate.
describe("two power tails plus a bounded term: expected shortfall vs mpmath (tests/fixtures/pair-bounded)", () => {
  type SL = { name: string; points: { x: string; stopLoss: string; check: number }[] };
  const sls = (JSON.parse(readFileSync(new URL("../fixtures/pair-bounded/pair-bounded-stoploss.json", import.meta.url), "utf8")) as { cases: SL[] }).cases;
  it.each(cases.map((c) => [c.name, c] as const))("%s", (_n, c) => {
    const sl = sls.find((s) => s.name === c.name)!;
    const pts = c.points.filter((p) => Number(p.cdf) > 1e-3 && Number(p.cdf) < 1 - 1e-3);
    const ps = pts.map((p) => Number(p.cdf));
    const r = quantiles(compile(c.model as never), ps, { expectedShortfall: true });
    const d = r.diagnostics;
    expect(d.notes.some((n) => /estimated/.test(n)), `${c.name}: no estimated bound, notes ${JSON.stringify(d.notes)}`).toBe(false);
    pts.forEach((p, i) => {
      const s = sl.points.find((q) => q.x === p.x)!;
      const want = Number(p.x) + Number(s.stopLoss) / (1 - ps[i]);
      // the answer's ES is at its own quantile q: ES at q differs from ES at q_p by at most f (q - q_p)^2 / (2 (1 - p)) (the
      // function q + E[(X - q)^+] / (1 - p) is least at q_p, its second derivative f / (1 - p)); with |q - q_p| within the
      // quantile's bound, f at most 1 here
      const second = (d.quantileError[i] ** 2 / 2) / (1 - ps[i]);
      const err = Math.abs(r.expectedShortfall![i] - want);
      expect(err, `${c.name} p = ${ps[i]}: ES ${r.expectedShortfall![i]} vs ${want}, bound ${d.expectedShortfallError![i]}`).toBeLessThanOrEqual(
        d.expectedShortfallError![i] + s.check / (1 - ps[i]) + second + 1e-15 * Math.abs(want),
      );
    });
  });
});
