// Convolution of tabulated lattice laws (direct and FFT with zero padding), n-fold powers and latticeTable of compiled
// models (Panjer tables: lattice-panjer.test.ts), against exact rationals and brute-force definitions.
import gammainc from "@stdlib/math-base-special-gammainc";
import erfc from "@stdlib/math-base-special-erfc";
import { density } from "@/lib/cf/invert/density";
import { afterAll, describe, expect, it } from "vitest";
import { compile, convolve, convolveDirect, convolveFft, convolveTables, powerTable, CfError } from "@/lib/cf";
import { close, record, worst } from "./model-assert";
import { buildNode } from "@/lib/cf/compile";
import { validateModel } from "@/lib/cf/validate";
import { binomExact, diceExact, maxAbsDiff, ratio } from "../support/lattice-exact";


describe("dice and binomials vs exact rationals (absolute error <= 1e-15)", () => {
  const dice: [number, number][] = [[2, 6], [3, 6], [5, 6], [10, 6], [20, 6], [4, 20], [7, 12]];
  it.each(dice)("sum of %d fair %d-sided dice via repeat (exact counts by integer convolution)", (n, s) => {
    const c = compile({ repeat: n, of: { lattice: { origin: 1, step: 1, p: new Array(s).fill(1 / s) } } });
    const t = c.latticeTable!(1 << 20)!;
    const ex = diceExact(n, s);
    expect([t.origin, t.step, t.p.length]).toEqual([n, 1, ex.length]);
    const err = maxAbsDiff(t.p, ex);
    record("lattice abs error (dice)", err);
    close(err, 0, { abs: 1e-15 }, `max |p - exact| for ${n}d${s}`);
    close(t.tailMass, 0, { abs: 1e-14 }, "tail mass");
  });
  it("dice through a sum of different dice: d4 + d6 + d8 + d20 (exact counts)", () => {
    const die = (s: number) => ({ lattice: { origin: 1, step: 1, p: new Array(s).fill(1 / s) } });
    const t = compile({ sum: [die(4), die(6), die(8), die(20)] }).latticeTable!(1000)!;
    let ways: bigint[] = [1n];
    for (const s of [4, 6, 8, 20]) {
      const next = new Array<bigint>(ways.length + s - 1).fill(0n);
      for (let i = 0; i < ways.length; i++) for (let f = 0; f < s; f++) next[i + f] += ways[i];
      ways = next;
    }
    const ex = ways.map((w) => ratio(w, 4n * 6n * 8n * 20n));
    expect(t.origin).toBe(4);
    const err = maxAbsDiff(t.p, ex);
    record("lattice abs error (dice)", err);
    close(err, 0, { abs: 1e-15 }, "d4+d6+d8+d20");
  });
  const bins: [number, bigint, bigint][] = [[1, 1n, 2n], [10, 1n, 2n], [60, 1n, 2n], [25, 1n, 4n], [40, 3n, 8n]];
  it.each(bins)("repeat %d of bernoulli(%d/%d) vs C(n,k) p^k q^(n-k) in exact arithmetic", (n, num, den) => {
    const p = Number(num) / Number(den);
    const t = compile({ repeat: n, of: { family: "bernoulli", p } }).latticeTable!(1 << 20)!;
    const err = maxAbsDiff(t.p, binomExact(n, num, den));
    record("lattice abs error (binomial via repeat)", err);
    close(err, 0, { abs: 1e-15 }, `bernoulli^${n}`);
  });
  it.each(bins)("binomial(%d, %d/%d) table vs exact", (n, num, den) => {
    const t = compile({ family: "binomial", n, p: Number(num) / Number(den) }).latticeTable!(1 << 20)!;
    const err = maxAbsDiff(t.p, binomExact(n, num, den));
    record("lattice abs error (binomial table)", err);
    close(err, 0, { abs: 1e-15 }, `binomial ${n}`);
  });
  it("sum of binomials with a common p is binomial: binomial(7,1/4) + binomial(13,1/4) = binomial(20,1/4) (JKK ch. 3)", () => {
    const t = compile({ sum: [{ family: "binomial", n: 7, p: 0.25 }, { family: "binomial", n: 13, p: 0.25 }] }).latticeTable!(100)!;
    const err = maxAbsDiff(t.p, binomExact(20, 1n, 4n));
    record("lattice abs error (binomial table)", err);
    close(err, 0, { abs: 1e-15 }, "binomial sum");
  });
});

