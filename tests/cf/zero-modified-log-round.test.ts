// Zero-modified and zero-truncated counts as claims: their log rounding (lib/cf/families/log-round-table.ts
// withPeriodicLogRound: the argument's total variation over one period from floors on |phi|) against their CF from the
// base pgf and by their series (mpmath 30 digits), the argument unwrapped on a fine grid:
// tests/fixtures/arg-rounding/zero-modified-log.json, generate_zero_modified_log.py beside it. The Poisson count's factor from its pgf's derivative lambda e^{lambda (z - 1)} (Loss Models, app. B).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { cfValueErrors } from "../support/cf-value-errors";

interface Row { t: number; re: string; im: string; absPhi: number; logAbs: number; theta: number; phiTimesLog: number; crossCheck: number }
const fx = JSON.parse(readFileSync(join(__dirname, "../fixtures/arg-rounding/zero-modified-log.json"), "utf8")) as { cases: { model: { family: string }; mean: number; rows: Row[] }[] };
const U8 = 8 * Number.EPSILON;

describe("zero-modified and zero-truncated count claims: the log rounding (mpmath reference)", () => {
  it("the fixture's two methods agree within 1e-25", () => {
    for (const c of fx.cases) for (const r of c.rows) expect(r.crossCheck, `${c.model.family} ${r.t}`).toBeLessThan(1e-25);
    expect(fx.cases.length).toBe(4);
  });
  it("a law whose CF comes near 0 on the circle keeps the note (zero-truncated Poisson(2 pi - 0.08): no positive floor)", () => {
    const node = compile({ compound: { count: { family: "poisson", lambda: 1 }, each: { family: "zero_truncated_poisson", lambda: 6.2 } } } as unknown as Model);
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
