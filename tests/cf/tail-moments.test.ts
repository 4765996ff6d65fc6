// Stop-loss bounds from central moments (lib/cf/invert/tail-moments.ts), the ES error's tail and image terms, against
// closed forms: normal E[(X - u)^+] = sigma phi(z) - (u - mu) (1 - Phi(z)), z = (u - mu)/sigma (Loss Models, limited
// expected values of the normal; Phi from @stdlib/math-base-special-erfc), exponential E[(X - u)^+] = e^{-lambda u}/lambda
// and E[(u - X)^+] = u - (1 - e^{-lambda u})/lambda (memoryless). Each bound must lie at or above the exact value and
// within the stated factor of the high-order moment bound it is meant to be (so a bound from the variance alone fails).
import { describe, expect, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import { compile } from "@/lib/cf/compile";
import { stopLossBounds } from "@/lib/cf/invert/tail-moments";

const Phi = (z: number) => 0.5 * erfc(-z / Math.SQRT2);
const phi = (z: number) => Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);

describe("stop-loss bounds from central moments", () => {
  it("normal(1, 2): E[(X - u)^+] and E[(u - X)^+] at or above the closed form, from the 12th moment far out", () => {
    const t = stopLossBounds(compile({ family: "normal", mu: 1, sigma: 2 }))!;
    expect(t).not.toBeNull();
    for (const k of [0.5, 1, 3, 5, 10, 20]) {
      const exact = 2 * phi(k) - 2 * k * (1 - Phi(k));
      const r = t.right(1 + 2 * k);
      const l = t.left(1 - 2 * k);
      expect(r, `right at ${k} sd: bound ${r} below the closed form ${exact}`).toBeGreaterThanOrEqual(exact);
      expect(l, `left at ${k} sd: bound ${l} below the closed form ${exact}`).toBeGreaterThanOrEqual(exact);
      // the best even order: k_n m_n / (k sd)^(n-1), k_n = (n-1)^(n-1) / n^n (the largest of (s - d)/s^n over s >= d, at
      // s = n d / (n - 1)), with m_n = (n-1)!! sd^n (normal central moments)
      const best = Math.min(...[2, 4, 6, 8, 10, 12].map((n) => 2 * k * (dfact(n - 1) / k ** n) * ((n - 1) ** (n - 1) / n ** n)));
      expect(r, `right at ${k} sd: ${r} vs the moment bound ${best}`).toBeLessThanOrEqual(best * (1 + 1e-9));
    }
  });

  it("exponential(0.5): right tail and left stop-loss, 0 left of the support", () => {
    const t = stopLossBounds(compile({ family: "exponential", rate: 0.5 }))!;
    for (const u of [4, 8, 20, 60]) {
      const exact = Math.exp(-0.5 * u) / 0.5;
      expect(t.right(u), `right at ${u}`).toBeGreaterThanOrEqual(exact);
    }
    expect(t.left(0)).toBe(0);
    expect(t.left(-3)).toBe(0);
    // below the mean 2: the left stop-loss u - (1 - e^{-lambda u})/lambda
    const exactLeft = 1 - (1 - Math.exp(-0.5)) / 0.5;
    expect(t.left(1), "left at 1").toBeGreaterThanOrEqual(exactLeft);
    // on the mean's wrong side no moment bound exists
    expect(t.left(3)).toBe(Infinity);
    expect(t.right(1)).toBe(Infinity);
  });

  it("laws without the needed moments give no bound", () => {
    expect(stopLossBounds(compile({ family: "cauchy", loc: 0, scale: 1 }))).toBeNull();
  });
});

function dfact(n: number): number {
  let r = 1;
  for (let k = n; k > 1; k -= 2) r *= k;
  return r;
}