describe("tables of laws whose P(N = 0) underflows (bulk window, saddle-point pmf of Loader 2000)", () => {
  it("binomial(3000, 1/4) vs C(n,k) 3^(n-k) / 4^n in exact arithmetic", () => {
    const t = compile({ family: "binomial", n: 3000, p: 0.25 }).latticeTable!(1 << 20)!;
    const ex = binomExact(3000, 1n, 4n);
    expect(t.origin).toBeGreaterThan(0);
    let err = 0;
    for (let k = 0; k < t.p.length; k++) err = Math.max(err, Math.abs(t.p[k] - ex[t.origin + k]));
    record("lattice abs error (binomial bulk table)", err);
    close(err, 0, { abs: 1e-15 }, "binomial(3000, 1/4)");
    close(t.tailMass, 0, { abs: 1e-13 }, "tail mass");
  });
  it("poisson(1e6): mass, mean and variance (JKK ch. 4) within rounding of a 40 000-entry sum", () => {
    const t = compile({ family: "poisson", lambda: 1e6 }).latticeTable!(1 << 20)!;
    let s = 0;
    let mean = 0;
    for (let k = 0; k < t.p.length; k++) {
      s += t.p[k];
      mean += (t.origin + k) * t.p[k];
    }
    let v = 0;
    for (let k = 0; k < t.p.length; k++) v += (t.origin + k - mean) ** 2 * t.p[k];
    close(s, 1, { abs: 1e-13 }, "mass");
    close(mean, 1e6, { rel: 1e-13 }, "mean");
    close(v, 1e6, { rel: 1e-10 }, "variance");
  });
  it("poisson(900) saddle-point pmf vs the multiplicative recursion from the mode of poisson pmf ratios (independent route)", () => {
    const t = compile({ family: "poisson", lambda: 900 }).latticeTable!(1 << 20)!;
    // p_k / p_{k-1} = lambda / k (JKK ch. 4): walk from the table's own mode value outward and compare the shape
    const m = 900 - t.origin;
    let err = 0;
    let up = t.p[m];
    for (let k = m + 1; k < Math.min(t.p.length, m + 200); k++) {
      up *= 900 / (t.origin + k);
      err = Math.max(err, Math.abs(up - t.p[k]) / t.p[k]);
    }
    record("relative error (poisson pmf ratios)", err);
    close(err, 0, { abs: 1e-13 }, "ratio consistency over 200 steps");
  });
});

describe("large convolutions (FFT with zero padding)", () => {
  it("binomial(20000, 1/2) as a 20000-fold power (frequency-domain power) vs exact, and mass conserved", () => {
    const n = 20000;
    const t = powerTable({ origin: 0, step: 1, p: Float64Array.of(0.5, 0.5), tailMass: 0 }, n);
    expect(t.p.length).toBe(n + 1);
    const ex = binomExact(n, 1n, 2n);
    const err = maxAbsDiff(t.p, ex);
    record("lattice abs error (binomial 20000 via FFT power)", err);
    close(err, 0, { abs: 1e-15 }, "binomial(20000, 1/2)");
    let s = 0;
    for (const v of t.p) s += v;
    close(s, 1, { abs: 1e-12 }, "mass");
  });
  it("binomial(5000, 1/4) by repeated squaring vs exact", () => {
    const t = powerTable({ origin: 0, step: 1, p: Float64Array.of(0.75, 0.25), tailMass: 0 }, 5000);
    const err = maxAbsDiff(t.p, binomExact(5000, 1n, 4n));
    record("lattice abs error (binomial 5000 via squaring)", err);
    close(err, 0, { abs: 1e-15 }, "binomial(5000, 1/4)");
  });
  it("two 65 536-point lattices: FFT result equals direct convolution within 1e-15 and conserves mass", () => {
    const L = 65536;
    const a = new Float64Array(L);
    const b = new Float64Array(L);
    let sa = 0;
    let sb = 0;
    // deterministic pseudo-random weights (LCG; Numerical Recipes constants, common practice)
    let seed = 12345;
    const rnd = () => ((seed = (1664525 * seed + 1013904223) >>> 0) / 2 ** 32);
    for (let k = 0; k < L; k++) {
      a[k] = rnd();
      b[k] = rnd() * Math.exp(-k / 5000);
      sa += a[k];
      sb += b[k];
    }
    for (let k = 0; k < L; k++) {
      a[k] /= sa;
      b[k] /= sb;
    }
    const c = convolve(a, b);
    expect(c.length).toBe(2 * L - 1);
    let s = 0;
    for (const v of c) s += v;
    close(s, 1, { abs: 1e-13 }, "mass of the convolution");
    // direct sums at sampled indices (exact to rounding)
    let err = 0;
    for (const k of [0, 1, 77, 4095, 30000, 65535, 65536, 100000, 131070]) {
      let d = 0;
      for (let i = Math.max(0, k - L + 1); i <= Math.min(k, L - 1); i++) d += a[i] * b[k - i];
      err = Math.max(err, Math.abs(c[k] - d));
    }
    record("lattice abs error (65536 x 65536 FFT vs direct)", err);
    close(err, 0, { abs: 1e-15 }, "FFT vs direct");
  });
  it("convolveFft and convolveDirect agree on random tables of awkward sizes", () => {
    let seed = 7;
    const rnd = () => ((seed = (1664525 * seed + 1013904223) >>> 0) / 2 ** 32);
    for (const [la, lb] of [[1, 1], [3, 700], [1000, 999], [4097, 33]]) {
      const a = Float64Array.from({ length: la }, rnd);
      const b = Float64Array.from({ length: lb }, rnd);
      const d = convolveDirect(a, b);
      const f = convolveFft(a, b);
      // tolerance of the form c eps log2 N ||a||_2 ||b||_2, the usual shape of the FFT convolution's rounding error
      // (common practice), with c = 5
      const N = 2 ** Math.ceil(Math.log2(la + lb - 1));
      const norm = (x: Float64Array) => Math.sqrt(x.reduce((s, v) => s + v * v, 0));
      const bound = 5 * 2 ** -53 * Math.max(1, Math.log2(N)) * norm(a) * norm(b);
      close(maxAbsDiff(d, f), 0, { abs: bound }, `sizes ${la}, ${lb}`);
    }
  });
});

