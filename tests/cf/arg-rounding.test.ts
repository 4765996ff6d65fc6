import { describe, expect, it } from "vitest";
import { cfValueErrors, tightestWithinBound } from "../support/cf-value-errors";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import { density } from "@/lib/cf/invert/density";
import { cfRelError, cfUlps, declaredCfError } from "@/lib/cf/invert/part";
import { exactGrid, exactGridStep } from "@/lib/cf/arg-rounding";
import type { Model } from "@/lib/cf/types";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import ref from "../fixtures/arg-rounding/arg-rounding.json";

// The frequency's rounding before a CF is called: a X evaluates phi_X at fl(a t), off by up to u |a t|. References:
// mpmath's closed forms at the exact a t and at the IEEE product fl(a t) (tests/fixtures/arg-rounding/generate.py, two
// methods, their difference in crossCheck). Model: a times compound Poisson(1) of gamma(1e8, 1), whose CF turns fast in
// s (E X = 1e8) while its log stays small: the rounding of a t shows far above the units of rounding allowed for log phi.
const compoundOnly = { compound: { count: { family: "poisson", lambda: ref.model.lambda }, each: { family: "gamma", shape: ref.model.shape, rate: ref.model.rate } } } as unknown as Model;
const model = (a: number) =>
  ({ scale: a, of: { compound: { count: { family: "poisson", lambda: ref.model.lambda }, each: { family: "gamma", shape: ref.model.shape, rate: ref.model.rate } } } }) as unknown as Model;

describe("argument rounding of scaled laws", () => {
  it("the fixture's two methods agree", () => {
    for (const r of ref.rows) expect(r.crossCheck, `a ${r.a} t ${r.t}`).toBeLessThan(1e-30);
  });

  it("the declared slope bounds the CF's change from fl(a t) to a t (mpmath), and is 0 where a t is exact", () => {
    for (const r of ref.rows) {
      const m = compile(model(r.a));
      const slope = m.cfArgSlope ?? 0;
      const bound = slope * r.t;
      // a power of two scales exactly: nothing added to the child's own slope (its severity's rounding, see below)
      if (r.a === 0.25) expect(slope, `a ${r.a}`).toBe(0.25 * (compile(compoundOnly).cfArgSlope ?? NaN));
      expect(r.argEffect, `a ${r.a} t ${r.t}: argument effect ${r.argEffect}, bound ${bound}`).toBeLessThanOrEqual(bound);
    }
  });

  it("the effect is above what the CF values' relative allowance carried before (so the term is needed)", () => {
    let above = 0;
    for (const r of ref.rows.filter((x) => x.a === 0.3)) {
      const m = compile(model(r.a));
      const t = Float64Array.of(r.t);
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      m.logCf(t, re, im);
      // the allowance of ./invert/part.ts for one value (centre 0) plus the declared absolute error
      const allowance = Math.exp(re[0]) * cfRelError(cfUlps(m), re[0], im[0], r.t, 0) + declaredCfError(m);
      if (r.argEffect > 4 * allowance) above++;
    }
    expect(above).toBeGreaterThan(0);
  });
});

// IEEE 754 binary64 (common practice): a product of a 24-bit and a 29-bit significand has at most 53 bits, so is exact. The
// check computes (k + 1/2) h exactly in BigInt (h = m 2^e) and compares it with the double product.
describe("exact inversion steps", () => {
  const exactProduct = (k: number, h: number): boolean => {
    let e = 0;
    let m = h;
    while (!Number.isInteger(m)) {
      m *= 2;
      e++;
    }
    // (2k + 1) m / 2^(e + 1) against the double (k + 0.5) * h scaled by the same power of two
    const want = BigInt(2 * k + 1) * BigInt(m);
    const got = (k + 0.5) * h * 2 ** (e + 1);
    return Number.isInteger(got) && BigInt(got) === want;
  };
  it("(k + 1/2) h is exact for every k < K once h is rounded to 29 bits, and is not in general before", () => {
    let inexactBefore = 0;
    for (const h0 of [2 * Math.PI / 37.3, 1e-3 / 3, 0.7071067811865476, 2 * Math.PI / 1234567.8]) {
      const h = exactGridStep(h0);
      expect(h).toBeLessThanOrEqual(h0);
      expect(h).toBeGreaterThan(h0 * (1 - 2 ** -27));
      expect(exactGrid(h, 1 << 22)).toBe(true);
      expect(exactGrid(h0, 1 << 22)).toBe(false);
      for (const k of [0, 1, 12345, 999999, (1 << 22) - 1]) {
        expect(exactProduct(k, h), `h ${h} k ${k}`).toBe(true);
        if (!exactProduct(k, h0)) inexactBefore++;
      }
    }
    expect(inexactBefore).toBeGreaterThan(0);
  });
});

