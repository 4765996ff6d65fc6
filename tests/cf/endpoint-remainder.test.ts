// Derived truncation bounds of compounds of pareto, weibull, lomax, Burr XII and loglogistic claims on the damped route (lib/cf/endpoint-remainder.ts,
// lib/cf/compound-remainder.ts) against mpmath (tests/fixtures/endpoint-remainder/generate.py, 40 digits, two methods per
// value with their difference in the fixture):
// - the Watson remainder |e^{s a} phi(s) - sum_{j<J} c_j s^{-p_j}| of the severity at orders 4, 6, 8 is never above the
//   bound rho (and how loose it is);
// - the kernels the engine takes out equal those rebuilt in the generator from the endpoint expansions, and what the
//   compound's damped transform leaves after its atom at 0 and those kernels, |P_N(phi) - p_0 - K|, is never above the
//   compound's derived bound (CompiledModel.dampedRemainderBound);
// - the answers of the models named by our users say the truncation bound is derived; the compound cdf stays within its
//   reported bound against tests/fixtures/compound/heavy.json (rounded-down lattice compounds extrapolated in the span,
//   cross-checked by a finite sum for pareto and de Hoog's inversion for weibull: tests/fixtures/compound/generate.py).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import { DAMPED_SAMPLED_NOTE } from "@/lib/cf/invert/damped-psi";
import { keptTerms } from "@/lib/cf/endpoint-remainder";
import { pareto, weibull } from "@/lib/cf/families/numeric";
import { lomax } from "@/lib/cf/families/severities";
import { burr } from "@/lib/cf/families/burr";
import type { Model } from "@/lib/cf/types";

interface SevRow { beta: number; t: number; abs: number; phi_diff: number; R: Record<string, string> }
interface CmpRow { beta: number; t: number; rem: string; rem_diff: number }
const fx = JSON.parse(readFileSync(new URL("../fixtures/endpoint-remainder/remainders.json", import.meta.url), "utf8")) as {
  severities: { law: { family: string; alpha?: number; xm?: number; shape?: number; scale?: number; theta?: number; gamma?: number }; rows: SevRow[] }[];
  compounds: { model: Model; kernels: { at: number; shape: number; rate: number; w: string }[]; rows: CmpRow[] }[];
};
const heavy = JSON.parse(readFileSync(new URL("../fixtures/compound/heavy.json", import.meta.url), "utf8")) as {
  cases: { model: Model; points: { x: number; cdf: number; cdfErr?: number }[]; crossCheck: { maxCdfDifference: number } }[];
};

/**
 * bound / value over the rows where the value is above 1e-16 (the looseness reported): at every frequency (`anyT`), and
 * from t = 100 on (`far`), where the cut-offs of the plans lie (at t = 3 to 30 the bounds are crude by design: there the
 * asymptotic pieces are large and the least of them is the transform's own size)
 */
const anyT: Record<string, number> = {};
const far: Record<string, number> = {};
function atLeast(label: string, bound: number, value: number, key: string, t: number) {
  if (!(bound >= value)) expect.fail(`${label}: bound ${bound} below the mpmath value ${value}`);
  if (!(value > 1e-16)) return;
  anyT[key] = Math.max(anyT[key] ?? 0, bound / value);
  if (t >= 100) far[key] = Math.max(far[key] ?? 0, bound / value);
}

