// Named laws alone at extreme parameters answer with finite, covering bounds and without looping. References are
// facts of the laws: a log-logistic's median is theta, F(theta) = 1/2 (Loss Models, 5th ed., app. A.2.2.4); Burr XII
// has F(theta) = 1 - 2^-alpha (app. A.2.2.2); a normal density is flat within (h/sigma)^2 relative over an interval of
// length h, so a short truncation is uniform to that accuracy (common practice).
import { describe, expect, it } from "vitest";
import { compile, density, quantiles } from "@/lib/cf";
import type { Model } from "@/lib/cf/types";

const cases: { model: Model; x: number; cdf: number; tol: number; what: string }[] = [
  { model: { family: "loglogistic", gamma: 1e-300, theta: 2 } as Model, x: 2, cdf: 0.5, tol: 1e-15, what: "log-logistic gamma 1e-300 at its median" },
  { model: { family: "burr", alpha: 1e-300, gamma: 1e-300, theta: 1 } as Model, x: 1, cdf: -Math.expm1(-1e-300 * Math.LN2), tol: 1e-310, what: "burr alpha = gamma = 1e-300 at theta" },
  { model: { family: "burr", alpha: 2.5, gamma: 1e300, theta: 1 } as Model, x: 1, cdf: 1 - Math.pow(2, -2.5), tol: 1e-15, what: "burr gamma 1e300 at theta" },
  { model: { family: "truncated_normal", mu: -3, sigma: 1e12, lower: -3.00000001, upper: -2.99999998 } as Model, x: -3, cdf: 1 / 3, tol: 1e-6, what: "a 3e-8 wide truncation of a normal with sigma 1e12" },
];

describe("direct laws at extreme parameters", () => {
  for (const c of cases) {
    it(c.what, () => {
      const m = compile(c.model);
      expect(m.direct, c.what).toBeDefined();
      const r = density(m, { x: [c.x] });
      const e = r.diagnostics.error;
      const msg = `${JSON.stringify(c.model)} at ${c.x}: cdf ${r.cdf[0]}, expected ${c.cdf}, bounds ${JSON.stringify(e)}`;
      expect(Number.isFinite(e.cdf) && e.cdf <= 1, msg).toBe(true);
      expect(e.pdf !== null && Number.isFinite(e.pdf), msg).toBe(true);
      expect(Math.abs(r.cdf[0] - c.cdf), msg).toBeLessThanOrEqual(c.tol);
      expect(Math.abs(r.cdf[0] - c.cdf), msg).toBeLessThanOrEqual(e.cdf + 1e-15 * c.cdf);
    });
  }
});

// In a sum the law's CF is needed, and its quadrature rule on the shifted contour needs about 45 / gamma / h nodes
// per frequency (the integrand's width in log x grows like 1/gamma): beyond the node limit the model is refused with
// limit_exceeded at once (a log-logistic with gamma 1e-5 in a sum used to run for minutes, unchecked by the deadline).
describe("CF rules past the node limit are refused", () => {
  const N01 = { family: "normal", mu: 0, sigma: 1 };
  const refused: { model: Model; what: RegExp }[] = [
    { model: { sum: [{ family: "loglogistic", gamma: 1e-5, theta: 2 }, N01] } as Model, what: /loglogistic with gamma = 0\.00001 needs .* quadrature nodes/ },
    { model: { sum: [{ family: "burr", alpha: 2, gamma: 1e-6, theta: 1 }, N01] } as Model, what: /burr with alpha = 2, gamma = 0\.000001 needs .* quadrature nodes/ },
  ];
  for (const c of refused) {
    it(JSON.stringify(c.model), () => {
      let err: unknown;
      try {
        density(compile(c.model), { x: [0, 2] });
      } catch (e) {
        err = e;
      }
      expect(err, "the model was not refused").toBeDefined();
      expect((err as { code?: string }).code).toBe("limit_exceeded");
      expect((err as Error).message).toMatch(c.what);
    });
  }
});

// A symmetric law's median is its centre (common practice). At a centre of 0 the normal's cdf is exact (Phi(0) = 1/2),
// so the bracket's walk started at the smallest double: 200 steps of 1.5 never reached an offset where the cdf moves,
// and POST /api/v1/quantiles answered the standard normal's median with 422 tolerance_unreached.
describe("quantiles exactly at 0", () => {
  const symmetric: Model[] = [
    { family: "normal", mu: 0, sigma: 1 },
    { family: "normal", mu: 0, sigma: 1e-200 },
    { family: "logistic", loc: 0, scale: 3 },
    { family: "laplace", loc: 0, scale: 0.5 },
    { family: "student_t", nu: 3, loc: 0, scale: 1 },
    { family: "cauchy", loc: 0, scale: 2 },
    { family: "uniform", a: -1, b: 1 },
  ] as Model[];
  for (const m of symmetric) {
    it(`the median of ${JSON.stringify(m)} is 0 within a finite bound, small against the spread`, () => {
      const r = quantiles(compile(m), [0.5]);
      const err = r.diagnostics.quantileError[0];
      expect(err, "no bound").not.toBeNull();
      expect(Math.abs(r.x[0])).toBeLessThanOrEqual(err!);
      const spread = (m as unknown as { sigma?: number }).sigma ?? 1;
      expect(err!).toBeLessThan(1e-12 * spread);
    });
  }
});
