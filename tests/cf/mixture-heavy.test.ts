// A mixture with a power-tailed component that has neither a direct law nor the damped route (a pareto plus a normal)
// beside a compound with an atom at 0: answered from its components (the heavy one by the period-doubling sums with
// Richardson extrapolation), never by one transform of the whole mixture (which cannot separate the atom and the
// slowest CF: such a mixture took 93 s and returned one value for every level). Reference:
// tests/fixtures/mixture-heavy/mixture-heavy.json (mpmath at 30 digits, every value by two methods; generate.py beside it).
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";
import ref from "../fixtures/mixture-heavy/mixture-heavy.json";

describe("mixture with a power-tailed component without a direct law (mpmath reference)", () => {
  const m = compile(ref.model as Model);

  it("cdf, sf and pdf within their bounds and the default tolerance", () => {
    const c = new Checker();
    const d = density(m, { x: ref.points.map((p) => p.x) });
    c.that("method", d.diagnostics.method === "mixture", d.diagnostics.method);
    const e = d.diagnostics.error;
    c.that("cdf bound <= 1e-9", e.cdf <= 1e-9, String(e.cdf));
    c.that("the atom at 0", Math.abs((d.atoms.find((a) => a.x === 0)?.p ?? NaN) - ref.atom.p) <= 1e-15, JSON.stringify(d.atoms));
    ref.points.forEach((p, i) => {
      c.that(`reference cdf(${p.x}) cross-check`, p.cdf_check <= 0.1 * e.cdf && p.pdf_check <= 0.1 * e.pdf, `${p.cdf_check} ${p.pdf_check}`);
      c.honest(`F(${p.x})`, d.cdf[i], p.cdf, e.cdf);
      c.honest(`S(${p.x})`, d.sf[i], p.sf, e.cdf);
      c.honest(`f(${p.x})`, d.pdf![i], p.pdf, e.pdf);
    });
    c.done();
  });

  it("quantiles within 1e-7 relative and ES within 1e-6 relative, each within its bound", () => {
    const c = new Checker();
    const r = quantiles(m, ref.levels.map((l) => l.p), { expectedShortfall: true });
    c.that("method", r.diagnostics.method === "mixture", r.diagnostics.method);
    ref.levels.forEach((l, i) => {
      // the reference's own uncertainty (its two methods' difference) at most a tenth of the engine's bound
      c.that(`reference q(${l.p}) cross-check`, l.x_check <= 0.1 * r.diagnostics.quantileError[i] || l.x_check === 0, String(l.x_check));
      c.that(`reference ES(${l.p}) cross-check`, l.es_check <= 0.1 * r.diagnostics.expectedShortfallError![i], String(l.es_check));
      if (l.atom) c.that(`q(${l.p}) is the atom at 0`, r.x[i] === 0 && r.diagnostics.quantileError[i] === 0, `${r.x[i]} +- ${r.diagnostics.quantileError[i]}`);
      else {
        c.honest(`q(${l.p})`, r.x[i], l.q, r.diagnostics.quantileError[i]);
        c.rel(`q(${l.p})`, r.x[i], l.q, 1e-7);
      }
      c.honest(`ES(${l.p})`, r.expectedShortfall![i], l.es, r.diagnostics.expectedShortfallError![i]);
      c.rel(`ES(${l.p})`, r.expectedShortfall![i], l.es, 1e-6);
    });
    c.done();
  });
});
