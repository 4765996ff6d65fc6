// The per-claim layer's CF with the Filon rule's derived remainder (lib/cf/filon.ts, filon-remainder.ts,
// families/layer-analytic.ts): against mpmath values of layered claims' CFs (tests/fixtures/layer-cf/, two methods, their
// difference in each row), and the remainder's two parts against closed forms where each is the larger part.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, type Model } from "@/lib/cf";
import { oscillatoryIntegral } from "@/lib/cf/filon";
import { panelRemainder } from "@/lib/cf/filon-remainder";
import { gaussLegendre } from "@/lib/cf/quadrature";
import { densityDisc } from "@/lib/cf/families/layer-analytic";

interface Row {
  of: Model;
  layer: { deductible: number; limit?: number; share: number };
  t: number;
  re: number;
  im: number;
  diff: number;
}
const fixture = JSON.parse(readFileSync("tests/fixtures/layer-cf/layer-cf.json", "utf8")) as { rows: Row[] };
// (cut the bound by hand to check that the checks can fail)
const CUT = 1;

describe("layered claims' CFs against mpmath (tests/fixtures/layer-cf/generate.py: density and atoms, and by parts from the survival function)", () => {
  const groups = new Map<string, Row[]>();
  for (const r of fixture.rows) {
    const k = JSON.stringify({ layer: r.layer, of: r.of });
    groups.set(k, [...(groups.get(k) ?? []), r]);
  }
  for (const [k, rows] of groups) {
    it(`${k}: |phi - mpmath| <= cfAbsError at t = ${rows.map((r) => r.t).join(", ")}, the rule's error derived`, () => {
      const m = compile(JSON.parse(k) as Model);
      const ts = Float64Array.from(rows, (r) => r.t);
      const re = new Float64Array(ts.length);
      const im = new Float64Array(ts.length);
      m.cf(ts, re, im);
      const bound = (m.cfAbsError ?? Infinity) * CUT;
      expect(bound).toBeLessThan(1e-12);
      expect(m.notes.join(" ")).toMatch(/error derived per panel/);
      rows.forEach((r, i) => {
        const e = Math.hypot(re[i] - r.re, im[i] - r.im);
        expect(e, `t = ${r.t}: ${re[i]} + ${im[i]}i against ${r.re} + ${r.im}i`).toBeLessThanOrEqual(bound + r.diff + 4e-16);
      });
    });
  }
});

describe("the derived remainder's parts where each dominates (closed forms, common practice)", () => {
  // int_0^L e^{-u} e^{isu} du = (e^{(is - 1) L} - 1) / (is - 1)
  const exact = (s: number, L: number): [number, number] => {
    const nr = Math.exp(-L) * Math.cos(s * L) - 1;
    const ni = Math.exp(-L) * Math.sin(s * L);
    const q = 1 + s * s;
    return [(-nr + ni * s) / q, (-ni - nr * s) / q];
  };
  const disc = densityDisc({ family: "exponential", rate: 1 } as Model)!;
  const F = (u: number) => 1 - Math.exp(-u);

  it("interpolation on one panel [0, 8] of e^{-u} (no halving): the rule's error covers the closed form's at s up to 30", () => {
    const L = 8;
    const rule = oscillatoryIntegral([0, L], (u) => Math.exp(-u), (a, b) => F(b) - F(a), { disc: disc.logBound, fErr: (u) => 2 * Number.EPSILON * Math.exp(-u), maxDepth: 0 });
    const out = new Float64Array(2);
    let worst = 0;
    for (const s of [0, 0.4, 1.7, 4.5, 6, 30]) {
      rule.at(s, out);
      const [vr, vi] = exact(s, L);
      const e = Math.hypot(out[0] - vr, out[1] - vi);
      worst = Math.max(worst, e);
      expect(e, `s = ${s}`).toBeLessThanOrEqual(rule.error * CUT);
    }
    expect(worst).toBeGreaterThan(1e-11);
  });

  // tests/fixtures/layer-cf/generate_interp.py: the 16-node interpolant's sup error by mpmath, two forms
  const interp = JSON.parse(readFileSync("tests/fixtures/layer-cf/interp.json", "utf8")) as { rows: { name: string; of: Model; m: number; h: number; sup: number; diff: number }[] };
  const LOOSE: Record<string, number> = { exponential: 106, lognormal: 2.4e5, pareto: 1.7e3, gamma: 38 };
  const absX = Float64Array.from(gaussLegendre(16).x, (v) => Math.abs(2 * v - 1));
  for (const r of interp.rows) {
    it(`${r.name} density on [${r.m - r.h}, ${r.m + r.h}]: the disc bound of sup |f - p| is at least mpmath's ${r.sup.toExponential(3)}, and no looser than recorded`, () => {
      const d = densityDisc(r.of)!;
      const rem = panelRemainder(d.logBound, r.m, r.h, 16, 1e-15, absX);
      expect(rem.sup * CUT).toBeGreaterThanOrEqual(r.sup + r.diff);
      // the max modulus over the whole disc is loose where f peaks on one side of it (a pole or the lognormal's
      // approach to 0 near the circle's left end): the ratios found (106, 2.4e5, 1.7e3, 38) with a margin of 2
      expect(rem.sup / r.sup).toBeLessThan(2 * LOOSE[r.name]);
    });
  }

  it("value errors: e^{-u} + 1e-9 declared as within 1e-9 on [0, 6], at s = 0 the error is 6e-9 and the bound below 1.5 times it", () => {
    const L = 6;
    const delta = 1e-9;
    const rule = oscillatoryIntegral([0, 1.5, 3, 4.5, L], (u) => Math.exp(-u) + delta, (a, b) => F(b) - F(a) + delta * (b - a), { disc: disc.logBound, fErr: () => delta * (1 + 1e-6) });
    const out = new Float64Array(2);
    rule.at(0, out);
    const e = Math.hypot(out[0] - (1 - Math.exp(-L)), out[1]);
    expect(e).toBeGreaterThan(5.9e-9);
    expect(e).toBeLessThanOrEqual(rule.error * CUT);
    expect(rule.error * CUT).toBeLessThan(1.5 * e);
  });
});
