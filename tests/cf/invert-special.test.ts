// Lattice and atomic laws, and special inputs (NaN, infinities, empty and huge requests, bad tolerances).
import { describe, expect, it } from "vitest";
import jStat from "jstat";
import erfc from "@stdlib/math-base-special-erfc";
import { CfError } from "@/lib/cf/errors";
import { MAX_GRID_POINTS } from "@/lib/cf/limits";
import { density } from "@/lib/cf/invert/density";
import { Checker, binomialLattice, build, normal, poissonLattice } from "./invert-helpers";

const J = ((jStat as unknown as { jStat?: unknown }).jStat ?? jStat) as {
  binomial: { pdf(k: number, n: number, p: number): number; cdf(k: number, n: number, p: number): number };
  poisson: { pdf(k: number, l: number): number };
};

function cfCode(f: () => unknown): string | null {
  try {
    f();
    return null;
  } catch (e) {
    return e instanceof CfError ? e.code : `other: ${String(e)}`;
  }
}

describe("lattice laws (reference: jstat binomial/poisson pmf)", () => {
  for (const withTable of [false, true]) {
    it(`binomial(30, 0.35) pmf, cdf, sf ${withTable ? "from the exact table" : "by FFT of the CF"}`, () => {
      const r = density(binomialLattice(30, 0.35, withTable));
      const c = new Checker();
      c.that("method", r.diagnostics.method === (withTable ? "lattice-table" : "lattice-fft"), r.diagnostics.method);
      c.that("has pmf, no pdf", !!r.pmf && !r.pdf);
      let total = 0;
      for (let i = 0; i < r.x.length; i++) {
        const k = r.x[i];
        const ref = J.binomial.pdf(k, 30, 0.35);
        total += r.pmf![i];
        c.abs(`pmf k=${k}`, r.pmf![i], ref, 1e-13);
        c.honest(`pmf k=${k}`, r.pmf![i], ref, r.diagnostics.error.pdf + 1e-15);
        let cum = 0;
        for (let j = 0; j <= k; j++) cum += J.binomial.pdf(j, 30, 0.35);
        c.abs(`cdf k=${k}`, r.cdf[i], cum, 1e-13);
        c.abs(`sf k=${k}`, r.sf[i], 1 - cum, 1e-13);
      }
      c.abs("mass", total, 1, 1e-13);
      c.done();
    });
  }

  it("poisson(7) on step 0.5: pmf at arbitrary points is zero off the lattice, cdf steps", () => {
    const r = density(poissonLattice(7, 0.5), { x: [0, 0.25, 3.5, 3.6, 100] });
    const c = new Checker();
    c.abs("pmf at 0", r.pmf![0], J.poisson.pdf(0, 7), 1e-13);
    c.abs("pmf off lattice", r.pmf![1], 0, 0);
    c.abs("pmf at 3.5 (k = 7)", r.pmf![2], J.poisson.pdf(7, 7), 1e-13);
    c.abs("cdf at 3.6 equals cdf at 3.5", r.cdf[3], r.cdf[2], 0);
    c.abs("sf far right", r.sf[4], 0, 1e-13);
    c.done();
  });

  it("density of a discrete law without a listed lattice is not_applicable", () => {
    const m = build({ logCf: () => [0, 0], kind: { type: "discrete", atoms: null }, location: 0, scale: 1 });
    expect(cfCode(() => density(m))).toBe("not_applicable");
  });

  it("discrete law with listed atoms gives a pmf at the atoms and a step cdf", () => {
    const atoms = [
      { x: 0, p: 0.25 },
      { x: Math.SQRT2, p: 0.5 },
      { x: Math.PI, p: 0.25 },
    ];
    const m = build({ logCf: () => [0, 0], kind: { type: "discrete", atoms }, location: 1, scale: 1 });
    const r = density(m, { x: [-1, 0, 1, Math.SQRT2, 4] });
    expect(Array.from(r.pmf!)).toEqual([0, 0.25, 0, 0.5, 0]);
    expect(Array.from(r.cdf)).toEqual([0, 0.25, 0.25, 0.75, 1]);
    expect(Array.from(r.sf)).toEqual([1, 0.75, 0.75, 0.25, 0]);
  });
});

