// Derived bounds on the derivatives of stable densities (lib/cf/direct/stable-smooth.ts: |z|^m |f^(k)(z)| from the CF,
// used by the shortfall sweep's Gauss panels, lib/cf/direct/shortfall-sweep.ts). Reference: f^(k)(z) by Fourier inversion
// with mpmath, tanh-sinh and Gauss-Legendre on two panel widths (tests/fixtures/stable/generate-derivatives.py). Each
// bound must hold (|f^(k)| less the reference's own uncertainty at most the bound), for the standard law, through the
// DirectLaw (S1 and S0) and through an affine map; and the bound over the whole line must stay within 100 times the
// largest |f^(k)| the fixture samples (the bound is a sum of Gamma functions, not a loose constant).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { smoothOver, stableSmooth } from "@/lib/cf/direct/stable-smooth";
import { stableDirect } from "@/lib/cf/direct/stable";
import { affineDirect } from "@/lib/cf/direct/affine";
import { tanHalfPi } from "@/lib/cf/direct/stable-kernel";

interface Case { alpha: number; beta: number; z: number; k: 1 | 3 | 7; value: string; abs_diff: number }
const cases = (JSON.parse(readFileSync(new URL("../fixtures/stable/derivatives.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

describe("stable density derivative bounds vs mpmath (tests/fixtures/stable/derivatives.json)", () => {
  it("the fixture's two quadratures agree within 1e-10", () => {
    expect(cases.length).toBeGreaterThanOrEqual(100);
    for (const c of cases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-10);
  });

  it.each(cases.map((c) => [`alpha ${c.alpha}, beta ${c.beta}, k ${c.k}, z ${c.z}`, c] as const))("%s", (_n, c) => {
    const v = Math.abs(Number(c.value)) - c.abs_diff;
    const s = stableSmooth(c.alpha, c.beta, c.k)!;
    expect(s, "a bound for alpha != 1").not.toBeNull();
    // the standard law at the point, and over an interval holding it
    expect(smoothOver(s, c.z, c.z), "at z").toBeGreaterThanOrEqual(v);
    expect(smoothOver(s, c.z - 0.25, c.z + 0.25), "over [z - 1/4, z + 1/4]").toBeGreaterThanOrEqual(v);
    // S1 with scale 2 and location 1: f_X(x) = f_Z((x - 1)/2) / 2, so f_X^(k)(x) = f_Z^(k)(z) / 2^(k+1) at x = 2 z + 1
    const x = 2 * c.z + 1;
    const law = stableDirect(c.alpha, c.beta, 2, 1, "S1")!;
    expect(law.pdfDeriv!(c.k, x, x) * 2 ** (c.k + 1), "S1, scale 2, loc 1").toBeGreaterThanOrEqual(v);
    // S0 with the same law: loc0 = loc1 + beta scale tan(pi alpha / 2)
    const law0 = stableDirect(c.alpha, c.beta, 2, 1 + c.beta * 2 * tanHalfPi(c.alpha), "S0")!;
    expect(law0.pdfDeriv!(c.k, x, x) * 2 ** (c.k + 1), "S0").toBeGreaterThanOrEqual(v * (1 - 1e-9));
    // -3 Z + 5 at y = -3 z + 5: f_Y^(k)(y) = (-1/3)^k f_Z^(k)(z) / 3
    const y = -3 * c.z + 5;
    const neg = affineDirect(stableDirect(c.alpha, c.beta, 1, 0, "S1")!, -3, 5);
    expect(neg.pdfDeriv!(c.k, y, y) * 3 ** (c.k + 1), "-3 Z + 5").toBeGreaterThanOrEqual(v);
  });

  it("the bound over the line is within 100 times the largest sampled |f^(k)|", () => {
    const top = new Map<string, number>();
    for (const c of cases) {
      const key = `${c.alpha},${c.beta},${c.k}`;
      top.set(key, Math.max(top.get(key) ?? 0, Math.abs(Number(c.value))));
    }
    for (const [key, m] of top) {
      const [alpha, beta, k] = key.split(",").map(Number);
      const b0 = stableSmooth(alpha, beta, k)!.B[0];
      expect(b0, key).toBeLessThanOrEqual(100 * m);
    }
  });
});
