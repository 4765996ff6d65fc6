import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { absMomentAbout } from "@/lib/cf/invert/grid-rounding";
import type { Model } from "@/lib/cf/types";
import fx from "../fixtures/abs-moment/abs-moment.json";

// E|X - m| about the mean, from tests/fixtures/abs-moment/generate.py (mpmath, 30 digits): Student t by its closed form
// (common practice) checked by a quadrature of |x| f(x); stable laws by the fractional absolute moment formula
// (Samorodnitsky and Taqqu 1994, Property 1.2.17) checked by (2/pi) int (1 - Re phi) / t^2 dt; a sum by that integral alone
// (two sets of breakpoints). The bound must never be below the reference; per family within 1e-10, the sum (triangle
// inequality) within a factor 1.5.
type Row = { kind: string; alpha?: number; beta?: number; scale?: number; nu?: number; terms?: unknown[]; about?: number; value: number; rel_diff: number };
const rows = (fx as { rows: Row[] }).rows;

const modelOf = (r: Row, loc: number): unknown =>
  r.kind === "stable"
    ? { family: "stable", alpha: r.alpha, beta: r.beta, scale: r.scale, loc, param: "S1" }
    : r.kind === "student_t"
      ? { family: "student_t", nu: r.nu, loc, scale: r.scale }
      : { sum: r.terms };

describe("first absolute moment bounds (E|X - c|) against the mpmath fixture", () => {
  for (const r of rows) {
    const name = r.kind === "sum" ? "stable(1.216) + Student t(5.6)" : `${r.kind} ${r.alpha ?? r.nu}`;
    it(`${name}: the two methods agree; the bound is at or above the reference and close to it`, () => {
      expect(r.rel_diff).toBeLessThan(1e-12);
      const loc = r.kind === "sum" ? 0 : 2.5;
      const m = compile(modelOf(r, loc) as Model);
      const b = absMomentAbout(m, loc);
      expect(b).toBeGreaterThanOrEqual(r.value);
      expect(b / r.value).toBeLessThan(r.kind === "sum" ? 1.5 : 1 + 1e-10);
    });
  }
  it("away from the mean: E|X - c| <= E|X - m| + |m - c|, and never below |m - c| (Jensen)", () => {
    const r = rows.find((x) => x.kind === "stable" && x.alpha === 1.5 && x.beta === 0)!;
    const m = compile(modelOf(r, 0) as Model);
    for (const c of [-7, 3, 100]) {
      const b = absMomentAbout(m, c);
      expect(b).toBeGreaterThanOrEqual(Math.abs(c));
      expect(b).toBeLessThanOrEqual((r.value + Math.abs(c)) * (1 + 1e-9));
    }
  });
  it("scale, shift and mixture carry the bound: 3 X + 1 and a mix of it with a normal", () => {
    const r = rows.find((x) => x.kind === "student_t" && x.nu === 1.5)!;
    const X = modelOf(r, 0);
    const m = compile({ shift: 1, of: { scale: -3, of: X } } as unknown as Model);
    const b = absMomentAbout(m, 1);
    expect(b).toBeGreaterThanOrEqual(3 * r.value);
    expect(b / (3 * r.value)).toBeLessThan(1 + 1e-10);
    // 0.3 (3 X + 1) + 0.7 N(1, 1): E|. - 1| = 0.3 * 3 E|X| + 0.7 sqrt(2/pi) (common practice for the normal)
    const mix = compile({ mix: [{ weight: 0.3, of: { shift: 1, of: { scale: 3, of: X } } }, { weight: 0.7, of: { family: "normal", mu: 1, sigma: 1 } }] } as unknown as Model);
    const exact = 0.3 * 3 * r.value + 0.7 * Math.sqrt(2 / Math.PI);
    const bm = absMomentAbout(mix, 1);
    expect(bm).toBeGreaterThanOrEqual(exact);
    // the normal part by Lyapunov (1 in place of sqrt(2/pi))
    expect(bm).toBeLessThan(1.2 * exact);
  });
  it("the sum's tail term G = D + E[rest]: E|G - c| at or above the stable law's own E|X - mu|", () => {
    const r = rows.find((x) => x.kind === "sum")!;
    const st = rows.find((x) => x.kind === "stable" && x.alpha === 1.216)!;
    const m = compile(modelOf(r, 0) as Model);
    const g = m.tailTerm?.absMomentAbout?.(0) ?? NaN;
    expect(g).toBeGreaterThanOrEqual(st.value);
    expect(g / st.value).toBeLessThan(1 + 1e-10);
  });
  it("stable in S0: the mean loc - beta scale tan(pi alpha / 2) formed with its rounding; the bound about it as in S1", () => {
    const r = rows.find((x) => x.kind === "stable" && x.alpha === 1.5 && x.beta === 1)!;
    const m = compile({ family: "stable", alpha: 1.5, beta: 1, scale: 2, loc: 0.7, param: "S0" } as Model);
    // S0 to S1 (Nolan 2020 ch. 1): mean = 0.7 - 1 * 2 * tan(3 pi / 4) = 2.7
    const b = absMomentAbout(m, 2.7);
    expect(b).toBeGreaterThanOrEqual(r.value);
    expect(b / r.value).toBeLessThan(1 + 1e-10);
  });
  it("without a mean (Cauchy, stable alpha 0.9): no bound", () => {
    expect(absMomentAbout(compile({ family: "cauchy", loc: 0, scale: 1 } as Model), 0)).toBeNaN();
    expect(absMomentAbout(compile({ sum: [{ family: "stable", alpha: 0.9, beta: 0, scale: 1, loc: 0 }, { family: "student_t", nu: 1.5, loc: 0, scale: 1 }] } as Model), 0)).toBeNaN();
  });
});
