// The derived error table of the Filon rule's spherical Bessel values (lib/cf/filon-bessel.ts) against mpmath
// (tests/fixtures/filon-bessel/generate.py: sqrt(pi / (2w)) J_{n+1/2}(w) at 50 digits, cross-checked by the recurrence
// and the power series at 120 digits; the difference is in the fixture).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { sphericalBessel } from "@/lib/cf/filon";
import { besselErrors, sTable } from "@/lib/cf/filon-bessel";

const fx = JSON.parse(readFileSync("tests/fixtures/filon-bessel/bessel.json", "utf8")) as { diff: number; rows: { w: string; j: string[]; y: string[] }[] };
const U = Number.EPSILON / 2;

describe("spherical Bessel values and their derived error bounds", () => {
  it("the fixture's two methods agree to 1e-28", () => expect(fx.diff).toBeLessThan(1e-28));
  const E = besselErrors(16, 24);
  it("the bound table is finite and a few hundred u at most (the Miller branch's turning points the largest)", () => {
    for (let n = 0; n < 16; n++) {
      expect(Number.isFinite(E[n])).toBe(true);
      expect(E[n]).toBeLessThan(300 * U);
    }
    // j_0, j_1 carry the largest coefficients: a few dozen u
    expect(E[0]).toBeLessThan(40 * U);
    expect(E[1]).toBeLessThan(40 * U);
  });
  it("every computed j_n(w) is within E_n of mpmath's, at the branch ends, the normaliser's switches and beyond", () => {
    const out = new Float64Array(16);
    let worst = 0;
    for (const r of fx.rows) {
      const w = Number(r.w);
      sphericalBessel(w, out);
      for (let n = 0; n < 16; n++) {
        const want = Number(r.j[n]);
        const err = Math.abs(out[n] - want) - 1e-29 * Math.abs(want) - Math.abs(want) * U;
        expect(err, `w = ${w}, n = ${n}`).toBeLessThanOrEqual(E[n]);
        worst = Math.max(worst, err / E[n]);
      }
    }
    // the bound is not vacuous: the largest error seen is a visible fraction of it
    expect(worst).toBeGreaterThan(1e-3);
  });
  it("S_m(w) = w^2 (j_m^2 + y_m^2) as the finite sum (DLMF 10.49.6), rounded up (and down) as stated, m <= 61", () => {
    for (const r of fx.rows) {
      if (!r.y.length) continue;
      const w = Number(r.w);
      const hi = sTable(61, w);
      const lo = sTable(61, w, true);
      for (let m = 0; m < 62; m++) {
        const y = Number(r.y[m]);
        const j = Number(r.j[m]);
        const S = w * w * (j * j + y * y);
        expect(hi[m] / S, `m ${m} w ${w}`).toBeGreaterThanOrEqual(1 - 1e-14);
        expect(lo[m] / S, `m ${m} w ${w}`).toBeLessThanOrEqual(1 + 1e-14);
        expect(Math.abs(hi[m] / S - 1)).toBeLessThan(1e-11);
      }
    }
  });
});
