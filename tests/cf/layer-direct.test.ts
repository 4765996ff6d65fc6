// A per-claim layer Y = c min((X - d)_+, l) of a claim with a direct law is evaluated directly (lib/cf/direct/layer.ts):
// atoms at 0 and at c l, the density between, quantiles (at the atoms exactly) and ES from the claim's layer moments.
// References in closed form (common practice; Klugman, Panjer & Willmot, Loss Models, coverage modifications): for
// exponential(r) claims S_X(x) = e^{-r x}; for gamma(2, r) claims S_X(x) = e^{-r x}(1 + r x), int S_X = e^{-r x}(2 + r x)/r
// (Johnson, Kotz & Balakrishnan vol. 1, ch. 17), its quantile by @stdlib gammaincinv. ES_p = q + E[(Y - q)_+]/(1 - p),
// E[(Y - q)_+] = c int_{d + q/c}^{d + l} S_X (Acerbi & Tasche 2002). Each value within its stated bound (plus the
// reference's rounding), quantiles to 1e-9 and ES to 1e-9 relative, and no inversion (it took 8-26 s for one weibull
// layer before).
import { describe, it } from "vitest";
import gammaincinv from "@stdlib/math-base-special-gammaincinv";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

interface Ref {
  label: string;
  model: Model;
  d: number;
  l: number;
  c: number;
  S: (x: number) => number;
  /** int_a^b S_X */
  intS: (a: number, b: number) => number;
  /** claim quantile x_p */
  qX: (p: number) => number;
}

const exp = (r: number, d: number, l: number, c: number): Ref => ({
  label: `layer(${d}, ${l}, share ${c}) of exponential(${r})`,
  model: { layer: { deductible: d, limit: l, share: c }, of: { family: "exponential", rate: r } } as Model,
  d,
  l,
  c,
  S: (x) => Math.exp(-r * x),
  intS: (a, b) => (Math.exp(-r * a) - Math.exp(-r * b)) / r,
  qX: (p) => -Math.log1p(-p) / r,
});
const gam2 = (r: number, d: number, l: number, c: number): Ref => ({
  label: `layer(${d}, ${l}, share ${c}) of gamma(2, ${r})`,
  model: { layer: { deductible: d, limit: l, share: c }, of: { family: "gamma", shape: 2, rate: r } } as Model,
  d,
  l,
  c,
  S: (x) => Math.exp(-r * x) * (1 + r * x),
  intS: (a, b) => (Math.exp(-r * a) * (2 + r * a) - Math.exp(-r * b) * (2 + r * b)) / r,
  qX: (p) => (p > 0.5 ? gammaincinv(1 - p, 2, true) : gammaincinv(p, 2)) / r,
});
const CASES = [exp(1, 0.5, 2, 1), exp(0.7, 0, 3, 1), exp(2, 0.3, 0.9, 0.3), gam2(0.5, 2, 5, 1), gam2(1.3, 1, 4, 0.7)];
const LEVELS = [0.001, 0.05, 0.3, 0.5, 0.7, 0.9, 0.99, 0.999];
/** the closed forms' rounding, relative (a few ulps of exp and log1p; gammaincinv to about 1e-14) */
const REF = 1e-13;

describe("per-claim layers of claims with a direct law: closed forms", () => {
  for (const r of CASES) {
    it(r.label, () => {
      const c = new Checker();
      const m = compile(r.model);
      const top = r.c * r.l;
      const F0 = 1 - r.S(r.d);
      const Ptop = r.S(r.d + r.l);
      // density: atoms and the cdf between
      const xs = [0, 0.1 * top, 0.5 * top, 0.9 * top, 0.999 * top];
      const d = density(m, { x: xs });
      c.that("no inversion", d.diagnostics.method === "closed-form" || d.diagnostics.method === "special-function", d.diagnostics.method);
      const a0 = d.atoms.find((a) => a.x === 0);
      const aT = d.atoms.find((a) => Math.abs(a.x - top) <= 4 * Number.EPSILON * top);
      c.honest("atom at 0", a0?.p ?? 0, F0, d.diagnostics.error.cdf + REF);
      c.honest("atom at c l", aT?.p ?? 0, Ptop, d.diagnostics.error.cdf + REF);
      xs.forEach((x, i) => {
        const want = 1 - r.S(r.d + x / r.c);
        c.honest(`F(${x})`, d.cdf[i], want, d.diagnostics.pointError!.cdf[i] + REF);
        c.that(`F(${x}) bound within 1e-12`, d.diagnostics.pointError!.cdf[i] <= 1e-12, String(d.diagnostics.pointError!.cdf[i]));
      });
      // quantiles and ES
      const q = quantiles(m, LEVELS, { expectedShortfall: true });
      LEVELS.forEach((p, i) => {
        const want = p <= F0 ? 0 : p > 1 - Ptop ? top : r.c * (r.qX(p) - r.d);
        c.honest(`q(${p})`, q.x[i], want, q.diagnostics.quantileError[i] + REF * Math.max(want, 1e-300));
        c.that(`q(${p}) within 1e-9 relative`, Math.abs(q.x[i] - want) <= 1e-9 * Math.max(Math.abs(want), 1e-12), `${q.x[i]} vs ${want}`);
        const excess = want >= top ? 0 : r.c * r.intS(r.d + want / r.c, r.d + r.l);
        const es = want + excess / (1 - p);
        c.honest(`ES(${p})`, q.expectedShortfall![i], es, q.diagnostics.expectedShortfallError![i] + REF * es);
        c.rel(`ES(${p})`, q.expectedShortfall![i], es, 1e-9);
      });
      c.done();
    });
  }
});