// The severity's own rounding: gamma(1e8, 1)'s log is i 1e8 atan(s) in phase, computed within a few ulps of |L_X| ~ 1e8 s,
// so the compound's value moves by up to E N ulps u |phi_X| |L_X|, far above the compound's own allowance relative to its
// small log. Reference: the fixture's rows at a = 0.25, where 0.25 t is exact and mpmath's value at it is the unscaled
// compound's CF at sRounded (tests/fixtures/arg-rounding/generate.py, two methods).
describe("a compound carries its severity's rounding", () => {
  const m = compile(compoundOnly);
  const rows = ref.rows.filter((x) => x.a === 0.25);
  const errorAt = (s: number, exact: number[]) => {
    const re = new Float64Array(1);
    const im = new Float64Array(1);
    m.logCf(Float64Array.of(s), re, im);
    const own = Math.exp(re[0]) * cfRelError(cfUlps(m), re[0], im[0], s, 0) + declaredCfError(m);
    return { err: Math.hypot(Math.exp(re[0]) * Math.cos(im[0]) - exact[0], Math.exp(re[0]) * Math.sin(im[0]) - exact[1]), own };
  };

  it("the compound's relative allowance alone is below the actual error somewhere (so the term is needed)", () => {
    expect(rows.some((r) => errorAt(r.sRounded, r.exact).err > 4 * errorAt(r.sRounded, r.exact).own)).toBe(true);
  });

  it("the allowance plus the declared slope E N R s is never below the actual error, and within 100x of it where it is largest", () => {
    const S = m.cfArgSlope ?? 0;
    let tightest = Infinity;
    for (const r of rows) {
      const { err, own } = errorAt(r.sRounded, r.exact);
      const bound = own + S * r.sRounded;
      expect(err, `s ${r.sRounded}: error ${err}, bound ${bound}`).toBeLessThanOrEqual(bound);
      if (err > 4 * own) tightest = Math.min(tightest, bound / err);
    }
    expect(tightest).toBeLessThan(100);
  });
});

// Many claims: the severity's value g = exp(L_X) is computed within a few ulps of |g| (and of |g| |L_X|, the term above),
// and Poisson(1e4) multiplies that by lambda in the compound's log, far above the compound's allowance relative to its own
// small log at small t. Reference: tests/fixtures/arg-rounding/large-count.json (generate_large_count.py beside it, mpmath,
// two methods).
describe("a compound of many claims carries its severity's rounding", () => {
  const big = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/large-count.json"), "utf8")) as {
    model: Model;
    rows: { t: number; phi: number[]; crossCheck: number }[];
  };
  const m = compile(big.model);
  it("the CF values are within the declared allowance plus the slope's, at every row, and within 100x where largest", () => {
    const S = m.cfArgSlope ?? 0;
    let closest = 0;
    for (const r of big.rows) {
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      m.logCf(Float64Array.of(r.t), re, im);
      const own = Math.exp(re[0]) * cfRelError(cfUlps(m), re[0], im[0], r.t, 0) + declaredCfError(m);
      const err = Math.hypot(Math.exp(re[0]) * Math.cos(im[0]) - r.phi[0], Math.exp(re[0]) * Math.sin(im[0]) - r.phi[1]);
      const bound = own + S * r.t + r.crossCheck;
      expect(err, `t ${r.t}: error ${err}, bound ${bound} (allowance ${own}, slope ${S * r.t})`).toBeLessThanOrEqual(bound);
      closest = Math.max(closest, err / bound);
    }
    expect(closest, "largest error / bound").toBeGreaterThan(1e-2);
  });
});

// Claim laws other than gamma with a large mean and a small spread: the claim's log-CF is large in phase (about E X t) while
// |phi_X| stays near 1, so its rounding is far above the compound's own allowance; each family declares its logRound
// (lib/cf/families: inverseGaussianLogRound, uniformLogRound, pointLogRound, shiftLogRound for normal, Cauchy, Laplace and
// logistic). Reference: tests/fixtures/arg-rounding/
// claim-laws.json (generate_claim_laws.py beside it, mpmath 50 digits, two methods per claim law).
describe("a compound carries the rounding of each closed-form claim law", () => {
  const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/claim-laws.json"), "utf8")) as {
    cases: { name: string; model: Model; rows: { t: number; phi: number[]; crossCheck: number }[] }[];
  };
  for (const c of fx.cases) {
    const m = compile(c.model);
    const at = (t: number) => {
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      m.logCf(Float64Array.of(t), re, im);
      return { re: re[0], im: im[0] };
    };
    const errorAt = (r: { t: number; phi: number[] }) => {
      const { re, im } = at(r.t);
      return cfValueErrors(m, re, im, r.t, r.phi);
    };
    it(`${c.name}: the two methods agree, the slope is derived, and the allowance alone is below the error somewhere`, () => {
      for (const r of c.rows) expect(r.crossCheck, `t ${r.t}`).toBeLessThan(1e-30);
      expect(Number.isFinite(m.cfArgSlope ?? NaN) && (m.cfArgSlope ?? 0) > 0).toBe(true);
      expect(c.rows.some((r) => errorAt(r).err > 4 * errorAt(r).own)).toBe(true);
    });
    it(`${c.name}: the allowance plus the declared slope (per frequency) is never below the actual error, within 100x where largest`, () => {
      const tightest = tightestWithinBound(c.rows, errorAt);
      expect(tightest).toBeLessThan(100);
    });
  }
});

