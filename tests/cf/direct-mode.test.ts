// DirectLaw.mode (closed forms recalled from Loss Models app. A and Johnson, Kotz & Balakrishnan; the shortfall bound of
// lib/cf/direct/shortfall.ts takes S convex above it and F below it) checked against its definition: the density, itself
// checked against references in direct-families.test.ts, is non-decreasing up to the mode and non-increasing after it,
// within the density's own bounds, on 400 points each side spread from the mode out to 8 spreads.
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { directPoint } from "@/lib/cf/direct/types";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

const MODELS: Model[] = [
  { family: "normal", mu: 1, sigma: 2 },
  { family: "lognormal", mu: 0.5, sigma: 0.8 },
  { family: "lognormal", mu: -1, sigma: 1.6 },
  { family: "gamma", shape: 2.5, rate: 1.3 },
  { family: "gamma", shape: 0.6, rate: 2 },
  { family: "exponential", rate: 0.7 },
  { family: "student_t", nu: 2.5, loc: 1, scale: 2 },
  { family: "weibull", shape: 1.5, scale: 2 },
  { family: "weibull", shape: 0.7, scale: 3 },
  { family: "logistic", loc: -1, scale: 0.5 },
  { family: "laplace", loc: 2, scale: 1 },
  { family: "pareto", alpha: 2.5, xm: 1.5 },
  { family: "lomax", alpha: 3, theta: 2 },
  { family: "generalized_pareto", xi: 0.3, sigma: 2, mu: 1 },
  { family: "generalized_pareto", xi: -0.4, sigma: 1, mu: 0 },
  { family: "burr", alpha: 2, gamma: 3, theta: 1.5 },
  { family: "burr", alpha: 1.5, gamma: 0.8, theta: 1 },
  { family: "loglogistic", gamma: 4, theta: 2 },
  { family: "inverse_gamma", alpha: 3, theta: 2 },
  { family: "inverse_gaussian", mu: 2, lambda: 1.5 },
  { family: "inverse_gaussian", mu: 1, lambda: 20 },
  { family: "beta", alpha: 2, beta: 5 },
  { family: "beta", alpha: 0.6, beta: 3, a: -1, b: 2 },
  { family: "beta", alpha: 4, beta: 0.7 },
  { family: "pert", a: 0, m: 3, b: 10 },
  { family: "triangular", a: 0, c: 1, b: 4 },
  { family: "truncated_normal", mu: 0, sigma: 1, lower: 0.5, upper: 3 },
  { family: "truncated_normal", mu: 2, sigma: 1, lower: -1 },
  { family: "uniform", a: -1, b: 3 },
  { scale: -2, of: { family: "gamma", shape: 3, rate: 1 } },
] as Model[];

describe("direct laws' mode: the density rises up to it and falls after it (definition of a mode)", () => {
  for (const model of MODELS) {
    it(JSON.stringify(model), () => {
      const law = compile(model).direct!;
      const c = new Checker();
      c.that("mode", law.mode !== undefined && Number.isFinite(law.mode), `${law.mode}`);
      const m = law.mode!;
      const pt = directPoint();
      for (const side of [-1, 1]) {
        let prev: { x: number; lo: number; hi: number } | null = null;
        for (let k = 0; k <= 400; k++) {
          const x = m + side * law.spread * 8 * (k / 400) ** 2;
          if (x < law.support[0] || x > law.support[1]) break;
          law.at(x, pt);
          if (!Number.isFinite(pt.pdf)) continue;
          const cur = { x, lo: pt.pdf - pt.pdfErr, hi: pt.pdf + pt.pdfErr };
          // moving away from the mode the density must not rise
          if (prev) c.that(`f(${cur.x}) <= f(${prev.x})`, cur.lo <= prev.hi, `${cur.lo} > ${prev.hi} (mode ${m})`);
          prev = cur;
        }
      }
      c.done();
    });
  }
});
