// The pareto claim law's damped transform far out in t (to 1e4), against alpha E_(alpha+1)(-i xm z) (DLMF 8.19.3;
// mpmath.expint at 40 digits, cross-checked by mpmath.quad on a rotated ray: tests/fixtures/severity-cf/generate-pareto-far.py):
// the modulus bound twice by parts (lib/cf/families/log-round.ts convexDensityModulus), the Lomax part's phase within
// [0, pi / 2] (a Thorin mass at most 1, ggcLogRound's `thorin`) and the claim-law rounding |phi| u (6 |Re L| + 3 |Im L| +
// c) within logRoundDampedAt. And the count's slope bound (lib/cf/compound-errors.ts countSlopeBound) against the closed-form
// pgf derivatives (Poisson lambda e^{lambda (m - 1)}, negative binomial r (1 - p) p^r / (1 - (1 - p) m)^{r + 1}; Loss
// Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { pareto } from "@/lib/cf/families/numeric";
import { lomax } from "@/lib/cf/families/severities";
import { buildNode, compile } from "@/lib/cf/compile";
import { countSlopeBound } from "@/lib/cf/compound-errors";
import type { Model } from "@/lib/cf/types";

interface Case { alpha: number; xm: number; t: number; beta: number; re: string; im: string; abs_diff: number }
const ref = JSON.parse(readFileSync(new URL("../fixtures/severity-cf/pareto-far.json", import.meta.url), "utf8")) as { cases: Case[] };

describe("pareto far out: modulus, phase and log rounding bounds (mpmath.expint reference)", () => {
  it("the fixture's two methods agree within 1e-35", () => {
    for (const c of ref.cases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-35);
    expect(ref.cases.length).toBeGreaterThanOrEqual(70);
  });
  it("|phi~| within the modulus bound (pareto, and lomax = pareto - xm), half the once-by-parts bound far out", () => {
    let tight = 0;
    for (const c of ref.cases) {
      const m = Math.hypot(Number(c.re), Number(c.im));
      const pm = pareto(c.alpha, c.xm).dampedErrorAt!.modulus!;
      const lm = lomax(c.alpha, c.xm).dampedErrorAt!.modulus!;
      expect(m, JSON.stringify(c)).toBeLessThanOrEqual(pm(c.beta, c.t));
      expect(m * Math.exp(c.beta * c.xm), `lomax ${JSON.stringify(c)}`).toBeLessThanOrEqual(lm(c.beta, c.t));
      // once by parts: 2 (alpha / xm) e^{-beta xm} / |w|
      const once = (2 * (c.alpha / c.xm) * Math.exp(-c.beta * c.xm)) / Math.hypot(c.beta, c.t);
      if (c.t >= 300) {
        expect(pm(c.beta, c.t)).toBeLessThan(0.6 * once);
        expect(pm(c.beta, c.t)).toBeLessThan(1.1 * m);
        tight++;
      }
    }
    expect(tight).toBeGreaterThanOrEqual(20);
  });
  it("the Lomax part's phase arg(phi~ e^{-i xm t}) lies in [0, pi / 2], and the log's rounding times |phi| within logRoundDampedAt", () => {
    for (const c of ref.cases) {
      const [re, im] = [Number(c.re), Number(c.im)];
      const [cs, sn] = [Math.cos(c.xm * c.t), Math.sin(c.xm * c.t)];
      const a = Math.atan2(im * cs - re * sn, re * cs + im * sn);
      expect(a, JSON.stringify(c)).toBeGreaterThanOrEqual(-1e-15);
      expect(a, JSON.stringify(c)).toBeLessThanOrEqual(Math.PI / 2);
      if (!(c.alpha > 1)) continue;
      const node = pareto(c.alpha, c.xm);
      const m = Math.hypot(re, im);
      // the continuous log: log |phi~| + i (xm t + the Lomax part's phase)
      // within u (6 |Re L| + 3 |Im L| + c) of rounding (pareto.ts `units`), times |phi|
      const u = Number.EPSILON / 2;
      const own = u * m * (6 * Math.abs(Math.log(m)) + 3 * (c.xm * c.t + a) + 3 * Math.abs(Math.log(c.alpha)) + 7 * Math.PI + 4);
      expect(own, JSON.stringify(c)).toBeLessThanOrEqual(node.logRoundDampedAt!(c.beta, c.t, node));
      // and not far above it where the phase dominates (the bound's part xm t + pi / 2 against xm t + a)
      if (c.t >= 300) expect(node.logRoundDampedAt!(c.beta, c.t, node)).toBeLessThan(3 * own);
      // the value the compound forms, e^L from the node's damped log, within its CF error plus that rounding
      const lr = new Float64Array(1);
      const li = new Float64Array(1);
      node.dampedLogCf!(c.beta, Float64Array.of(c.t), lr, li);
      const v = Math.exp(lr[0]);
      const d = Math.hypot(v * Math.cos(li[0]) - re, v * Math.sin(li[0]) - im);
      expect(d, JSON.stringify(c)).toBeLessThanOrEqual(node.dampedErrorAt!.at(c.beta, c.t) + node.logRoundDampedAt!(c.beta, c.t, node));
    }
  });
});

