// Atoms and density jumps of compounds of per-claim layered claims (lib/cf/layer-compound.ts) against the closed forms of
// P_N(a0 + a1 z) for the counts of the trade (common practice: the pgfs of Poisson, negative binomial and binomial, and
// the coefficient extraction below, e.g. Klugman, Panjer & Willmot, Loss Models, the (a, b, 0) class).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { buildNode, compile } from "@/lib/cf/compile";
import { layerCompoundAtoms, layerCompoundJumps, layerCompoundKinks } from "@/lib/cf/layer-compound";
import type { Model } from "@/lib/cf/types";
import gammaln from "@stdlib/math-base-special-gammaln";

// log-gamma from a general-purpose reference library (@stdlib/math-base-special-gammaln, gammaln)
const lgamma = (x: number): number => gammaln(x);

const a0 = 0.35;
const a1 = 0.12;
const v = 2.5;

/** m_k = [z^k] P_N(a0 + a1 z) in closed form */
const cases: { name: string; count: Model; mk: (k: number) => number; total: number }[] = [
  {
    name: "poisson(6)",
    count: { family: "poisson", lambda: 6 } as Model,
    // exp(lambda (a0 - 1)) (lambda a1)^k / k!
    mk: (k) => Math.exp(6 * (a0 - 1) + k * Math.log(6 * a1) - lgamma(k + 1)),
    total: Math.exp(6 * (a0 + a1 - 1)),
  },
  {
    name: "negative binomial(r = 2.5, p = 0.3)",
    count: { family: "negative_binomial", r: 2.5, p: 0.3 } as Model,
    // (p / (1 - q a0))^r C(r + k - 1, k) beta^k, beta = q a1 / (1 - q a0)
    mk: (k) => {
      const q = 0.7;
      const beta = (q * a1) / (1 - q * a0);
      return Math.exp(2.5 * Math.log(0.3 / (1 - q * a0)) + lgamma(2.5 + k) - lgamma(2.5) - lgamma(k + 1) + k * Math.log(beta));
    },
    total: (0.3 / (1 - 0.7 * (a0 + a1))) ** 2.5,
  },
  {
    name: "binomial(9, 0.4)",
    count: { family: "binomial", n: 9, p: 0.4 } as Model,
    // C(9, k) (p a1)^k (1 - p + p a0)^(9 - k)
    mk: (k) => (k > 9 ? 0 : Math.exp(lgamma(10) - lgamma(k + 1) - lgamma(10 - k) + k * Math.log(0.4 * a1) + (9 - k) * Math.log(0.6 + 0.4 * a0))),
    total: (0.6 + 0.4 * (a0 + a1)) ** 9,
  },
];

describe("atoms of a compound of layered claims", () => {
  for (const c of cases) {
    it(`${c.name}: masses at k v equal [z^k] P_N(a0 + a1 z), and the unlisted mass bound holds`, () => {
      const N = buildNode(c.count);
      const r = layerCompoundAtoms(N, a0, a1, v)!;
      expect(r).not.toBeNull();
      let listed = 0;
      for (const at of r.atoms) {
        const k = Math.round(at.x / v);
        expect(at.x).toBeCloseTo(k * v, 12);
        const want = c.mk(k);
        expect(Math.abs(at.p - want), `k = ${k}: ${at.p} against ${want}`).toBeLessThanOrEqual(1e-12 * want + 1e-300);
        listed += at.p;
      }
      // the atoms' total is P_N(a0 + a1); what is not listed is within the stated bound (plus float slack of the sum)
      expect(Math.abs(c.total - listed)).toBeLessThanOrEqual(r.unlisted + 1e-14 * c.total);
      expect(r.unlisted).toBeLessThan(1e-13);
    });
  }
  it("poisson(2 000): P_N(a0) underflows but the atoms near the mode are listed from logarithms", () => {
    const lam = 2000;
    const N = buildNode({ family: "poisson", lambda: lam } as Model);
    const r = layerCompoundAtoms(N, 0.001, 0.999, 1)!;
    expect(r).not.toBeNull();
    // total mass exp(-lambda (1 - a0 - a1)) = 1: the atoms are Poisson(lambda a1) masses
    const mode = r.atoms.reduce((p, q) => (q.p > p.p ? q : p));
    const k = mode.x;
    const want = Math.exp(lam * (0.001 - 1) + k * Math.log(lam * 0.999) - lgamma(k + 1));
    expect(Math.abs(mode.p - want)).toBeLessThanOrEqual(1e-10 * want);
  });
});

