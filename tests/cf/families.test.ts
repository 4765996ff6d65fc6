// CF of every family against published closed forms (relative error <= 1e-12) and the numerical families against
// their stated accuracy; branch continuity of powers and compounds; special inputs.
import { afterAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, besselK, logBesselKScaled, lgamma, NUMERIC_CF_ABS_ERROR } from "@/lib/cf";
import { close, closeC, record, worst } from "./model-assert";
import { paretoAsymptotic, weibullAsymptotic, weibullSeries } from "@/lib/cf/families/asymptotic";

type Cx = [number, number];
const cmul = (a: Cx, b: Cx): Cx => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const cdiv = (a: Cx, b: Cx): Cx => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const cexp = (a: Cx): Cx => [Math.exp(a[0]) * Math.cos(a[1]), Math.exp(a[0]) * Math.sin(a[1])];
const clog = (a: Cx): Cx => [Math.log(Math.hypot(a[0], a[1])), Math.atan2(a[1], a[0])];
const cpow = (a: Cx, p: number): Cx => {
  const l = clog(a);
  return cexp([p * l[0], p * l[1]]);
};
const csqrt = (a: Cx): Cx => cpow(a, 0.5);

/** Compensated summation (Neumaier 1974) so that the brute-force references are not limited by rounding. */
class Neumaier {
  private s = 0;
  private c = 0;
  add(x: number) {
    const t = this.s + x;
    this.c += Math.abs(this.s) >= Math.abs(x) ? this.s - t + x : x - t + this.s;
    this.s = t;
  }
  get value() {
    return this.s + this.c;
  }
}

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


