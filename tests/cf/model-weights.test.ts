// Weighted samples { sample: [x...], weights: [w...] }: validation pointers, classification, CF and moments against
// the definition of the weighted empirical law (mass w_i / sum w at x_i; common practice).
import { describe, expect, it } from "vitest";
import { compile, SampleSchema, moments } from "@/lib/cf";
import { close, closeC, errorOf } from "./model-assert";


describe("weights: validation (pointer names the field: <node>/weights or <node>/weights/k)", () => {
  const cases: [string, unknown, string, RegExp][] = [
    ["negative weight", { sample: [1, 2, 3], weights: [1, -1, 1] }, "/weights/1", />= 0/],
    ["NaN weight", { sample: [1, 2], weights: [1, NaN] }, "/weights/1", /finite/],
    ["length mismatch", { sample: [1, 2, 3], weights: [1, 2] }, "/weights", /one entry per sample value/],
    ["zero total", { sample: [1, 2], weights: [0, 0] }, "/weights", /positive/],
    ["overflowing total", { sample: [1, 2], weights: [1e308, 1e308] }, "/weights", /largest finite/],
    ["deep in a sum", { sum: [{ family: "normal", mu: 0, sigma: 1 }, { sample: [1, 2], weights: [1, "x"] }] }, "/sum/1/weights/1", /finite/],
    ["not an array", { sample: [1, 2], weights: 3 }, "/weights", /array/],
  ];
  it.each(cases)("%s", (_n, model, pointer, re) => {
    const e = errorOf(model);
    expect(e.code).toBe("invalid_model");
    expect(e.pointer, e.detail).toBe(pointer);
    expect(e.detail).toMatch(re);
  });
  it("zod schema agrees (accepts good weights, rejects mismatch and zero total)", () => {
    expect(SampleSchema.safeParse({ sample: [1, 2], weights: [0.2, 3] }).success).toBe(true);
    expect(SampleSchema.safeParse({ sample: [1, 2], weights: [1] }).success).toBe(false);
    expect(SampleSchema.safeParse({ sample: [1, 2], weights: [0, 0] }).success).toBe(false);
    expect(SampleSchema.safeParse({ sample: [1, 2], weights: [1, -2] }).success).toBe(false);
  });
});

describe("weights: classification (atoms carry normalised weights; equal values merge; zero weights drop)", () => {
  it("incommensurate values: discrete atoms w_i / sum w", () => {
    const k = compile({ sample: [Math.PI, 0, 1, 0], weights: [1, 2, 3, 4] }).kind;
    expect(k.type).toBe("discrete");
    const atoms = (k as { atoms: { x: number; p: number }[] }).atoms;
    const want = [{ x: 0, p: 0.6 }, { x: 1, p: 0.3 }, { x: Math.PI, p: 0.1 }];
    expect(atoms.length).toBe(3);
    want.forEach((a, i) => {
      expect(atoms[i].x).toBe(a.x);
      close(atoms[i].p, a.p, { abs: 1e-15 }, `atom at ${a.x}`);
    });
  });
  it("lattice values: table with weighted frequencies; a zero-weight value is dropped", () => {
    const c = compile({ sample: [2, 0.5, 3.5, 100.25], weights: [3, 1, 1, 0] });
    expect(c.kind).toEqual({ type: "lattice", origin: 0.5, step: 1.5 });
    const t = c.latticeTable!(100)!;
    [0.2, 0.6, 0.2].forEach((p, i) => close(t.p[i], p, { abs: 1e-15 }, `p[${i}]`));
    expect(c.support).toEqual([0.5, 3.5]);
  });
  it("integer weights equal repeated values (unweighted behaviour unchanged)", () => {
    const a = compile({ sample: [1, 2, 2, 7] });
    const b = compile({ sample: [1, 2, 7], weights: [1, 2, 1] });
    expect(b.kind).toEqual(a.kind);
    const t = Float64Array.of(-1.3, 0, 0.4, 2.2);
    const ar = new Float64Array(4), ai = new Float64Array(4), br = new Float64Array(4), bi = new Float64Array(4);
    a.cf(t, ar, ai);
    b.cf(t, br, bi);
    for (let k = 0; k < 4; k++) closeC(br[k], bi[k], ar[k], ai[k], { abs: 1e-15 }, `t=${t[k]}`);
  });
  it("a weighted sample of whole numbers is a count law for compounds", () => {
    expect(() => compile({ compound: { count: { sample: [0, 1, 2.5], weights: [1, 1, 0] }, each: { family: "exponential", rate: 1 } } })).not.toThrow();
  });
});