describe("density jumps of a compound of layered claims", () => {
  it("poisson(6): the jump at k v is fStart lambda m_k - fEnd lambda m_{k-1} (P_N' = lambda P_N for the Poisson pgf)", () => {
    const N = buildNode({ family: "poisson", lambda: 6 } as Model);
    const r = layerCompoundAtoms(N, a0, a1, v)!;
    const edges = { start: 0, fStart: 0.8, fEnd: 0.05 };
    const jumps = layerCompoundJumps(N, a0, a1, v, r.byCount, edges);
    const mk = cases[0].mk;
    for (const j of jumps) {
      const k = Math.round(j.at / v);
      // beyond the listed atoms m_k is taken as 0 (the jumps only speed the inversion up; they are added back exactly)
      if (k >= r.byCount.length) continue;
      const want = 0.8 * 6 * mk(k) - (k > 0 ? 0.05 * 6 * mk(k - 1) : 0);
      expect(Math.abs(j.size - want)).toBeLessThanOrEqual(1e-12 * Math.abs(want) + 1e-300);
    }
    expect(jumps.length).toBeGreaterThan(5);
  });
  it("negative binomial: jumps from P_N'(a0 + a1 z) = r q p^r / (1 - q s)^(r + 1), differentiated in closed form", () => {
    const r0 = 2.5;
    const p = 0.3;
    const q = 1 - p;
    const N = buildNode({ family: "negative_binomial", r: r0, p } as Model);
    const r = layerCompoundAtoms(N, a0, a1, v)!;
    const jumps = layerCompoundJumps(N, a0, a1, v, r.byCount, { start: 0.4, fStart: 1, fEnd: 0 });
    // w_k = [z^k] P'(a0 + a1 z) = r q p^r (1 - q a0)^{-(r+1)} C(r + k, k) beta^k, beta = q a1 / (1 - q a0)
    const beta = (q * a1) / (1 - q * a0);
    for (const j of jumps) {
      const k = Math.round((j.at - 0.4) / v);
      if (k >= r.byCount.length) continue;
      const want = Math.exp(Math.log(r0 * q) + r0 * Math.log(p) - (r0 + 1) * Math.log(1 - q * a0) + lgamma(r0 + 1 + k) - lgamma(r0 + 1) - lgamma(k + 1) + k * Math.log(beta));
      expect(Math.abs(j.size - want), `k = ${k}`).toBeLessThanOrEqual(1e-11 * want);
    }
  });
});

