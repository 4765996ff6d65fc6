// The bounded regularised incomplete beta function (lib/cf/families/incbeta-bounded.ts) against mpmath
// (tests/fixtures/incbeta/generate.py: mpmath.betainc regularized at 50 digits, checked by A&S 26.5.23 through
// mpmath.hyp2f1): wherever the series answers, the stated bound is at least the actual error of I and of 1 - I, the
// smaller side keeps its relative accuracy, and the bounds are not uselessly loose (median bound/actual within 100).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { incBetaBounded, incBetaShape, incBetaValue } from "@/lib/cf/families/incbeta-bounded";

const f = JSON.parse(readFileSync(new URL("../fixtures/incbeta/incbeta.json", import.meta.url), "utf8")) as {
  points: { a: string; b: string; x: string; v: string; c: string; rel_diff: number; c_rel_diff: number }[];
};
const SOURCE = "tests/fixtures/incbeta/incbeta.json (mpmath.betainc, 50 digits)";
const U = Number.EPSILON / 2;

describe("incBetaBounded against mpmath", () => {
  it("the fixture's two methods agree to 1e-30 relative", () => {
    for (const p of f.points) {
      expect(p.rel_diff, `${p.a} ${p.b} ${p.x}`).toBeLessThan(1e-30);
      expect(p.c_rel_diff, `${p.a} ${p.b} ${p.x}`).toBeLessThan(1e-30);
    }
    expect(f.points.length).toBeGreaterThan(200);
  });

  it("|value - reference| <= bound for I and 1 - I wherever the series answers (x and 1 - x exact)", () => {
    const ratios: number[] = [];
    let worst = { r: 0, at: "" };
    let worstRel = { r: 0, at: "" };
    const none: string[] = [];
    for (const pt of f.points) {
      const [a, b, x] = [Number(pt.a), Number(pt.b), Number(pt.x)];
      const r = incBetaBounded(incBetaShape(a, b), x, 1 - x, 0);
      if (!r) {
        none.push(`(${a}, ${b}, ${x})`);
        continue;
      }
      for (const [name, v, e, ref] of [["I", r.v, r.e, Number(pt.v)], ["1 - I", r.c, r.ce, Number(pt.c)]] as const) {
        const diff = Math.abs(v - ref);
        if (!(diff <= e + U * ref)) expect.fail(`${name}_${x}(${a}, ${b}) = ${v}, expected ${ref} (${SOURCE}), difference ${diff}, bound ${e}`);
        if (diff > 2 * U * ref) {
          ratios.push(e / diff);
          if (e / diff > worst.r) worst = { r: e / diff, at: `${name}_${x}(${a}, ${b})` };
        }
        if (ref <= 0.5 && ref > 1e-300 && e / ref > worstRel.r) worstRel = { r: e / ref, at: `${name}_${x}(${a}, ${b}) = ${ref}` };
      }
    }
    ratios.sort((p, q) => p - q);
    const med = ratios[ratios.length >> 1];
    console.log(`incBetaBounded over ${f.points.length - none.length} of ${f.points.length} points (the rest beyond the series' budget: ${none.join(" ")}): bound/actual median ${med.toExponential(2)}, worst ${worst.r.toExponential(2)} at ${worst.at}; largest relative bound on the smaller side ${worstRel.r.toExponential(2)} at ${worstRel.at}`);
    expect(med).toBeLessThan(100);
    expect(worstRel.r).toBeLessThan(1e-9);
    // the series answers the great majority (those it leaves: shapes far apart with x between the mean and 1)
    expect(none.length).toBeLessThan(0.2 * f.points.length);
  });

  it("incBetaValue (exact x, 1 - x formed inside, as the layer moments call it) bounds its error at every point", () => {
    for (const pt of f.points) {
      const [a, b, x] = [Number(pt.a), Number(pt.b), Number(pt.x)];
      const r = incBetaValue(a, b, x);
      if (!r) expect.fail(`incBetaValue(${a}, ${b}, ${x}) gave no value`);
      for (const [name, v, e, ref] of [["I", r.v, r.e, Number(pt.v)], ["1 - I", r.c, r.ce, Number(pt.c)]] as const) {
        const diff = Math.abs(v - ref);
        if (!(diff <= e + U * ref)) expect.fail(`${name}_${x}(${a}, ${b}) = ${v}, expected ${ref} (${SOURCE}), difference ${diff}, bound ${e}`);
      }
    }
  });

  it("special inputs: x = 0 and x = 1 exact, NaN gives no value", () => {
    const s = incBetaShape(2, 3);
    expect(incBetaBounded(s, 0, 1, 0)).toMatchObject({ v: 0, c: 1, e: 0, ce: 0 });
    expect(incBetaBounded(s, 1, 0, 0)).toMatchObject({ v: 1, c: 0, e: 0, ce: 0 });
    expect(incBetaBounded(s, NaN, NaN, 0)).toBeNull();
  });
});