// Without a first absolute moment (Cauchy, pareto alpha <= 1) the scale node derives no bound on the rounding of a t: the
// answer must say so (a note), not take it as 0; with one (gamma), or at a power of two (a t exact), no such note.
describe("a scaled term without a first absolute moment says its argument rounding is not bounded", () => {
  const noted = (m: unknown) => compile(m as Model).notes.some((n) => /rounding of the scaled frequency a t is not bounded/.test(n));
  it("Cauchy and pareto(0.9) scaled by 3 and 1.7: noted, also inside a sum", () => {
    expect(noted({ scale: 3, of: { family: "cauchy", loc: 0, scale: 1 } })).toBe(true);
    expect(noted({ sum: [{ scale: 1.7, of: { family: "pareto", alpha: 0.9, xm: 1 } }, { family: "gamma", shape: 2, rate: 1 }] })).toBe(true);
  });
  it("gamma scaled by 3, Cauchy scaled by 4 (exact): no note", () => {
    expect(noted({ scale: 3, of: { family: "gamma", shape: 2, rate: 1 } })).toBe(false);
    // no variance, but a first absolute moment (Student t nu 1.5, stable alpha 1.3: tests/cf/abs-moment.test.ts)
    expect(noted({ scale: 1.7, of: { family: "student_t", nu: 1.5, loc: 0, scale: 1 } })).toBe(false);
    expect(noted({ sum: [{ scale: 3, of: { family: "stable", alpha: 1.3, beta: 0.4, scale: 1, loc: 0 } }, { family: "normal", mu: 0, sigma: 1 }] })).toBe(false);
    expect(noted({ scale: 4, of: { family: "cauchy", loc: 0, scale: 1 } })).toBe(false);
  });
});

// The inversion's rounded nodes move the transform by at most u t_k times its Lipschitz constant, E|X - c| (common
// practice: |d/dt E e^{it(X - c)}| <= E|X - c|). Without a bound on it (a term without a mean: Cauchy, stable alpha <= 1)
// that move is left out, and the answer must say so; where one is derived (a light sum by its variance; a stable law with
// alpha > 1 and a Student t by their first absolute moments, tests/cf/abs-moment.test.ts, also for the power-tail term
// the heavy route subtracts) it is kept, and no note.
describe("an inversion whose part has no derived Lipschitz constant says its node rounding is left out", () => {
  const said = (r: { diagnostics: { notes: string[] } }) => r.diagnostics.notes.some((n) => /frequency nodes are not exact doubles/.test(n));
  const noMean: unknown = { sum: [{ family: "cauchy", loc: 0, scale: 1 }, { family: "student_t", nu: 5.6, loc: 0, scale: 1 }] };
  const heavy: unknown = { sum: [{ family: "stable", alpha: 1.216, beta: 0.588, scale: 1, loc: 0, param: "S1" }, { family: "student_t", nu: 5.6, loc: 0, scale: 1 }] };
  const light: unknown = { sum: [{ family: "gamma", shape: 2, rate: 1 }, { family: "normal", mu: 0, sigma: 1 }] };
  it("Cauchy + Student t: noted by the quantiles and the density", () => {
    expect(said(quantiles(compile(noMean as Model), [0.01, 0.5, 0.99]))).toBe(true);
    expect(said(density(compile(noMean as Model), { x: [0, 1, 2] }))).toBe(true);
  });
  it("stable(1.216) + Student t (its tail term subtracted on the heavy route): no note, the move is bounded", () => {
    expect(said(quantiles(compile(heavy as Model), [0.01, 0.5, 0.99]))).toBe(false);
    expect(said(density(compile(heavy as Model), { x: [0, 1, 2] }))).toBe(false);
  });
  it("gamma + normal: no note", () => {
    expect(said(quantiles(compile(light as Model), [0.01, 0.5, 0.99]))).toBe(false);
    expect(said(density(compile(light as Model), { x: [0, 1, 2] }))).toBe(false);
  });
});