describe("tables through operators", () => {
  it("mixture of lattices on a common lattice: weights add pointwise (common practice)", () => {
    const t = compile({
      mix: [
        { weight: 0.25, of: { lattice: { origin: 0, step: 0.5, p: [0.5, 0.5] } } },
        { weight: 0.75, of: { family: "bernoulli", p: 0.5 } },
      ],
    }).latticeTable!(100)!;
    expect([t.origin, t.step]).toEqual([0, 0.5]);
    const want = [0.125 + 0.375, 0.125, 0.375];
    close(maxAbsDiff(t.p, want), 0, { abs: 1e-16 }, "mixture table");
  });
  it("negative scale reverses the table; shift moves the origin", () => {
    const t = compile({ shift: 10, of: { scale: -2, of: { family: "binomial", n: 3, p: 0.25 } } }).latticeTable!(100)!;
    expect([t.origin, t.step]).toEqual([4, 2]);
    close(maxAbsDiff(t.p, binomExact(3, 1n, 4n).reverse()), 0, { abs: 1e-16 }, "reversed binomial");
  });
  it("sample on a lattice is tabulated with empirical frequencies", () => {
    const t = compile({ sample: [2, 0.5, 2, 3.5, 2] }).latticeTable!(100)!;
    expect([t.origin, t.step]).toEqual([0.5, 1.5]);
    close(maxAbsDiff(t.p, [0.2, 0.6, 0.2]), 0, { abs: 1e-16 }, "empirical table");
  });
});

describe("special inputs", () => {
  it("empty tables and bad powers are rejected; incommensurate steps are not a lattice", () => {
    expect(() => convolve(new Float64Array(0), Float64Array.of(1))).toThrow(CfError);
    expect(() => powerTable({ origin: 0, step: 1, p: Float64Array.of(1), tailMass: 0 }, 0)).toThrow(CfError);
    expect(() =>
      convolveTables([
        { origin: 0, step: 1, p: Float64Array.of(0.5, 0.5), tailMass: 0 },
        { origin: 0, step: Math.SQRT2, p: Float64Array.of(0.5, 0.5), tailMass: 0 },
      ]),
    ).toThrow(/not commensurate/);
  });
  it("truncation reports the dropped mass; a table dropping more than 1e-11 is not offered (the CF route does better)", () => {
    const node = buildNode(validateModel({ family: "poisson", lambda: 10 }));
    const t = node.table!(10)!;
    expect(t.p.length).toBe(10);
    // the dropped mass P(N >= 10) = P(10, 10), the lower regularised incomplete gamma (Loss Models app. B; @stdlib
    // gammainc): tailMass bounds it from above (the continued recursion with its roundings and remainder), within 1e-13
    const dropped = gammainc(10, 10);
    expect(t.tailMass).toBeGreaterThanOrEqual(dropped * (1 - 1e-15));
    expect(t.tailMass).toBeLessThanOrEqual(dropped * (1 + 1e-13));
    expect(compile({ family: "poisson", lambda: 10 }).latticeTable!(10)).toBeNull();
    const die = { origin: 1, step: 1, p: new Float64Array(6).fill(1 / 6), tailMass: 0 };
    const d = convolveTables([die, die, die], 5);
    expect(d.p.length).toBe(5);
    // three dice sum to at most 7 with probability 35/216 (1 + 3 + 6 + 10 + 15 ways, common practice): the rest dropped
    expect(d.tailMass).toBeGreaterThanOrEqual(181 / 216);
    close(d.tailMass, 181 / 216, { abs: 1e-14 }, "tail mass of a truncated convolution");
    // the bulk of 10^6 dice lies beyond 2^20 steps from the origin: no table, and no time spent building one
    expect(compile({ repeat: 1e6, of: { lattice: { origin: 1, step: 1, p: new Array(6).fill(1 / 6) } } }).latticeTable!(1 << 20)).toBeNull();
  });
  it("continuous and non-lattice models have no exact table", () => {
    expect(compile({ family: "normal", mu: 0, sigma: 1 }).latticeTable).toBeUndefined();
    expect(compile({ sample: [0, 1, Math.PI] }).latticeTable).toBeUndefined();
  });
  it("a single-point lattice and a degenerate binomial", () => {
    expect(compile({ lattice: { origin: 2, step: 1, p: [0, 1, 0] } }).latticeTable!(5)).toEqual({ origin: 3, step: 1, p: Float64Array.of(1), tailMass: 0 });
    expect(compile({ family: "binomial", n: 5, p: 1 }).latticeTable!(5)!.origin).toBe(5);
  });
});

