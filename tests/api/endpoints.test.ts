// Each endpoint's happy path through the gate, with numbers checked against named outside sources.
// jstat (npm, general-purpose statistics library) provides the reference pdf, cdf and quantiles.
import jStat from "jstat";
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { keyedClient } from "../support/api";
import { FAMILY_NAMES } from "@/lib/cf/families/spec";

const client = keyedClient();
const { app, post } = client;

function close(actual: number, expected: number, tol: { abs?: number; rel?: number }, what: string) {
  const diff = Math.abs(actual - expected);
  const bound = Math.max(tol.abs ?? 0, (tol.rel ?? 0) * Math.abs(expected));
  expect(diff, `${what}: value ${actual}, expected ${expected}, difference ${diff}, tolerance ${bound}`).toBeLessThanOrEqual(bound);
}

describe("POST /api/v1/cf", () => {
  it("matches the normal CF exp(i mu t - sigma^2 t^2 / 2) (closed form, common practice) to 1e-12 relative", async () => {
    const mu = 1.5;
    const sigma = 2;
    const t = [0, 0.3, 1.7, -0.9];
    const res = await post("/api/v1/cf", { model: { family: "normal", mu, sigma }, t });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    t.forEach((ti, i) => {
      const mod = Math.exp((-sigma * sigma * ti * ti) / 2);
      close(res.body.re[i], mod * Math.cos(mu * ti), { rel: 1e-12, abs: 1e-300 }, `Re phi(${ti})`);
      close(res.body.im[i], mod * Math.sin(mu * ti), { rel: 1e-12, abs: 1e-300 }, `Im phi(${ti})`);
      // each value carries its bound: at or above the distance to the closed form, and small
      const act = Math.hypot(res.body.re[i] - mod * Math.cos(mu * ti), res.body.im[i] - mod * Math.sin(mu * ti));
      expect(res.body.error[i]).toBeGreaterThanOrEqual(Math.max(0, act - 1e-15));
      expect(res.body.error[i]).toBeLessThan(1e-12);
    });
    expect(res.body.notes).toEqual([]);
  });

  it("evaluates on a { from, to, count } grid; the Cauchy CF is exp(i loc t - scale |t|) (closed form, common practice)", async () => {
    const res = await post("/api/v1/cf", { model: { family: "cauchy", loc: 0, scale: 0.5 }, t: { from: -2, to: 2, count: 5 } });
    expect(res.status).toBe(200);
    expect(res.body.t).toEqual([-2, -1, 0, 1, 2]);
    res.body.t.forEach((ti: number, i: number) => close(res.body.re[i], Math.exp(-0.5 * Math.abs(ti)), { rel: 1e-12 }, `Re phi(${ti})`));
  });
});

