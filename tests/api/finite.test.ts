// Answers are numbers or errors: overflowing inputs are refused with a pointer, probabilities are clamped only
// within their error bound, and no 200 carries a value JSON would turn into null.
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { ApiError } from "@/lib/api/errors";
import { finiteResult, firstNonFinite } from "@/lib/api/finite";
import { apiServer, orgWithKey } from "../support/api";

const app = apiServer();
const post = (path: string, key: string, body: unknown) =>
  supertest(app).post(path).set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify(body));

const allFinite = (v: unknown) => firstNonFinite(v) === null;

describe("overflowing inputs", () => {
  it("a grid from -1e308 to 1e308 (span past the largest double) answers 422 pointing at /grid", async () => {
    const o = await orgWithKey();
    const res = await post("/api/v1/density", o.secret, { model: { family: "normal", mu: 0, sigma: 1 }, grid: { from: -1e308, to: 1e308, count: 3 } });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.errors[0].pointer).toBe("/grid");
    const cf = await post("/api/v1/cf", o.secret, { model: { family: "normal", mu: 0, sigma: 1 }, t: { from: -1e308, to: 1e308, count: 3 } });
    expect(cf.status).toBe(422);
    expect(cf.body.errors[0].pointer).toBe("/t");
  });

  it("/convolve with p = [1e308, 1e308] and power 2 answers 422 pointing at the table", async () => {
    const o = await orgWithKey();
    const res = await post("/api/v1/convolve", o.secret, { terms: [{ origin: 0, step: 1, p: [1e308, 1e308] }], power: 2 });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.errors[0].pointer).toBe("/terms/0/p");
    const ok = await post("/api/v1/convolve", o.secret, { terms: [{ origin: 0, step: 1, p: [0.5, 0.5] }], power: 2 });
    // binomial(2, 1/2): 1/4, 1/2, 1/4 (common practice)
    expect(ok.status).toBe(200);
    ok.body.p.forEach((v: number, i: number) => expect(Math.abs(v - [0.25, 0.5, 0.25][i])).toBeLessThan(1e-15));
  });

  it("the quantile at p = 1 of a normal law (unbounded above) is refused with a pointer, not answered with null", async () => {
    const o = await orgWithKey();
    const res = await post("/api/v1/quantiles", o.secret, { model: { family: "normal", mu: 0, sigma: 1 }, p: [0.5, 1] });
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.errors[0].pointer).toBe("/p/1");
  });

  it("a stable law (alpha 0.5) far in the tail at x = 1e12 never answers 200 with cdf above 1 or a negative pdf", async () => {
    const o = await orgWithKey({ plan: "scale" });
    const res = await post("/api/v1/density", o.secret, { model: { family: "stable", alpha: 0.5, beta: 0, scale: 1, loc: 0 }, x: [1e12] });
    expect([200, 422]).toContain(res.status);
    if (res.status === 200) {
      expect(res.body.cdf[0]).toBeLessThanOrEqual(1);
      expect(res.body.pdf[0]).toBeGreaterThanOrEqual(0);
      expect(allFinite(res.body)).toBe(true);
    } else {
      expect(res.body.type).toMatch(/#(compute_budget_exceeded|tolerance_unreached)$/);
    }
  }, 30_000);
});

describe("clamping within the bound, refusing beyond it", () => {
  const body = { x: [1, 2, 3], tolerance: 1e-12 };
  const density = (cdf: number[], pdf: number[], errCdf: number, errPdf: number) => ({
    x: [1, 2, 3],
    pdf,
    cdf,
    sf: cdf.map((c) => 1 - c),
    atoms: [],
    diagnostics: { error: { cdf: errCdf, pdf: errPdf } },
  });

  it("clamps a cdf 3e-16 above 1 and a pdf -1e-14 when the bounds are 1e-13", () => {
    const r = finiteResult("density", body, density([0.5, 0.9, 1 + 3e-16], [0.1, -1e-14, 0], 1e-13, 1e-13));
    expect((r.cdf as number[])[2]).toBe(1);
    expect((r.pdf as number[])[1]).toBe(0);
  });

  it("refuses a cdf of 1.0003 when its bound is 1e-13, naming the tolerance and pointing at the point", () => {
    let err: ApiError | null = null;
    try {
      finiteResult("density", body, density([0.5, 0.9, 1.0003], [0.1, 0.1, 0], 1e-13, 1e-13));
    } catch (e) {
      err = e as ApiError;
    }
    expect(err?.code).toBe("tolerance_unreached");
    expect(err?.detail).toContain("1e-12");
    expect(err?.errors?.[0].pointer).toBe("/x/2");
  });

  it("passes the documented null of a density that is +infinity at a point listed in unboundedDensityAt, refuses any other", () => {
    const r = density([0, 0.5, 0.9], [null as unknown as number, 0.3, 0.1], 1e-13, 1e-13);
    expect(() => finiteResult("density", body, r)).toThrow(/could not be computed/);
    (r.diagnostics as Record<string, unknown>).unboundedDensityAt = [1];
    expect((finiteResult("density", body, r).pdf as unknown[])[0]).toBeNull();
  });

  it("refuses a negative pdf beyond its bound", () => {
    expect(() => finiteResult("density", body, density([0.5, 0.6, 0.7], [0.1, -0.02, 0.1], 1e-13, 1e-13))).toThrow(/below 0/);
  });

  it("any other non-finite number anywhere in a result is refused", () => {
    expect(() => finiteResult("cf", {}, { t: [0], re: [1], im: [Number.NaN] })).toThrow(/im\.0/);
    expect(firstNonFinite({ raw: [3, null], a: { b: [Infinity] } })).toBe("/a/b/0");
  });
});