describe("endpoint remainders of pareto and weibull transforms (mpmath)", () => {
  it("the fixture's two methods agree", () => {
    for (const s of fx.severities) for (const r of s.rows) expect(r.phi_diff, JSON.stringify([s.law, r.beta, r.t])).toBeLessThan(1e-25);
    for (const c of fx.compounds) for (const r of c.rows) expect(r.rem_diff, JSON.stringify([c.model, r.beta, r.t])).toBeLessThan(1e-25);
    expect(fx.severities.length).toBeGreaterThanOrEqual(10);
    expect(fx.compounds.length).toBeGreaterThanOrEqual(8);
  });

  it.each(fx.severities.map((s) => [JSON.stringify(s.law), s] as const))("Watson remainder bound rho >= |R_J| at orders 4, 6, 8: %s", (_n, s) => {
    const l = s.law;
    const node =
      l.family === "pareto" ? pareto(l.alpha!, l.xm!)
      : l.family === "weibull" ? weibull(l.shape!, l.scale!)
      : l.family === "lomax" ? lomax(l.alpha!, l.theta!)
      : burr(l.alpha ?? 1, l.gamma!, l.theta!, l.family);
    const er = node.endpointRemainder!;
    expect(er.series).toBe(node.laplaceExpansion);
    for (const r of s.rows)
      for (const L of [4, 6, 8]) {
        const J = keptTerms(er.series, L);
        atLeast(`${_n} beta ${r.beta} t ${r.t} order ${L}`, er.rho(r.beta, r.t, J), Number(r.R[String(L)]), `${s.law.family} order ${L}`, r.t);
      }
  });

  it.each(fx.compounds.map((c) => [JSON.stringify(c.model), c] as const))("kernels as rebuilt by mpmath, remainder within the derived bound: %s", (_n, c) => {
    const m = compile(c.model);
    const ks = m.dampedKernels!;
    const rb = m.dampedRemainderBound!;
    expect(rb, "derived remainder bound").toBeTypeOf("function");
    // the same kernels (order of construction kept): endpoints, shapes and rates exactly as floats give them, weights to 1e-12
    // of the largest (a weight that cancels to 0 in exact arithmetic is left as a rounding residue by the floats)
    expect(ks.length).toBe(c.kernels.length);
    const wMax = Math.max(...c.kernels.map((k) => Math.abs(Number(k.w))));
    c.kernels.forEach((k, i) => {
      expect(Math.abs(ks[i].at - k.at), `kernel ${i} at`).toBeLessThanOrEqual(1e-14 * Math.max(1, k.at));
      expect(Math.abs(ks[i].shape - k.shape), `kernel ${i} shape`).toBeLessThanOrEqual(1e-12);
      expect(Math.abs(ks[i].rate - k.rate), `kernel ${i} rate`).toBeLessThanOrEqual(1e-15 * k.rate);
      expect(Math.abs(ks[i].w - Number(k.w)), `kernel ${i} weight ${ks[i].w} against ${k.w}`).toBeLessThanOrEqual(1e-12 * wMax);
    });
    const sev = (c.model as unknown as { compound: { each: { family: string } } }).compound.each.family;
    for (const r of c.rows) atLeast(`${_n} beta ${r.beta} t ${r.t}`, rb(r.beta, r.t), Number(r.rem), `compound of ${sev}`, r.t);
  });

  it("prints how loose the bounds are (bound / value where the value is above 1e-16)", () => {
    console.log("endpoint remainder looseness, every t:", JSON.stringify(anyT));
    console.log("endpoint remainder looseness, t >= 100:", JSON.stringify(far));
    // from t = 100 on within 100 of the truth (measured: Watson bounds within 1.15, compounds with their kernels to order 8
    // within 4.3); every Watson bound
    // of pareto, weibull and lomax within 5 at every t (Burr's at t = 3 to 30 up to 2 700: its ray turns only to pi/(2 gamma))
    for (const [k, v] of Object.entries(far)) expect(v, k).toBeLessThanOrEqual(100);
    for (const [k, v] of Object.entries(anyT)) if (/^(pareto|weibull|lomax) order/.test(k)) expect(v, k).toBeLessThanOrEqual(5);
    expect(Object.keys(far).length).toBeGreaterThan(10);
  });
});

const poisson = (lambda: number) => ({ family: "poisson", lambda });
const NAMED: [string, Model][] = [
  ["Poisson(2) x pareto(1.5, 1)", { compound: { count: poisson(2), each: { family: "pareto", alpha: 1.5, xm: 1 } } } as Model],
  ["Poisson(2) x weibull(0.7, 1)", { compound: { count: poisson(2), each: { family: "weibull", shape: 0.7, scale: 1 } } } as Model],
  ["NB(1.5, 0.4) x weibull(1.8, 2)", { compound: { count: { family: "negative_binomial", r: 1.5, p: 0.4 }, each: { family: "weibull", shape: 1.8, scale: 2 } } } as Model],
];

