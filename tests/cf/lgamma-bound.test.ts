// lgamma's running error bound (lib/cf/families/special.ts, lgammaErr) against log Gamma from mpmath
// (tests/fixtures/special/generate-lgamma.py: mpmath.loggamma at 40 digits, checked by log(gamma) at 60 digits): the
// bound is never below the actual error of lgamma, at a spread of arguments and at those of the stable tail series.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { lgamma, lgammaErr } from "@/lib/cf/families/special";

const f = JSON.parse(readFileSync(new URL("../fixtures/special/lgamma.json", import.meta.url), "utf8")) as {
  points: { x: string; lgamma: string; abs_diff: number }[];
};
const SOURCE = "tests/fixtures/special/lgamma.json (mpmath.loggamma, 40 digits)";

describe("lgammaErr bounds the error of lgamma", () => {
  it("the fixture's two methods agree to 1e-25", () => {
    for (const p of f.points) expect(p.abs_diff, p.x).toBeLessThan(1e-25);
    expect(f.points.length).toBeGreaterThan(500);
  });
  it("|lgamma(x) - reference| <= lgammaErr(x) at every point, and the bound is within 1e4 of the error or below 1e-13", () => {
    const ratios: number[] = [];
    for (const p of f.points) {
      const x = Number(p.x);
      const ref = Number(p.lgamma);
      const v = lgamma(x);
      const e = lgammaErr(x);
      // the reference read into a double is off by half an ulp of it
      const diff = Math.abs(v - ref);
      const refUlp = Number.EPSILON * Math.abs(ref);
      if (!(diff <= e + refUlp)) expect.fail(`x = ${x}: lgamma ${v}, expected ${ref} (${SOURCE}), difference ${diff}, bound ${e}`);
      if (!(e <= Math.max(1e4 * diff, 1e-13, 64 * refUlp))) expect.fail(`x = ${x}: bound ${e} far above the difference ${diff}`);
      if (diff > refUlp) ratios.push(e / diff);
    }
    ratios.sort((a, b) => a - b);
    console.log(`lgammaErr / actual over ${ratios.length} points above the reference's rounding: median ${ratios[ratios.length >> 1].toExponential(2)}, least ${ratios[0].toExponential(2)}`);
  });
});
