import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

// Compounds of continuous severities: the derived majorant of |phi_S - P(N = 0)| (lib/cf/compound-majorant.ts) against
// the closed forms phi_S = P_N(phi_X) with phi_X = (1 - i t / r)^{-k} (gamma; JKB vol. 1 ch. 17), P_N(z) = e^{lambda (z - 1)}
// (Poisson) and (p / (1 - (1 - p) z))^r (negative binomial in the (r, p) form with P(N = 0) = p^r; JKB, Univariate Discrete
// Distributions, ch. 5), evaluated in double precision here (complex arithmetic of a few operations; the comparison allows
// 1e-12 absolute). The majorant must be at least |phi_S(s) - p_0| at every grid point s >= t, and its tail power must hold.
type C = [number, number];
const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const div = (a: C, b: C): C => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const cexp = (a: C): C => [Math.exp(a[0]) * Math.cos(a[1]), Math.exp(a[0]) * Math.sin(a[1])];
const cpow = (a: C, e: number): C => {
  const m = Math.hypot(a[0], a[1]);
  const th = Math.atan2(a[1], a[0]);
  return [Math.pow(m, e) * Math.cos(e * th), Math.pow(m, e) * Math.sin(e * th)];
};
const gammaCf = (k: number, r: number) => (t: number): C => cpow([1, -t / r], -k);

const CASES: { label: string; model: unknown; p0: number; phiS: (t: number) => C }[] = [
  {
    label: "poisson(3) of gamma(2, 1)",
    model: { compound: { count: { family: "poisson", lambda: 3 }, each: { family: "gamma", shape: 2, rate: 1 } } },
    p0: Math.exp(-3),
    phiS: (t) => {
      const x = gammaCf(2, 1)(t);
      return cexp([3 * (x[0] - 1), 3 * x[1]]);
    },
  },
  {
    label: "negative_binomial(2, 0.4) of gamma(0.7, 2)",
    model: { compound: { count: { family: "negative_binomial", r: 2, p: 0.4 }, each: { family: "gamma", shape: 0.7, rate: 2 } } },
    p0: 0.4 ** 2,
    phiS: (t) => {
      const x = gammaCf(0.7, 2)(t);
      return cpow(div([0.4, 0], [1 - 0.6 * x[0], -0.6 * x[1]]), 2);
    },
  },
];

describe("compound majorants of the continuous part (reference: closed-form CFs)", () => {
  const t = Float64Array.from({ length: 60 }, (_, i) => 0.05 * Math.pow(2, i / 3));
  for (const k of CASES) {
    it(`${k.label}: M(t) >= |phi_S(s) - p_0| for grid s >= t, and the tail power holds`, () => {
      const m = compile(k.model as Model);
      const c = new Checker();
      const cm = m.continuousMajorant;
      c.that("has a continuous-part majorant with the atom at 0", !!cm && cm.atoms.length === 1 && cm.atoms[0].x === 0 && Math.abs(cm.atoms[0].p - k.p0) < 1e-14, JSON.stringify(cm?.atoms));
      if (!cm) return c.done();
      const ref = Array.from(t, (s) => {
        const v = k.phiS(s);
        return Math.max(0, Math.hypot(v[0] - k.p0, v[1]) - 1e-12);
      });
      const lm = new Float64Array(t.length);
      cm.maj(t, lm);
      let sup = 0;
      for (let i = t.length - 1; i >= 0; i--) {
        sup = Math.max(sup, ref[i]);
        c.that(`M(${t[i]})`, Math.exp(lm[i]) >= sup, `M ${Math.exp(lm[i])} below sup ${sup}`);
        const tail = cm.maj.tail!(t[i]);
        for (let j = i; j < t.length; j++) {
          const b = Math.exp(tail.log) * Math.pow(t[i] / t[j], tail.q);
          c.that(`tail from ${t[i]} at ${t[j]}`, b >= ref[j], `bound ${b} (q ${tail.q}) below ${ref[j]}`);
        }
      }
      // a check that can fail: the bound is within a factor 100 of the reference at the largest t (not vacuous)
      c.that("not vacuous", Math.exp(lm[t.length - 1]) < 100 * ref[t.length - 1], `${Math.exp(lm[t.length - 1])} vs ${ref[t.length - 1]}`);
      c.done();
    });
  }
});
