// Derived rounding bounds of tables formed by FFT compounds (the discretised route), by powers, mixtures and the count's
// short-table sum, against references outside the engine: mpmath compound pmfs (tests/fixtures/panjer-bounds/generate.py:
// closed-form n-fold laws cross-checked by a 50-digit recursion) and exact rationals (dice, common practice).
import { readFileSync } from "node:fs";
import { afterAll, describe, expect, it } from "vitest";
import { compile } from "@/lib/cf";
import { buildNode } from "@/lib/cf/compile";
import { validateModel } from "@/lib/cf/validate";
import { compoundByFft, type SeverityLaw } from "@/lib/cf/discretise";
import { boundedCompound, compoundPairByFft } from "@/lib/cf/discretise-bounds";
import type { Node } from "@/lib/cf/node";
import { record, worst } from "./model-assert";
import { diceExact } from "../support/lattice-exact";

const fx: { cases: { name: string; pmf: string[]; xerr: string; from?: number }[] } = JSON.parse(readFileSync("tests/fixtures/panjer-bounds/panjer-bounds.json", "utf8"));
const ref = (name: string) => {
  const c = fx.cases.find((x) => x.name === name)!;
  return { pmf: c.pmf.map(Number), xerr: Number(c.xerr) };
};
const node = (m: unknown) => buildNode(validateModel(m as never), {}) as Node;

// P(sum of n fair s-sided dice = k) as exact rationals (integer counts / s^n), rounded once to a double
const dice = diceExact;

afterAll(() => console.log("bound / actual:", JSON.stringify(worst)));

describe("FFT compound rounding (lib/cf/compound-fft-round.ts) vs mpmath compound pmfs", () => {
  // geometric claims on 1, 2, ... (P(X = j) = (1 - th) th^(j-1)), counts poisson(3) and negative_binomial(0.5, 0.3)
  const cases = [
    { name: "poisson(3)-geometric(0.4)", count: { family: "poisson", lambda: 3 }, th: 0.4 },
    { name: "negative_binomial(0.5, 0.3)-geometric(0.6)", count: { family: "negative_binomial", r: 0.5, p: 0.3 }, th: 0.6 },
  ];
  for (const M of [4096, 1 << 16]) {
    it.each(cases)(`$name on M = ${M}: every entry within ||dp||_2, each cdf within sqrt(k + 1) ||dp||_2 (single and pair routes)`, ({ name, count, th }) => {
      const N = node(count);
      const f = new Float64Array(M / 2 + 1);
      for (let j = 1; j < f.length; j++) f[j] = (1 - th) * th ** (j - 1);
      const s = { wr: new Float64Array(M), wi: new Float64Array(M), re: new Float64Array(M), im: new Float64Array(M) };
      const { p, round } = compoundByFft(N, f, M, s);
      const [pf, pg, rPair] = compoundPairByFft(N, f, f, M);
      const { pmf, xerr } = ref(name);
      for (const [what, q, r] of [["single", p, round], ["pair f", pf, rPair], ["pair g", pg, rPair]] as const) {
        expect(Number.isFinite(r) && r > 0, `${what}: a derived bound`).toBe(true);
        // useful: below the size the discretised route's bracket ever reaches (1e-12 on ||dp||_2)
        expect(r, what).toBeLessThan(1e-12);
        let cum = 0;
        let worstD = 0;
        for (let k = 0; k < pmf.length; k++) {
          const d = q[k] - pmf[k];
          cum += d;
          worstD = Math.max(worstD, Math.abs(d));
          if (Math.abs(d) > r + xerr) throw new Error(`${name} ${what} k=${k}: |${q[k]} - ${pmf[k]}| > ${r}`);
          if (Math.abs(cum) > Math.sqrt(k + 1) * r + (k + 1) * xerr) throw new Error(`${name} ${what} cdf k=${k}: ${cum} > sqrt(k+1) ${r}`);
        }
        record(`fft ${what} M=${M} ${name}`, r / Math.max(worstD, 1e-18));
      }
    });
  }
  it("a claim law with a cdf but no bound on it gets no stated accuracy: the bracket's error is infinite", () => {
    const sev: SeverityLaw = {
      name: "exponential (no bound)",
      pdf: (x) => (x > 0 ? Math.exp(-x) : 0),
      cdf: (x) => (x > 0 ? -Math.expm1(-x) : 0),
      sf: (x) => (x > 0 ? Math.exp(-x) : 1),
      lo: 0,
      upper: (q) => -Math.log(q),
      scale: 1,
      tailIndex: Infinity,
      rootAtZero: 0,
    };
    const b = boundedCompound(node({ family: "poisson", lambda: 2 }), sev, 1 / 64, 4096);
    expect(b.cdfError).toBe(Infinity);
  });
});

