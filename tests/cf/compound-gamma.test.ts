// Compounds of gamma claims (Poisson and negative binomial counts, lambda 0.1 .. 10 000) and sums of such compounds
// with gamma and normal terms, against tests/fixtures/compound/compound-gamma.json (generate_gamma.py beside it: the
// gamma mixture over the claim count in mpmath at 32 digits, every cdf value cross-checked by Gil-Pelaez or de Hoog
// inversion, their largest difference written as crossCheck). Each value within the engine's stated bound (widened by
// the reference's own cross-check difference) and within the accuracy targets: cdf and sf 1e-9 absolute, quantiles
// 1e-7 and expected shortfall 1e-6 relative.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  atom0: number;
  points: { x: number; pdf: number; cdf: number; sf: number }[];
  levels: { p: number; q: number; es: number | null }[];
  crossCheck: { method: string; maxCdfDifference: number };
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/compound-gamma.json"), "utf8")) as { cases: Case[] };

const ratios: Record<string, number> = {};
function within(kind: string, label: string, got: number, want: number, bound: number, refErr: number, target: number) {
  const d = Math.abs(got - want);
  expect(d, `${label}: got ${got}, reference ${want}, difference ${d}, stated bound ${bound}, reference uncertainty ${refErr}`).toBeLessThanOrEqual(bound + refErr);
  expect(d, `${label}: got ${got}, reference ${want}: error ${d} above the accuracy target ${target}`).toBeLessThanOrEqual(target + refErr);
  if (d > refErr) ratios[kind] = Math.max(ratios[kind] ?? 0, bound / d);
}

describe("compounds of gamma claims and their sums with gamma and normal terms (generate_gamma.py, mpmath)", () => {
  it.each(fixture.cases.map((c) => [JSON.stringify(c.model), c] as const))("%s", (name, c) => {
    const m = compile(c.model);
    const refErr = c.crossCheck.maxCdfDifference;
    const r = density(m, { x: c.points.map((p) => p.x) });
    if (c.atom0 > 0) expect((r.atoms ?? []).find((a) => a.x === 0)?.p ?? 0).toBeCloseTo(c.atom0, 14);
    // a route's own point bounds where it gives them, else the whole answer's (as the API's diagnostics.pointError)
    const pe = r.diagnostics.pointError;
    const err = r.diagnostics.error;
    c.points.forEach((p, i) => {
      within("cdf", `${name} cdf(${p.x})`, r.cdf[i], p.cdf, pe ? pe.cdf[i] : err.cdf, refErr, 1e-9);
      within("sf", `${name} sf(${p.x})`, r.sf[i], p.sf, pe ? pe.sf[i] : err.cdf, refErr, 1e-9);
      // no accuracy target is set for the density itself (only its bound is checked)
      within("pdf", `${name} pdf(${p.x})`, r.pdf![i], p.pdf, pe ? pe.pdf[i] : err.pdf, refErr, Infinity);
    });
    const q = quantiles(
      m,
      c.levels.map((l) => l.p),
      { expectedShortfall: true },
    );
    c.levels.forEach((l, i) => {
      within("quantile", `${name} q(${l.p})`, q.x[i], l.q, q.diagnostics.quantileError[i], 0, 1e-7 * Math.abs(l.q));
      if (l.es !== null) within("ES", `${name} ES(${l.p})`, q.expectedShortfall![i], l.es, q.diagnostics.expectedShortfallError![i], 0, 1e-6 * Math.abs(l.es));
    });
  }, 300_000);

  afterAll(() => console.log("compound-gamma: loosest bound/actual by quantity", JSON.stringify(ratios)));
});
