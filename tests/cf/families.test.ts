// CF of every family against published closed forms (relative error <= 1e-12), the stable parameterisations, and the
// special functions behind them (numerical families, branches and special inputs: families-numeric.test.ts).
import { afterAll, describe, it } from "vitest";
import { readFileSync } from "node:fs";
import { besselK, logBesselKScaled, lgamma } from "@/lib/cf";
import { close, closeC, record, worst } from "./model-assert";
import { cdiv, cexp, cfAt, cmul, cpow, csqrt, type Cx } from "./cx-helpers";

const T = [-40, -7.5, -2, -1, -0.3, -1e-3, 0, 1e-6, 1e-3, 0.1, 0.5, 1, 2.5, 7, 15, 60];

/** CF values of the variance-gamma and NIG laws computed from their definitions as normal variance-mean mixtures by
 *  mpmath (tests/fixtures/cf-reference/generate.py), not from the CF closed forms the engine uses. */
const MIXTURE_CF = JSON.parse(readFileSync(new URL("../fixtures/cf-reference/vg-nig-cf.json", import.meta.url), "utf8")) as {
  laws: { model: { family: string }; values: { t: number; re: string; im: string }[] }[];
};
const BESSEL = JSON.parse(readFileSync(new URL("../fixtures/cf-reference/bessel.json", import.meta.url), "utf8")) as { values: { nu: number; x: number; K: string }[] };
function mixtureCases(): Case[] {
  return MIXTURE_CF.laws.map((l) => {
    const byT = new Map(l.values.map((v) => [v.t, [Number(v.re), Number(v.im)] as Cx]));
    return {
      name: l.model.family,
      model: l.model,
      ts: l.values.map((v) => v.t),
      ref: (t: number) => byT.get(t)!,
      source:
        l.model.family === "nig"
          ? "mixture of normals over an inverse Gaussian (Barndorff-Nielsen 1997, sec. 2), mpmath: tests/fixtures/cf-reference/vg-nig-cf.json"
          : "mixture of normals over a gamma time (Madan, Carr & Chang 1998, sec. 2), mpmath: tests/fixtures/cf-reference/vg-nig-cf.json",
    };
  });
}



interface Case {
  name: string;
  model: unknown;
  /** reference CF at t, from the cited closed form */
  ref: (t: number) => Cx;
  source: string;
  ts?: number[];
  /** tolerance: relative 1e-12 unless stated */
  rel?: number;
  abs?: number;
}

