// Inversion of power-tailed laws against closed forms: pdf/cdf within 1e-7, error estimate never below the
// actual error.
import { describe, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import gammaFn from "@stdlib/math-base-special-gamma";
import { density } from "@/lib/cf/invert/density";
import type { CompiledModel } from "@/lib/cf/types";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

interface Case {
  name: string;
  model: CompiledModel;
  pdf: (x: number) => number;
  cdf: (x: number) => number;
  points: number[];
  grid: { from: number; to: number; count: number };
}

const cases: Case[] = [
  {
    // Cauchy(loc, s): pdf s / (pi (s^2 + (x-loc)^2)), cdf 1/2 + atan((x-loc)/s)/pi (common practice)
    name: "cauchy(1, 2)",
    model: compile({ family: "cauchy", loc: 1, scale: 2 } as Model),
    pdf: (x) => 2 / (Math.PI * (4 + (x - 1) ** 2)),
    cdf: (x) => 0.5 + Math.atan((x - 1) / 2) / Math.PI,
    points: [-60, -10, -2, 0, 1, 2.5, 7, 30, 100],
    grid: { from: -25, to: 25, count: 1001 },
  },
  {
    // sum of Cauchy laws is Cauchy with added locations and scales (common practice)
    name: "cauchy(0, 0.5) + cauchy(2, 1.5) = cauchy(2, 2)",
    model: compile({ sum: [{ family: "cauchy", loc: 0, scale: 0.5 }, { family: "cauchy", loc: 2, scale: 1.5 }] } as Model),
    pdf: (x) => 2 / (Math.PI * (4 + (x - 2) ** 2)),
    cdf: (x) => 0.5 + Math.atan((x - 2) / 2) / Math.PI,
    points: [-20, -3, 0, 2, 5, 40],
    grid: { from: -18, to: 22, count: 800 },
  },
  {
    // Levy(mu, c): pdf sqrt(c/(2 pi)) e^{-c/(2(x-mu))} / (x-mu)^{3/2}, cdf erfc(sqrt(c/(2(x-mu))))
    // (Nolan, Univariate Stable Distributions, Example 1.4); erfc from @stdlib/math-base-special-erfc
    name: "levy(0, 1) = stable(1/2, 1)",
    model: compile({ family: "stable", alpha: 0.5, beta: 1, scale: 1, loc: 0, param: "S1" } as Model),
    pdf: (x) => (x <= 0 ? 0 : Math.sqrt(1 / (2 * Math.PI)) * Math.exp(-1 / (2 * x)) / x ** 1.5),
    cdf: (x) => (x <= 0 ? 0 : erfc(Math.sqrt(1 / (2 * x)))),
    points: [0.05, 0.2, 0.5, 1, 3, 10],
    grid: { from: 0.02, to: 10, count: 500 },
  },
  {
    // Student t, nu = 3: pdf 6 sqrt3 / (pi (3 + x^2)^2), cdf 1/2 + (atan(x/sqrt3) + sqrt3 x/(3 + x^2))/pi
    // (Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions vol. 2, ch. 28, odd nu closed form)
    name: "student_t(3)",
    model: compile({ family: "student_t", nu: 3 } as Model),
    pdf: (x) => (6 * Math.sqrt(3)) / (Math.PI * (3 + x * x) ** 2),
    cdf: (x) => 0.5 + (Math.atan(x / Math.sqrt(3)) + (Math.sqrt(3) * x) / (3 + x * x)) / Math.PI,
    points: [-40, -5, -1, 0, 0.7, 3, 12],
    grid: { from: -15, to: 15, count: 601 },
  },
  {
    // Pareto(alpha 2.5, xm 1): pdf alpha xm^alpha / x^{alpha+1}, cdf 1 - (xm/x)^alpha (JKB vol. 1, ch. 20);
    // numerical CF, density jump at xm
    name: "pareto(2.5, 1)",
    model: compile({ family: "pareto", alpha: 2.5, xm: 1 } as Model),
    pdf: (x) => (x < 1 ? 0 : 2.5 / x ** 3.5),
    cdf: (x) => (x < 1 ? 0 : 1 - x ** -2.5),
    points: [0.5, 1.001, 1.3, 2, 5, 30],
    grid: { from: 1.001, to: 20, count: 500 },
  },
];

describe("inversion of power-tailed laws (closed forms named per case)", () => {
  for (const cs of cases) {
    for (const method of ["gil-pelaez", "fft"] as const) {
      it(`${cs.name}: ${method} within 1e-7 and within the estimate`, () => {
        const r = method === "fft" ? density(cs.model, { grid: cs.grid, method }) : density(cs.model, { x: cs.points, method });
        const c = new Checker();
        const e = r.diagnostics.error;
        c.that("levels > 1 (period doubling used)", r.diagnostics.levels > 1, String(r.diagnostics.levels));
        for (let i = 0; i < r.x.length; i++) {
          const x = r.x[i];
          const lbl = `${cs.name} ${method} x=${x}`;
          c.abs(`${lbl} pdf`, r.pdf![i], cs.pdf(x), 1e-7);
          c.abs(`${lbl} cdf`, r.cdf[i], cs.cdf(x), 1e-7);
          c.abs(`${lbl} sf`, r.sf[i], 1 - cs.cdf(x), 1e-7);
          c.honest(`${lbl} pdf`, r.pdf![i], cs.pdf(x), e.pdf);
          c.honest(`${lbl} cdf`, r.cdf[i], cs.cdf(x), e.cdf);
          c.honest(`${lbl} sf`, r.sf[i], 1 - cs.cdf(x), e.cdf);
        }
        c.done();
      });
    }
  }

  it("symmetric stable density at 0 equals Gamma(1 + 1/alpha) / (pi c) (Nolan, Univariate Stable Distributions, eq. for f(0))", () => {
    const c = new Checker();
    for (const alpha of [0.8, 1.1, 1.5, 1.9]) {
      for (const scale of [0.5, 2]) {
        const r = density(compile({ family: "stable", alpha, beta: 0, scale, loc: 0 } as Model), { x: [0, 0.3] });
        const expected = gammaFn(1 + 1 / alpha) / (Math.PI * scale);
        c.abs(`alpha ${alpha} scale ${scale} f(0)`, r.pdf![0], expected, 1e-7);
        c.honest(`alpha ${alpha} scale ${scale} f(0)`, r.pdf![0], expected, r.diagnostics.error.pdf);
        // symmetry: F(0) = 1/2
        c.abs(`alpha ${alpha} scale ${scale} F(0)`, r.cdf[0], 0.5, 1e-7);
      }
    }
    c.done();
  });

  it("alpha = 2 stable with scale c is normal(0, c sqrt 2) (Nolan, Univariate Stable Distributions, sec. 1.3)", () => {
    const r = density(compile({ family: "stable", alpha: 2, beta: 0, scale: 0.7, loc: 0 } as Model), { x: [0, 1] });
    const c = new Checker();
    c.abs("f(0)", r.pdf![0], gammaFn(1.5) / (Math.PI * 0.7), 1e-9);
    c.done();
  });
});