afterAll(() => {
  console.log("worst errors (lattice):", JSON.stringify(worst, null, 1));
});

describe("reflected lattice laws: the reversed table keeps its dropped mass below its origin", () => {
  it("-Poisson(3): the table is Poisson(3)'s reversed (JKK ch. 4 pmf), its cut mass below it, and a per-claim layer refuses it", () => {
    const t = compile({ scale: -1, of: { family: "poisson", lambda: 3 } }).latticeTable!(1 << 20)!;
    const n = t.p.length;
    expect(t.origin).toBe(-(n - 1));
    expect(t.tailBelow).toBe(true);
    // p_k = e^-3 3^k / k! at x = -k, each entry within its own bound (pointErr) of the closed form (the closed form's own
    // rounding, a few ulps, is far below the entries' bounds of 1e-31 and up only at the smallest entries: compared with
    // a relative slack of 1e-14)
    let fact = 1;
    for (let k = 0; k < n; k++) {
      if (k > 0) fact *= k;
      // the closed form by its power and factorial (not the engine's ratio recursion)
      const pk = (Math.exp(-3) * 3 ** k) / fact;
      const i = n - 1 - k;
      expect(Math.abs(t.p[i] - pk)).toBeLessThanOrEqual(t.pointErr![i] + 1e-14 * pk);
    }
    // the mass below the table: at most its tailMass (the Poisson tail past n - 1, JKK ch. 4: below p_{n-1} 3 / (n - 3))
    expect(t.tailMass).toBeGreaterThan(0);
    expect(t.tailMass).toBeLessThanOrEqual(t.p[0] * (3 / (n - 3)) * 1.01);
    expect(() => compile({ layer: { deductible: -5, limit: 3 }, of: { scale: -1, of: { family: "poisson", lambda: 3 } } } as never)).toThrow(CfError);
  });
  it("0.5 normal(0, 1) + 0.5 (-Poisson(3)): the reflected atoms listed from the table, cdf = 0.5 Phi(x) + 0.5 P(N >= -x) (erfc, regularised incomplete gamma)", () => {
    const r = density(compile({ mix: [{ weight: 0.5, of: { family: "normal", mu: 0, sigma: 1 } }, { weight: 0.5, of: { scale: -1, of: { family: "poisson", lambda: 3 } } }] }), { x: [-10, -3, -0.5, 0, 2] });
    r.x.forEach((x, i) => {
      // P(N >= k) = P(k, 3), the lower regularised incomplete gamma (JKK ch. 4), k = ceil(-x) >= 1; 1 for k <= 0
      const k = Math.ceil(-x);
      const tail = k <= 0 ? 1 : gammainc(3, k);
      const want = 0.5 * (0.5 * erfc(-x / Math.SQRT2)) + 0.5 * tail;
      const bound = r.diagnostics.pointError ? r.diagnostics.pointError.cdf[i] : r.diagnostics.error.cdf;
      expect(bound).toBeLessThan(1e-9);
      // (the references within a few ulps of their values)
      expect(Math.abs(r.cdf[i] - want)).toBeLessThanOrEqual(bound + 1e-15 * want);
    });
  });
});