function cfAt(model: unknown, ts: number[]): Cx[] {
  const c = compile(model);
  const t = Float64Array.from(ts);
  const re = new Float64Array(ts.length);
  const im = new Float64Array(ts.length);
  c.cf(t, re, im);
  return ts.map((_, k) => [re[k], im[k]]);
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

describe(`numerical CFs (lognormal, weibull, pareto): absolute error <= ${NUMERIC_CF_ABS_ERROR}`, () => {
  it("weibull with shape 1 is exponential [JKB vol. 1, ch. 21]", () => {
    const got = cfAt({ family: "weibull", shape: 1, scale: 2 }, T);
    T.forEach((t, k) => {
      const r = cdiv([1, 0], [1, -2 * t]);
      const e = closeC(got[k][0], got[k][1], r[0], r[1], { rel: 1e-12 }, `t=${t}`);
      record("cf relative error (weibull shape 1 vs exponential)", e);
    });
  });
  it("weibull and lognormal near 0 agree with the moment series sum (it)^n E X^n / n! [JKB ch. 21, 14]", () => {
    const ln = { mu: 0.2, sigma: 0.5 };
    const wb = { k: 1.7, lambda: 1.3 };
    const ts = [1e-3, -2e-3, 5e-3];
    const series = (t: number, m: (n: number) => number): Cx => {
      let r = 0;
      let i = 0;
      let f = 1;
      for (let n = 0; n <= 10; n++) {
        if (n > 0) f *= n;
        const v = (t ** n * m(n)) / f;
        const s = n % 4;
        if (s === 0) r += v;
        else if (s === 1) i += v;
        else if (s === 2) r -= v;
        else i -= v;
      }
      return [r, i];
    };
    const gl = cfAt({ family: "lognormal", mu: ln.mu, sigma: ln.sigma }, ts);
    const gw = cfAt({ family: "weibull", shape: wb.k, scale: wb.lambda }, ts);
    ts.forEach((t, k) => {
      const a = series(t, (n) => Math.exp(n * ln.mu + (n * n * ln.sigma * ln.sigma) / 2));
      const b = series(t, (n) => wb.lambda ** n * Math.exp(lgamma(1 + n / wb.k)));
      record("numeric CF abs error (lognormal, small t)", closeC(gl[k][0], gl[k][1], a[0], a[1], { abs: NUMERIC_CF_ABS_ERROR }, `lognormal t=${t}`));
      record("numeric CF abs error (weibull, small t)", closeC(gw[k][0], gw[k][1], b[0], b[1], { abs: NUMERIC_CF_ABS_ERROR }, `weibull t=${t}`));
    });
  });
  it("lognormal and weibull vs brute-force quadrature of the published density on the real line", () => {
    // composite Simpson in y = log x with a fine step (independent route, no contour shift)
    const brute = (logDens: (y: number) => number, lo: number, hi: number, t: number): Cx => {
      const n = 400000;
      const h = (hi - lo) / n;
      const r = new Neumaier();
      const i = new Neumaier();
      for (let j = 0; j <= n; j++) {
        const y = lo + j * h;
        const w = (j === 0 || j === n ? 1 : j % 2 === 1 ? 4 : 2) * (h / 3);
        const f = Math.exp(logDens(y));
        r.add(w * f * Math.cos(t * Math.exp(y)));
        i.add(w * f * Math.sin(t * Math.exp(y)));
      }
      return [r.value, i.value];
    };
    // the brute-force route resolves the oscillation of exp(i t e^y) only where t e^y h << 1 over the mass
    for (const [sigma, ts] of [[0.1, [0.7, 3, 12]], [0.6, [0.7, 3, 12]], [1, [0.7, 3]]] as [number, number[]][]) {
      const got = cfAt({ family: "lognormal", mu: 0, sigma }, ts);
      ts.forEach((t, k) => {
        // density of y = log X: N(0, sigma^2) (JKB ch. 14)
        const r = brute((y) => -0.5 * (y / sigma) ** 2 - Math.log(sigma * Math.sqrt(2 * Math.PI)), -12 * sigma, 12 * sigma, t);
        record("numeric CF abs error (lognormal vs brute force)", closeC(got[k][0], got[k][1], r[0], r[1], { abs: NUMERIC_CF_ABS_ERROR }, `sigma=${sigma} t=${t}`));
      });
    }
    for (const shape of [0.6, 2, 4]) {
      const ts = [0.7, 3, 12];
      const got = cfAt({ family: "weibull", shape, scale: 1 }, ts);
      ts.forEach((t, k) => {
        // density of y = log X: shape e^{shape y} exp(-e^{shape y}) (JKB ch. 21 transformed)
        const r = brute((y) => Math.log(shape) + shape * y - Math.exp(shape * y), -60 / shape, Math.log(50) / shape, t);
        record("numeric CF abs error (weibull vs brute force)", closeC(got[k][0], got[k][1], r[0], r[1], { abs: NUMERIC_CF_ABS_ERROR }, `shape=${shape} t=${t}`));
      });
    }
  });
  it("large-t expansions (Watson's lemma) agree with the contour quadrature where both apply", () => {
    const out = new Float64Array(2);
    for (const [k, lam, as] of [[0.7, 2, [2, 3, 3.9]], [1.2, 0.5, [3, 3.9]], [0.3, 1, [2, 3, 3.9]]] as [number, number, number[]][]) {
      const ser = weibullSeries(k);
      for (const a of as) {
        // a < 4: the node itself uses the quadrature
        expect(weibullAsymptotic(ser, a, out), `series converges for k=${k}, a=${a}`).toBe(true);
        const q = cfAt({ family: "weibull", shape: k, scale: lam }, [a / lam])[0];
        record("numeric CF abs error (weibull series vs quadrature)", closeC(out[0], out[1], q[0], q[1], { abs: 1e-14 }, `k=${k} a=${a}`));
      }
    }
    // the pareto series (used for xm t > 40 + 3 alpha) is checked against brute-force quadrature in the next test
    expect(paretoAsymptotic(2.5, 60, out)).toBe(true);
    // weibull shape 1: the series is the geometric series of the exponential CF 1/(1 - i lambda t) (JKB vol. 1, ch. 19)
    expect(weibullAsymptotic(weibullSeries(1), 50, out)).toBe(true);
    const r = cdiv([1, 0], [1, -50]);
    closeC(out[0], out[1], r[0], r[1], { rel: 1e-14 }, "shape 1 at a = 50");
  });
  it("pareto vs quadrature of the density (JKB ch. 20) with an integration-by-parts tail", () => {
    const alpha = 2.5;
    const xm = 1;
    for (const t of [0.5, 1, 3, 60]) {
      const X = 200;
      // Simpson's error ~ (h t)^4 / 180: more panels for the large t
      const n = t > 10 ? 8_000_000 : 2_000_000;
      const h = (X - xm) / n;
      const rs = new Neumaier();
      const is = new Neumaier();
      for (let j = 0; j <= n; j++) {
        const x = xm + j * h;
        const w = (j === 0 || j === n ? 1 : j % 2 === 1 ? 4 : 2) * (h / 3);
        const f = alpha * xm ** alpha * x ** (-alpha - 1);
        rs.add(w * f * Math.cos(t * x));
        is.add(w * f * Math.sin(t * x));
      }
      const r = rs.value;
      const i = is.value;
      // int_X^inf e^{itx} x^{-b} dx = -e^{itX} X^{-b}/(it) + (b/(it)) int_X^inf e^{itx} x^{-b-1} dx, iterated
      let b = alpha + 1;
      let coef: Cx = [alpha * xm ** alpha, 0];
      let tail: Cx = [0, 0];
      for (let m = 0; m < 12; m++) {
        const term = cmul(coef, cdiv(cmul([-1, 0], cexp([-b * Math.log(X), t * X])), [0, t]));
        tail = [tail[0] + term[0], tail[1] + term[1]];
        coef = cmul(coef, cdiv([b, 0], [0, t]));
        b += 1;
      }
      const got = cfAt({ family: "pareto", alpha, xm }, [t])[0];
      record("numeric CF abs error (pareto vs quadrature)", closeC(got[0], got[1], r + tail[0], i + tail[1], { abs: NUMERIC_CF_ABS_ERROR }, `t=${t}`));
    }
  });
});

describe("continuous branch of the log-CF", () => {
  const fine = Float64Array.from({ length: 4001 }, (_, k) => -50 + k * 0.025);
  const models: [string, unknown][] = [
    ["repeat 200 of gamma(0.3)", { repeat: 200, of: { family: "gamma", shape: 0.3, rate: 1 } }],
    ["compound Poisson of a shifted normal", { compound: { count: { family: "poisson", lambda: 30 }, each: { family: "normal", mu: 2, sigma: 0.1 } } }],
    ["binomial n=40 p=0.9", { family: "binomial", n: 40, p: 0.9 }],
    ["mixture normal/point", { mix: [{ weight: 0.5, of: { family: "normal", mu: 3, sigma: 0.2 } }, { weight: 0.5, of: { family: "point", at: -1 } }] }],
    ["stable S1 alpha=0.8 beta=1", { family: "stable", alpha: 0.8, beta: 1, scale: 1, loc: 5 }],
  ];
  it.each(models)("%s: imaginary part has no 2 pi jumps and is 0 at t = 0 (common practice)", (_name, model) => {
    const c = compile(model);
    const re = new Float64Array(fine.length);
    const im = new Float64Array(fine.length);
    c.logCf(fine, re, im);
    let maxJump = 0;
    for (let k = 1; k < fine.length; k++) if (Number.isFinite(re[k]) && re[k] > -30) maxJump = Math.max(maxJump, Math.abs(im[k] - im[k - 1]));
    expect(maxJump, `largest step of Im log phi on a 0.025 grid`).toBeLessThan(Math.PI);
    close(im[2000], 0, { abs: 0 }, "Im log phi(0)");
    close(re[2000], 0, { abs: 1e-15 }, "Re log phi(0)");
  });
});

describe("special inputs", () => {
  it("NaN t gives NaN, +-Inf gives 0 for a law with a density and NaN for a lattice law; t = 0 gives exactly 1", () => {
    const t = Float64Array.of(NaN, Infinity, -Infinity, 0);
    const re = new Float64Array(4);
    const im = new Float64Array(4);
    compile({ family: "normal", mu: 1, sigma: 1 }).cf(t, re, im);
    expect(Number.isNaN(re[0]) && Number.isNaN(im[0])).toBe(true);
    expect([re[1], im[1], re[2], im[2], re[3], im[3]]).toEqual([0, 0, 0, 0, 1, 0]);
    compile({ family: "poisson", lambda: 1 }).cf(t, re, im);
    expect(Number.isNaN(re[1]) && Number.isNaN(re[2])).toBe(true);
    expect([re[3], im[3]]).toEqual([1, 0]);
  });
  it("empty t is a no-op; short output buffers are rejected", () => {
    const c = compile({ family: "cauchy", loc: 0, scale: 1 });
    expect(() => c.cf(new Float64Array(0), new Float64Array(0), new Float64Array(0))).not.toThrow();
    expect(() => c.cf(new Float64Array(3), new Float64Array(2), new Float64Array(3))).toThrow(RangeError);
  });
  it("huge grid: 2^20 points of a 3-term sum in one call, spot-checked against the closed form (JKB ch. 13, 17)", () => {
    const n = 2 ** 20;
    const t = Float64Array.from({ length: n }, (_, k) => (k - n / 2) * 1e-3);
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    compile({ sum: [{ family: "normal", mu: 1, sigma: 0.1 }, { family: "gamma", shape: 2, rate: 3 }, { family: "point", at: -1 }] }).cf(t, re, im);
    for (const k of [0, 1234, n / 2, n / 2 + 1, n - 1]) {
      const x = t[k];
      const g = cpow([1, -x / 3], -2);
      const r = cmul(g, cexp([-0.005 * x * x, 0]));
      closeC(re[k], im[k], r[0], r[1], { rel: 1e-12, abs: 1e-300 }, `t=${x}`);
    }
  });
  it("extreme parameters stay finite: tiny and huge scales, huge t", () => {
    const t = Float64Array.of(1e-300, 1e300, -1e300);
    const re = new Float64Array(3);
    const im = new Float64Array(3);
    for (const m of [
      { family: "normal", mu: 0, sigma: 1e-300 },
      { family: "gamma", shape: 1e-8, rate: 1e8 },
      { family: "student_t", nu: 1e6 },
      { family: "stable", alpha: 0.1, beta: 1, scale: 1e-10 },
    ]) {
      compile(m).cf(t, re, im);
      for (let k = 0; k < 3; k++) {
        expect(Number.isFinite(re[k]) && Number.isFinite(im[k]), `${JSON.stringify(m)} t=${t[k]}`).toBe(true);
        expect(Math.hypot(re[k], im[k])).toBeLessThanOrEqual(1 + 1e-15);
      }
      close(re[0], 1, { abs: 1e-12 }, `${JSON.stringify(m)} at t=1e-300`);
    }
  });
});

afterAll(() => {
  console.log("worst errors (families):", JSON.stringify(worst, null, 1));
});
