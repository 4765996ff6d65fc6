// Expected shortfall of directly evaluated laws, per-claim layers and 2-3 component mixtures of them against mpmath
// (tests/fixtures/shortfall/generate.py, 40 digits: the quantile by Newton's method on F or S, then the stop-loss transform
// as a closed form, partial moment or normal-mixture integral, checked by the quadrature of S; the bound audit's
// direct/shortfall set takes every level). Here a subset of levels in both tails: the value within its derived bound
// (plus the reference's cross-check difference and 30 digits), and the bound not absurdly loose (at most 1e-5 of
// max(|ES|, 1), as tests/cf/direct-shortfall.test.ts asks of single laws). A law without a finite ES must not be given one;
// one bounded above has its ES whatever its left tail (stable, alpha 0.8, beta -1: it was NaN).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

interface Row {
  p: string;
  q: string;
  q_check: number;
  es: string;
  es_check: number;
}
const F = JSON.parse(readFileSync(new URL("../fixtures/shortfall/shortfall.json", import.meta.url), "utf8")) as { laws: { name: string; model: Model; levels: Row[] }[] };
const SUBSET = ["0.0001", "0.01", "0.5", "0.99", "0.9999"];

describe("ES of direct laws, layers and their mixtures vs mpmath (tests/fixtures/shortfall)", () => {
  it.each(F.laws.map((l) => [l.name, l] as const))("%s", (_name, law) => {
    const rows = law.levels.filter((r) => SUBSET.includes(r.p));
    expect(rows.length, "the fixture has the subset's levels").toBe(SUBSET.length);
    const r = quantiles(compile(law.model), rows.map((l) => Number(l.p)), { expectedShortfall: true });
    const es = r.expectedShortfall!;
    const err = r.diagnostics.expectedShortfallError!;
    const c = new Checker();
    rows.forEach((row, i) => {
      if (row.es === "inf") {
        c.that(`ES(${row.p})`, !Number.isFinite(es[i]), `answered ${es[i]} for a law without a finite ES`);
        return;
      }
      const ref = Number(row.es);
      const refErr = row.es_check + 1e-29 * Math.abs(ref) + 2 ** -53 * Math.abs(ref);
      c.honest(`ES(${row.p})`, es[i], ref, err[i] + refErr);
      // a law bounded above without a mean (stable, alpha < 1, beta = -1) takes ES below the median as q plus the
      // integral of S over (q, 0], about |q|: ES is a small difference of the two and its bound the integral's bracket,
      // held here to 1e-13 of |q| (7.4e-10 on ES -25.8 at p = 1e-4, q = -64 612, from the Gauss panels with the density's
      // derived seventh derivative; the swept chord/tangent brackets gave 2.3e-3, and 348 before the sweep's panels took
      // allowances relative to their own integral)
      const leftOnly = law.name.startsWith("stable(0.8, -1)") && Number(row.p) < 0.5;
      const allowed = leftOnly ? 1e-13 * Math.abs(Number(row.q)) : 1e-5 * Math.max(Math.abs(ref), 1);
      c.that(`ES(${row.p}) bound`, err[i] <= allowed, `${err[i]} against |ES| ${ref}, allowed ${allowed}`);
      // the quantile too, within its own bound and the root's residual
      c.honest(`q(${row.p})`, r.x[i], Number(row.q), r.diagnostics.quantileError[i] + row.q_check + 1e-29 * Math.abs(Number(row.q)) + 2 ** -53 * Math.abs(Number(row.q)));
    });
    c.done();
  });
});

/**
 * Every ES level of a fixture law within its bound (plus the reference's own check and an ulp), the bound at most `worst`
 * times the actual error (taken as at least one ulp of ES: the last bit cannot show looseness), and the median over the
 * levels at most `median` times.
 */
function esWithin(law: (typeof F.laws)[number], worst: number, median: number) {
  const rows = law.levels.filter((r) => r.es !== "inf");
  if (rows.length === 0) return;
  const r = quantiles(compile(law.model), rows.map((l) => Number(l.p)), { expectedShortfall: true });
  const es = r.expectedShortfall!;
  const err = r.diagnostics.expectedShortfallError!;
  const c = new Checker();
  const ratios: number[] = [];
  rows.forEach((row, i) => {
    const ref = Number(row.es);
    const refErr = row.es_check + 1e-29 * Math.abs(ref);
    const actual = Math.abs(es[i] - ref);
    c.honest(`ES(${row.p})`, es[i], ref, err[i] + refErr + 2 ** -53 * Math.abs(ref));
    const ratio = err[i] / Math.max(actual, 2 ** -53 * Math.abs(ref));
    ratios.push(ratio);
    c.that(`ES(${row.p}) looseness`, ratio <= worst, `bound ${err[i]}, actual ${actual}, ratio ${ratio}`);
  });
  ratios.sort((a, b) => a - b);
  const med = ratios[ratios.length >> 1];
  c.that("median bound/actual", med <= median, `median ${med} over ${ratios.length} levels`);
  c.done();
}