const cases: Case[] = [
  { name: "normal", model: { family: "normal", mu: 1.5, sigma: 0.7 }, ref: (t) => cexp([-0.5 * 0.49 * t * t, 1.5 * t]), source: "JKB vol. 1, ch. 13" },
  { name: "cauchy", model: { family: "cauchy", loc: -2, scale: 3 }, ref: (t) => cexp([-3 * Math.abs(t), -2 * t]), source: "JKB vol. 1, ch. 16" },
  {
    name: "uniform",
    model: { family: "uniform", a: -1, b: 3 },
    ref: (t) => (t === 0 ? [1, 0] : cdiv([Math.cos(3 * t) - Math.cos(-t), Math.sin(3 * t) - Math.sin(-t)], [0, 4 * t])),
    source: "JKB vol. 2, ch. 26 (e^{ibt} - e^{iat})/(it(b-a))",
    ts: [-7.5, -2, -1, -0.3, 0, 0.1, 0.5, 1, 2.5, 7, 15],
    abs: 1e-15,
  },
  { name: "exponential", model: { family: "exponential", rate: 2 }, ref: (t) => cdiv([2, 0], [2, -t]), source: "JKB vol. 1, ch. 19: rate/(rate - it)" },
  { name: "gamma", model: { family: "gamma", shape: 2.5, rate: 0.5 }, ref: (t) => cpow([1, -t / 0.5], -2.5), source: "JKB vol. 1, ch. 17" },
  { name: "chi_squared", model: { family: "chi_squared", k: 3 }, ref: (t) => cpow([1, -2 * t], -1.5), source: "JKB vol. 1, ch. 18: (1-2it)^{-k/2}" },
  { name: "laplace", model: { family: "laplace", loc: 0.5, scale: 2 }, ref: (t) => cmul(cexp([0, 0.5 * t]), [1 / (1 + 4 * t * t), 0]), source: "JKB vol. 2, ch. 24" },
  {
    name: "logistic",
    model: { family: "logistic", loc: 1, scale: 0.5 },
    ref: (t) => cmul(cexp([0, t]), [t === 0 ? 1 : (Math.PI * 0.5 * t) / Math.sinh(Math.PI * 0.5 * t), 0]),
    source: "JKB vol. 2, ch. 23",
    ts: [-40, -7.5, -2, -1, -0.3, -1e-3, 0, 1e-3, 0.1, 0.5, 1, 2.5, 7, 15, 60],
  },
  {
    name: "student_t nu=1 is Cauchy",
    model: { family: "student_t", nu: 1, loc: 0.3, scale: 2 },
    ref: (t) => cexp([-2 * Math.abs(t), 0.3 * t]),
    source: "JKB vol. 2, ch. 28 (t with 1 d.f. is Cauchy)",
  },
  {
    name: "student_t nu=3",
    model: { family: "student_t", nu: 3 },
    ref: (t) => {
      const z = Math.sqrt(3) * Math.abs(t);
      return [Math.exp(-z) * (1 + z), 0];
    },
    source: "closed form e^{-z}(1+z), z = sqrt(3)|t|, from K_{3/2} (A&S sec. 10.2)",
  },
  {
    name: "student_t nu=5",
    model: { family: "student_t", nu: 5, loc: -1, scale: 0.5 },
    ref: (t) => {
      const z = Math.sqrt(5) * 0.5 * Math.abs(t);
      return cmul([Math.exp(-z) * (1 + z + (z * z) / 3), 0], cexp([0, -t]));
    },
    source: "closed form e^{-z}(1 + z + z^2/3) from K_{5/2} (A&S sec. 10.2)",
  },
  {
    name: "stable alpha=2 is normal with variance 2 scale^2",
    model: { family: "stable", alpha: 2, beta: 0.7, scale: 1.5, loc: 1 },
    ref: (t) => cexp([-2.25 * t * t, t]),
    source: "Nolan (2020) ch. 1: S(2, beta, gamma, delta) = N(delta, 2 gamma^2)",
  },
  {
    name: "stable alpha=1 beta=0 is Cauchy",
    model: { family: "stable", alpha: 1, beta: 0, scale: 2, loc: -1, param: "S0" },
    ref: (t) => cexp([-2 * Math.abs(t), -t]),
    source: "Nolan (2020) ch. 1: S(1, 0, gamma, delta) is Cauchy",
  },
  {
    name: "stable alpha=1/2 beta=1 S1 is Levy",
    model: { family: "stable", alpha: 0.5, beta: 1, scale: 2, loc: 0 },
    ref: (t) => cexp(cmul([-1, 0], csqrt([0, -2 * 2 * t]))),
    source: "Levy law with scale c: phi = exp(-sqrt(-2 i c t)) (Nolan 2020, ch. 1; Feller vol. 2)",
  },
  {
    name: "stable S1 alpha=1 beta=0.5",
    model: { family: "stable", alpha: 1, beta: 0.5, scale: 1.3, loc: 0.2 },
    ref: (t) =>
      t === 0 ? [1, 0] : cexp([-1.3 * Math.abs(t), 0.2 * t - 1.3 * Math.abs(t) * 0.5 * (2 / Math.PI) * Math.sign(t) * Math.log(Math.abs(t))]),
    source: "Nolan (2020) ch. 1, S1 with alpha = 1",
  },
  ...mixtureCases(),
  { name: "point", model: { family: "point", at: 2.5 }, ref: (t) => cexp([0, 2.5 * t]), source: "common practice" },
  { name: "bernoulli", model: { family: "bernoulli", p: 0.3 }, ref: (t) => [0.7 + 0.3 * Math.cos(t), 0.3 * Math.sin(t)], source: "JKK ch. 3" },
  { name: "binomial p<1/2", model: { family: "binomial", n: 7, p: 0.2 }, ref: (t) => cpow([0.8 + 0.2 * Math.cos(t), 0.2 * Math.sin(t)], 7), source: "JKK ch. 3" },
  {
    name: "binomial p>1/2",
    model: { family: "binomial", n: 9, p: 0.85 },
    ref: (t) => {
      let z: Cx = [1, 0];
      for (let k = 0; k < 9; k++) z = cmul(z, [0.15 + 0.85 * Math.cos(t), 0.85 * Math.sin(t)]);
      return z;
    },
    source: "JKK ch. 3 (product form)",
    abs: 1e-15,
  },
  { name: "poisson", model: { family: "poisson", lambda: 3.2 }, ref: (t) => cexp([3.2 * (Math.cos(t) - 1), 3.2 * Math.sin(t)]), source: "JKK ch. 4" },
  {
    name: "negative_binomial",
    model: { family: "negative_binomial", r: 2.5, p: 0.4 },
    ref: (t) => cpow(cdiv([0.4, 0], [1 - 0.6 * Math.cos(t), -0.6 * Math.sin(t)]), 2.5),
    source: "JKK ch. 5",
  },
  { name: "geometric", model: { family: "geometric", p: 0.25 }, ref: (t) => cdiv([0.25, 0], [1 - 0.75 * Math.cos(t), -0.75 * Math.sin(t)]), source: "JKK ch. 5" },
  {
    name: "sum of gammas with a common rate",
    model: { sum: [{ family: "gamma", shape: 0.7, rate: 2 }, { family: "gamma", shape: 1.8, rate: 2 }, { family: "exponential", rate: 2 }] },
    ref: (t) => cpow([1, -t / 2], -3.5),
    source: "JKB vol. 1, ch. 17: Gamma(a1, r) + Gamma(a2, r) = Gamma(a1 + a2, r)",
  },
  {
    name: "repeat of a gamma (non-integer shape, branch through many turns)",
    model: { repeat: 40, of: { family: "gamma", shape: 0.3, rate: 1 } },
    ref: (t) => cpow([1, -t], -12),
    source: "JKB vol. 1, ch. 17 (sum of gammas)",
  },
  {
    name: "scale and shift of a normal",
    model: { shift: 2, of: { scale: -3, of: { family: "normal", mu: 1, sigma: 0.5 } } },
    ref: (t) => cexp([-0.5 * 2.25 * t * t, -t]),
    source: "common practice: aX + b with X ~ N(1, 0.25) is N(a + b, a^2 0.25)",
  },
  {
    name: "compound Poisson with exponential severity",
    model: { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "exponential", rate: 1.5 } } },
    ref: (t) => cexp([2 * (cdiv([1.5, 0], [1.5, -t])[0] - 1), 2 * cdiv([1.5, 0], [1.5, -t])[1]]),
    source: "Loss Models (Klugman, Panjer & Willmot), aggregate loss models chapter: phi_S = exp(lambda (phi_X - 1))",
  },
  {
    name: "compound geometric with exponential severity",
    model: { compound: { count: { family: "geometric", p: 0.4 }, each: { family: "exponential", rate: 1 } } },
    // P_N(z) = p/(1 - q z); with phi_X = 1/(1 - it)
    ref: (t) => {
      const phx = cdiv([1, 0], [1, -t]);
      return cdiv([0.4, 0], [1 - 0.6 * phx[0], -0.6 * phx[1]]);
    },
    source: "Loss Models, aggregate loss models chapter: phi_S = P_N(phi_X)",
  },
  {
    name: "compound with an empirical count and a lattice count of step 1/2 (mass on naturals only)",
    model: { compound: { count: { mix: [{ weight: 0.5, of: { sample: [0, 1, 1, 2] } }, { weight: 0.5, of: { lattice: { origin: 0, step: 0.5, p: [0.5, 0, 0.5] } } }] }, each: { family: "normal", mu: 1, sigma: 0.1 } } },
    // P_N(z) = 0.5 (0.25 + 0.5 z + 0.25 z^2) + 0.5 (0.5 + 0.5 z) at z = phi_X(t)
    ref: (t) => {
      const z = cexp([-0.005 * t * t, t]);
      const z2 = cmul(z, z);
      return [0.125 + 0.25 * z[0] + 0.125 * z2[0] + 0.25 + 0.25 * z[0], 0.25 * z[1] + 0.125 * z2[1] + 0.25 * z[1]];
    },
    source: "Loss Models, aggregate loss models chapter: phi_S = P_N(phi_X)",
    abs: 1e-15,
  },
  {
    name: "mixture of two normals",
    model: { mix: [{ weight: 0.25, of: { family: "normal", mu: -1, sigma: 1 } }, { weight: 0.75, of: { family: "normal", mu: 2, sigma: 0.5 } }] },
    ref: (t) => {
      const a = cexp([-0.5 * t * t, -t]);
      const b = cexp([-0.125 * t * t, 2 * t]);
      return [0.25 * a[0] + 0.75 * b[0], 0.25 * a[1] + 0.75 * b[1]];
    },
    source: "common practice: phi = sum w_j phi_j",
    abs: 1e-16,
  },
  {
    name: "lattice (fair die)",
    model: { lattice: { origin: 1, step: 1, p: [1, 1, 1, 1, 1, 1].map(() => 1 / 6) } },
    ref: (t) => {
      let s: Cx = [0, 0];
      for (let k = 1; k <= 6; k++) s = [s[0] + Math.cos(k * t) / 6, s[1] + Math.sin(k * t) / 6];
      return s;
    },
    source: "definition of the CF of a discrete law",
    abs: 1e-15,
  },
];

