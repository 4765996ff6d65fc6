// A density evaluated exactly where it is infinite (a power singularity at an end of the support) answers with a
// representable, documented value: the engine keeps +Infinity (the exact limit) with a finite pdf bound over the other
// points; the public answer carries null there (JSON has no infinity) and lists the point in
// diagnostics.unboundedDensityAt; the response validates against the documented schema. References: a gamma density
// with shape a < 1 is x^(a-1) e^(-x)/Gamma(a), unbounded at 0 (JKB vol. 1, ch. 17); so is a beta density with
// alpha < 1 at its lower end (JKB vol. 2, ch. 25); F = 0 there (common practice).
import { describe, expect, it } from "vitest";
import { runDensity } from "@/lib/api/operations";
import { DensityResponse } from "@/lib/api/schemas/density";

const cases: { model: unknown; at: number; other: number; pdfOther: number; cdfAt?: number }[] = [
  // gamma(0.5, 1) at 1: e^-1 / Gamma(1/2) = e^-1 / sqrt(pi)
  { model: { family: "gamma", shape: 0.5, rate: 1 }, at: 0, other: 1, pdfOther: Math.exp(-1) / Math.sqrt(Math.PI) },
  // 2 X, X ~ gamma(0.5, 1): f(2) = f_X(1)/2
  { model: { scale: 2, of: { family: "gamma", shape: 0.5, rate: 1 } }, at: 0, other: 2, pdfOther: Math.exp(-1) / Math.sqrt(Math.PI) / 2 },
  // X + 1
  { model: { shift: 1, of: { family: "gamma", shape: 0.5, rate: 1 } }, at: 1, other: 2, pdfOther: Math.exp(-1) / Math.sqrt(Math.PI) },
  // half gamma(0.5, 1), half normal(0, 1): f(1) = (e^-1/sqrt(pi) + e^-1/2 / sqrt(2 pi)) / 2
  {
    model: { mix: [{ weight: 0.5, of: { family: "gamma", shape: 0.5, rate: 1 } }, { weight: 0.5, of: { family: "normal", mu: 0, sigma: 1 } }] },
    at: 0,
    other: 1,
    pdfOther: (Math.exp(-1) / Math.sqrt(Math.PI) + Math.exp(-0.5) / Math.sqrt(2 * Math.PI)) / 2,
    // F(0) = (0 + Phi(0)) / 2
    cdfAt: 0.25,
  },
  // beta(0.5, 1) on [0, 1]: f(z) = 0.5 z^-0.5; f(0.25) = 1
  { model: { family: "beta", alpha: 0.5, beta: 1 }, at: 0, other: 0.25, pdfOther: 1 },
];

describe("a density infinite at the point asked for", () => {
  for (const c of cases) {
    it(JSON.stringify(c.model), () => {
      const r = runDensity({ model: c.model, x: [c.at, c.other] } as Parameters<typeof runDensity>[0]);
      const msg = JSON.stringify({ model: c.model, pdf: r.pdf, diagnostics: r.diagnostics });
      expect(r.pdf![0], msg).toBeNull();
      expect(r.diagnostics.unboundedDensityAt, msg).toEqual([c.at]);
      const e = r.diagnostics.error.pdf;
      expect(typeof e === "number" && Number.isFinite(e), msg).toBe(true);
      expect(Math.abs((r.pdf![1] as number) - c.pdfOther), msg).toBeLessThanOrEqual(Math.max(e as number, 1e-15));
      expect(Math.abs((r.pdf![1] as number) - c.pdfOther) / c.pdfOther, msg).toBeLessThan(1e-12);
      expect(Math.abs(r.cdf[0] - (c.cdfAt ?? 0)), msg).toBeLessThanOrEqual(r.diagnostics.error.cdf);
      // the whole answer survives JSON and the documented schema
      const json = JSON.parse(JSON.stringify({ ...r, meta: { requestId: "req_test", computeUnits: 1, engineVersion: "test", elapsedMs: 1 } }));
      const parsed = DensityResponse.safeParse(json);
      expect(parsed.success, `${msg} ${parsed.success ? "" : parsed.error.message}`).toBe(true);
    });
  }

  it("a point where the density is finite lists nothing", () => {
    const r = runDensity({ model: { family: "gamma", shape: 0.5, rate: 1 }, x: [1] } as Parameters<typeof runDensity>[0]);
    expect(r.diagnostics.unboundedDensityAt).toBeUndefined();
    expect(r.pdf![0]).toBeCloseTo(Math.exp(-1) / Math.sqrt(Math.PI), 14);
  });
});
