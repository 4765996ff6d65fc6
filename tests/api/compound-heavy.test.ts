// Aggregate claims with a pareto severity through the public API: a continuous law (atom at 0 plus a density) with
// finite, honest bounds on every quantile, against tests/fixtures/compound/heavy.json (generate.py --heavy-only:
// rounded-down lattice compounds extrapolated in the span, cross-checked by an mpmath finite sum).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import supertest from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { apiServer, orgWithKey } from "../support/api";

interface Case {
  model: { compound: { count: { family: string; lambda?: number }; each: { family: string; alpha?: number } } };
  atom0: number;
  points: { x: number; cdf: number; sf: number; cdfErr: number }[];
  levels: { p: number; q: number; qErr: number }[];
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
