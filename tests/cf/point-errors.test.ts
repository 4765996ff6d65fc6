// Per-point error bounds (diagnostics.pointError): a directly evaluated law and a mixture of such laws bound every
// point on its own. References: the lognormal and weibull cdf and sf in closed form through @stdlib erfc and exp
// (Klugman, Panjer & Willmot, Loss Models, app. A); each point's actual error at most its own bound, each point bound
// at most the whole answer's, and a far-tail sf bound relative to the tail.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import gammainc from "@stdlib/math-base-special-gammainc";
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

// Compounds by the damped inversion: every point's own bound (the sums' error grows with e^{beta (x - lo)}), checked
// against the Erlang-mixture / closed-form Bessel references of tests/fixtures/compound/compound.json (generate.py
// beside it, mpmath, its cross-check difference maxCdfDifference) at the fixture's points (the pointwise sums).
describe("per-point error bounds of the damped inversion (tests/fixtures/compound, mpmath)", () => {
  interface Case {
    model: Model;
    points: { x: number; pdf: number; cdf: number; sf: number }[];
    crossCheck: { maxCdfDifference: number };
  }
  const f = JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/compound.json"), "utf8")) as { exponential: Case[] };
  for (const c of f.exponential) {
    it(JSON.stringify(c.model), () => {
      const m = compile(c.model);
      const xs = c.points.map((p) => p.x);
      const ref = c.crossCheck.maxCdfDifference + 1e-16;
      const r = density(m, { x: xs });
      const d = r.diagnostics;
      expect(d.method).toBe("gil-pelaez-damped");
      const pe = d.pointError!;
      expect(pe, "point bounds present").toBeDefined();
      c.points.forEach((p, i) => {
        const msg = `${JSON.stringify(c.model)} at ${p.x}: cdf ${r.cdf[i]} reference ${p.cdf} sf ${r.sf[i]} reference ${p.sf} pdf ${r.pdf![i]} reference ${p.pdf}; point bounds ${pe.cdf[i]} ${pe.sf[i]} ${pe.pdf[i]}, whole ${d.error.cdf} ${d.error.pdf}`;
        expect(pe.cdf[i], msg).toBeLessThanOrEqual(d.error.cdf);
        expect(pe.sf[i], msg).toBeLessThanOrEqual(d.error.cdf);
        expect(pe.pdf[i], msg).toBeLessThanOrEqual(d.error.pdf!);
        expect(Math.abs(r.cdf[i] - p.cdf), msg).toBeLessThanOrEqual(pe.cdf[i] + ref);
        expect(Math.abs(r.sf[i] - p.sf), msg).toBeLessThanOrEqual(pe.sf[i] + ref);
        expect(Math.abs(r.pdf![i] - p.pdf), msg).toBeLessThanOrEqual(pe.pdf[i] + ref);
      });
      // the bound at the nearest point is below the largest one whenever the points spread over the range
      expect(Math.min(...pe.cdf)).toBeLessThan(Math.max(...pe.cdf));
    });
  }
});

describe("per-point error bounds of the damped inversion on an FFT grid", () => {
  // Poisson(2)-exponential(1): given N = n >= 1 claims the sum is gamma(n, 1), so F(x) = e^{-2} sum_n 2^n / n! P(n, x)
  // (the Erlang mixture, Klugman, Panjer & Willmot, Loss Models, compound models with exponential severities), P the
  // regularised lower incomplete gamma of @stdlib/math-base-special-gammainc, summed until the Poisson weights are
  // below 1e-20; the reference's own rounding (40 terms of relative accuracy ~1e-15) allowed as 1e-14
  const lambda = 2;
  const erlangCdf = (x: number) => {
    let pn = Math.exp(-lambda);
    let s = pn;
    for (let n = 1; n < 200 && pn > 1e-20; n++) {
      pn *= lambda / n;
      s += pn * gammainc(x, n);
    }
    return s;
  };
  it("Poisson(2)-exponential(1) on 0.05 .. 20", () => {
    const r = density(compile({ compound: { count: { family: "poisson", lambda }, each: { family: "exponential", rate: 1 } } }), {
      grid: { from: 0.05, to: 20, count: 400 },
    });
    const d = r.diagnostics;
    expect(d.method).toBe("fft-damped");
    const pe = d.pointError!;
    expect(pe, "point bounds present").toBeDefined();
    for (let i = 0; i < r.x.length; i++) {
      const F = erlangCdf(r.x[i]);
      const msg = `x = ${r.x[i]}: cdf ${r.cdf[i]} reference ${F}, point bound ${pe.cdf[i]}, whole ${d.error.cdf}`;
      expect(pe.cdf[i], msg).toBeLessThanOrEqual(d.error.cdf);
      expect(pe.sf[i], msg).toBeLessThanOrEqual(d.error.cdf);
      expect(Math.abs(r.cdf[i] - F), msg).toBeLessThanOrEqual(pe.cdf[i] + 1e-14);
      expect(Math.abs(r.sf[i] - (1 - F)), msg).toBeLessThanOrEqual(pe.sf[i] + 1e-14);
    }
    // the sums' error grows with e^{beta (x - lo)}: the first point's bound is below the last one's
    expect(pe.cdf[0]).toBeLessThan(pe.cdf[r.x.length - 1]);
  });
});