describe("special inputs", () => {
  const m = normal(0, 1);
  it("NaN or infinite points are rejected with a pointer", () => {
    for (const bad of [NaN, Infinity, -Infinity]) {
      try {
        density(m, { x: [0, bad] });
        throw new Error("no error");
      } catch (e) {
        expect(e).toBeInstanceOf(CfError);
        expect((e as CfError).pointer).toBe("/x/1");
      }
    }
  });
  it("zero, negative and NaN tolerances are rejected", () => {
    for (const t of [0, -1e-9, NaN, Infinity]) expect(cfCode(() => density(m, { x: [0], tolerance: t }))).toBe("invalid_model");
  });
  it("an empty point list returns empty arrays", () => {
    const r = density(m, { x: [] });
    expect(r.x.length).toBe(0);
    expect(r.cdf.length).toBe(0);
  });
  it("bad grids: zero count, reversed ends, too many points", () => {
    expect(cfCode(() => density(m, { grid: { from: 0, to: 1, count: 0 } }))).toBe("invalid_model");
    expect(cfCode(() => density(m, { grid: { from: 1, to: 0, count: 10 } }))).toBe("invalid_model");
    expect(cfCode(() => density(m, { grid: { from: 0, to: 1, count: MAX_GRID_POINTS + 1 } }))).toBe("limit_exceeded");
    expect(cfCode(() => density(m, { grid: { from: 0, to: NaN, count: 10 } }))).toBe("invalid_model");
  });
  it("fft on arbitrary points is not_applicable; x and grid together are rejected", () => {
    expect(cfCode(() => density(m, { x: [0, 1], method: "fft" }))).toBe("not_applicable");
    expect(cfCode(() => density(m, { x: [0], grid: { from: 0, to: 1, count: 3 } }))).toBe("invalid_model");
  });
  it("a single grid point and the automatic grid work", () => {
    const one = density(m, { grid: { from: 0.5, to: 0.5, count: 1 } });
    expect(one.x.length).toBe(1);
    // standard normal pdf at 0.5 (common practice closed form)
    expect(Math.abs(one.pdf![0] - Math.exp(-0.125) / Math.sqrt(2 * Math.PI))).toBeLessThan(1e-9);
    const auto = density(m);
    expect(auto.x.length).toBe(1024);
    expect(auto.diagnostics.method).toBe("fft");
    expect(auto.x[0]).toBeLessThan(-5);
    expect(auto.x[1023]).toBeGreaterThan(5);
  });
  it("a huge grid (2^20 points) runs and stays accurate", () => {
    const r = density(m, { grid: { from: -8, to: 8, count: 2 ** 20 }, cdfOnly: true });
    // standard normal cdf = erfc(-x/sqrt 2)/2 (Abramowitz & Stegun 26.2.29; erfc from @stdlib/math-base-special-erfc)
    const c = new Checker();
    for (const i of [0, 12345, 2 ** 19, 2 ** 20 - 7]) c.abs(`cdf x=${r.x[i]}`, r.cdf[i], 0.5 * erfc(-r.x[i] / Math.SQRT2), 1e-9);
    c.done();
    expect(r.diagnostics.gridSize).toBeGreaterThanOrEqual(2 ** 20);
  });
  it("overrides: a too-narrow range or a too-low frequency cut-off give larger, still honest, estimates", () => {
    const c = new Checker();
    const xs = [-2, -0.5, 0, 1, 2.5];
    // standard normal references (Abramowitz & Stegun 26.2.29 via @stdlib/math-base-special-erfc)
    const F = (x: number) => 0.5 * erfc(-x / Math.SQRT2);
    const f = (x: number) => Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);
    for (const opts of [{ range: { from: -3, to: 3 } }, { range: { from: -4.5, to: 3.5 } }, { maxFrequency: 3 }, { maxFrequency: 5 }]) {
      const r = density(m, { x: xs, ...opts });
      const e = r.diagnostics.error;
      c.that(`${JSON.stringify(opts)} estimate grows`, e.cdf > 1e-6, String(e.cdf));
      for (let i = 0; i < xs.length; i++) {
        c.honest(`${JSON.stringify(opts)} cdf x=${xs[i]}`, r.cdf[i], F(xs[i]), e.cdf);
        c.honest(`${JSON.stringify(opts)} pdf x=${xs[i]}`, r.pdf![i], f(xs[i]), e.pdf);
      }
    }
    c.done();
  });

  it("caller-owned output buffers are filled in place", () => {
    const out = { pdf: new Float64Array(3), cdf: new Float64Array(3), sf: new Float64Array(3) };
    const r = density(m, { x: [-1, 0, 1], out });
    expect(r.cdf).toBe(out.cdf);
    expect(r.pdf).toBe(out.pdf);
    // standard normal cdf at 0 is 1/2 (symmetry)
    expect(Math.abs(out.cdf[1] - 0.5)).toBeLessThan(1e-12);
    expect(Math.abs(out.sf[0] - 0.5 * erfc(-1 / Math.SQRT2))).toBeLessThan(1e-12);
  });
  it("points far beyond the bulk get tiny tails, not garbage", () => {
    const r = density(m, { x: [-1e6, 1e6] });
    const c = new Checker();
    c.abs("cdf(-1e6)", r.cdf[0], 0, 1e-12);
    c.abs("sf(1e6)", r.sf[1], 0, 1e-12);
    c.abs("pdf(1e6)", r.pdf![1], 0, 1e-12);
    c.done();
  });
});