describe("CF closed forms (relative error <= 1e-12 unless an absolute bound is stated)", () => {
  for (const c of cases) {
    it(`${c.name} [${c.source}]`, () => {
      const ts = c.ts ?? T;
      const got = cfAt(c.model, ts);
      ts.forEach((t, k) => {
        const r = c.ref(t);
        const tol = { rel: c.rel ?? 1e-12, abs: c.abs ?? 1e-300 };
        const err = closeC(got[k][0], got[k][1], r[0], r[1], tol, `${c.name} at t=${t}`);
        if (Math.hypot(r[0], r[1]) > 1e-300) record(`cf relative error (${c.abs ? "abs-bounded " : ""}${c.name})`, err);
      });
    });
  }
});

describe("stable: parameterisations agree and S0 is continuous at alpha = 1", () => {
  it("S0 with delta0 equals S1 with delta1 = delta0 - beta gamma tan(pi alpha/2) [Nolan 2020, ch. 1]", () => {
    for (const [a, b] of [[0.6, 0.8], [1.3, -0.4], [1.8, 1]] as const) {
      const g = 0.8;
      const d0 = 0.4;
      const d1 = d0 - b * g * Math.tan((Math.PI * a) / 2);
      const x = cfAt({ family: "stable", alpha: a, beta: b, scale: g, loc: d0, param: "S0" }, T);
      const y = cfAt({ family: "stable", alpha: a, beta: b, scale: g, loc: d1, param: "S1" }, T);
      T.forEach((t, k) => closeC(x[k][0], x[k][1], y[k][0], y[k][1], { rel: 1e-12, abs: 1e-300 }, `alpha=${a} beta=${b} t=${t}`));
    }
  });
  it("S0 at alpha = 1 +- 1e-9 is within 1e-7 of alpha = 1 [Nolan 2020: S0 is continuous in alpha]", () => {
    const at1 = cfAt({ family: "stable", alpha: 1, beta: 0.9, scale: 2, loc: 0, param: "S0" }, T);
    for (const a of [1 - 1e-9, 1 + 1e-9]) {
      const near = cfAt({ family: "stable", alpha: a, beta: 0.9, scale: 2, loc: 0, param: "S0" }, T);
      T.forEach((t, k) => closeC(near[k][0], near[k][1], at1[k][0], at1[k][1], { abs: 1e-7 }, `alpha=${a} t=${t}`));
    }
  });
});

