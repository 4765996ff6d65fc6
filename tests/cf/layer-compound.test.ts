// Atoms and density jumps of compounds of per-claim layered claims (lib/cf/layer-compound.ts) against the closed forms of
// P_N(a0 + a1 z) for the counts of the trade (common practice: the pgfs of Poisson, negative binomial and binomial, and
// the coefficient extraction below, e.g. Klugman, Panjer & Willmot, Loss Models, the (a, b, 0) class).
import { describe, expect, it } from "vitest";
import { buildNode } from "@/lib/cf/compile";
import { layerCompoundAtoms, layerCompoundJumps } from "@/lib/cf/layer-compound";
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