// Laws whose ES comes from a closed-form stop-loss transform (lib/cf/direct/stop-loss.ts, the mean excess of pareto and
// lomax, Student t's, a layer's moments, the size-biased mixtures of variance-gamma and NIG in lib/cf/direct/vg-nig.ts),
// and mixtures of such laws (their components' E[(X - q)^+] summed as formed, not taken back from ES - q): every level
// of the fixture, the bound at most 1e4 times the actual error (taken as at least one ulp of ES: an answer exact to the
// last bit cannot show looseness) and its median over the levels at most 500 (before the closed forms the swept brackets
// gave medians of 1e4-1e6 here; the normal cdf's own bound, about 1e-13 relative near z = 2, keeps normal and lognormal
// near 100; Laplace and logistic, 1.5e5 at the median with the swept brackets, take theirs from
// lib/cf/direct/stop-loss.ts symmetricStopLoss)
const CLOSED = /^(normal|lognormal|gamma|weibull|pareto|lomax|student_t|vg|nig|laplace|logistic|layer|mix (normal|gamma|weibull|nig))/;
describe("ES from closed-form stop-loss transforms: bounds within reach of the actual error (tests/fixtures/shortfall)", () => {
  it.each(F.laws.filter((l) => CLOSED.test(l.name)).map((l) => [l.name, l] as const))("%s", (_name, law) => esWithin(law, 1e4, 500));
});

// A light sum on the inverted route (normal + uniform): past the inversion window the tail integral is bounded from the
// central moments (lib/cf/invert/tail-moments.ts, the best even order up to 40); at order 12 that bound was 1.9e-8, 8.6
// standard deviations out, against about 1e-23, and ES(0.999) missed 1e-6 relative. Every level within 1e4 of the actual
// error, median 1e3 (the window's own image and rounding terms, about 1e-13, stay)
describe("ES of a light sum on the inverted route: the tail past the window from moments to order 40 (tests/fixtures/shortfall)", () => {
  it.each(F.laws.filter((l) => /^sum /.test(l.name)).map((l) => [l.name, l] as const))("%s", (_name, law) => esWithin(law, 1e4, 1e3));
});

// Stable laws (and a mixture with one) have no closed-form stop-loss transform: their tail integrals are swept in panels
// of the 4-point Gauss-Legendre rule whose remainder takes a derived bound on the density's seventh derivative from the
// CF (lib/cf/direct/stable-smooth.ts). Every level of the fixture, the bound at most 1e3 times the actual error (taken as
// at least one ulp of ES) and the median at most 100 (the chord/tangent brackets before gave 2e2-1.8e7: 1e-6 relative
// against an actual error of 1e-13; at p = 1e-4 of stable(0.8, -1), q = -64 612, ES is a difference of two numbers near
// |q| and the ratio is about 230)
describe("ES of stable laws from Gauss panels with derived remainders: bounds within reach of the actual error (tests/fixtures/shortfall)", () => {
  it.each(F.laws.filter((l) => /stable/.test(l.name)).map((l) => [l.name, l] as const))("%s", (_name, law) => esWithin(law, 1e3, 100));
});

// ES of a X + b is a ES_X + b for a > 0 (common practice): the scaled and shifted stable law keeps the Gauss panels (its
// density's derivative bounds follow the map, lib/cf/direct/affine.ts), every level within 1e3 of the actual error
describe("ES of a scaled and shifted stable law: the same panels (tests/fixtures/shortfall)", () => {
  const law = F.laws.find((l) => l.name === "stable(1.5, 0.7) S1")!;
  it("2 stable(1.5, 0.7) + 3", () => {
    const rows = law.levels.filter((r) => r.es !== "inf");
    const model = { shift: 3, of: { scale: 2, of: law.model } } as Model;
    const r = quantiles(compile(model), rows.map((l) => Number(l.p)), { expectedShortfall: true });
    const c = new Checker();
    rows.forEach((row, i) => {
      const ref = 2 * Number(row.es) + 3;
      const refErr = 2 * row.es_check + 1e-29 * Math.abs(ref) + 2 ** -52 * Math.abs(ref);
      const es = r.expectedShortfall![i];
      const err = r.diagnostics.expectedShortfallError![i];
      c.honest(`ES(${row.p})`, es, ref, err + refErr);
      const ratio = err / Math.max(Math.abs(es - ref), 2 ** -53 * Math.abs(ref));
      c.that(`ES(${row.p}) looseness`, ratio <= 1e3, `bound ${err}, actual ${Math.abs(es - ref)}, ratio ${ratio}`);
    });
    c.done();
  });
});
