// Expected shortfall of mixtures of directly evaluated laws (lib/cf/invert/mixture-shortfall.ts): a component deep in its
// own tail at a level takes part of the error the others have there as its sweep's allowance; every ES stays within its
// bound of the closed forms and within the sweep's design accuracy (1e-6 relative). Stop-loss transforms: normal
// E[(X - q)^+] = s phi(z) - (q - m) Q(z), z = (q - m) / s; gamma(a, r) (a / r) Q(a + 1, r q) - q Q(a, r q) (Klugman,
// Panjer & Willmot, Loss Models, app. A), with @stdlib erfc and gammainc.
import { describe, it } from "vitest";
import gammainc from "@stdlib/math-base-special-gammainc";
import erfc from "@stdlib/math-base-special-erfc";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

const Q = (z: number) => 0.5 * erfc(z / Math.SQRT2);
const phi = (z: number) => Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);

interface Ref {
  S(x: number): number;
  excess(q: number): number;
}
const normal = (m: number, s: number): Ref => ({
  S: (x) => Q((x - m) / s),
  excess: (q) => s * phi((q - m) / s) - (q - m) * Q((q - m) / s),
});
const gamma = (a: number, r: number): Ref => ({
  S: (x) => (x <= 0 ? 1 : gammainc(r * x, a, true, true)),
  excess: (q) => (q <= 0 ? a / r - q : (a / r) * gammainc(r * q, a + 1, true, true) - q * gammainc(r * q, a, true, true)),
});

/** q_p = min{x : S(x) <= 1 - p} by bisection to a few ulps */
function refQuantile(S: (x: number) => number, p: number, lo: number, hi: number): number {
  for (let k = 0; k < 400 && hi - lo > 2 * Number.EPSILON * Math.max(Math.abs(lo), Math.abs(hi)); k++) {
    const mid = 0.5 * (lo + hi);
    if (S(mid) <= 1 - p) hi = mid;
    else lo = mid;
  }
  return hi;
}

const LEVELS = [0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999, 0.9999];

const CASES: { label: string; parts: { w: number; of: Model; r: Ref }[] }[] = [
  {
    // at 0.999 the normal's own tail is ~1e-6 of its mass, the gamma holds the mixture's; at 0.001 the reverse
    label: "0.6 normal(0, 2) + 0.4 gamma(4, 1)",
    parts: [
      { w: 0.6, of: { family: "normal", mu: 0, sigma: 2 } as Model, r: normal(0, 2) },
      { w: 0.4, of: { family: "gamma", shape: 4, rate: 1 } as Model, r: gamma(4, 1) },
    ],
  },
  {
    label: "0.2 gamma(2, 3) + 0.5 normal(1, 0.5) + 0.3 gamma(9, 0.5)",
    parts: [
      { w: 0.2, of: { family: "gamma", shape: 2, rate: 3 } as Model, r: gamma(2, 3) },
      { w: 0.5, of: { family: "normal", mu: 1, sigma: 0.5 } as Model, r: normal(1, 0.5) },
      { w: 0.3, of: { family: "gamma", shape: 9, rate: 0.5 } as Model, r: gamma(9, 0.5) },
    ],
  },
];

describe("expected shortfall of mixtures of direct laws", () => {
  for (const { label, parts } of CASES) {
    it(`${label}: quantiles and ES within their bounds of the closed forms (@stdlib erfc, gammainc)`, () => {
      const c = new Checker();
      const S = (x: number) => parts.reduce((s, p) => s + p.w * p.r.S(x), 0);
      const excess = (q: number) => parts.reduce((s, p) => s + p.w * p.r.excess(q), 0);
      const r = quantiles(compile({ mix: parts.map(({ w, of }) => ({ weight: w, of })) } as Model), LEVELS, { expectedShortfall: true });
      c.that(`${label}: method`, r.diagnostics.method === "mixture", r.diagnostics.method);
      LEVELS.forEach((p, i) => {
        const q = refQuantile(S, p, -50, 200);
        c.honest(`${label} q(${p})`, r.x[i], q, r.diagnostics.quantileError[i]);
        // ES_p = q + E[(X - q)^+] / (1 - p) (Acerbi & Tasche 2002)
        const es = q + excess(q) / (1 - p);
        const e = r.diagnostics.expectedShortfallError![i];
        c.honest(`${label} ES(${p})`, r.expectedShortfall![i], es, e);
        c.that(`${label} ES(${p}) bound ${e.toExponential(2)} within 1e-6 of |ES| ${es}`, e <= 1e-6 * Math.abs(es));
      });
      c.done();
    });
  }
});
