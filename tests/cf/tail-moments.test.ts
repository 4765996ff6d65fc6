// Stop-loss bounds from central moments (lib/cf/invert/tail-moments.ts), the ES error's tail and image terms, against
// closed forms: normal E[(X - u)^+] = sigma phi(z) - (u - mu) (1 - Phi(z)), z = (u - mu)/sigma (Loss Models, limited
// expected values of the normal; Phi from @stdlib/math-base-special-erfc), exponential E[(X - u)^+] = e^{-lambda u}/lambda
// and E[(u - X)^+] = u - (1 - e^{-lambda u})/lambda (memoryless). Each bound must lie at or above the exact value and
// within the stated factor of the high-order moment bound it is meant to be (so a bound from the variance alone fails).
import { describe, expect, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import { compile } from "@/lib/cf/compile";
import { stopLossBounds } from "@/lib/cf/invert/tail-moments";
import { cumulantsToCentralE } from "@/lib/cf/moment-error";

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

  it("normal(1, 2) far out with a goal: the orders up to 40 taken, at or above the closed form, below the 12th order's bound", () => {
    // without a goal the orders stop at 12 (a fresh bound: once formed, the higher orders stay with it)
    const t12 = stopLossBounds(compile({ family: "normal", mu: 1, sigma: 2 }))!;
    const t = stopLossBounds(compile({ family: "normal", mu: 1, sigma: 2 }))!;
    for (const k of [8, 12, 20]) {
      const exact = 2 * phi(k) - 2 * k * (1 - Phi(k));
      const twelve = t12.right(1 + 2 * k);
      const r = t.right(1 + 2 * k, 0);
      expect(r, `right at ${k} sd: bound ${r} below the closed form ${exact}`).toBeGreaterThanOrEqual(exact);
      const evens = Array.from({ length: 20 }, (_, i) => 2 * i + 2);
      const best = Math.min(...evens.map((n) => 2 * k * (dfact(n - 1) / k ** n) * ((n - 1) ** (n - 1) / n ** n)));
      expect(r, `right at ${k} sd: ${r} vs the moment bound to order 40, ${best}`).toBeLessThanOrEqual(best * (1 + 1e-9));
      expect(r, `right at ${k} sd: ${r} not below the 12th order's ${twelve}`).toBeLessThan(twelve / 100);
    }
  });

  // the central moments to order 40 that the bound rests on, with their running-error bounds, against the closed form of
  // normal(mu, s) + uniform(a, b): E(X - m)^n = sum_k C(n, k) E(N - mu)^k E(U - (a + b)/2)^(n - k), normal (k - 1)!! s^k and
  // uniform (w/2)^j / (j + 1) for even orders, 0 for odd (common practice); positive terms, summed in doubles within 1e-13
  it("normal + uniform: central moments to order 40 within their bounds (closed form)", () => {
    const s = 1.193;
    const w = 2.938;
    const c = compile({ sum: [{ family: "normal", mu: -2.126, sigma: s }, { family: "uniform", a: -1, b: 1.938 }] });
    const kap = c.cumulants(40);
    const err = c.cumulantErrors!(40);
    const central = cumulantsToCentralE(kap.map((v, i) => ({ v: v as number, e: err[i] as number })));
    for (const n of [12, 24, 32, 40]) {
      let ref = 0;
      for (let k = 0; k <= n; k += 2) if ((n - k) % 2 === 0) ref += binom(n, k) * dfact(k - 1) * s ** k * ((w / 2) ** (n - k) / (n - k + 1));
      const m = central[n - 1]!;
      expect(Math.abs(m.v - ref), `order ${n}: ${m.v} vs ${ref}, bound ${m.e}`).toBeLessThanOrEqual(m.e + 1e-13 * ref);
    }
  });

  it("laws without the needed moments give no bound", () => {
    expect(stopLossBounds(compile({ family: "cauchy", loc: 0, scale: 1 }))).toBeNull();
  });
});

function binom(n: number, k: number): number {
  let r = 1;
  for (let i = 1; i <= k; i++) r = (r * (n - k + i)) / i;
  return r;
}

function dfact(n: number): number {
  let r = 1;
  for (let k = n; k > 1; k -= 2) r *= k;
  return r;
}
