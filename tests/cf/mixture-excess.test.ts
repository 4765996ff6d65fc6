// Expected shortfall of a mixture where the level's quantile lies past a light component's inversion window: that
// component's E[(X - q)^+] there comes from its moments' bounds (mixture-components.ts), or carries no bound at all.
import { describe, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import normalQuantile from "@stdlib/stats-base-dists-normal-quantile";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

// 0.9 (N(0, 1) + Laplace(0, 1)) + 0.1 N(100, 2): the first component is answered by the Gil-Pelaez sums on a window
// ending near 40; every level above 0.9 has its quantile near 100, far past it
const MODEL: Model = {
  mix: [
    { weight: 0.9, of: { sum: [{ family: "normal", mu: 0, sigma: 1 }, { family: "laplace", loc: 0, scale: 1 }] } },
    { weight: 0.1, of: { family: "normal", mu: 100, sigma: 2 } },
  ],
};
const LEVELS = [0.95, 0.99, 0.999];

/**
 * Reference: near 100 the first component's tail is below 2e-22 (Chernoff: P(X > x) <= E e^{X/2} e^{-x/2}, E e^{X/2} =
 * e^{1/8} / (1 - 1/4) for N(0, 1) + Laplace(0, 1); the same bound over e/2 bounds E[(X - x)^+], since y^+ <= e^{y/2} 2/e),
 * so q_p = 100 + 2 z, z = Phi^{-1}((p - 0.9) / 0.1) (@stdlib/stats-base-dists-normal-quantile), and
 * ES_p = q + 0.1 (2 phi(z) - 2 z (1 - Phi(z))) / (1 - p), the normal stop-loss transform E[(Y - q)^+] = sigma phi(z) -
 * (q - mu)(1 - Phi(z)) (common practice), 1 - Phi(z) = erfc(z / sqrt 2) / 2 (@stdlib/math-base-special-erfc).
 */
function reference(p: number): { q: number; es: number; slack: number } {
  const z = normalQuantile((p - 0.9) / 0.1, 0, 1);
  const q = 100 + 2 * z;
  const phi = Math.exp(-z * z / 2) / Math.sqrt(2 * Math.PI);
  const sf = erfc(z / Math.SQRT2) / 2;
  const excess = 0.1 * (2 * phi - 2 * z * sf);
  // the first component's part, left out above: below 0.9 * 1.51 * e^{-q/2} * 2 / e
  const left = (0.9 * 1.52 * Math.exp(-q / 2) * 2) / Math.E;
  return { q, es: q + excess / (1 - p), slack: left / (1 - p) + 1e-14 * q };
}

describe("mixture expected shortfall past a light component's window (reference: normal quantile and stop-loss closed forms)", () => {
  it("ES of 0.9 (N + Laplace) + 0.1 N(100, 2): within its stated bound", () => {
    const r = quantiles(compile(MODEL), LEVELS, { expectedShortfall: true });
    const c = new Checker();
    c.that("method", r.diagnostics.method === "mixture", r.diagnostics.method);
    LEVELS.forEach((p, i) => {
      const ref = reference(p);
      c.honest(`q at p = ${p}`, r.x[i], ref.q, r.diagnostics.quantileError[i] + 1e-13 * ref.q);
      const bound = r.diagnostics.expectedShortfallError![i];
      c.that(`ES bound at p = ${p} finite`, Number.isFinite(bound), String(bound));
      c.honest(`ES at p = ${p}`, r.expectedShortfall![i], ref.es, bound + ref.slack);
    });
    c.done();
  });

  it("a component without derived moment bounds: its excess past the window, and so the ES, has no bound (Infinity)", () => {
    const m = compile(MODEL);
    // the first component's cumulants without their running-error bounds: neither its central moments (tail-moments.ts)
    // nor Markov's at the best order (moment-tails.ts) can then bound its tail past the window
    const first = m.components!()[0].model as { cumulantErrors?: unknown };
    delete first.cumulantErrors;
    const r = quantiles(m, LEVELS, { expectedShortfall: true });
    const c = new Checker();
    LEVELS.forEach((p, i) => {
      const ref = reference(p);
      const bound = r.diagnostics.expectedShortfallError![i];
      c.that(`ES bound at p = ${p} is Infinity`, bound === Infinity, `${bound} (ES ${r.expectedShortfall![i]}, reference ${ref.es})`);
    });
    c.done();
  });
});

describe("expected shortfall of a light law by the Gil-Pelaez sums (shortfall.ts): the part past the window", () => {
  const SUM: Model = { sum: [{ family: "normal", mu: 0, sigma: 1 }, { family: "laplace", loc: 0, scale: 1 }] };
  it("N(0, 1) + Laplace(0, 1): finite ES bounds with the moments; Infinity without their error bounds", () => {
    const c = new Checker();
    const levels = [0.9, 0.999];
    const r = quantiles(compile(SUM), levels, { expectedShortfall: true });
    c.that("method", r.diagnostics.method === "gil-pelaez", r.diagnostics.method);
    // the law is symmetric with E|X| > 0, so ES_p > q_p > 0 for p >= 0.9 (a check of direction, not of the bound)
    levels.forEach((p, i) => c.that(`ES above q at p = ${p}`, r.expectedShortfall![i] > r.x[i] && r.x[i] > 0));
    levels.forEach((p, i) => c.that(`ES bound at p = ${p} finite`, Number.isFinite(r.diagnostics.expectedShortfallError![i])));
    // without the cumulants' error bounds the mass past the window's end b has no derived bound (it was 8 spreads of S(b))
    const m = compile(SUM);
    delete (m as { cumulantErrors?: unknown }).cumulantErrors;
    const s = quantiles(m, levels, { expectedShortfall: true });
    levels.forEach((p, i) => c.that(`ES bound at p = ${p} without moment bounds is Infinity`, s.diagnostics.expectedShortfallError![i] === Infinity, String(s.diagnostics.expectedShortfallError![i])));
    c.done();
  });
});