describe("tables through powers, mixtures and counts carry derived rounding bounds", () => {
  const geo = (th: number) => ({ shift: 1, of: { family: "geometric", p: 1 - th } });
  it("repeat 3 of poisson(3)-geometric(0.4) is poisson(9)-geometric(0.4) (compound Poisson rates add; Loss Models, aggregate loss chapter)", () => {
    const t = compile({ repeat: 3, of: { compound: { count: { family: "poisson", lambda: 3 }, each: geo(0.4) } } }).latticeTable!(4096)!;
    expect(t.round, "derived rounding bound").toBeDefined();
    const { pmf, xerr } = ref("poisson(9)-geometric(0.4)");
    let w = 0;
    for (let k = 0; k < pmf.length; k++) {
      const d = Math.abs(t.p[k] - pmf[k]);
      w = Math.max(w, d);
      if (d > t.round!.pmf + xerr) throw new Error(`k=${k}: ${d} > ${t.round!.pmf}`);
    }
    record("power pmf", t.round!.pmf / Math.max(w, 2 ** -53 * Math.max(...pmf)));
  });
  it("poisson(800)-geometric(0.4) (P(S = 0) underflows: the count in 2^m parts, Panjer's recursion for one, repeated squaring) about its mode", () => {
    const t = compile({ compound: { count: { family: "poisson", lambda: 800 }, each: geo(0.4) } }).latticeTable!(1 << 14)!;
    expect(t.round, "derived rounding bound").toBeDefined();
    const c = fx.cases.find((x) => x.name === "poisson(800)-geometric(0.4)")! as { pmf: string[]; xerr: string; from: number };
    const pmf = c.pmf.map(Number);
    let w = 0;
    for (let i = 0; i < pmf.length; i++) {
      const d = Math.abs(t.p[c.from + i] - pmf[i]);
      w = Math.max(w, d);
      if (d > t.round!.pmf + Number(c.xerr)) throw new Error(`k=${c.from + i}: ${d} > ${t.round!.pmf}`);
    }
    record("divided count pmf", t.round!.pmf / Math.max(w, 2 ** -53 * Math.max(...pmf)));
  });
  it("bulk tables of counts whose P(N = 0) underflows: poisson(900) vs mpmath, binomial(3000, 1/4) vs exact rationals", () => {
    const t = compile({ family: "poisson", lambda: 900 }).latticeTable!(1 << 16)!;
    expect(t.round, "poisson: derived bound").toBeDefined();
    const c = fx.cases.find((x) => x.name === "poisson(900)")! as { pmf: string[]; xerr: string; from: number };
    let w = 0;
    for (let i = 0; i < c.pmf.length; i++) {
      const want = Number(c.pmf[i]);
      const d = Math.abs(t.p[c.from + i - t.origin] - want);
      w = Math.max(w, d);
      if (d > t.round!.pmf + Number(c.xerr)) throw new Error(`poisson(900) k=${c.from + i}: ${d} > ${t.round!.pmf}`);
    }
    record("bulk poisson(900) pmf", t.round!.pmf / w);
    // binomial(3000, 1/4): P(k) = C(n, k) 3^(n-k) / 4^n exactly (common practice), each rounded once to a double
    const b = compile({ family: "binomial", n: 3000, p: 0.25 }).latticeTable!(1 << 16)!;
    expect(b.round, "binomial: derived bound").toBeDefined();
    let cnk = 1n;
    const total = 4n ** 3000n;
    let wb = 0;
    for (let k = 0; k <= 3000; k++) {
      if (k > 0) cnk = (cnk * BigInt(3000 - k + 1)) / BigInt(k);
      const i = k - b.origin;
      if (i < 0 || i >= b.p.length) continue;
      // (scaled by 2^1000: every kept entry exceeds 2^-900, so the quotient carries 100+ bits before its one rounding)
      const want = Number(((cnk * 3n ** BigInt(3000 - k)) << 1000n) / total) / 2 ** 1000;
      const d = Math.abs(b.p[i] - want);
      expect(want > 0 && Number.isFinite(d), `binomial k=${k}: a finite reference`).toBe(true);
      wb = Math.max(wb, d);
      if (d > b.round!.pmf + 2 ** -53 * want) throw new Error(`binomial k=${k}: ${d} > ${b.round!.pmf}`);
    }
    record("bulk binomial(3000, 1/4) pmf", b.round!.pmf / wb);
  });
  it("mixture 0.3 poisson(3)-geometric(0.4) + 0.7 negative_binomial(0.5, 0.3)-geometric(0.6): weights add pointwise (common practice)", () => {
    const t = compile({
      mix: [
        { weight: 0.3, of: { compound: { count: { family: "poisson", lambda: 3 }, each: geo(0.4) } } },
        { weight: 0.7, of: { compound: { count: { family: "negative_binomial", r: 0.5, p: 0.3 }, each: geo(0.6) } } },
      ],
    }).latticeTable!(4096)!;
    expect(t.round, "derived rounding bound").toBeDefined();
    const a = ref("poisson(3)-geometric(0.4)");
    const b = ref("negative_binomial(0.5, 0.3)-geometric(0.6)");
    let w = 0;
    for (let k = 0; k < a.pmf.length; k++) {
      const want = 0.3 * a.pmf[k] + 0.7 * b.pmf[k];
      const d = Math.abs(t.p[k] - want);
      w = Math.max(w, d);
      // the reference's own rounding to a double in the weighted sum: an ulp of it
      if (d > t.round!.pmf + a.xerr + b.xerr + 2 ** -52 * want) throw new Error(`k=${k}: ${d} > ${t.round!.pmf}`);
    }
    record("mixture pmf", t.round!.pmf / Math.max(w, 2 ** -53));
  });
  it("three dice (fixed count: the 3-fold power) and a count of one or two dice (the count's short table): exact rationals", () => {
    const die = { lattice: { origin: 1, step: 1, p: new Array(6).fill(1 / 6) } };
    const a = compile({ compound: { count: { family: "point", at: 3 }, each: die } }).latticeTable!(100)!;
    const m = compile({ compound: { count: { mix: [{ weight: 0.5, of: { family: "point", at: 1 } }, { weight: 0.5, of: { family: "point", at: 2 } }] }, each: die } }).latticeTable!(100)!;
    const e3 = dice(3, 6);
    const e1 = dice(1, 6);
    const e2 = dice(2, 6);
    const want = new Array(13).fill(0);
    e1.forEach((v, k) => (want[k + 1] += 0.5 * v));
    e2.forEach((v, k) => (want[k + 2] += 0.5 * v));
    for (const [what, t, ex, off] of [["N = 3", a, e3, 3], ["N in {1, 2}", m, want, 0]] as const) {
      expect(t.round, `${what}: derived rounding bound`).toBeDefined();
      for (let k = 0; k < ex.length; k++) {
        const d = Math.abs(t.p[k + off] - ex[k]);
        if (d > t.round!.pmf + 2 ** -53 * ex[k]) throw new Error(`${what} k=${k}: ${d} > ${t.round!.pmf}`);
      }
    }
  });
});

