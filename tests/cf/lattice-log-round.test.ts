// Lattice tables as claims: their log rounding (lib/cf/families/log-round-table.ts withLatticeLogRound: the argument over
// one period 2 pi / step from floors on |phi|, with the drift origin t) against their CF term by term and by polyval
// (mpmath 30 digits), the argument unwrapped on a fine grid: tests/fixtures/arg-rounding/lattice-log.json,
// generate_lattice_log.py beside it. The Poisson count's factor from its pgf's derivative lambda e^{lambda (z - 1)} (Loss Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { cfValueErrors } from "../support/cf-value-errors";

interface Row { t: number; re: string; im: string; absPhi: number; logAbs: number; theta: number; phiTimesLog: number; crossCheck: number }
const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/lattice-log.json"), "utf8")) as { cases: { model: object; rows: Row[] }[] };
const U8 = 8 * Number.EPSILON;

describe("lattice table claims: the log rounding (mpmath reference)", () => {
  it("the fixture's two methods agree within 1e-25", () => {
    for (const c of fx.cases) for (const r of c.rows) expect(r.crossCheck, `${JSON.stringify(c.model)} ${r.t}`).toBeLessThan(1e-25);
    expect(fx.cases.length).toBe(2);
  });
  it("a table whose CF vanishes on the circle keeps the note (0.1 + 0.3 z + 0.4 z^2 + 0.2 z^3 = 0 at z = -1)", () => {
    const node = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: { lattice: { origin: 0, step: 1, p: [0.1, 0.3, 0.4, 0.2] } } } } as unknown as Model);
    expect(node.notes.some((n) => n.includes("not derived for this claim law"))).toBe(true);
  });
  for (const c of fx.cases) {
    const model = c.model as unknown as Model;
    const name = JSON.stringify(c.model);
    it(`${name}: 8 u |phi| |L| (continuous and principal branch) within the Poisson(1) compound's cfArgErrAt and slope, within 30x where largest`, () => {
      const node = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: model } } as unknown as Model);
      expect(node.notes.some((n) => n.includes("not derived for this claim law"))).toBe(false);
      let closest = 0;
      let worst = 0;
      // the compound's slope is E N R = R (Poisson(1)), the claim law's own
      const R = node.cfArgSlope ?? 0;
      for (const r of c.rows) {
        const principal = Math.atan2(Number(r.im), Number(r.re));
        const need = U8 * Math.max(r.phiTimesLog, r.absPhi * Math.hypot(r.logAbs, principal));
        // Poisson(1): |P'(phi)| = e^{Re phi - 1}; the compound's per-frequency bound is at least that times the claim's
        const dP = Math.exp(Number(r.re) - 1);
        const b = node.cfArgErrAt!(r.t);
        expect(b, `t ${r.t}`).toBeGreaterThanOrEqual(dP * need);
        expect(R * r.t, `t ${r.t}`).toBeGreaterThanOrEqual(need);
        closest = Math.max(closest, (dP * need) / b);
        if (r.phiTimesLog > 0.01) worst = Math.max(worst, b / (dP * need));
      }
      expect(closest).toBeGreaterThan(0.1);
      expect(worst).toBeLessThan(30);
    });
    it(`${name}: the law's e^L within its allowance plus the claim rounding of the reference, its phase on the continuous branch`, () => {
      const m = compile(model);
      const t = Float64Array.from({ length: 10000 }, (_, i) => (i + 1) * 0.005);
      const re = new Float64Array(t.length);
      const im = new Float64Array(t.length);
      m.logCf(t, re, im);
      const node = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: model } } as unknown as Model);
      for (const r of c.rows) {
        const j = Math.round(r.t / 0.005) - 1;
        const { err, own } = cfValueErrors(m, re[j], im[j], r.t, [Number(r.re), Number(r.im)]);
        const claim = node.cfArgErrAt!(r.t) / Math.exp(Number(r.re) - 1);
        expect(err, `t ${r.t}`).toBeLessThanOrEqual(own + claim + r.crossCheck);
        expect(Math.abs(im[j] - r.theta), `t ${r.t}`).toBeLessThan(1e-9);
      }
    });
  }
});
