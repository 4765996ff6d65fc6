import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

// Laws whose truncation bound now comes from a derived majorant (lib/cf/singular-majorants.ts, lib/cf/layer-majorant.ts)
// inverted by the Gil-Pelaez sums: the stated cdf bound must not be below the actual error against the closed-form cdf.
// Beta(1/2, 1/2) is the arcsine law, F(x) = (2 / pi) asin(sqrt x) (JKB vol. 2 ch. 25); burr(2, 1/2, 1) has
// F(x) = 1 - (1 + sqrt x)^{-2} (Klugman, Panjer & Willmot, Loss Models, app. A.2.2.2); a layer min((X - d)_+, l) has
// cdf F_X(d + y) below the limit (common practice), here of the uniform (JKB vol. 2 ch. 26) and weibull (JKB vol. 1 ch. 21).
const CASES: { label: string; model: unknown; cdf: (x: number) => number; xs: number[] }[] = [
  { label: "beta(0.5, 0.5)", model: { family: "beta", alpha: 0.5, beta: 0.5 }, cdf: (x) => (2 / Math.PI) * Math.asin(Math.sqrt(x)), xs: [0.01, 0.1, 0.3, 0.5, 0.8, 0.97] },
  { label: "burr(2, 0.5, 1)", model: { family: "burr", alpha: 2, gamma: 0.5, theta: 1 }, cdf: (x) => 1 - Math.pow(1 + Math.sqrt(x), -2), xs: [0.01, 0.2, 1, 3, 10] },
  { label: "layer(1, 4.5) of uniform(0, 10)", model: { layer: { deductible: 1, limit: 4.5 }, of: { family: "uniform", a: 0, b: 10 } }, cdf: (y) => (1 + y) / 10, xs: [0.2, 1, 2.5, 4, 4.4] },
  {
    label: "layer(0, 3) of weibull(1.5, 2)",
    model: { layer: { limit: 3 }, of: { family: "weibull", shape: 1.5, scale: 2 } },
    cdf: (y) => -Math.expm1(-Math.pow(y / 2, 1.5)),
    xs: [0.1, 0.5, 1, 2, 2.9],
  },
];

describe("inversion with a derived envelope: stated cdf bounds against closed-form cdfs", () => {
  for (const k of CASES) {
    it(`${k.label}: gil-pelaez cdf within its stated bound`, () => {
      const m = compile(k.model as Model);
      const r = density(m, { x: k.xs, method: "gil-pelaez" });
      const c = new Checker();
      const err = r.diagnostics.error;
      c.that("cdf bound finite", Number.isFinite(err.cdf), JSON.stringify(err));
      for (let i = 0; i < r.x.length; i++) c.honest(`x=${r.x[i]} cdf`, r.cdf[i], k.cdf(r.x[i]), err.cdf);
      c.done();
    });
  }
});
