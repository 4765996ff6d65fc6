import jStatDefault from "jstat";
import { describe, expect, it } from "vitest";
import { histogram, summarize } from "@/lib/datasets/stats";
import { near } from "./support";

// types/jstat.d.ts types the distributions only; these are the vector functions used here (jstat src/vector.js).
interface VectorStats {
  mean(x: number[]): number;
  stdev(x: number[], sample?: boolean): number;
  min(x: number[]): number;
  max(x: number[]): number;
  quantiles(x: number[], p: number[], alphap?: number, betap?: number): number[];
  skewness(x: number[]): number;
  kurtosis(x: number[]): number;
  histogram(x: number[], bins: number): number[];
}
const jStat = jStatDefault as unknown as VectorStats;

// Demo inputs (invented): a seeded generator of claim-like sizes; the expected values come from jstat.
function lcg(seed: number) {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}
function claims(n: number, seed: number): number[] {
  const u = lcg(seed);
  return Array.from({ length: n }, () => Math.round(Math.exp(6 + 1.2 * Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u())) * 100) / 100);
}
const expand = (x: number[], c: number[]) => x.flatMap((v, i) => Array<number>(c[i]).fill(v));
// jStat.quantiles with alphap = betap = 1 is Hyndman & Fan type 7 (its port of scipy's mquantiles);
// jStat.percentile is not used: it returns the lower order statistic inside the last interval (n = 2).
const type7 = (x: number[], p: number) => jStat.quantiles(x, [p], 1, 1)[0];
const TOL = 1e-12; // relative (floor 1): both sides sum in double precision in a different order

describe("summarize: unweighted sample against jstat", () => {
  for (const [n, seed] of [[2, 1], [7, 2], [1001, 3], [20000, 4]] as const) {
    it(`n = ${n}`, () => {
      const x = claims(n, seed);
      const s = summarize(Float64Array.from(x));
      const checks: [string, number | null, number][] = [
        ["mean (jStat.mean)", s.mean, jStat.mean(x)],
        ["sd, n-1 (jStat.stdev(x, true))", s.sd, jStat.stdev(x, true)],
        ["min (jStat.min)", s.min, jStat.min(x)],
        ["max (jStat.max)", s.max, jStat.max(x)],
        ["q1 type 7 (jStat.quantiles(x, [0.25], 1, 1))", s.q1, type7(x, 0.25)],
        ["median type 7 (jStat.quantiles(x, [0.5], 1, 1))", s.median, type7(x, 0.5)],
        ["q3 type 7 (jStat.quantiles(x, [0.75], 1, 1))", s.q3, type7(x, 0.75)],
        ["skewness g1 (jStat.skewness)", s.skewness, jStat.skewness(x)],
        ["excess kurtosis g2 (jStat.kurtosis)", s.kurtosis, jStat.kurtosis(x)],
      ];
      for (const [label, v, e] of checks) near(`${label}, n=${n}`, v, e, TOL);
      expect(s).toMatchObject({ rows: n, n, weightKind: "none", sdDivisor: "n-1", quartileRule: "type 7" });
    });
  }

  it("1..n against the exact moments of the discrete uniform law", () => {
    // Each reference is an exact rational formed from the points themselves in BigInt (twice the deviations,
    // d_i = 2 i - (n + 1), keep every sum whole): mean (n + 1) / 2, sample variance sum d^2 / (4 (n - 1)), population
    // skewness sum d^3 (= 0 by symmetry, summed here) and excess kurtosis n sum d^4 / (sum d^2)^2 - 3 (common practice,
    // the definitions of g1 and g2). Only the last division rounds, to 18 digits.
    const ratio = (a: bigint, b: bigint) => Number((a * 10n ** 18n) / b) / 1e18;
    for (const n of [5, 100, 4097]) {
      const s = summarize(Float64Array.from({ length: n }, (_, i) => i + 1));
      let s2 = 0n, s3 = 0n, s4 = 0n;
      for (let i = 1; i <= n; i++) {
        const d = BigInt(2 * i - (n + 1));
        s2 += d * d;
        s3 += d * d * d;
        s4 += d * d * d * d;
      }
      const N = BigInt(n);
      near(`mean n=${n}`, s.mean, ratio(N + 1n, 2n), 1e-14);
      near(`sd n=${n}`, s.sd, Math.sqrt(ratio(s2, 4n * (N - 1n))), 1e-13);
      near(`skewness n=${n}`, s.skewness, ratio(s3, s2), 1e-12);
      near(`kurtosis n=${n}`, s.kurtosis, ratio(N * s4, s2 * s2) - 3, 1e-12);
      near(`median n=${n}`, s.median, ratio(N + 1n, 2n), 0);
    }
  });
});

