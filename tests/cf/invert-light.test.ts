// Inversion of light-tailed laws and their sums against closed forms: pdf/cdf within 1e-9, tails within 1e-4
// relative where the probability is >= 1e-8, and the error estimate never below the actual error.
import { describe, expect, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import gammaFn from "@stdlib/math-base-special-gamma";
import gammainc from "@stdlib/math-base-special-gammainc";
import { density } from "@/lib/cf/invert/density";
import type { CompiledModel } from "@/lib/cf/types";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { Checker, cpExpPdf, cpExpPdfSeries, cpExpSf, irwinHallCdf, irwinHallPdf } from "./invert-helpers";

const N = (mu: number, sigma: number): Model => ({ family: "normal", mu, sigma }) as Model;
const G = (shape: number, rate: number): Model => ({ family: "gamma", shape, rate }) as Model;
const U = { family: "uniform", a: 0, b: 1 } as Model;
const CP = (lambda: number): Model =>
  ({ compound: { count: { family: "poisson", lambda }, each: { family: "exponential", rate: 1 } } }) as Model;

interface Ref {
  pdf: (x: number) => number;
  cdf: (x: number) => number;
  sf: (x: number) => number;
}

// Normal N(mu, s): pdf closed form; cdf = erfc(-(x-mu)/(s sqrt 2))/2 (Abramowitz & Stegun 26.2.29), erfc from @stdlib/math-base-special-erfc
const normalRef = (mu: number, s: number): Ref => ({
  pdf: (x) => Math.exp(-0.5 * ((x - mu) / s) ** 2) / (s * Math.sqrt(2 * Math.PI)),
  cdf: (x) => 0.5 * erfc(-(x - mu) / (s * Math.SQRT2)),
  sf: (x) => 0.5 * erfc((x - mu) / (s * Math.SQRT2)),
});
// Gamma(k, rate r): sums with a common rate add shapes (Johnson, Kotz & Balakrishnan vol. 1, ch. 17);
// pdf closed form with @stdlib/math-base-special-gamma; cdf/sf = regularized incomplete gamma (@stdlib/math-base-special-gammainc)
const gammaRef = (k: number, r: number): Ref => ({
  pdf: (x) => (x <= 0 ? 0 : Math.exp((k - 1) * Math.log(x) + k * Math.log(r) - r * x) / gammaFn(k)),
  cdf: (x) => (x <= 0 ? 0 : gammainc(r * x, k, true, false)),
  sf: (x) => (x <= 0 ? 1 : gammainc(r * x, k, true, true)),
});
// Irwin-Hall closed form (JKB vol. 2 ch. 26)
const ihRef = (n: number): Ref => ({
  pdf: (x) => irwinHallPdf(n, x),
  cdf: (x) => irwinHallCdf(n, x),
  sf: (x) => irwinHallCdf(n, n - x), // symmetry about n/2
});
// compound Poisson with Exponential(1) claims: continuous part (Bessel form), sf by the Erlang mixture
const cpRef = (l: number): Ref => ({
  pdf: (x) => cpExpPdf(l, x),
  cdf: (x) => (x < 0 ? 0 : 1 - cpExpSf(l, x)),
  sf: (x) => cpExpSf(l, x),
});

interface Case {
  name: string;
  model: CompiledModel;
  ref: Ref;
  points: number[];
  grid: { from: number; to: number; count: number };
}

const cases: Case[] = [
  {
    name: "normal(1,2) + normal(-3,0.5) = normal(-2, sqrt 4.25)",
    model: compile({ sum: [N(1, 2), N(-3, 0.5)] }),
    ref: normalRef(-2, Math.sqrt(4.25)),
    points: [-13, -9, -5, -2, 0, 1.7, 4, 8, 9.5],
    grid: { from: -14, to: 10, count: 4096 },
  },
  {
    name: "10 normals (mu_i = i/10, sigma_i = 0.3 + i/20)",
    model: compile({ sum: Array.from({ length: 10 }, (_, i) => N(i / 10, 0.3 + i / 20)) }),
    ref: normalRef(4.5, Math.sqrt(Array.from({ length: 10 }, (_, i) => (0.3 + i / 20) ** 2).reduce((s, v) => s + v, 0))),
    points: [-3, 0, 2, 4.5, 7, 10, 12],
    grid: { from: -2, to: 11, count: 1000 },
  },
  {
    name: "gamma(2, 1.5) + gamma(3.5, 1.5) = gamma(5.5, 1.5)",
    model: compile({ sum: [G(2, 1.5), G(3.5, 1.5)] }),
    ref: gammaRef(5.5, 1.5),
    points: [0.05, 0.5, 1, 2, 3.6, 6, 10, 15, 20],
    grid: { from: 0, to: 20, count: 2001 },
  },
  {
    name: "gamma(1, 2) = exponential(2) (density jump at 0)",
    model: compile({ family: "exponential", rate: 2 }),
    ref: gammaRef(1, 2),
    points: [1e-4, 0.01, 0.3, 1, 3, 8],
    grid: { from: 0.001, to: 9, count: 900 },
  },
  {
    name: "3 x gamma(0.7, 3) = gamma(2.1, 3)",
    model: compile({ repeat: 3, of: G(0.7, 3) }),
    ref: gammaRef(2.1, 3),
    points: [0.02, 0.2, 0.7, 1.5, 3, 6],
    grid: { from: 0.01, to: 6, count: 600 },
  },
  {
    // chi-squared(k) = gamma(k/2, rate 1/2) (Abramowitz & Stegun 26.4.1); density unbounded at 0 for k = 1
    name: "chi_squared(1) = gamma(0.5, 0.5) (density ~ x^{-1/2} at 0)",
    model: compile({ family: "chi_squared", k: 1 } as Model),
    ref: gammaRef(0.5, 0.5),
    points: [0.001, 0.05, 0.3, 1, 2.5, 6, 15],
    grid: { from: 0.01, to: 10, count: 1000 },
  },
  {
    name: "gamma(0.3, 1) (density ~ x^{-0.7} at 0)",
    model: compile(G(0.3, 1)),
    ref: gammaRef(0.3, 1),
    points: [0.001, 0.05, 0.3, 1, 2.5, 6],
    grid: { from: 0.01, to: 10, count: 1000 },
  },
  {
    // lognormal(0, 0.5): pdf exp(-(ln x)^2/(2 s^2))/(x s sqrt(2 pi)), cdf = Phi(ln x / s) (JKB vol. 1, ch. 14);
    // its CF is numerical (the model declares its absolute error, which the estimate must carry)
    name: "lognormal(0, 0.5) (numerical CF)",
    model: compile({ family: "lognormal", mu: 0, sigma: 0.5 } as Model),
    ref: {
      pdf: (x) => (x <= 0 ? 0 : Math.exp(-0.5 * (Math.log(x) / 0.5) ** 2) / (x * 0.5 * Math.sqrt(2 * Math.PI))),
      cdf: (x) => (x <= 0 ? 0 : 0.5 * erfc(-Math.log(x) / (0.5 * Math.SQRT2))),
      sf: (x) => (x <= 0 ? 1 : 0.5 * erfc(Math.log(x) / (0.5 * Math.SQRT2))),
    },
    points: [0.2, 0.5, 0.8, 1, 1.7, 3, 5],
    grid: { from: 0.05, to: 6, count: 700 },
  },
  {
    // Laplace(loc 1, scale 2): pdf e^{-|x-1|/2}/4, cdf by halves (JKB vol. 2, ch. 24); kink at the location
    name: "laplace(1, 2) (kink at the location)",
    model: compile({ family: "laplace", loc: 1, scale: 2 } as Model),
    ref: {
      pdf: (x) => Math.exp(-Math.abs(x - 1) / 2) / 4,
      cdf: (x) => (x < 1 ? 0.5 * Math.exp((x - 1) / 2) : 1 - 0.5 * Math.exp(-(x - 1) / 2)),
      sf: (x) => (x < 1 ? 1 - 0.5 * Math.exp((x - 1) / 2) : 0.5 * Math.exp(-(x - 1) / 2)),
    },
    points: [-20, -3, 0.5, 0.999, 1.001, 4, 25],
    grid: { from: -12, to: 14, count: 1300 },
  },
  {
    // uniform(-1, 2): density 1/3 on (-1, 2) (common practice); jumps at both ends
    name: "uniform(-1, 2) (jumps at both ends)",
    model: compile({ family: "uniform", a: -1, b: 2 } as Model),
    ref: {
      pdf: (x) => (x > -1 && x < 2 ? 1 / 3 : 0),
      cdf: (x) => Math.min(1, Math.max(0, (x + 1) / 3)),
      sf: (x) => Math.min(1, Math.max(0, (2 - x) / 3)),
    },
    points: [-3, -0.999, -0.5, 0.3, 1.9, 1.999, 2.001, 7],
    grid: { from: -1.4995, to: 2.5005, count: 401 },
  },
  {
    // Weibull(shape 1.5, scale 2): pdf (k/l)(x/l)^{k-1} e^{-(x/l)^k}, cdf 1 - e^{-(x/l)^k} (JKB vol. 1, ch. 21);
    // numerical CF with declared error, density ~ x^{1/2} at 0
    name: "weibull(1.5, 2) (numerical CF, density ~ x^{1/2} at 0)",
    model: compile({ family: "weibull", shape: 1.5, scale: 2 } as Model),
    ref: {
      pdf: (x) => (x <= 0 ? 0 : 0.75 * Math.sqrt(x / 2) * Math.exp(-Math.pow(x / 2, 1.5))),
      cdf: (x) => (x <= 0 ? 0 : -Math.expm1(-Math.pow(x / 2, 1.5))),
      sf: (x) => (x <= 0 ? 1 : Math.exp(-Math.pow(x / 2, 1.5))),
    },
    points: [0.001, 0.1, 0.7, 1.6, 3, 6, 9],
    grid: { from: 0.005, to: 10, count: 1000 },
  },
  {
    name: "Irwin-Hall n=4",
    model: compile({ repeat: 4, of: U }),
    ref: ihRef(4),
    points: [0.05, 0.5, 1, 1.5, 2, 2.7, 3.5, 3.95],
    grid: { from: 0, to: 4, count: 401 },
  },
  {
    name: "Irwin-Hall n=6",
    model: compile({ repeat: 6, of: U }),
    ref: ihRef(6),
    points: [0.1, 1, 2.5, 3, 4.2, 5.9],
    grid: { from: 0, to: 6, count: 601 },
  },
  {
    name: "Irwin-Hall n=3",
    model: compile({ repeat: 3, of: U }),
    ref: ihRef(3),
    points: [0.2, 0.9, 1.5, 2.4],
    grid: { from: 0, to: 3, count: 301 },
  },
  {
    name: "compound Poisson(2) of exponential(1): atom e^-2 at 0",
    model: compile(CP(2)),
    ref: cpRef(2),
    points: [1e-3, 0.1, 0.5, 1, 2, 4, 8, 15, 25],
    grid: { from: 0, to: 30, count: 3001 },
  },
  {
    name: "compound Poisson(0.5) of exponential(1): atom e^-0.5 at 0",
    model: compile(CP(0.5)),
    ref: cpRef(0.5),
    points: [1e-3, 0.2, 1, 3, 10, 18],
    grid: { from: 0, to: 20, count: 1001 },
  },
  {
    name: "mixture 0.3 point(1) + 0.7 normal(0,1): atom inside the bulk",
    model: compile({ mix: [{ weight: 0.3, of: { family: "point", at: 1 } }, { weight: 0.7, of: N(0, 1) }] } as Model),
    ref: {
      pdf: (x) => 0.7 * normalRef(0, 1).pdf(x),
      cdf: (x) => 0.7 * normalRef(0, 1).cdf(x) + (x >= 1 ? 0.3 : 0),
      sf: (x) => 0.7 * normalRef(0, 1).sf(x) + (x < 1 ? 0.3 : 0),
    },
    points: [-6, -1, 0, 0.999999, 1, 1.000001, 3, 7],
    grid: { from: -8, to: 8, count: 1601 },
  },
];

describe("inversion of light-tailed laws (reference: closed forms named in each case)", () => {
  it("Bessel form of the compound Poisson density equals its Erlang-mixture series (cross-check of the reference)", () => {
    const c = new Checker();
    for (const l of [0.5, 2, 10]) for (const x of [0.01, 0.5, 3, 20]) c.rel(`lambda ${l} x ${x}`, cpExpPdf(l, x), cpExpPdfSeries(l, x), 1e-12);
    c.done();
  });

  for (const cs of cases) {
    for (const method of ["gil-pelaez", "fft"] as const) {
      it(`${cs.name}: ${method} pdf/cdf/sf within 1e-9 and within the estimate`, () => {
        const r = method === "fft" ? density(cs.model, { grid: cs.grid, method: "fft" }) : density(cs.model, { x: cs.points, method });
        const c = new Checker();
        const e = r.diagnostics.error;
        // laws bounded below with a damped transform take the damped variant of the method asked for
        c.that("method", r.diagnostics.method === method || r.diagnostics.method === `${method}-damped`, r.diagnostics.method);
        c.that("estimate finite", Number.isFinite(e.pdf) && Number.isFinite(e.cdf), JSON.stringify(e));
        for (let i = 0; i < r.x.length; i++) {
          const x = r.x[i];
          const lbl = `${cs.name} ${method} x=${x}`;
          c.abs(`${lbl} pdf`, r.pdf![i], cs.ref.pdf(x), 1e-9);
          c.abs(`${lbl} cdf`, r.cdf[i], cs.ref.cdf(x), 1e-9);
          c.abs(`${lbl} sf`, r.sf[i], cs.ref.sf(x), 1e-9);
          c.honest(`${lbl} pdf`, r.pdf![i], cs.ref.pdf(x), e.pdf);
          c.honest(`${lbl} cdf`, r.cdf[i], cs.ref.cdf(x), e.cdf);
          c.honest(`${lbl} sf`, r.sf[i], cs.ref.sf(x), e.cdf);
        }
        c.that("captured mass", r.diagnostics.capturedMass > 1 - 1e-9 && r.diagnostics.capturedMass <= 1 + 1e-12, String(r.diagnostics.capturedMass));
        c.done();
      });
    }
    it(`${cs.name}: tails relative error <= 1e-4 where probability >= 1e-8 (tolerance 1e-13)`, () => {
      const r = density(cs.model, { grid: { from: cs.grid.from - 20, to: cs.grid.to + 40, count: 4000 }, tolerance: 1e-13, cdfOnly: true });
      const c = new Checker();
      let checked = 0;
      // probabilities down to 1e-8, or down to 1e4 times the stated error where the model's own CF is only
      // accurate to an absolute error (numerical CFs declare it; the relative target cannot beat it)
      const numericCf = /absolute error/.test(r.diagnostics.notes.join(" "));
      const floor = numericCf ? Math.max(1e-8, 1e4 * r.diagnostics.error.cdf) : 1e-8;
      for (let i = 0; i < r.x.length; i++) {
        const x = r.x[i];
        const F = cs.ref.cdf(x);
        const S = cs.ref.sf(x);
        if (F >= floor && F < 0.5) {
          c.rel(`${cs.name} lower tail x=${x}`, r.cdf[i], F, 1e-4);
          checked++;
        }
        if (S >= floor && S < 0.5) {
          c.rel(`${cs.name} upper tail x=${x}`, r.sf[i], S, 1e-4);
          checked++;
        }
        c.honest(`${cs.name} sf x=${x}`, r.sf[i], S, r.diagnostics.error.cdf);
      }
      c.that("some tail points checked", checked > 10, String(checked));
      c.done();
    });
  }

  it("mixed law returns its atom and a cdf that jumps by it", () => {
    const r = density(compile(CP(2)), { x: [-1e-9, 0, 1e-9] });
    expect(r.atoms).toEqual([{ x: 0, p: Math.exp(-2) }]);
    // P(S <= 0) = e^{-2}: the atom (Klugman, Panjer & Willmot, Loss Models: P(S = 0) = P(N = 0))
    expect(Math.abs(r.cdf[0] - 0)).toBeLessThan(1e-9);
    expect(Math.abs(r.cdf[1] - Math.exp(-2))).toBeLessThan(1e-9);
    expect(Math.abs(r.sf[1] - (1 - Math.exp(-2)))).toBeLessThan(1e-9);
  });
});