describe("a compound whose claim table has only absolute bounds (a sum of two lattices)", () => {
  it("poisson(2) claims of die + die (2..12) vs exact-rational brute force of the definition: every entry within the bound", () => {
    // claims X = D1 + D2, two fair dice (its table from a convolution: absolute bounds only); the compound's pmf by
    // the definition sum_n P(N = n) X^{*n} with X^{*n} = 2n dice, exact rationals (common practice), and Poisson
    // weights e^-2 2^n / n! rounded once each (their rounding counted in the tolerance below)
    const die = { lattice: { origin: 1, step: 1, p: new Array(6).fill(1 / 6) } };
    const t = compile({ compound: { count: { family: "poisson", lambda: 2 }, each: { sum: [die, die] } } }).latticeTable!(4096)!;
    expect(t.round, "derived rounding bound").toBeDefined();
    const K = 60;
    const want = new Array(K).fill(0);
    let w = Math.exp(-2);
    for (let n = 0; n < 40; n++) {
      const d = dice(2 * n, 6);
      for (let k = 0; k < d.length && k + 2 * n < K; k++) want[k + 2 * n] += w * d[k];
      w = (w * 2) / (n + 1);
    }
    let worstD = 0;
    for (let k = 0; k < K; k++) {
      const d = Math.abs(t.p[k] - want[k]);
      worstD = Math.max(worstD, d);
      // the reference's own rounding: 40 weights and products and sums, well within 1e-15 of want
      if (d > t.round!.pmf + 1e-15 * want[k] + 1e-300) throw new Error(`k=${k}: ${d} > ${t.round!.pmf}`);
    }
    record("Panjer with an absolutely bounded claim table", t.round!.pmf / Math.max(worstD, 1e-18));
  });
});