describe("weights: CF and moments against the definition (common practice: weighted mean and variance)", () => {
  // demo data: claim amounts with exposure weights of an invented cooperative
  const xs = [12.5, 3.25, 7.75, 40.1, 3.25, 19.9, 0.6];
  const ws = [2, 0.5, 1.5, 0.25, 1, 3, 0.75];
  const W = ws.reduce((s, w) => s + w, 0);
  const mean = xs.reduce((s, x, i) => s + ws[i] * x, 0) / W;
  const central = (r: number) => xs.reduce((s, x, i) => s + ws[i] * (x - mean) ** r, 0) / W;
  it("mean, variance, skewness, excess kurtosis: relative error <= 1e-12", () => {
    const m = moments(compile({ sample: xs, weights: ws }), 4);
    close(m.mean!, mean, { rel: 1e-12 }, "weighted mean sum w x / sum w");
    close(m.variance!, central(2), { rel: 1e-12 }, "weighted population variance");
    close(m.skewness!, central(3) / central(2) ** 1.5, { rel: 1e-12 }, "weighted skewness");
    close(m.excessKurtosis!, central(4) / central(2) ** 2 - 3, { rel: 1e-12 }, "weighted excess kurtosis");
  });
  it("CF = sum w_i e^{i t x_i} / sum w at arbitrary and uniform t (abs <= 1e-13)", () => {
    const c = compile({ sample: xs, weights: ws });
    const defn = (t: number) => [xs.reduce((s, x, i) => s + ws[i] * Math.cos(t * x), 0) / W, xs.reduce((s, x, i) => s + ws[i] * Math.sin(t * x), 0) / W];
    for (const t of [Float64Array.of(-2, 0.1, 0.37, 5), Float64Array.from({ length: 600 }, (_, k) => -3 + k * 0.01)]) {
      const re = new Float64Array(t.length), im = new Float64Array(t.length);
      c.cf(t, re, im);
      for (let k = 0; k < t.length; k++) {
        const [r, i] = defn(t[k]);
        closeC(re[k], im[k], r, i, { abs: 1e-13 }, `t=${t[k]}`);
      }
    }
  });
  it("large irregular sample: the uniform-t rotation path equals the per-point cos/sin path (abs <= 1e-13)", () => {
    let seed = 7;
    const rnd = () => {
      seed = (seed * 16807) % 2147483647;
      return seed / 2147483647;
    };
    const n = 5000;
    const sample = Array.from({ length: n }, () => 100 * rnd() + Math.SQRT2 * rnd());
    const weights = sample.map(() => rnd());
    const c = compile({ sample, weights });
    const t = Float64Array.from({ length: 300 }, (_, k) => k * 0.05);
    const re = new Float64Array(300), im = new Float64Array(300);
    c.cf(t, re, im);
    // one point at a time: not a uniform grid, so the direct sum is used
    const one = new Float64Array(1), r1 = new Float64Array(1), i1 = new Float64Array(1);
    for (const k of [0, 1, 31, 32, 127, 128, 129, 299]) {
      one[0] = t[k];
      c.cf(one, r1, i1);
      closeC(re[k], im[k], r1[0], i1[0], { abs: 1e-13 }, `t=${t[k]}`);
    }
  });
});
