// Panjer recursion and compound tables of lattice claims against exact rationals and brute-force convolution powers,
// and the mass a compound's table leaves past its end against the count's regularised incomplete beta / gamma.
import gammainc from "@stdlib/math-base-special-gammainc";
import betainc from "@stdlib/math-base-special-betainc";
import { describe, expect, it } from "vitest";
import { compile, convolveTables, panjer } from "@/lib/cf";
import { close, record } from "./model-assert";
import { diceExact, maxAbsDiff } from "../support/lattice-exact";

describe("Panjer recursion and compound tables", () => {
  /** Brute force of the definition S = X_1 + ... + X_N: sum_k P(N=k) f^{*k} by direct convolutions. */
  function bruteCompound(pN: number[], f: number[], len: number): number[] {
    const out = new Array(len).fill(0);
    let cur = [1];
    for (let k = 0; k < pN.length; k++) {
      for (let i = 0; i < Math.min(len, cur.length); i++) out[i] += pN[k] * cur[i];
      const next = new Array(Math.min(len, cur.length + f.length - 1)).fill(0);
      for (let i = 0; i < cur.length; i++) for (let j = 0; j < f.length && i + j < next.length; j++) next[i + j] += cur[i] * f[j];
      cur = next;
    }
    return out;
  }
  const poissonPmf = (lam: number, K: number) => {
    const p = [Math.exp(-lam)];
    for (let k = 1; k < K; k++) p.push((p[k - 1] * lam) / k);
    return p;
  };

  it("compound Poisson with geometric severity on 1, 2, ... vs the Polya-Aeppli closed form (k claims on 1, 2, ... sum to n in C(n-1, k-1) ways, each of probability (1-th)^k th^{n-k}; common practice)", () => {
    const lam = 2.5;
    const th = 0.4;
    // severity P(X = j) = (1 - th) th^{j-1}, j >= 1
    const f = Array.from({ length: 200 }, (_, j) => (j === 0 ? 0 : (1 - th) * th ** (j - 1)));
    const c = compile({ compound: { count: { family: "poisson", lambda: lam }, each: { shift: 1, of: { family: "geometric", p: 1 - th } } } });
    const t = c.latticeTable!(60)!;
    // P(S = n) = e^{-lam} sum_{k=1}^n C(n-1, k-1) (lam (1-th))^k th^{n-k} / k!
    let err = 0;
    for (let n = 0; n < 60; n++) {
      let want = n === 0 ? Math.exp(-lam) : 0;
      let c1 = 1;
      let kf = 1;
      for (let k = 1; k <= n; k++) {
        kf *= k;
        if (k > 1) c1 = (c1 * (n - k + 1)) / (k - 1);
        want += (Math.exp(-lam) * c1 * (lam * (1 - th)) ** k * th ** (n - k)) / kf;
      }
      err = Math.max(err, Math.abs(t.p[n] - want));
    }
    expect(f[1]).toBeCloseTo(0.6, 15);
    record("Panjer abs error (Polya-Aeppli)", err);
    close(err, 0, { abs: 1e-15 }, "Panjer vs Polya-Aeppli");
  });

  const severities: [string, number[]][] = [
    ["on 0..3 with an atom at 0", [0.2, 0.3, 0.4, 0.1]],
    ["on 1..5", [0, 0.1, 0.2, 0.3, 0.25, 0.15]],
  ];
  it.each(severities)("Poisson, binomial and negative binomial counts, severity %s: Panjer vs brute force of the definition", (_n, f) => {
    const len = 80;
    const counts: [unknown, number[]][] = [
      [{ family: "poisson", lambda: 3 }, poissonPmf(3, 80)],
      [{ family: "binomial", n: 6, p: 0.35 }, Array.from({ length: 7 }, (_, k) => { let c = 1; for (let j = 1; j <= k; j++) c = (c * (6 - j + 1)) / j; return c * 0.35 ** k * 0.65 ** (6 - k); })],
      [{ family: "negative_binomial", r: 2.5, p: 0.6 }, (() => { const p = [0.6 ** 2.5]; for (let k = 1; k < 120; k++) p.push((p[k - 1] * 0.4 * (2.5 + k - 1)) / k); return p; })()],
    ];
    for (const [count, pN] of counts) {
      const t = compile({ compound: { count, each: { lattice: { origin: 0, step: 1, p: f } } } }).latticeTable!(4096)!;
      const want = bruteCompound(pN, f, len);
      const err = maxAbsDiff(t.p.subarray(0, len), want);
      record("Panjer abs error (vs brute force)", err);
      close(err, 0, { abs: 2e-15 }, `${JSON.stringify(count)}`);
    }
  });
  it("panjer() directly: (a, b) = (0, lambda) reproduces the compound Poisson; g_0 underflow returns null", () => {
    const f = Float64Array.of(0, 0.5, 0.5);
    const g = panjer({ a: 0, b: 2, pgf: (z) => Math.exp(2 * (z - 1)) }, f, 30)!;
    const want = bruteCompound(poissonPmf(2, 60), [0, 0.5, 0.5], 30);
    close(maxAbsDiff(g, want), 0, { abs: 1e-15 }, "panjer vs brute force");
    expect(panjer({ a: 0, b: 1000, pgf: (z) => Math.exp(1000 * (z - 1)) }, f, 10)).toBeNull();
  });
  it("compound with a lattice severity of step 0.5 and origin 1: table on step 0.5 from 0", () => {
    const t = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: { lattice: { origin: 1, step: 0.5, p: [0.5, 0.5] } } } }).latticeTable!(200)!;
    expect([t.origin, t.step]).toEqual([0, 0.5]);
    close(t.p[0], Math.exp(-1), { rel: 1e-15 }, "P(S=0)");
    close(t.p[1], 0, { abs: 0 }, "P(S=0.5)");
    close(t.p[2], Math.exp(-1) * 0.5, { rel: 1e-15 }, "P(S=1) = P(N=1) P(X=1)");
    let mean = 0;
    for (let k = 0; k < t.p.length; k++) mean += t.p[k] * k * 0.5;
    close(mean, 1.25, { rel: 1e-13 }, "mean = E N E X (Loss Models, aggregate loss models chapter)");
  });
  it("count poisson(1) + poisson(2) (no Panjer route) equals the Panjer table of poisson(3) (Poisson additivity, JKK ch. 4)", () => {
    const sev = { lattice: { origin: 1, step: 1, p: [0.5, 0.3, 0.2] } };
    const a = compile({ compound: { count: { sum: [{ family: "poisson", lambda: 1 }, { family: "poisson", lambda: 2 }] }, each: sev } }).latticeTable!(200)!;
    const b = compile({ compound: { count: { family: "poisson", lambda: 3 }, each: sev } }).latticeTable!(200)!;
    const err = maxAbsDiff(a.p.subarray(0, 100), b.p.subarray(0, 100));
    record("Panjer abs error (vs brute force)", err);
    close(err, 0, { abs: 1e-15 }, "two routes");
  });
  it("large expected counts (P(S=0) underflows): split-and-power route matches the convolution of two direct Panjer tables and the moments", () => {
    const sev = { lattice: { origin: 1, step: 1, p: [0.5, 0.3, 0.2] } };
    const big = compile({ compound: { count: { family: "poisson", lambda: 800 }, each: sev } }).latticeTable!(1 << 14)!;
    const a = compile({ compound: { count: { family: "poisson", lambda: 300 }, each: sev } }).latticeTable!(1 << 14)!;
    const b = compile({ compound: { count: { family: "poisson", lambda: 500 }, each: sev } }).latticeTable!(1 << 14)!;
    // compound Poisson(300) + compound Poisson(500) = compound Poisson(800) (Loss Models, aggregate loss chapter)
    const two = convolveTables([a, b], 1 << 14);
    const err = maxAbsDiff(big.p.subarray(0, 3000), two.p.subarray(0, 3000));
    record("Panjer abs error (split route vs two direct tables)", err);
    close(err, 0, { abs: 1e-15 }, "lambda 800 two routes");
    // E S = lambda E X, Var S = lambda E X^2 for compound Poisson (Loss Models, aggregate loss chapter)
    let mean = 0;
    let m2 = 0;
    for (let i = 0; i < big.p.length; i++) mean += i * big.p[i];
    for (let i = 0; i < big.p.length; i++) m2 += (i - mean) ** 2 * big.p[i];
    close(mean, 800 * 1.7, { rel: 1e-12 }, "mean");
    close(m2, 800 * 3.5, { rel: 1e-10 }, "variance");
  });
  it("point count gives the n-fold power; mixture counts use the short-table route", () => {
    const die = { lattice: { origin: 1, step: 1, p: new Array(6).fill(1 / 6) } };
    const a = compile({ compound: { count: { family: "point", at: 3 }, each: die } }).latticeTable!(100)!;
    const ex = diceExact(3, 6);
    close(maxAbsDiff(a.p.subarray(3), ex), 0, { abs: 1e-15 }, "compound with N = 3");
    const m = compile({ compound: { count: { mix: [{ weight: 0.5, of: { family: "point", at: 1 } }, { weight: 0.5, of: { family: "point", at: 2 } }] }, each: die } }).latticeTable!(100)!;
    const e1 = diceExact(1, 6);
    const e2 = diceExact(2, 6);
    const want = new Array(13).fill(0);
    e1.forEach((v, k) => (want[k + 1] += 0.5 * v));
    e2.forEach((v, k) => (want[k + 2] += 0.5 * v));
    close(maxAbsDiff(m.p.subarray(0, 13), want), 0, { abs: 1e-15 }, "mixture count");
  });
});


describe("the mass a compound's Panjer table leaves past its end: a Chernoff bound from a whole severity", () => {
  // with one claim size 1 the compound is its count: P(S >= L) = I_{1-p}(L, r) for NB(r, p) (JKK ch. 5; regularised
  // incomplete beta) and P(L, lambda) for Poisson(lambda) (JKK ch. 4; regularised lower incomplete gamma)
  for (const [label, count, tail] of [
    ["NB(3, 0.4)", { family: "negative_binomial", r: 3, p: 0.4 }, (L: number) => betainc(0.6, L, 3)],
    ["Poisson(3)", { family: "poisson", lambda: 3 }, (L: number) => gammainc(3, L)],
  ] as const) {
    it(`${label} of a claim of 1: the table's tailMass bounds P(S >= L) and stays far below the entries' rounding`, () => {
      const t = compile({ compound: { count, each: { lattice: { origin: 1, step: 1, p: [1] } } } } as never).latticeTable!(1 << 20)!;
      const L = t.origin + t.p.length;
      expect(t.tailMass).toBeGreaterThanOrEqual(tail(L));
      expect(t.tailMass).toBeLessThan(1e-20);
    });
  }
});
