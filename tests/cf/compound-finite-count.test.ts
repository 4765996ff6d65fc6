// Compounds with a binomial-type count (a < 0 in the (a, b, 0) class) on a lattice severity: the recursion is
// unstable for them (Panjer & Wang 1993, On the stability of recursive formulas), so the table comes from the direct
// sum sum_k P(N = k) X^{*k}. Reference: that sum enumerated here in plain arithmetic from the definitions
// (P(N = k) = C(n, k) p^k (1 - p)^(n - k), convolution of the severity's probabilities; common practice).
// Before, a Bernoulli(0.822) count gave a table summing to 1.00106 and sf(0) = 0.866 against 0.822 (found by
// tests/cf/properties-*.test.ts).
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";

const sev = [0.17832957110609482, 0.004514672686230248, 0.002257336343115124, 0.029345372460496615, 0.21218961625282168, 0.13544018058690746, 0.18510158013544017, 0.056433408577878104, 0.13318284424379231, 0.06320541760722348];

/** exact law of the compound on the points origin*k + step*j, as a map from total to probability */
function enumerate(n: number, p: number, origin: number, step: number, f: number[]): Map<string, { x: number; p: number }> {
  const out = new Map<string, { x: number; p: number }>();
  // k-fold convolution over index sums: cur[j] = P(X_1 + ... + X_k = k origin + j step)
  let cur = [1];
  let choose = 1;
  for (let k = 0; k <= n; k++) {
    if (k > 0) {
      const next = new Array(cur.length + f.length - 1).fill(0);
      for (let i = 0; i < cur.length; i++) for (let j = 0; j < f.length; j++) next[i + j] += cur[i] * f[j];
      cur = next;
      choose = (choose * (n - k + 1)) / k;
    }
    const pk = choose * p ** k * (1 - p) ** (n - k);
    cur.forEach((q, j) => {
      const x = k * origin + j * step;
      const key = x.toFixed(9);
      const e = out.get(key) ?? { x, p: 0 };
      e.p += pk * q;
      out.set(key, e);
    });
  }
  return out;
}

const cases: { n: number; p: number; origin: number; step: number; f: number[] }[] = [
  { n: 1, p: 0.822, origin: 0.614, step: 0.5, f: sev },
  { n: 3, p: 0.4, origin: 0.25, step: 0.5, f: [0.5, 0.3, 0.2] },
  { n: 12, p: 0.7, origin: 1, step: 1, f: [0.1, 0.6, 0.3] },
];

describe("compounds with binomial-type counts on lattice severities", () => {
  for (const k of cases) {
    const count = k.n === 1 ? { family: "bernoulli", p: k.p } : { family: "binomial", n: k.n, p: k.p };
    const model = { compound: { count, each: { lattice: { origin: k.origin, step: k.step, p: k.f } } } } as Model;
    it(JSON.stringify(count), () => {
      const law = [...enumerate(k.n, k.p, k.origin, k.step, k.f).values()].sort((a, b) => a.x - b.x);
      const xs = [-1, ...law.map((a) => a.x), law[law.length - 1].x + 1];
      const r = density(compile(model), { x: xs });
      const e = r.diagnostics.error.cdf;
      let F = 0;
      xs.forEach((x, i) => {
        F = law.filter((a) => a.x <= x + 1e-9).reduce((s, a) => s + a.p, 0);
        const what = `model ${JSON.stringify(model)} at ${x}: cdf ${r.cdf[i]} sf ${r.sf[i]}, exact F ${F}, bound ${e}`;
        expect(Math.abs(r.cdf[i] - F), what).toBeLessThanOrEqual(e + 1e-14);
        expect(Math.abs(r.sf[i] - (1 - F)), what).toBeLessThanOrEqual(e + 1e-14);
      });
    });
  }
});

describe("purely atomic laws keep cdf and sf inside [0, 1]", () => {
  it("a scaled sample far below and above its values (masses w_i / sum w round past 1)", () => {
    const model = { scale: 1.034, of: { sample: [7.989, 11.363, -4.389, -3.29, 10.344, 19.68, 10.227, -4.998, 14.803] } } as Model;
    const r = density(compile(model), { x: [-62.8, 0, 100] });
    for (let i = 0; i < 3; i++) {
      expect(r.cdf[i], `cdf at ${r.x[i]}`).toBeGreaterThanOrEqual(0);
      expect(r.cdf[i], `cdf at ${r.x[i]}`).toBeLessThanOrEqual(1);
      expect(r.sf[i], `sf at ${r.x[i]}`).toBeGreaterThanOrEqual(0);
      expect(r.sf[i], `sf at ${r.x[i]}`).toBeLessThanOrEqual(1);
    }
  });
});
