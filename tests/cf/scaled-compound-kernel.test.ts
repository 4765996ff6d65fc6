// A scaled compound keeps its first claims' closed forms and the derived truncation bound of its remainder
// (lib/cf/severity-kernel-scale.ts, lib/cf/kernel-carry.ts). References: the compound fixtures generated outside the
// engine (tests/fixtures/compound/generate.py: tilted FFT convolution of the sampled lognormal density, cross-checked at
// half the step; generate_gamma.py: gamma mixture over the claim count in mpmath), read at x / a: F_{aS}(x) = F_S(x / a)
// and f_{aS}(x) = f_S(x / a) / a (common practice).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import { DAMPED_SAMPLED_NOTE } from "@/lib/cf/invert/damped-psi";
import { scaledSeverityKernel } from "@/lib/cf/severity-kernel-scale";
import { lognormalKernel } from "@/lib/cf/severity-kernel";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  atom0: number;
  points: { x: number; pdf: number; cdf: number; sf: number }[];
  levels: { p: number; q: number; es: number | null }[];
  crossCheck: { maxCdfDifference: number };
}
const dir = join(__dirname, "../fixtures/compound");
const lognormal = (JSON.parse(readFileSync(join(dir, "compound.json"), "utf8")) as { lognormal: Case[] }).lognormal;
const gamma = (JSON.parse(readFileSync(join(dir, "compound-gamma.json"), "utf8")) as { cases: Case[] }).cases;
const pick = (cs: Case[], s: string) => cs.find((c) => JSON.stringify(c.model) === s)!;
const cases: [string, Case, number][] = [
  ["Poisson(2)-lognormal(0, 1) x 1000", pick(lognormal, '{"compound":{"count":{"family":"poisson","lambda":2},"each":{"family":"lognormal","mu":0,"sigma":1}}}'), 1000],
  ["Poisson(0.5)-lognormal(0, 0.5) x 0.37", pick(lognormal, '{"compound":{"count":{"family":"poisson","lambda":0.5},"each":{"family":"lognormal","mu":0,"sigma":0.5}}}'), 0.37],
  ["NB(2, 0.4)-lognormal(1, 0.8) x 3", pick(lognormal, '{"compound":{"count":{"family":"negative_binomial","r":2,"p":0.4},"each":{"family":"lognormal","mu":1,"sigma":0.8}}}'), 3],
  ["NB(3.2, 0.61)-gamma(1.56, 1) x 250", gamma.find((c) => JSON.stringify(c.model).includes('"r":3.2,"p":0.61},"each":{"family":"gamma","shape":1.56'))!, 250],
];

describe("scaled compounds: first claims and derived truncation carried through the scale", () => {
  it.each(cases)("%s: cdf, sf and pdf within their bounds at a x, no sampled-envelope note", (_n, c, a) => {
    expect(c).toBeDefined();
    const m = compile({ scale: a, of: c.model } as Model);
    const xs = c.points.map((p) => a * p.x);
    const r = density(m, { x: xs });
    const d = r.diagnostics;
    expect(d.notes.join("\n")).not.toContain(DAMPED_SAMPLED_NOTE);
    expect(d.notes.join("\n")).toMatch(/frequency truncation bounded from derived bounds/);
    const ref = c.crossCheck.maxCdfDifference;
    c.points.forEach((p, i) => {
      const cdf = r.cdf![i];
      const sf = r.sf![i];
      const pdf = r.pdf![i];
      if (!(Math.abs(cdf - p.cdf) <= d.error.cdf + ref)) expect.fail(`cdf at ${xs[i]}: ${cdf} vs ${p.cdf}, bound ${d.error.cdf}`);
      if (!(Math.abs(sf - p.sf) <= d.error.cdf + ref)) expect.fail(`sf at ${xs[i]}: ${sf} vs ${p.sf}, bound ${d.error.cdf}`);
      // the reference density carries the cross-check's size over the scale
      if (!(Math.abs(pdf - p.pdf / a) <= d.error.pdf + ref / a + 1e-9 * Math.abs(p.pdf / a))) expect.fail(`pdf at ${xs[i]}: ${pdf} vs ${p.pdf / a}, bound ${d.error.pdf}`);
    });
    // quantiles at the fixture's levels above the atom: a q
    const lv = c.levels.filter((l) => l.q > 0 && l.p <= 0.999);
    const q = quantiles(m, lv.map((l) => l.p));
    expect(q.diagnostics.notes.join("\n")).not.toContain(DAMPED_SAMPLED_NOTE);
    lv.forEach((l, i) => {
      const want = a * l.q;
      const err = Math.abs(q.x[i] - want);
      // the reference quantile carries the cross-check's cdf difference over the density there
      if (!(err <= q.diagnostics.quantileError[i] + 1e-9 * want)) expect.fail(`quantile ${l.p}: ${q.x[i]} vs ${want}, bound ${q.diagnostics.quantileError[i]}`);
    });
  });

  it("the scaled kernel's values are the claim law's at x / a, with the rounding of x / a in the bound", () => {
    // lognormal(0, 1) scaled by 7 is lognormal(ln 7, 1) (JKB vol. 1, ch. 14): its cdf Phi((ln x - ln 7)), compared with
    // the unscaled kernel built at mu = ln 7 (a different path: no division of x)
    const none = () => {};
    const k = lognormalKernel(0.3, 0, 1, none, 0);
    const s = scaledSeverityKernel(k, 7)!;
    const direct = lognormalKernel(0.3, Math.log(7), 1, none, 0);
    for (const x of [0.01, 0.5, 3, 7, 40, 900]) {
      const v = s.at(x);
      const w = direct.at(x);
      // both within their bounds of the same value (ln 7 rounded moves the second by at most phi * u ln 7)
      expect(Math.abs(v.F - w.F)).toBeLessThanOrEqual(v.err + w.err + 0.3 * Number.EPSILON * Math.log(7));
      expect(Math.abs(v.f - w.f)).toBeLessThanOrEqual(v.errf + w.errf + 1e-15 * w.f);
      expect(v.err).toBeGreaterThan(k.at(x / 7).err);
    }
  });
});