describe("summarize: weighted tables", () => {
  it("counts: equal to the expanded sample (jstat on the expansion)", () => {
    const x = [0, 1, 2, 3, 5];
    const c = [812, 143, 38, 7, 0];
    const e = expand(x, c);
    const s = summarize(Float64Array.from(x), Float64Array.from(c), "counts");
    const checks: [string, number | null, number][] = [
      ["n = sum of counts", s.n, 1000],
      ["mean (jStat.mean)", s.mean, jStat.mean(e)],
      ["sd (jStat.stdev(e, true))", s.sd, jStat.stdev(e, true)],
      ["q1 (jStat.quantiles, type 7)", s.q1, type7(e, 0.25)],
      ["median (jStat.quantiles, type 7)", s.median, type7(e, 0.5)],
      ["q3 (jStat.quantiles, type 7)", s.q3, type7(e, 0.75)],
      ["skewness (jStat.skewness)", s.skewness, jStat.skewness(e)],
      ["kurtosis (jStat.kurtosis)", s.kurtosis, jStat.kurtosis(e)],
      ["max ignores zero-count rows (jStat.max)", s.max, jStat.max(e)],
    ];
    for (const [label, v, ex] of checks) near(label, v, ex, TOL);
    expect(s.weightKind).toBe("counts");
  });

  it("counts with a fractional type 7 position (jStat.quantiles type 7 on the expansion)", () => {
    const x = [10, 20, 30, 40];
    const c = [1, 2, 2, 1];
    const e = expand(x, c);
    const s = summarize(Float64Array.from(x), Float64Array.from(c), "counts");
    near("q1", s.q1, type7(e, 0.25), TOL);
    near("q3", s.q3, type7(e, 0.75), TOL);
  });

  it("real weights: moments of the law, equal to the population moments of a rational expansion", () => {
    // weights 0.125, 0.5, 0.25, 0.125 describe the same law as counts 1, 4, 2, 1
    const x = [-3, 0.5, 2, 10];
    const w = [0.125, 0.5, 0.25, 0.125];
    const e = expand(x, [1, 4, 2, 1]);
    const s = summarize(Float64Array.from(x), Float64Array.from(w), "weights");
    near("mean (jStat.mean)", s.mean, jStat.mean(e), TOL);
    near("sd of the law (jStat.stdev(e), population)", s.sd, jStat.stdev(e), TOL);
    near("skewness (jStat.skewness)", s.skewness, jStat.skewness(e), TOL);
    near("kurtosis (jStat.kurtosis)", s.kurtosis, jStat.kurtosis(e), TOL);
    // Hyndman & Fan (1996) type 1: x_(ceil(N p)) of the sorted expansion
    const sorted = [...e].sort((a, b) => a - b);
    for (const [p, v] of [[0.25, s.q1], [0.5, s.median], [0.75, s.q3]] as const) near(`quantile ${p} (type 1)`, v, sorted[Math.ceil(e.length * p) - 1], 0);
    expect(s).toMatchObject({ n: 1, sdDivisor: "sum of weights", quartileRule: "inverse cdf" });
  });
});

describe("summarize: special inputs", () => {
  it("one value: sd, skewness and kurtosis are null", () => {
    expect(summarize(Float64Array.of(42))).toMatchObject({ n: 1, mean: 42, sd: null, min: 42, q1: 42, median: 42, q3: 42, max: 42, skewness: null, kurtosis: null });
  });
  it("all values equal: zero sd, no skewness or kurtosis", () => {
    expect(summarize(new Float64Array(10).fill(-7))).toMatchObject({ mean: -7, sd: 0, skewness: null, kurtosis: null });
  });
  it("empty sample throws", () => {
    expect(() => summarize(new Float64Array(0))).toThrow(RangeError);
  });
  it("huge magnitudes do not overflow the two-pass moments", () => {
    const s = summarize(Float64Array.of(1e150, 1e150 + 2e134, 1e150 - 2e134));
    near("mean", s.mean, 1e150, 1e-15);
    near("skewness", s.skewness, 0, 1e-9);
  });
});

describe("histogram against jStat.histogram", () => {
  for (const n of [3, 50, 2500]) {
    it(`n = ${n}`, () => {
      const x = claims(n, 10 + n);
      const h = histogram(Float64Array.from(x));
      const k = h.counts.length;
      expect(k).toBe(Math.min(40, Math.ceil(Math.sqrt(n))));
      expect(h.counts, `counts for n=${n}, k=${k}`).toEqual(jStat.histogram(x, k));
      expect(h.edges[0]).toBe(jStat.min(x));
      expect(h.edges[k]).toBe(jStat.max(x));
    });
  }
  it("weighted: bins sum the weights; equal values make one bin; empty input no bins", () => {
    const h = histogram(Float64Array.of(0, 1, 2, 3), Float64Array.of(5, 0, 1, 2));
    expect(h.counts.reduce((a, b) => a + b, 0)).toBe(8);
    expect(histogram(Float64Array.of(4, 4, 4))).toEqual({ edges: [4, 4], counts: [3] });
    expect(histogram(new Float64Array(0))).toEqual({ edges: [], counts: [] });
  });
});
