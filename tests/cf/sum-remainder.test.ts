// The derived bound on what an independent sum's damped transform leaves after its gamma kernels (lib/cf/sum-remainder.ts)
// against mpmath's transforms of the sum (tests/fixtures/sum-remainder/generate.py: closed forms and ray quadratures, their
// difference `check`): |phi(s) e^{s lo} - K(s)| within the bound at every point, the kernels K as the engine takes them out
// (w (r / (r + s))^e, evaluated here); and the bound not idle: somewhere within 20 times the remainder it bounds.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf";

interface Case {
  model: unknown;
  points: { beta: string; t: string; re: string; im: string; check: number }[];
}
const cases = (JSON.parse(readFileSync(new URL("../fixtures/sum-remainder/sum-remainder.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

/** sum_k w_k (r_k / (r_k + s))^{e_k} at s = beta - i t (principal powers), and the sum of the terms' sizes */
function kernelsAt(ks: readonly { w: number; rate: number; shape: number }[], beta: number, t: number) {
  let re = 0;
  let im = 0;
  let size = 0;
  for (const k of ks) {
    const a = k.rate + beta;
    const lm = Math.log(k.rate) - Math.log(Math.hypot(a, t));
    const ph = -Math.atan2(-t, a);
    const m = k.w * Math.exp(k.shape * lm);
    re += m * Math.cos(k.shape * ph);
    im += m * Math.sin(k.shape * ph);
    size += Math.abs(m);
  }
  return { re, im, size };
}

describe("sum remainder bound vs mpmath transforms (tests/fixtures/sum-remainder)", () => {
  it.each(cases.map((c) => [JSON.stringify(c.model), c] as const))("%s", (_n, c) => {
    const m = compile(c.model as never);
    const ks = m.dampedKernels!;
    expect(ks && m.dampedRemainderBound, "the sum has kernels and a derived remainder bound").toBeTruthy();
    expect(ks.every((k) => k.at === m.support[0])).toBe(true);
    let tightest = 0;
    for (const p of c.points) {
      const beta = Number(p.beta);
      const t = Number(p.t);
      const k = kernelsAt(ks, beta, t);
      const rem = Math.hypot(Number(p.re) - k.re, Number(p.im) - k.im);
      const b = m.dampedRemainderBound!(beta, t);
      // the kernels' evaluation here: a few ulps of each term
      const own = 16 * Number.EPSILON * k.size;
      expect(rem, `beta ${p.beta} t ${p.t}: remainder ${rem} vs bound ${b}`).toBeLessThanOrEqual(b + p.check + own);
      if (rem > 100 * (p.check + own)) tightest = Math.max(tightest, rem / b);
    }
    expect(tightest, "the bound within 20 times the remainder somewhere").toBeGreaterThanOrEqual(0.05);
  });
});
