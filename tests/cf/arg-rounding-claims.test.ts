import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { cfValueErrors, tightestWithinBound } from "../support/cf-value-errors";
import type { Model } from "@/lib/cf/types";
import { readFileSync } from "node:fs";
import { join } from "node:path";

// Claim laws beyond the nine of claim-laws.json, with a large mean and a small spread: the claim's log-CF is large in phase
// (about E X t) while |phi_X| stays near 1, so its rounding is far above the compound's own allowance; each declares its
// logRound (lib/cf/families/log-round.ts: variance gamma, NIG, Student t, stable, Poisson, binomial, negative binomial
// claims, the lognormal as a generalized gamma convolution, and a scale and a shift node carrying their child's).
// Reference: tests/fixtures/arg-rounding/claim-laws-more.json (generate_claim_laws_more.py beside it, mpmath 50 digits,
// two methods per claim law: closed forms, mixtures, quadratures).
describe("a compound carries the rounding of each further claim law", () => {
  const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/claim-laws-more.json"), "utf8")) as {
    cases: { name: string; model: Model; grid?: { h: number; K: number }; rows: { t: number; k?: number; phi: number[]; crossCheck: number }[] }[];
  };
  for (const c of fx.cases) {
    const m = compile(c.model);
    // the quadrature claims on their equispaced grid (the phase unwrapped along it), the others one frequency at a time
    const grid = c.grid ? Float64Array.from({ length: c.grid.K }, (_, i) => (i + 1) * c.grid!.h) : null;
    const gRe = grid ? new Float64Array(grid.length) : null;
    const gIm = grid ? new Float64Array(grid.length) : null;
    if (grid) m.logCf(grid, gRe!, gIm!);
    const errorAt = (r: { t: number; k?: number; phi: number[] }) => {
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      if (grid) {
        expect(grid[r.k! - 1]).toBe(r.t);
        re[0] = gRe![r.k! - 1];
        im[0] = gIm![r.k! - 1];
      } else m.logCf(Float64Array.of(r.t), re, im);
      return cfValueErrors(m, re[0], im[0], r.t, r.phi);
    };
    it(`${c.name}: the two methods agree, the slope is derived, and the allowance alone is below the error somewhere`, () => {
      for (const r of c.rows) expect(r.crossCheck, `t ${r.t}`).toBeLessThan(1e-30);
      expect(Number.isFinite(m.cfArgSlope ?? NaN) && (m.cfArgSlope ?? 0) > 0).toBe(true);
      // the quadrature claims' declared CF error (about 2e-15 / sigma for the lognormal, growing with alpha for the
      // Pareto) stays above their phase's rounding (u E X t where |phi_X| is near 1, t up to about 1 / sd): their rows
      // check the bound on the unwrapped grid, not that the term is needed
      if (!grid) expect(c.rows.some((r) => errorAt(r).err > 4 * errorAt(r).own)).toBe(true);
      else {
        // the claim law's own phase on that grid is unwrapped far past pi (about E X t)
        const each = compile((c.model as unknown as { compound: { each: Model } }).compound.each);
        const xr = new Float64Array(grid.length);
        const xi = new Float64Array(grid.length);
        each.logCf(grid, xr, xi);
        expect(Math.abs(xi[grid.length - 1])).toBeGreaterThan(1000);
      }
    });
    it(`${c.name}: the allowance plus the declared slope (per frequency) is never below the actual error, within 100x where largest`, () => {
      const tightest = tightestWithinBound(c.rows, errorAt);
      if (!grid) expect(tightest).toBeLessThan(100);
    });
  }
});

// A claim law that declares no such bound is not silently taken as exact: the compound's notes say the term is left out.
describe("a claim law without a derived log rounding is named in the notes", () => {
  it("a compound of mixture claims (its log unwrapped along the grid) notes it; a gamma claim's does not", () => {
    const note = (each: object) => compile({ compound: { count: { family: "poisson", lambda: 1 }, each } } as unknown as Model).notes.some((n) => n.includes("not derived for this claim law"));
    expect(note({ mix: [{ weight: 0.7, of: { family: "gamma", shape: 2, rate: 1 } }, { weight: 0.3, of: { family: "lognormal", mu: 1, sigma: 1 } }] })).toBe(true);
    expect(note({ family: "gamma", shape: 2, rate: 1 })).toBe(false);
  });
});

// The quadrature claims' per-frequency bound (lib/cf/families/log-round.ts ggcLogRound: |phi| |L| <= min(1/e, E X t) +
// max(pi |phi|, min(|phi| E X t, int_0^t |phi'|)), the last through the family's derivative majorant), which a Poisson(1)
// compound takes times |P'(phi_X)| = |exp(phi_X - 1)| (bounded through the compound's majorant), against that product with
// |phi| |L| on the continuous branch. Reference: tests/fixtures/arg-rounding/ggc-log.json (generate_ggc_log.py beside it:
// the Pareto CF by the exponential integral and by the incomplete gamma function, mpmath 30 digits, the argument unwrapped
// on a fine grid); P' of the Poisson pgf in closed form (common practice).
describe("the quadrature claims' log rounding per frequency", () => {
  const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/ggc-log.json"), "utf8")) as {
    model: object;
    rows: { t: number; absPhi: number; theta: number; phiTimesLog: number; crossCheck: number }[];
  };
  it("a Poisson(1) compound of Pareto(3, 1) claims bounds |P'(phi_X)| 8 u |phi_X| |L_X| at every row, within 20x, and tighter than the slope alone", () => {
    const m = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: fx.model } } as unknown as Model);
    let slopeOnly = 0;
    for (const r of fx.rows) {
      expect(r.crossCheck, `t ${r.t}`).toBeLessThan(1e-25);
      const dP = Math.exp(r.absPhi * Math.cos(r.theta) - 1);
      const need = dP * 8 * Number.EPSILON * r.phiTimesLog;
      const b = m.cfArgErrAt!(r.t);
      expect(b, `t ${r.t}: bound ${b}, |P'| 8 u |phi| |L| ${need}`).toBeGreaterThanOrEqual(need);
      expect(b / need, `t ${r.t}`).toBeLessThan(20);
      slopeOnly = Math.max(slopeOnly, ((m.cfArgSlope ?? 0) * r.t) / need);
    }
    expect(slopeOnly).toBeGreaterThan(50);
  });
});