describe("modified Bessel K (A&S 9.6.24 by the trapezoidal rule)", () => {
  const cases: [number, number, number, string][] = [];
  for (const x of [1e-6, 0.01, 0.5, 1, 3, 10, 50, 300]) {
    // K_{1/2}(x) = sqrt(pi/(2x)) e^{-x}, K_{3/2}(x) = K_{1/2}(x) (1 + 1/x) (A&S sec. 10.2)
    cases.push([0.5, x, Math.log(Math.sqrt(Math.PI / (2 * x))), "A&S sec. 10.2"]);
    cases.push([1.5, x, Math.log(Math.sqrt(Math.PI / (2 * x)) * (1 + 1 / x)), "A&S sec. 10.2"]);
  }
  it.each(cases)("log(e^x K_%d(%d)) vs half-integer closed form", (nu, x, ref) => {
    close(logBesselKScaled(nu, x), ref, { abs: 2e-15, rel: 1e-14 }, `nu=${nu} x=${x}`);
  });
  it.each(BESSEL.values.map((v) => [v.nu, v.x, v] as const))("K_%d(%d) vs mpmath.besselk (tests/fixtures/cf-reference/bessel.json, relative 1e-13)", (_nu, _x, v) => {
    close(besselK(v.nu, v.x), Number(v.K), { rel: 1e-13 }, `K_${v.nu}(${v.x}) (source: mpmath.besselk via tests/fixtures/cf-reference/generate.py)`);
  });
  it("recurrence K_{nu+1}(x) = K_{nu-1}(x) + (2 nu / x) K_nu(x) (A&S 9.6.26) for non-half-integer orders", () => {
    for (const nu of [0.3, 1.7, 4.25, 11.1]) {
      for (const x of [0.05, 0.7, 2, 9, 40]) {
        const lhs = besselK(nu + 1, x);
        const rhs = besselK(nu - 1, x) + ((2 * nu) / x) * besselK(nu, x);
        close(lhs, rhs, { rel: 1e-13 }, `nu=${nu} x=${x}`);
        record("Bessel K recurrence relative error", Math.abs(lhs - rhs) / Math.abs(rhs));
      }
    }
  });
  it("log Gamma at known values (A&S 6.1.8, 6.1.15)", () => {
    close(lgamma(0.5), 0.5 * Math.log(Math.PI), { abs: 1e-15 }, "lgamma(1/2)");
    close(lgamma(11), Math.log(3628800), { rel: 1e-15 }, "lgamma(11)");
    close(lgamma(100.5) - lgamma(99.5), Math.log(99.5), { abs: 1e-13 }, "recurrence");
  });
});

afterAll(() => {
  console.log("worst errors (families):", JSON.stringify(worst, null, 1));
});