describe("slope steps of the density of a compound of layered claims", () => {
  // the claim density g on (start, v): values A, B and slopes DA, DB at its two ends (invented)
  const A = 0.8;
  const B = 0.05;
  const DA = -0.3;
  const DB = -0.02;
  it("poisson(6): at k v the step is lambda (DA m_k - DB m_{k-1}) + lambda^2 (A^2 m_k - 2 A B m_{k-1} + B^2 m_{k-2}) / 2 (P_N'' = lambda^2 P_N)", () => {
    const N = buildNode({ family: "poisson", lambda: 6 } as Model);
    const r = layerCompoundAtoms(N, a0, a1, v)!;
    const kinks = layerCompoundKinks(N, a0, a1, v, r.byCount, { start: 0, fStart: A, fEnd: B, dStart: DA, dEnd: DB });
    const mk = (k: number) => (k >= 0 ? cases[0].mk(k) : 0);
    let checked = 0;
    for (const j of kinks) {
      const k = Math.round(j.at / v);
      expect(j.at).toBe(k * v);
      // beyond the listed atoms m_k is taken as 0, as for the jumps
      if (k >= r.byCount.length) continue;
      const want = 6 * (DA * mk(k) - DB * mk(k - 1)) + 18 * (A * A * mk(k) - 2 * A * B * mk(k - 1) + B * B * mk(k - 2));
      expect(Math.abs(j.size - want), `k = ${k}`).toBeLessThanOrEqual(1e-12 * Math.abs(want) + 1e-300);
      checked++;
    }
    expect(checked).toBeGreaterThan(5);
  });
  it("negative binomial with the layer starting inside: steps at k v + start, k v + 2 start, (k + 1) v + start, (k + 1) v, (k + 2) v from P_N' and P_N'' in closed form", () => {
    const r0 = 2.5;
    const p = 0.3;
    const q = 1 - p;
    const s = 0.4;
    const N = buildNode({ family: "negative_binomial", r: r0, p } as Model);
    const r = layerCompoundAtoms(N, a0, a1, v)!;
    const kinks = layerCompoundKinks(N, a0, a1, v, r.byCount, { start: s, fStart: A, fEnd: B, dStart: DA, dEnd: DB });
    // [z^k] P^(j)(a0 + a1 z) = r (r + 1) .. (r + j - 1) q^j p^r (1 - q a0)^{-(r + j)} C(r + j - 1 + k, k) beta^k
    const beta = (q * a1) / (1 - q * a0);
    const coef = (j: number, k: number) =>
      k < 0 || k >= r.byCount.length
        ? 0
        : Math.exp(lgamma(r0 + j) - lgamma(r0) + j * Math.log(q) + r0 * Math.log(p) - (r0 + j) * Math.log(1 - q * a0) + lgamma(r0 + j + k) - lgamma(r0 + j) - lgamma(k + 1) + k * Math.log(beta));
    const w = (k: number) => coef(1, k);
    const u = (k: number) => coef(2, k) / 2;
    // every position m v + i s (i = 0, 1, 2) with its steps added
    const want = new Map<number, number>();
    const add = (x: number, d: number) => want.set(x, (want.get(x) ?? 0) + d);
    for (let k = 0; k < r.byCount.length; k++) {
      add(k * v + s, DA * w(k));
      add((k + 1) * v, -DB * w(k));
      add(k * v + 2 * s, A * A * u(k));
      add((k + 1) * v + s, -2 * A * B * u(k));
      add((k + 2) * v, B * B * u(k));
    }
    let checked = 0;
    for (const j of kinks) {
      const m = Math.floor(j.at / v + 1e-9);
      // positions whose weights reach past the listed atoms are left out of the comparison
      if (m >= r.byCount.length - 1) continue;
      const x = want.get(j.at);
      expect(x, `position ${j.at}`).toBeDefined();
      expect(Math.abs(j.size - x!), `at ${j.at}`).toBeLessThanOrEqual(1e-11 * Math.abs(x!) + 1e-300);
      checked++;
    }
    expect(checked).toBeGreaterThan(10);
  });
});

describe("slope and second-derivative steps of a compiled compound of layered exponential claims against mpmath", () => {
  // tests/fixtures/layer-compound/kinks.json (generate_kinks.py): the compound density's first and second derivatives term
  // by term from its direct series over the counts, cross-checked by the pgf-derivative forms (difference written per value)
  type Step = { at: number; step: string; methodsDifference: number };
  const f = JSON.parse(readFileSync(join(import.meta.dirname, "../fixtures/layer-compound/kinks.json"), "utf8")) as {
    cases: { model: Model; kinks: Step[]; bends: Step[] }[];
  };
  for (const k of f.cases) {
    it(`${JSON.stringify(k.model)}: the step at each multiple of the layer's width`, () => {
      const c = compile(k.model);
      const got = new Map((c.densityKinks ?? []).map((j) => [j.at, j.size]));
      for (const ref of k.kinks) {
        const want = Number(ref.step);
        const v = got.get(ref.at);
        expect(v, `at ${ref.at}`).toBeDefined();
        // the claim density's end slopes come from its values by Richardson-combined differences (lib/cf/layer.ts
        // edgeSlope, about 1e-10 relative): they only set the kernels' sizes, which are added back exactly
        expect(Math.abs(v! - want), `at ${ref.at}: ${v} against ${want}`).toBeLessThanOrEqual(1e-8 * Math.abs(want) + ref.methodsDifference);
      }
    });
    it(`${JSON.stringify(k.model)}: the second derivative's step at each multiple of the layer's width`, () => {
      const c = compile(k.model);
      const got = new Map((c.densityBends ?? []).map((j) => [j.at, j.size]));
      // the claim density's second derivative at its ends by Richardson-combined differences (edgeCurve, about 1e-8 of
      // itself): a step made of several terms that cancel is off by that much of the largest step, not of its own size
      const scale = Math.max(...k.bends.map((b) => Math.abs(Number(b.step))));
      for (const ref of k.bends) {
        const want = Number(ref.step);
        const v = got.get(ref.at);
        expect(v, `at ${ref.at}`).toBeDefined();
        expect(Math.abs(v! - want), `at ${ref.at}: ${v} against ${want}`).toBeLessThanOrEqual(1e-6 * Math.abs(want) + 1e-8 * scale + ref.methodsDifference);
      }
    });
  }
});
