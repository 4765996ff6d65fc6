// Aggregate claims with pareto and lomax severities through the public API: continuous laws (atom at 0 plus a density)
// with finite, honest bounds on every quantile and expected shortfall, against tests/fixtures/compound/heavy.json
// (generate.py --heavy-only: rounded-down lattice compounds extrapolated in the span, cross-checked by an mpmath finite
// sum for pareto and by mpmath's de Hoog inversion with the lomax transform in closed form).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import supertest from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { apiServer, orgWithKey } from "../support/api";

interface Case {
  model: { compound: { count: { family: string; lambda?: number }; each: { family: string; alpha?: number; theta?: number } } };
  atom0: number;
  points: { x: number; cdf: number; sf: number; cdfErr: number }[];
  levels: { p: number; q: number; qErr: number; es: number; esErr: number }[];
}
const cases = (JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/heavy.json"), "utf8")) as { cases: Case[] }).cases;
const c = cases.find((k) => k.model.compound.each.family === "pareto" && k.model.compound.each.alpha === 3)!;

const app = apiServer();
let key: string;
beforeAll(async () => {
  key = (await orgWithKey()).secret;
});
const post = (path: string, body: unknown) =>
  supertest(app).post(path).set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify(body));

describe("Poisson(2)-pareto(3, 1) aggregate claims through the API", () => {
  it("quantiles 0.95 .. 0.999: within their stated bounds (finite), continuous method, not a lattice", async () => {
    const levels = c.levels.filter((l) => l.p >= 0.95 && l.p <= 0.999);
    const res = await post("/api/v1/quantiles", { model: c.model, p: levels.map((l) => l.p), expectedShortfall: true });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.diagnostics.method).toBe("gil-pelaez-damped");
    levels.forEach((l, i) => {
      const got = res.body.x[i];
      const bound = res.body.diagnostics.quantileError[i];
      const d = Math.abs(got - l.q);
      expect(Number.isFinite(bound), `p=${l.p}: bound ${bound}`).toBe(true);
      expect(d, `p=${l.p}: got ${got}, reference ${l.q}, difference ${d}, stated bound ${bound}, reference uncertainty ${l.qErr}`).toBeLessThanOrEqual(bound + l.qErr);
      // the accuracy target (1e-7 relative) is met by the stated bound itself
      expect(bound / l.q, `p=${l.p}: relative bound`).toBeLessThan(1e-7);
      expect(res.body.expectedShortfall[i]).toBeGreaterThan(got);
    });
  });

  it("density: the atom at 0 is P(N = 0) = e^-2, cdf and sf within the stated bound (<= 1e-9)", async () => {
    const res = await post("/api/v1/density", { model: c.model, x: c.points.map((p) => p.x) });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.atoms).toHaveLength(1);
    expect(res.body.atoms[0].x).toBe(0);
    // P(N = 0) = e^{-lambda} (Poisson law, common practice)
    expect(Math.abs(res.body.atoms[0].p - Math.exp(-2))).toBeLessThan(1e-15);
    expect(res.body.pdf).toBeDefined();
    const bound = res.body.diagnostics.error.cdf;
    expect(bound).toBeGreaterThan(0);
    expect(bound).toBeLessThanOrEqual(1e-9);
    c.points.forEach((p, i) => {
      const d = Math.abs(res.body.cdf[i] - p.cdf);
      expect(d, `cdf(${p.x}): got ${res.body.cdf[i]}, reference ${p.cdf}, difference ${d}, bound ${bound}`).toBeLessThanOrEqual(bound + p.cdfErr);
      expect(Math.abs(res.body.sf[i] - p.sf)).toBeLessThanOrEqual(bound + p.cdfErr);
    });
  });
});

const lomax = cases.find((k) => k.model.compound.each.family === "lomax" && k.model.compound.each.alpha === 2.5)!;

describe("Poisson(2)-lomax(2.5, 1) aggregate claims through the API", () => {
  it("quantiles and ES at 0.95 .. 0.9999: continuous (gil-pelaez-damped), every value within its stated bound", async () => {
    const levels = lomax.levels.filter((l) => l.p >= 0.95);
    const res = await post("/api/v1/quantiles", { model: lomax.model, p: levels.map((l) => l.p), expectedShortfall: true });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.diagnostics.method).toBe("gil-pelaez-damped");
    expect(res.body.diagnostics.notes.some((n: string) => /gamma kernels/.test(n))).toBe(true);
    levels.forEach((l, i) => {
      const q = res.body.x[i];
      const qb = res.body.diagnostics.quantileError[i];
      expect(Math.abs(q - l.q), `p=${l.p}: got ${q}, reference ${l.q}, bound ${qb}, reference uncertainty ${l.qErr}`).toBeLessThanOrEqual(qb + l.qErr);
      const es = res.body.expectedShortfall[i];
      const eb = res.body.diagnostics.expectedShortfallError[i];
      expect(Math.abs(es - l.es), `ES p=${l.p}: got ${es}, reference ${l.es}, bound ${eb}, reference uncertainty ${l.esErr}`).toBeLessThanOrEqual(eb + l.esErr);
    });
  });

  it("density: atom e^-2 at 0 and a pdf; the opt-in discretisation still answers a labelled lattice law", async () => {
    const res = await post("/api/v1/density", { model: lomax.model, x: lomax.points.map((p) => p.x) });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    // P(S = 0) = P(N = 0) = e^{-lambda} (Poisson law, common practice)
    expect(res.body.atoms).toHaveLength(1);
    expect(Math.abs(res.body.atoms[0].p - Math.exp(-2))).toBeLessThan(1e-15);
    expect(res.body.pdf).toBeDefined();
    const bound = res.body.diagnostics.error.cdf;
    lomax.points.forEach((p, i) => {
      expect(Math.abs(res.body.cdf[i] - p.cdf), `cdf(${p.x}): got ${res.body.cdf[i]}, reference ${p.cdf}, bound ${bound}`).toBeLessThanOrEqual(bound + p.cdfErr);
    });
    const disc = await post("/api/v1/density", { model: lomax.model, x: [5], method: "discretise" });
    expect(disc.status, JSON.stringify(disc.body)).toBe(200);
    expect(disc.body.diagnostics.method).toBe("discretised");
    // the lattice approximation's cdf at 5 is within its own stated bound of the reference
    const ref = lomax.points.find((p) => p.x === 5)!;
    expect(Math.abs(disc.body.cdf[0] - ref.cdf)).toBeLessThanOrEqual(disc.body.diagnostics.error.cdf + ref.cdfErr);
  });
});
