// Invariants on every answer, over random models from the whole notation (fast-check; a failure prints the model):
// 0 <= cdf <= 1, cdf non-decreasing, cdf + sf = 1 within the bound, pdf >= -bound, quantile(p) consistent with the
// cdf at the same model, the mean consistent with the numerical mean of the computed distribution.
// These are facts of every probability law (common practice); the engine is never its own reference here.
import fc from "fast-check";
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { randomModel, rng } from "../support/random-models";

const RUNS = Number(process.env.SUMFOLD_PROPERTY_RUNS ?? 25);
const HEAVY_RUNS = Number(process.env.SUMFOLD_PROPERTY_HEAVY_RUNS ?? 3);

// Left out for this file's time budget (they take seconds to minutes in the general route today, see the model
// benchmark): uniform and laplace terms (densities with kinks), mixtures of several densities.
const models = (heavy: boolean, maxTerms: number) =>
  fc.integer({ min: 1, max: 2 ** 31 - 1 }).map((seed) => randomModel(rng(seed), maxTerms, heavy, false, false, false));

function check(model: Model): void {
  const c = compile(model);
  const kind = c.kind.type;
  if (kind === "discrete") return;
  const lo = c.location - 6 * c.scale;
  const hi = c.location + 6 * c.scale;
  const xs = Array.from({ length: 9 }, (_, i) => lo + ((hi - lo) * i) / 8);
  const r = density(c, { x: xs, tolerance: 1e-8 });
  const e = r.diagnostics.error.cdf;
  const ep = r.diagnostics.error.pdf;
  const fail = (what: string) => {
    throw new Error(`${what}; model ${JSON.stringify(model)}; method ${r.diagnostics.method}; cdf bound ${e}`);
  };
  for (let i = 0; i < xs.length; i++) {
    if (!(r.cdf[i] >= 0 && r.cdf[i] <= 1)) fail(`cdf(${xs[i]}) = ${r.cdf[i]} outside [0, 1]`);
    if (!(r.sf[i] >= 0 && r.sf[i] <= 1)) fail(`sf(${xs[i]}) = ${r.sf[i]} outside [0, 1]`);
    if (!(Math.abs(r.cdf[i] + r.sf[i] - 1) <= 2 * e + 1e-14)) fail(`cdf + sf - 1 = ${r.cdf[i] + r.sf[i] - 1} at ${xs[i]}`);
    if (i > 0 && !(r.cdf[i] >= r.cdf[i - 1] - 2 * e - 1e-15)) fail(`cdf decreases from ${r.cdf[i - 1]} to ${r.cdf[i]} at ${xs[i]}`);
    if (r.pdf && !(r.pdf[i] >= -ep - 1e-15)) fail(`pdf(${xs[i]}) = ${r.pdf[i]} below -bound ${ep}`);
    if (r.pmf && !(r.pmf[i] >= -e - 1e-15)) fail(`pmf(${xs[i]}) = ${r.pmf[i]} negative`);
  }
  // quantile consistency: F(q + d) >= p - e and F(q - d) <= p + e with d the stated quantile error (plus a hair)
  const ps = [0.05, 0.5, 0.95];
  const q = quantiles(c, ps);
  for (let i = 0; i < ps.length; i++) {
    const x = q.x[i];
    const d = q.diagnostics.quantileError[i];
    if (!Number.isFinite(x) || !Number.isFinite(d)) continue;
    const hair = 1e-9 * Math.max(Math.abs(x), c.scale) + d;
    const step = kind === "lattice" ? (c.kind as { step: number }).step / 2 : 0;
    const at = density(c, { x: [x + hair, x - hair - step], tolerance: 1e-8 });
    const eb = at.diagnostics.error.cdf + q.diagnostics.cdfError;
    if (!(at.cdf[0] >= ps[i] - eb)) fail(`quantile ${ps[i]} = ${x} (error ${d}) but F(q + d) = ${at.cdf[0]}`);
    if (!(at.cdf[1] <= ps[i] + eb)) fail(`quantile ${ps[i]} = ${x} (error ${d}) but F(q - d) = ${at.cdf[1]}`);
  }
}

/** the mean against the numerical mean of the computed cdf: E X = int_0^inf S - int_-inf^0 F (light tails only) */
function checkMean(model: Model): void {
  const c = compile(model);
  if (c.kind.type !== "continuous" && c.kind.type !== "mixed") return;
  if (Number.isFinite(Math.min(c.tails.left, c.tails.right))) return;
  const mean = c.cumulants(1)[0];
  if (mean === null) return;
  const a = Math.min(c.location - 14 * c.scale, c.support[0]);
  const b = c.location + 14 * c.scale;
  const lo = Number.isFinite(c.support[0]) ? Math.max(a, c.support[0] - c.scale) : a;
  if (!Number.isFinite(lo) || !Number.isFinite(b) || !(b > lo)) return;
  const n = 4097;
  const r = density(c, { grid: { from: lo, to: b, count: n }, tolerance: 1e-9, cdfOnly: true });
  const dx = (b - lo) / (n - 1);
  // int (1{x>=0} - F(x)) dx over [lo, b] by the trapezoid rule, starting from lo (F(lo) ~ 0)
  let m = lo;
  for (let i = 1; i < n; i++) m += 0.5 * dx * (r.sf[i] + r.sf[i - 1]);
  const err = r.diagnostics.error.cdf * (b - lo) + (dx * dx * (b - lo)) / 4 + 1e-6 * c.scale;
  if (!(Math.abs(m - mean) <= err + 1e-3 * dx * 100)) {
    throw new Error(`mean ${mean} but the computed cdf integrates to ${m} (allowance ${err}); model ${JSON.stringify(model)}`);
  }
}

describe("invariants on every answer (random models from the whole notation)", () => {
  it(`${RUNS} light-tailed models (sums, mixes, compounds, scales, shifts, lattices; up to 8 terms)`, () => {
    fc.assert(fc.property(models(false, 3), (m) => check(m)), { numRuns: RUNS, seed: 20261203 });
  }, 600_000);
  it(`${HEAVY_RUNS} models with heavy-tailed terms (student t, pareto, lognormal, weibull, stable)`, () => {
    fc.assert(fc.property(models(true, 2), (m) => check(m)), { numRuns: HEAVY_RUNS, seed: 7 });
  }, 600_000);
  it("means agree with the numerical mean of the computed cdf", () => {
    fc.assert(fc.property(models(false, 3), (m) => checkMean(m)), { numRuns: 20, seed: 11 });
  }, 600_000);
});
