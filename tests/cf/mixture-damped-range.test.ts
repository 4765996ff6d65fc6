// A mixture of damped components (compounds of a power-tailed severity) sizes each component's range by loose probes
// to where its weighted tail falls below the level asked (lib/cf/invert/damped-reach.ts), not by a guess from the tail
// index alone, which lay ten times too far for Poisson(2)-pareto(1.5, 1) at 0.999 and past the damped route's budget
// at 0.9999 (the period-doubling route then answered with bounds near 0.4). The mixture of a law with itself is that
// law (common practice), so the compound's references apply to every level: tests/fixtures/compound/heavy.json
// (generate.py beside it: rounded-down lattice compounds extrapolated in the span, cross-checked by the finite sum over
// at most two claims with mpmath.quad and, for ES, by mpmath's de Hoog inversion; the differences are in the fixture).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

interface Level {
  p: number;
  q: number;
  qErr: number;
  es?: number;
  esErr?: number;
}
const heavy = (JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/heavy.json"), "utf8")) as { cases: { model: Model; levels: Level[] }[] }).cases;
const key = JSON.stringify({ compound: { count: { family: "poisson", lambda: 2 }, each: { family: "pareto", alpha: 1.5, xm: 1 } } });
const ref = heavy.find((c) => JSON.stringify(c.model) === key)!;

describe("mixture of damped compounds: component ranges from the tail asked (heavy.json references)", () => {
  it("0.3 C + 0.7 C with C = Poisson(2)-pareto(1.5, 1): quantiles to 1e-7 and ES to 1e-6 relative, within their bounds, up to 0.9999", () => {
    const c = new Checker();
    c.that("reference case present", ref !== undefined, key);
    const model = { mix: [{ weight: 0.3, of: ref.model }, { weight: 0.7, of: ref.model }] } as Model;
    const ps = ref.levels.map((l) => l.p);
    const r = quantiles(compile(model), ps, { expectedShortfall: true });
    c.that("method", r.diagnostics.method === "mixture", r.diagnostics.method);
    c.that("components by the damped route", r.diagnostics.notes.some((n) => n.includes("2 by gil-pelaez-damped")), r.diagnostics.notes.join(" | "));
    ref.levels.forEach((l, i) => {
      const qErr = r.diagnostics.quantileError[i];
      c.honest(`q(${l.p})`, r.x[i], l.q, qErr + l.qErr);
      c.rel(`q(${l.p})`, r.x[i], l.q, 1e-7);
      if (l.es === undefined) return;
      const esErr = r.diagnostics.expectedShortfallError![i];
      c.honest(`ES(${l.p})`, r.expectedShortfall![i], l.es, esErr + (l.esErr ?? 0));
      c.rel(`ES(${l.p})`, r.expectedShortfall![i], l.es, 1e-6);
      c.that(`ES(${l.p}) bound within 1e-6 relative`, esErr <= 1e-6 * l.es, String(esErr));
    });
    c.done();
  });
  // a closed-form component below the compound's support: for x >= -1 the mixture's cdf is 1/2 + F_C(x)/2, so its quantile at
  // p = (1 + p_C)/2 is C's at 2p - 1 (exact in doubles, Sterbenz; it differs from the fixture's p_C by at most 2^-53, which
  // moves the quantile by 2^-53 / f_C, below 1e-12 relative at these levels: the fixture's own bound covers far more), and
  // E[(X - q)^+] = E[(C - q)^+]/2 over 1 - p = (1 - p_C)/2, so ES is C's. The power-tailed component then takes the closed
  // form's share of the cdf target (mixture-components.ts powerTailShare): the answers stay within their bounds
  it("0.5 uniform(-2, -1) + 0.5 C: the compound's quantiles and ES at the shifted levels, within their bounds", () => {
    const c = new Checker();
    const model = { mix: [{ weight: 0.5, of: { family: "uniform", a: -2, b: -1 } }, { weight: 0.5, of: ref.model }] } as Model;
    const ps = ref.levels.map((l) => (1 + l.p) / 2);
    const r = quantiles(compile(model), ps, { expectedShortfall: true });
    c.that("method", r.diagnostics.method === "mixture", r.diagnostics.method);
    ref.levels.forEach((l, i) => {
      const qErr = r.diagnostics.quantileError[i];
      c.honest(`q(${ps[i]})`, r.x[i], l.q, qErr + l.qErr + 1e-12 * l.q);
      c.rel(`q(${ps[i]})`, r.x[i], l.q, 1e-7);
      if (l.es === undefined) return;
      const esErr = r.diagnostics.expectedShortfallError![i];
      c.honest(`ES(${ps[i]})`, r.expectedShortfall![i], l.es, esErr + (l.esErr ?? 0) + 1e-12 * l.es);
      c.rel(`ES(${ps[i]})`, r.expectedShortfall![i], l.es, 1e-6);
    });
    c.done();
  });
});
