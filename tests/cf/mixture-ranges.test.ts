// A mixture's damped components set up over the ranges its levels need (lib/cf/invert/mixture-damped.ts): the ranges
// chosen before any search cover every upper level's quantile where a component's tail matters there, and the answers
// (quantiles, expected shortfall) lie within their bounds of the closed forms. Compound Poisson laws of gamma claims
// with an integer shape are Erlang mixtures: S(x) = sum_n P(N = n) Q(n a, r x) (Klugman, Panjer & Willmot, Loss Models,
// sec. 9.3), evaluated with @stdlib gammainc.
import { describe, it } from "vitest";
import gammainc from "@stdlib/math-base-special-gammainc";
import gammaFn from "@stdlib/math-base-special-gamma";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import { mixtureLeaves } from "@/lib/cf/invert/mixture";
import { components } from "@/lib/cf/invert/mixture-components";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

/** compound Poisson(lambda) of gamma(a, r) claims: the atom e^{-lambda} at 0 and sum_{n >= 1} p_n gamma(n a, r) (Loss Models, sec. 9.3) */
function cpGamma(lambda: number, a: number, r: number) {
  const terms = 120;
  const pn = (n: number) => Math.exp(-lambda + n * Math.log(lambda) - Math.log(gammaFn(n + 1)));
  const over = (g: (n: number) => number) => {
    let s = 0;
    for (let n = 1; n <= terms; n++) s += pn(n) * g(n);
    return s;
  };
  return {
    S: (x: number) => (x < 0 ? 1 : over((n) => gammainc(r * x, n * a, true, true))),
    // E[(X - q)^+] = sum_n p_n ((n a / r) Q(n a + 1, r q) - q Q(n a, r q)) (Loss Models, app. A, per gamma term)
    excess: (q: number) => (q <= 0 ? (lambda * a) / r - q : over((n) => ((n * a) / r) * gammainc(r * q, n * a + 1, true, true) - q * gammainc(r * q, n * a, true, true))),
  };
}

type Part = { w: number; lambda: number; a: number; r: number };

function mixModel(parts: Part[]): Model {
  return {
    mix: parts.map(({ w, lambda, a, r }) => ({
      weight: w,
      of: { compound: { count: { family: "poisson", lambda }, each: a === 1 ? { family: "exponential", rate: r } : { family: "gamma", shape: a, rate: r } } },
    })),
  } as Model;
}

/** q_p = min{x : S(x) <= 1 - p} of the reference by bisection to a few ulps (p above the median) */
function refQuantile(S: (x: number) => number, p: number, lo: number, hi: number): number {
  for (let k = 0; k < 400 && hi - lo > 2 * Number.EPSILON * hi; k++) {
    const mid = 0.5 * (lo + hi);
    if (S(mid) <= 1 - p) hi = mid;
    else lo = mid;
  }
  return hi;
}

const LEVELS = [0.9, 0.99, 0.999, 0.9999];

const CASES: { label: string; parts: Part[] }[] = [
  {
    // the light first component's own range ends far left of the mixture's upper quantiles
    label: "0.3 CP(2)-exp(1) + 0.3 CP(8)-exp(1) + 0.4 CP(1)-gamma(2, 0.25)",
    parts: [
      { w: 0.3, lambda: 2, a: 1, r: 1 },
      { w: 0.3, lambda: 8, a: 1, r: 1 },
      { w: 0.4, lambda: 1, a: 2, r: 0.25 },
    ],
  },
  {
    label: "0.05 CP(30)-gamma(3, 2) + 0.6 CP(0.5)-exp(0.2) + 0.35 CP(4)-gamma(2, 1)",
    parts: [
      { w: 0.05, lambda: 30, a: 3, r: 2 },
      { w: 0.6, lambda: 0.5, a: 1, r: 0.2 },
      { w: 0.35, lambda: 4, a: 2, r: 1 },
    ],
  },
];

describe("a mixture's damped components over the ranges its levels need", () => {
  for (const { label, parts } of CASES) {
    it(`${label}: ranges cover the quantiles where a tail matters; quantiles and ES within their bounds (Erlang mixtures, @stdlib gammainc)`, () => {
      const c = new Checker();
      const refs = parts.map(({ lambda, a, r }) => cpGamma(lambda, a, r));
      const S = (x: number) => parts.reduce((s, p, j) => s + p.w * refs[j].S(x), 0);
      const excess = (q: number) => parts.reduce((s, p, j) => s + p.w * refs[j].excess(q), 0);
      const model = compile(mixModel(parts));
      const qs = LEVELS.map((p) => refQuantile(S, p, 0, 2000));

      // the components as the quantile route builds them, before any search: the default tolerance 1e-10, its share per
      // component tol / (4 n) (mixture-components.ts)
      const leaves = mixtureLeaves(model)!;
      const tol = 1e-10;
      const cs = components(leaves, tol, 1 - LEVELS[LEVELS.length - 1], 1 - LEVELS[LEVELS.length - 1], true, LEVELS)!;
      c.that(`${label}: every component damped`, cs.every((k) => k.method === "gil-pelaez-damped"), cs.map((k) => k.method).join());
      cs.forEach((k, j) => {
        LEVELS.forEach((p, i) => {
          // the tail at the quantile above the component's share of the target: its range must reach past the quantile
          const tailThere = parts[j].w * refs[j].S(qs[i]);
          if (tailThere > tol / (4 * parts.length))
            c.that(`${label}: component ${j} range ${k.reach!()} covers q(${p}) = ${qs[i]} (tail ${tailThere.toExponential(2)})`, k.reach!() >= qs[i]);
        });
      });

      const r = quantiles(model, LEVELS, { expectedShortfall: true });
      c.that(`${label}: method`, r.diagnostics.method === "mixture", r.diagnostics.method);
      LEVELS.forEach((p, i) => {
        const q = qs[i];
        c.honest(`${label} q(${p})`, r.x[i], q, r.diagnostics.quantileError[i]);
        c.rel(`${label} q(${p})`, r.x[i], q, 1e-7);
        // ES_p = q + E[(X - q)^+] / (1 - p) (Acerbi & Tasche 2002)
        const es = q + excess(q) / (1 - p);
        c.honest(`${label} ES(${p})`, r.expectedShortfall![i], es, r.diagnostics.expectedShortfallError![i]);
        c.rel(`${label} ES(${p})`, r.expectedShortfall![i], es, 1e-6);
      });
      c.done();
    });
  }
});