// The light route (pointwise mid-point sums on one window): each point's cdf and sf bound from its own rounding and
// aliasing, checked against the lattice-sums references (tests/fixtures/lattice-sums/generate.py beside them, mpmath
// at 22 digits, each value's second-method difference cdfErr) for the sums with light tails. compile answers these sums
// over their lattice points (lib/cf/direct/lattice-sum.ts): the model without that direct law takes the inversion.
describe("per-point error bounds of the light route (tests/fixtures/lattice-sums, mpmath)", () => {
  interface Case {
    model: Model;
    points: { x: number; cdf: string; sf: string; cdfErr: number }[];
  }
  const f = JSON.parse(readFileSync(join(__dirname, "../fixtures/lattice-sums/lattice-sums.json"), "utf8")) as { cases: Case[] };
  const light = f.cases.filter((c) => !JSON.stringify(c.model).includes("student_t"));
  expect(light.length).toBeGreaterThanOrEqual(2);
  for (const c of light) {
    it(JSON.stringify(c.model), () => {
      const compiled = compile(c.model);
      expect(compiled.direct, "compile answers the sum over its lattice points").toBeDefined();
      const { direct: _direct, ...inverted } = compiled;
      const r = density({ ...inverted, notes: compiled.notes }, { x: c.points.map((p) => p.x) });
      const d = r.diagnostics;
      expect(d.method).toBe("gil-pelaez");
      const pe = d.pointError!;
      expect(pe, "point bounds present").toBeDefined();
      c.points.forEach((p, i) => {
        const F = Number(p.cdf);
        const S = Number(p.sf);
        // the reference's own precision: its second method's difference and the rounding to a double
        const ref = p.cdfErr + 2.3e-16;
        const msg = `${JSON.stringify(c.model)} at ${p.x}: cdf ${r.cdf[i]} reference ${F}, sf ${r.sf[i]} reference ${S}; point bounds ${pe.cdf[i]} ${pe.sf[i]}, whole ${d.error.cdf}`;
        expect(pe.cdf[i], msg).toBeLessThanOrEqual(d.error.cdf);
        expect(pe.sf[i], msg).toBeLessThanOrEqual(d.error.cdf);
        expect(Math.abs(r.cdf[i] - F), msg).toBeLessThanOrEqual(pe.cdf[i] + ref);
        expect(Math.abs(r.sf[i] - S), msg).toBeLessThanOrEqual(pe.sf[i] + ref * Math.max(1, S));
      });
    });
  }
});

// Count laws tabulated by their recursions: each pmf within its own relative bound (and past the table within the bound
// on the pmf there), each cdf within its own, against the (a, b, 1) class references (tests/fixtures/reference-counts/
// generate.py beside them: exact fractions, or mpmath at 40 digits, written as doubles).
describe("per-point error bounds of count tables (tests/fixtures/reference-counts, fractions and mpmath)", () => {
  const f = JSON.parse(readFileSync(join(__dirname, "../fixtures/reference-counts/counts.json"), "utf8")) as { cases: { model: Model; pmf: number[] }[] };
  expect(f.cases.length).toBeGreaterThanOrEqual(10);
  for (const c of f.cases) {
    it(JSON.stringify(c.model), () => {
      const xs = c.pmf.map((_, k) => k);
      const r = density(compile(c.model), { x: xs });
      const d = r.diagnostics;
      expect(d.method).toBe("lattice-table");
      const pe = d.pointError!;
      expect(pe, "point bounds present").toBeDefined();
      let F = 0;
      c.pmf.forEach((p, k) => {
        F += p;
        // the reference's own precision: each double within half an ulp, the running sum one rounding a term
        const refP = 1.2e-16 * p;
        const refF = (k + 2) * 2.3e-16 * F;
        const msg = `${JSON.stringify(c.model)} at ${k}: pmf ${r.pmf![k]} reference ${p}, cdf ${r.cdf[k]} reference ${F}; point bounds ${pe.pdf[k]} ${pe.cdf[k]}, whole ${d.error.pdf} ${d.error.cdf}`;
        expect(pe.pdf[k], msg).toBeLessThanOrEqual(d.error.pdf);
        expect(pe.cdf[k], msg).toBeLessThanOrEqual(d.error.cdf);
        expect(Math.abs(r.pmf![k] - p), msg).toBeLessThanOrEqual(pe.pdf[k] + refP);
        expect(Math.abs(r.cdf[k] - Math.min(F, 1)), msg).toBeLessThanOrEqual(pe.cdf[k] + refF);
      });
      // the bounds follow the values: each point's pmf bound is relative to its pmf (the recursions' per-point bounds
      // grow by a few eps a step: 1e-12 covers tables of some thousand points), not the whole table's bound (which is
      // now the largest of them plus the dropped tail)
      // (points past the table are answered 0 and bounded by the pmf there, checked above)
      c.pmf.forEach((p, k) => {
        if (r.pmf![k] > 0) expect(pe.pdf[k], `${JSON.stringify(c.model)} at ${k}`).toBeLessThanOrEqual(1e-12 * p);
      });
    });
  }
});
