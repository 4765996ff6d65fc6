// Bodies the fuzzer (tests/api/fuzz.test.ts) found answering 500, each kept as a focused regression check: they
// now answer 422 with a problem document that says which parameter asks too much, or compute the right law.
import supertest from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { apiServer, orgWithKey } from "../support/api";

const app = apiServer();
const post = (path: string, key: string, body: unknown) =>
  supertest(app).post(path).set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify(body));

let secret = "";
beforeAll(async () => {
  // a plan whose rate (200 requests per second) the dozen calls below cannot reach, so no 429 hides an answer
  secret = (await orgWithKey({ plan: "scale" })).secret;
});

describe("CF quadratures that would need unboundedly many nodes are refused, not a 500", () => {
  const cases: [string, string, unknown][] = [
    // the rule's node count grows like 1/shape: 2.5e15 nodes (an invalid typed-array length) before the fix
    ["weibull shape 2e-13", "/api/v1/cf", { model: { family: "weibull", shape: 2.124960975902041e-13, scale: 1 }, t: [0.5, 1] }],
    // shape near the largest double: the contour's step underflows to a subnormal
    ["weibull shape 1e308", "/api/v1/quantiles", { model: { sum: [{ family: "weibull", shape: 1e308, scale: 1 }, { family: "normal", mu: 0, sigma: 1 }] }, p: [0.5] }],
    // sqrt(2)^(alpha + 2) overflowed past alpha ~ 2044, giving a zero step and an infinite node count
    ["lomax alpha 1e300", "/api/v1/cf", { model: { family: "lomax", alpha: 1e300, theta: 1 }, t: [0.5] }],
    ["pareto alpha 1e6", "/api/v1/cf", { model: { family: "pareto", alpha: 1e6, xm: 1 }, t: [0.5] }],
    // the step shrinks like 1/sigma: 7e301 nodes for sigma = 1e300
    ["lognormal sigma 1e308 in a shifted sum", "/api/v1/cf", { model: { shift: 1e-255, of: { sum: [{ family: "lognormal", mu: 0, sigma: 1e308 }] } }, t: [1e100, 1] }],
    ["lognormal sigma 1e300 under a layer", "/api/v1/quantiles", { model: { scale: -5e-324, of: { layer: { deductible: 1e16, limit: 1e-16, share: 1 }, of: { family: "lognormal", mu: 1e300, sigma: 1e300 } } }, p: [0.5], expectedShortfall: true }],
  ];
  for (const [name, path, body] of cases) {
    it(name, async () => {
      const res = await post(path, secret, body);
      expect(res.status, JSON.stringify(res.body)).toBe(422);
      expect(res.headers["content-type"]).toMatch(/application\/problem\+json/);
      expect(res.body.type).toMatch(/#limit_exceeded$/);
      expect(res.body.detail).toMatch(/quadrature nodes/);
    });
  }

  it("a pareto tail index past the old overflow point (alpha = 3000) still computes: phi(0) = 1 and |phi| <= 1", async () => {
    const res = await post("/api/v1/cf", secret, { model: { family: "pareto", alpha: 3000, xm: 1 }, t: [0, 0.5] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    // any CF: phi(0) = 1, |phi(t)| <= 1 (common practice)
    expect(Math.abs(res.body.re[0] - 1)).toBeLessThan(1e-12);
    expect(Math.hypot(res.body.re[1], res.body.im[1])).toBeLessThanOrEqual(1 + 1e-12);
    // Pareto(alpha, 1) tends to the point mass at 1 as alpha grows: phi(0.5) ~ e^{0.5 i}, |error| <= E|X - 1| * 0.5 = 0.5 / (alpha - 1)
    expect(Math.hypot(res.body.re[1] - Math.cos(0.5), res.body.im[1] - Math.sin(0.5))).toBeLessThan(0.5 / 2999 + 1e-9);
  });
});

describe("a zero-modified binomial with p = 1 (N = n surely before modification) is a law, not a 500", () => {
  it("its mean is (1 - p0) n and its quantiles are 0 below p0 and n above", async () => {
    // zero-modified law: P(M = 0) = p0, P(M = k) = (1 - p0) P(N = k | N > 0) (Klugman, Panjer & Willmot, Loss Models, sec. 6.6)
    const model = { family: "zero_modified_binomial", n: 7, p: 1, p0: 0.25 };
    const m = await post("/api/v1/moments", secret, { model, order: 1 });
    expect(m.status, JSON.stringify(m.body)).toBe(200);
    expect(Math.abs(m.body.mean - 0.75 * 7)).toBeLessThan(1e-12);
    const q = await post("/api/v1/quantiles", secret, { model, p: [0.1, 0.5] });
    expect(q.status, JSON.stringify(q.body)).toBe(200);
    expect(q.body.x).toEqual([0, 7]);
  });

  it("the body the fuzzer found (n = 999993, p0 = 1e-267, lower-tail shortfall, discretised) answers below 500", async () => {
    const res = await post("/api/v1/quantiles", secret, {
      model: { family: "zero_modified_binomial", n: 999993, p: 1, p0: 1.0694721996900575e-267 },
      p: [0.00002065475171570511],
      expectedShortfall: true,
      tail: "lower",
      tolerance: 0.000001,
      method: "discretise",
    });
    expect(res.status, JSON.stringify(res.body)).toBeLessThan(500);
    if (res.status === 200) expect(res.body.x).toEqual([999993]);
  });
});
