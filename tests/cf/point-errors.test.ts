// Per-point error bounds (diagnostics.pointError): a directly evaluated law and a mixture of such laws bound every
// point on its own. References: the lognormal and weibull cdf and sf in closed form through @stdlib erfc and exp
// (Klugman, Panjer & Willmot, Loss Models, app. A); each point's actual error at most its own bound, each point bound
// at most the whole answer's, and a far-tail sf bound relative to the tail.
import { describe, expect, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import { compile, density } from "@/lib/cf";
import type { Model } from "@/lib/cf/types";

const lnSf = (x: number, mu: number, s: number) => 0.5 * erfc((Math.log(x) - mu) / (s * Math.SQRT2));
const wbSf = (x: number, k: number, lam: number) => Math.exp(-((x / lam) ** k));

describe("per-point error bounds", () => {
  const cases: { what: string; model: Model; sf: (x: number) => number; method: string }[] = [
    { what: "lognormal(0.3, 0.8) alone", model: { family: "lognormal", mu: 0.3, sigma: 0.8 } as Model, sf: (x) => lnSf(x, 0.3, 0.8), method: "special-function" },
    {
      what: "0.3 lognormal(0.3, 0.8) + 0.7 weibull(1.4, 2)",
      model: { mix: [{ weight: 0.3, of: { family: "lognormal", mu: 0.3, sigma: 0.8 } }, { weight: 0.7, of: { family: "weibull", shape: 1.4, scale: 2 } }] } as Model,
      sf: (x) => 0.3 * lnSf(x, 0.3, 0.8) + 0.7 * wbSf(x, 1.4, 2),
      method: "mixture",
    },
  ];
  for (const c of cases) {
    it(c.what, () => {
      const x = [0.05, 0.5, 1, 3, 10, 40];
      const r = density(compile(c.model), { x });
      const d = r.diagnostics;
      expect(d.method).toBe(c.method);
      const pe = d.pointError!;
      expect(pe, "point bounds present").toBeDefined();
      x.forEach((xi, i) => {
        const sf = c.sf(xi);
        const msg = `${c.what} at ${xi}: sf ${r.sf[i]} reference ${sf} point bound ${pe.sf[i]} whole bound ${d.error.cdf}`;
        expect(pe.cdf[i], msg).toBeLessThanOrEqual(d.error.cdf);
        expect(pe.sf[i], msg).toBeLessThanOrEqual(d.error.cdf);
        expect(pe.pdf[i], msg).toBeLessThanOrEqual(d.error.pdf!);
        // erfc and exp within a few ulps: 1e-15 relative covers the reference's own rounding
        expect(Math.abs(r.sf[i] - sf), msg).toBeLessThanOrEqual(pe.sf[i] + 1e-15 * sf);
        expect(Math.abs(r.cdf[i] - (1 - sf)), msg).toBeLessThanOrEqual(pe.cdf[i] + 2e-16);
      });
      // at x = 40 the tail is about 1e-6 .. 1e-13: its own bound is relative to it, far below the whole answer's
      const last = x.length - 1;
      expect(pe.sf[last]).toBeLessThan(1e-9 * Math.max(r.sf[last], 1e-300) + 1e-300);
      expect(pe.sf[last]).toBeLessThan(d.error.cdf);
    });
  }
});