describe("compounds of pareto and weibull claims: the truncation bound is derived", () => {
  it.each(NAMED)("%s: quantiles and expected shortfall carry no sampled-envelope note", (_n, model) => {
    const r = quantiles(compile(model), [0.001, 0.5, 0.99, 0.999], { expectedShortfall: true });
    expect(r.diagnostics.method).toMatch(/damped/);
    expect(r.diagnostics.notes).not.toContain(DAMPED_SAMPLED_NOTE);
    expect(r.diagnostics.notes.some((n) => /derived bounds/.test(n))).toBe(true);
  });

  // the density grid of a compound whose claims' expansion starts at an exponent of 1 or less (pareto and lomax: 1, weibull
  // with shape below 1: the shape) keeps the sampled envelope and says so: what its kernels leave decays like |s|^-e0 times
  // the rounding of their weights (1e-16), whose density-type integral past the last probe is not finite, so no derived
  // density truncation bound exists on this route (lib/cf/invert/damped-psi.ts: the tail from CompiledModel.dampedRemainderDecay)
  it.each(NAMED)("%s: a 200-point density grid says which envelope bounds its truncation", (_n, model) => {
    const r = density(compile(model), { grid: { from: 0.5, to: 30, count: 200 } });
    expect(r.diagnostics.method).toMatch(/damped/);
    // shapes below 1 keep the samples' envelope; pareto's first exponent of exactly 1 splits off its s^-1 residue
    expect(r.diagnostics.notes.includes(DAMPED_SAMPLED_NOTE)).toBe(/weibull\(0\.7/.test(_n));
  });

  // the density grid (FFT route) against the references on its nodes (x = 0.5, 1, ..., 100); a first exponent below 1
  // (shapes below 1) keeps the samples' envelope there and says so; exactly 1 (pareto, lomax) has its s^-1 residue split off
  // (lib/cf/compound-remainder-terms.ts jumpSplit) and a derived bound
  const onGrid = heavy.cases.filter((c) => /pareto|weibull|lomax|burr/.test(JSON.stringify(c.model)));
  it.each(onGrid.map((c) => [JSON.stringify(c.model), c] as const))("%s: density grid's cdf within its bound (heavy.json)", (_n, c) => {
    const r = density(compile(c.model), { grid: { from: 0.5, to: 100, count: 200 } });
    expect(r.diagnostics.method).toMatch(/damped/);
    const below1 = /"(shape|gamma)":0\./.test(_n);
    expect(r.diagnostics.notes.includes(DAMPED_SAMPLED_NOTE), "sampled-envelope note").toBe(below1);
    let n = 0;
    for (const p of c.points) {
      const i = Math.round((p.x - 0.5) / 0.5);
      if (!(i >= 0 && i < 200 && Math.abs(0.5 + 0.5 * i - p.x) < 1e-12)) continue;
      n++;
      const d = Math.abs(r.cdf[i] - p.cdf);
      const ref = p.cdfErr ?? c.crossCheck.maxCdfDifference;
      if (!(d <= r.diagnostics.error.cdf + ref)) expect.fail(`x ${p.x}: cdf ${r.cdf[i]}, reference ${p.cdf}, difference ${d}, bound ${r.diagnostics.error.cdf}, reference uncertainty ${ref}`);
    }
    expect(n).toBeGreaterThanOrEqual(3);
  });

  // the cdf alone (no density asked), so shape-below-1 weibull claims keep their derived bound too
  const cases = heavy.cases.filter((c) => /pareto|weibull|lomax|burr/.test(JSON.stringify(c.model)));
  it.each(cases.map((c) => [JSON.stringify(c.model), c] as const))("%s: cdf within its derived bound (heavy.json)", (_n, c) => {
    const r = density(compile(c.model), { x: c.points.map((p) => p.x), cdfOnly: true });
    expect(r.diagnostics.notes).not.toContain(DAMPED_SAMPLED_NOTE);
    c.points.forEach((p, i) => {
      const d = Math.abs(r.cdf[i] - p.cdf);
      const ref = p.cdfErr ?? c.crossCheck.maxCdfDifference;
      if (!(d <= r.diagnostics.error.cdf + ref)) expect.fail(`x ${p.x}: cdf ${r.cdf[i]}, reference ${p.cdf}, difference ${d}, bound ${r.diagnostics.error.cdf}, reference uncertainty ${ref}`);
    });
  });
});