describe("POST /api/v1/density", () => {
  it("inverts N(0,1) + N(1,2) = N(1, sqrt 5) to pdf and cdf within 1e-9 (jstat normal.pdf / normal.cdf)", async () => {
    const res = await post("/api/v1/density", {
      model: { sum: [{ family: "normal", mu: 0, sigma: 1 }, { family: "normal", mu: 1, sigma: 2 }] },
      grid: { from: -6, to: 8, count: 57 },
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const s = Math.sqrt(5);
    res.body.x.forEach((x: number, i: number) => {
      close(res.body.pdf[i], jStat.normal.pdf(x, 1, s), { abs: 1e-9 }, `pdf(${x})`);
      close(res.body.cdf[i], jStat.normal.cdf(x, 1, s), { abs: 1e-9 }, `cdf(${x})`);
    });
    expect(res.body.atoms).toEqual([]);
    expect(res.body.diagnostics.error.cdf).toBeGreaterThan(0);
    expect(res.body.diagnostics.error.cdf).toBeLessThan(1e-8);
  });

  it("answers a density that is +infinity at a requested point as the documented null, listed in unboundedDensityAt (gamma(0.5, 1) at 0; jstat gamma.pdf beside it)", async () => {
    const res = await post("/api/v1/density", { model: { family: "gamma", shape: 0.5, rate: 1 }, x: [0, 0.5] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.pdf[0]).toBeNull();
    expect(res.body.diagnostics.unboundedDensityAt).toEqual([0]);
    expect(res.body.cdf[0]).toBe(0);
    close(res.body.pdf[1], jStat.gamma.pdf(0.5, 0.5, 1), { rel: 1e-12 }, "pdf(0.5)");
  });

  it("bounds each point of a directly evaluated law on its own: gamma(3, 2) tail values against jstat gamma.cdf", async () => {
    const x = [0.2, 1.5, 6, 12];
    const res = await post("/api/v1/density", { model: { family: "gamma", shape: 3, rate: 2 }, x });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const d = res.body.diagnostics;
    expect(d.pointError.cdf).toHaveLength(x.length);
    expect(d.pointError.sf).toHaveLength(x.length);
    expect(d.pointError.pdf).toHaveLength(x.length);
    x.forEach((xi, i) => {
      // jstat's gamma takes the scale 1/rate; its own error (about 1e-15 relative) is far below the bounds compared
      const sfRef = 1 - jStat.gamma.cdf(xi, 3, 0.5);
      expect(d.pointError.cdf[i]).toBeLessThanOrEqual(d.error.cdf);
      expect(d.pointError.sf[i]).toBeLessThanOrEqual(d.error.cdf);
      close(res.body.cdf[i], jStat.gamma.cdf(xi, 3, 0.5), { abs: d.pointError.cdf[i] + 1e-15 }, `cdf(${xi}) within its point bound`);
      if (xi < 10) close(res.body.sf[i], sfRef, { abs: d.pointError.sf[i] + 1e-15 }, `sf(${xi}) within its point bound`);
    });
    // far in the upper tail (sf(12) = 1.4e-9) the point's sf bound is relative to sf, not the whole answer's
    expect(d.pointError.sf[3]).toBeLessThan(1e-6 * res.body.sf[3]);
  });

  it("returns the pmf of a lattice law: binomial(10, 0.3) against jstat binomial.pdf", async () => {
    const res = await post("/api/v1/density", { model: { family: "binomial", n: 10, p: 0.3 }, x: [0, 3, 7, 10] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    res.body.x.forEach((x: number, i: number) => close(res.body.pmf[i], jStat.binomial.pdf(x, 10, 0.3), { abs: 1e-12 }, `pmf(${x})`));
  });

  it("answers an empirical law (no density) with its atoms and an exact step cdf, never a pdf", async () => {
    const res = await post("/api/v1/density", { model: { sample: [1, Math.SQRT2, Math.PI] }, grid: { from: 0, to: 4, count: 9 } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.pdf).toBeUndefined();
    expect(res.body.atoms.map((a: { x: number }) => a.x)).toEqual([1, Math.SQRT2, Math.PI]);
    expect(res.body.diagnostics.method).toBe("atoms");
    // Empirical cdf of three points (definition, common practice): 0 below 1, 1/3 on [1, sqrt 2), 2/3 on [sqrt 2, pi), 1 after.
    expect(res.body.cdf).toEqual([0, 0, 1 / 3, 2 / 3, 2 / 3, 2 / 3, 2 / 3, 1, 1]);
  });

  it("refuses a density for a discrete law with too many atoms to list (422 not_applicable)", async () => {
    const values = Array.from({ length: 400 }, (_, i) => Math.sqrt(i + 2));
    const res = await post("/api/v1/density", { model: { sum: [{ sample: values }, { sample: values.map((v) => v * Math.E) }, { sample: values.map((v) => v * Math.PI) }] }, grid: { from: 0, to: 4, count: 9 } });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(422);
    expect(res.body.type).toMatch(/not_applicable$/);
  });
});

describe("POST /api/v1/quantiles", () => {
  it("gives gamma(3, rate 2) quantiles within 1e-8 relative (jstat gamma.inv with scale 1/2)", async () => {
    const p = [0.01, 0.5, 0.99];
    const res = await post("/api/v1/quantiles", { model: { family: "gamma", shape: 3, rate: 2 }, p });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    p.forEach((pi, i) => close(res.body.x[i], jStat.gamma.inv(pi, 3, 0.5), { rel: 1e-8 }, `q(${pi})`));
  });

  it("gives the normal expected shortfall mu + sigma phi(z_p) / (1 - p) (closed form, common practice) within 1e-6", async () => {
    const p = [0.95, 0.995];
    const res = await post("/api/v1/quantiles", { model: { family: "normal", mu: 10, sigma: 3 }, p, expectedShortfall: true });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    p.forEach((pi, i) => {
      const z = jStat.normal.inv(pi, 0, 1);
      close(res.body.x[i], 10 + 3 * z, { rel: 1e-8 }, `VaR(${pi})`);
      close(res.body.expectedShortfall[i], 10 + (3 * jStat.normal.pdf(z, 0, 1)) / (1 - pi), { rel: 1e-6 }, `ES(${pi})`);
    });
  });
});

describe("POST /api/v1/moments", () => {
  it("gives gamma moments: mean k/r, variance k/r^2, skewness 2/sqrt k, excess kurtosis 6/k (Johnson, Kotz & Balakrishnan, ch. 17)", async () => {
    const res = await post("/api/v1/moments", { model: { family: "gamma", shape: 2.5, rate: 0.5 }, order: 4 });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    close(res.body.mean, 5, { rel: 1e-12 }, "mean");
    close(res.body.variance, 10, { rel: 1e-12 }, "variance");
    close(res.body.skewness, 2 / Math.sqrt(2.5), { rel: 1e-12 }, "skewness");
    close(res.body.excessKurtosis, 6 / 2.5, { rel: 1e-12 }, "excess kurtosis");
    expect(res.body.exists).toEqual([true, true, true, true]);
  });

  it("says the Cauchy law has no mean: nulls, exists false, and a note (common practice)", async () => {
    const res = await post("/api/v1/moments", { model: { family: "cauchy", loc: 0, scale: 1 }, order: 2 });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.mean).toBeNull();
    expect(res.body.raw).toEqual([null, null]);
    expect(res.body.exists).toEqual([false, false]);
    expect(res.body.notes.join(" ")).toMatch(/infinite/i);
  });
});

describe("POST /api/v1/convolve", () => {
  it("convolves two fair dice to the exact triangular law k/36 (elementary probability, common practice)", async () => {
    const die = { origin: 1, step: 1, p: new Array(6).fill(1 / 6) };
    const res = await post("/api/v1/convolve", { terms: [die, die] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.origin).toBe(2);
    const exact = [1, 2, 3, 4, 5, 6, 5, 4, 3, 2, 1].map((k) => k / 36);
    exact.forEach((e, i) => close(res.body.p[i], e, { abs: 1e-15 }, `p(${i + 2})`));
    // each entry's rounding bound covers its distance to k/36 (the inputs 1/6 as sent are exact; k/36 in double is
    // and the sent 1/6 within 2^-53 relative of theirs: 2^-50 relative taken into the comparison)
    exact.forEach((e, i) => {
      expect(res.body.pError[i]).toBeGreaterThanOrEqual(Math.max(0, Math.abs(res.body.p[i] - e) - e * 2 ** -50));
      expect(res.body.pError[i]).toBeLessThan(1e-14);
    });
  });
});

describe("GET /api/v1/families", () => {
  it("lists every family of the notation with parameters, CF text and moment existence", async () => {
    const res = await supertest(app).get("/api/v1/families").set("authorization", `Bearer ${client.key}`);
    expect(res.status).toBe(200);
    const names = res.body.families.map((f: { family: string }) => f.family);
    expect(names).toHaveLength(FAMILY_NAMES.length);
    expect(names).toEqual(expect.arrayContaining(["normal", "stable", "variance_gamma", "nig", "negative_binomial", "geometric", "lomax", "burr", "triangular", "zero_modified_poisson"]));
    const stable = res.body.families.find((f: { family: string }) => f.family === "stable");
    expect(stable.parameters.map((p: { name: string }) => p.name)).toEqual(expect.arrayContaining(["alpha", "beta", "scale", "loc", "param"]));
  });
});
