// The beta CF's derived error bound (lib/cf/families/beta-unit.ts, beta-bounds.ts: Kummer's series, the logistic line
// and the two rays, each bounded over its whole range of tau) against Kummer's function 1F1(alpha; alpha + beta; i tau)
// (A&S 13.1.2; mpmath.hyp1f1 at 40 digits), cross-checked by mpmath.quad of the density on the logistic line
// (tests/fixtures/beta-cf/generate-routes.py). Every route, each frequency alone and on an equispaced grid (the rays summed
// across t): the difference within the node's stated CF error, and that error useful (below 1e-12; 1e-11 for
// beta(300, 300)).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { betaLaw } from "@/lib/cf/families/bounded";

interface Case { alpha: number; beta: number; tau: number; re: string; im: string; abs_diff: number }
const cases = (JSON.parse(readFileSync(new URL("../fixtures/beta-cf/routes.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

describe("beta CF within its derived bound on every route (mpmath.hyp1f1 reference)", () => {
  it("the fixture's two methods agree within 1e-24, from tau = 0.3 (series) to 400 (rays)", () => {
    for (const c of cases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThan(1e-24);
    expect(cases.length).toBeGreaterThanOrEqual(120);
    expect(Math.min(...cases.map((c) => c.tau))).toBeLessThan(2);
    expect(Math.max(...cases.map((c) => c.tau))).toBeGreaterThan(100);
  });
  const params = [...new Set(cases.map((c) => `${c.alpha},${c.beta}`))];
  const worst: [string, number, number][] = [];
  it.each(params)("alpha, beta = %s", (p) => {
    const [alpha, beta] = p.split(",").map(Number);
    const node = betaLaw(alpha, beta, 0, 1);
    const bound = node.cfAbsError!;
    // (large shapes: the line's rounding grows with its range of tau and the shape; before the rays' start was chosen by
    // their derived bound, beta(300, 300) overflowed to NaN at tau = 1000)
    expect(bound, `beta(${p}) stated CF error`).toBeLessThanOrEqual(alpha + beta > 100 ? 1e-11 : 1e-12);
    // tau = 0.1, 0.2, ..., 400: the equispaced route; and each tau alone
    const t = Float64Array.from({ length: 4000 }, (_, k) => (k + 1) / 10);
    const re = new Float64Array(t.length);
    const im = new Float64Array(t.length);
    node.logCf(t, re, im);
    const one = new Float64Array(1);
    const oneIm = new Float64Array(1);
    let w = 0;
    for (const c of cases.filter((x) => `${x.alpha},${x.beta}` === p)) {
      const k = Math.round(c.tau * 10) - 1;
      node.logCf(Float64Array.of(c.tau), one, oneIm);
      for (const [route, lr, li] of [["equispaced", re[k], im[k]], ["alone", one[0], oneIm[0]]] as const) {
        const m = Math.exp(lr);
        const diff = Math.hypot(m * Math.cos(li) - Number(c.re), m * Math.sin(li) - Number(c.im));
        const tol = bound + c.abs_diff;
        if (!(diff <= tol)) expect.fail(`beta(${p}), tau = ${c.tau} (${route}): phi = ${m * Math.cos(li)} + ${m * Math.sin(li)} i, expected ${c.re} + ${c.im} i, difference ${diff}, bound ${tol}`);
        w = Math.max(w, diff);
      }
    }
    worst.push([p, bound, w]);
  });
  it("prints the stated bounds against the worst actual errors", () => {
    console.log("beta CF: alpha,beta | stated | worst actual\n" + worst.map(([p, b, w]) => `${p} | ${b.toExponential(2)} | ${w.toExponential(2)}`).join("\n"));
    expect(worst.length).toBe(params.length);
  });
});
