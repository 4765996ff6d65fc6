// A law evaluated directly whose density is infinite (gamma and weibull with shape < 1) or 0 (weibull with shape > 1)
// at the end of its support answers there with finite error bounds: before, Infinity * 0 made every bound of the answer NaN (found by
// tests/cf/properties-*.test.ts on a shifted gamma). Reference: F(lower end) = 0 and S = 1 for a law with a density
// (common practice); the bound is only required to be a finite number that covers the error.
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";

const cases: { model: Model; end: number }[] = [
  { model: { shift: 0.208, of: { family: "gamma", shape: 0.511, rate: 0.3 } } as Model, end: 0.208 },
  { model: { family: "gamma", shape: 0.511, rate: 0.3 } as Model, end: 0 },
  { model: { scale: 2.5, of: { family: "gamma", shape: 0.7, rate: 1 } } as Model, end: 0 },
  { model: { shift: -1.25, of: { family: "weibull", shape: 0.6, scale: 2 } } as Model, end: -1.25 },
  // density 0 at the end (shape > 1): 0 * log 0 made the pdf bound NaN
  { model: { family: "weibull", shape: 2.916, scale: 2.27 } as Model, end: 0 },
  { model: { mix: [{ weight: 0.52, of: { family: "weibull", shape: 2.916, scale: 2.27 } }, { weight: 0.48, of: { family: "chi_squared", k: 2.831 } }] } as Model, end: 0 },
];

describe("direct laws at a singular end of their support", () => {
  for (const { model, end } of cases) {
    it(JSON.stringify(model), () => {
      const c = compile(model);
      const r = density(c, { x: [end, end + 0.5] });
      const e = r.diagnostics.error;
      const what = `model ${JSON.stringify(model)} at ${end}: cdf ${r.cdf[0]}, sf ${r.sf[0]}, bounds ${JSON.stringify(e)}`;
      expect(Number.isFinite(e.cdf) && e.cdf >= 0, what).toBe(true);
      expect(Math.abs(r.cdf[0] - 0), what).toBeLessThanOrEqual(e.cdf);
      expect(Math.abs(r.sf[0] - 1), what).toBeLessThanOrEqual(e.cdf);
      expect(e.pdf >= 0, what).toBe(true);
      if (r.pdf && Number.isFinite(r.pdf[0])) expect(Number.isFinite(e.pdf), what).toBe(true);
    });
  }
});
