// The tabulated standard normal cdf with a derived bound (lib/cf/families/normal-table.ts) against mpmath
// (tests/fixtures/normal-cdf/generate.py: mpmath.ncdf at 40 digits, checked by mpmath.gammainc(1/2, z^2/2)/2): at every
// point the stated bound is at least the actual error, it stays relative on the lower tail down to Phi(-37.5) ~ 1e-308,
// and it is not uselessly loose (median bound/actual within 100).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { normalCdfFast } from "@/lib/cf/families/normal-table";

const f = JSON.parse(readFileSync(new URL("../fixtures/normal-cdf/normal-cdf.json", import.meta.url), "utf8")) as {
  max_rel_diff: number;
  points: { z: number; cdf: number; rel_diff: number }[];
};
const SOURCE = "tests/fixtures/normal-cdf/normal-cdf.json (mpmath.ncdf, 40 digits)";
const U = Number.EPSILON / 2;

describe("normalCdfFast against mpmath", () => {
  it("the fixture's two methods agree to 1e-30 relative over z in [-39.9, 12]", () => {
    expect(f.max_rel_diff).toBeLessThan(1e-30);
    expect(f.points.length).toBeGreaterThan(400);
    expect(Math.min(...f.points.map((p) => p.z))).toBeLessThan(-39);
  });

  it("|value - reference| <= bound at every point; relative bound below 1e-13 on the lower side above 1e-300", () => {
    const out = { v: NaN, e: NaN };
    const ratios: number[] = [];
    let worst = { r: 0, at: "" };
    let worstRel = { r: 0, at: "" };
    for (const p of f.points) {
      const r = normalCdfFast(p.z, out);
      // the reference read into a double is within half an ulp of it (below 2^-1022, of the subnormal spacing)
      const diff = Math.abs(r.v - p.cdf);
      const refRound = Math.max(U * p.cdf, Number.MIN_VALUE);
      if (!(diff <= r.e + refRound)) expect.fail(`Phi(${p.z}) = ${r.v}, expected ${p.cdf} (${SOURCE}), difference ${diff}, bound ${r.e}`);
      if (diff > 2 * refRound) {
        ratios.push(r.e / diff);
        if (r.e / diff > worst.r) worst = { r: r.e / diff, at: `Phi(${p.z})` };
      }
      const small = p.z <= 0 ? p.cdf : 1 - p.cdf;
      if (p.z <= 0 && small > 1e-300) {
        const rel = r.e / small;
        if (rel > worstRel.r) worstRel = { r: rel, at: `Phi(${p.z}) = ${p.cdf}` };
        if (!(rel <= 1e-13)) expect.fail(`Phi(${p.z}): relative bound ${rel} on ${p.cdf}`);
      }
      // above 0 the value is 1 - Phi(-z): its bound is absolute, some 30 ulps of 1 at most (near z = 0)
      if (p.z > 0 && !(r.e <= 4e-15)) expect.fail(`Phi(${p.z}): bound ${r.e} above 4e-15`);
    }
    ratios.sort((x, y) => x - y);
    const med = ratios[ratios.length >> 1];
    console.log(`normalCdfFast bound/actual over ${ratios.length} values above the reference's rounding: median ${med.toExponential(2)}, worst ${worst.r.toExponential(2)} at ${worst.at}; largest relative bound ${worstRel.r.toExponential(2)} at ${worstRel.at}`);
    // most values are within the reference's rounding; enough are not for the bound to be tested
    expect(ratios.length).toBeGreaterThan(20);
    expect(med).toBeLessThan(100);
  });

  it("special inputs: NaN, +-Infinity, beyond the table, signed zero", () => {
    const out = { v: NaN, e: NaN };
    normalCdfFast(NaN, out);
    expect(out.v).toBeNaN();
    expect(out.e).toBeNaN();
    for (const [z, v] of [[-Infinity, 0], [Infinity, 1], [-41, 0], [41, 1], [-1e300, 0]] as const) {
      normalCdfFast(z, out);
      expect(out.v, `Phi(${z})`).toBe(v);
      // Phi(-40) < phi(40)/40 < 2^-1074 (Gordon 1941): the bound covers the value left out
      expect(out.e, `Phi(${z})`).toBeGreaterThan(0);
      expect(out.e, `Phi(${z})`).toBeLessThanOrEqual(Number.MIN_VALUE);
    }
    for (const z of [0, -0]) {
      normalCdfFast(z, out);
      expect(out.v).toBe(0.5);
      expect(out.e).toBeLessThan(4e-15);
    }
  });
});