describe("a negative binomial (3, 0.4) compound of pareto claims far out: its damped transform within its per-frequency bounds", () => {
  it("|P_N(phi~) computed - reference| <= rel(beta, t) |ref| + the claim-law rounding (cfArgErrDampedAt) + exp's rounding", () => {
    let n = 0;
    for (const c of ref.cases as (Case & { nb_re: string; nb_im: string; nb_diff: number })[]) {
      expect(c.nb_diff).toBeLessThan(1e-35);
      if (!(c.alpha > 1)) continue;
      const m = compile({ compound: { count: { family: "negative_binomial", r: 3, p: 0.4 }, each: { family: "pareto", alpha: c.alpha, xm: c.xm } } } as Model);
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      m.dampedLogCf!(c.beta, Float64Array.of(c.t), re, im);
      const v = Math.exp(re[0]);
      const d = Math.hypot(v * Math.cos(im[0]) - Number(c.nb_re), v * Math.sin(im[0]) - Number(c.nb_im));
      const r = Math.hypot(Number(c.nb_re), Number(c.nb_im));
      const rel = m.dampedRelErrorAt!(c.beta, c.t);
      const arg = Math.min((m.cfArgSlope ?? 0) * (c.t + c.beta), m.cfArgErrDampedAt!(c.beta, c.t));
      const bound = rel * r + arg + 2 * Number.EPSILON * r * (3 + Math.hypot(re[0], im[0]));
      expect(d, JSON.stringify({ ...c, d, rel, arg, bound })).toBeLessThanOrEqual(bound);
      n++;
    }
    expect(n).toBeGreaterThanOrEqual(50);
  });
});

describe("countSlopeBound: |P_N'(z)| for |z| <= m against the closed-form derivative", () => {
  const cases: { model: Model; d: (m: number) => number }[] = [
    { model: { family: "poisson", lambda: 2 } as Model, d: (m) => 2 * Math.exp(2 * (m - 1)) },
    { model: { family: "poisson", lambda: 40 } as Model, d: (m) => 40 * Math.exp(40 * (m - 1)) },
    { model: { family: "negative_binomial", r: 3, p: 0.4 } as Model, d: (m) => (3 * 0.6 * 0.4 ** 3) / (1 - 0.6 * m) ** 4 },
  ];
  for (const c of cases)
    it(JSON.stringify(c.model), () => {
      const N = buildNode(c.model);
      for (const m of [1e-300, 1e-9, 1e-3, 0.05, 0.3, 0.49, 0.7, 0.99]) {
        const b = countSlopeBound(N, m);
        expect(b, `m ${m}`).toBeGreaterThanOrEqual(c.d(m));
        // at most the derivative at the chord's far end, 2 m + 1e-3 (or 1)
        expect(b, `m ${m}`).toBeLessThanOrEqual(c.d(Math.min(1, 2 * m + 1e-3)) * (1 + 1e-6) + 1e-9);
      }
      // NB(3, 0.4) near 0: about P(N = 1) = 0.1152, against c P_N(0) = 4.5 * 0.064 = 0.288
      if ((c.model as { family: string }).family === "negative_binomial") expect(countSlopeBound(N, 1e-6)).toBeLessThan(0.117);
    });
});
