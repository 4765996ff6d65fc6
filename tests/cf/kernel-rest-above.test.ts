// A sum's transform less its gamma kernels where some kernels sit above its lower end (a compound of pareto claims: its
// jumps at n xm times the other terms), lib/cf/damped-kernel-rest.ts: |psi - atom - K| against the transform of the sum by
// mpmath at 30 digits (tests/fixtures/damped-majorant/generate_pareto_compound_sum.py: the exponential integral, checked
// by the incomplete gamma form), less the kernels the engine takes out (data: w e^{-s at} (r / (r + s))^e each, s = beta - i t).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { cdiv, cexp, cmul, cpow, type Cx } from "./cx-helpers";

interface Case {
  count: Record<string, unknown>;
  alpha: number;
  xm: number;
  gamma: [number, number];
  rows: { beta: string; t: string; re: string; im: string; check: number }[];
}
const cases = (JSON.parse(readFileSync(new URL("../fixtures/damped-majorant/pareto-compound-sum.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

describe("kernels above the sum's lower end: the kernel rest's bounds are never below mpmath's transform less the kernels", () => {
  it.each(cases.map((c) => ({ name: `gamma(${c.gamma.join(", ")}) + ${JSON.stringify(c.count)} x pareto(${c.alpha}, ${c.xm})`, c })))("$name", ({ c }) => {
    const model = { sum: [{ family: "gamma", shape: c.gamma[0], rate: c.gamma[1] }, { compound: { count: c.count, each: { family: "pareto", alpha: c.alpha, xm: c.xm } } }] } as Model;
    const m = compile(model);
    const ks = m.dampedKernels!;
    expect(m.support[0]).toBe(0);
    expect(ks.some((k) => k.at > 0), "kernels above lo").toBe(true);
    const kr = m.dampedMajorant!.kernelRest!;
    expect(kr, "a kernel rest").toBeDefined();
    const atom = m.dampedMajorant!.atom;
    const rest = (beta: number, t: number, ref: Cx, check: number) => {
      let r = ref[0] - atom;
      let i = ref[1];
      let size = Math.hypot(ref[0], ref[1]) + atom;
      for (const k of ks) {
        const g = cmul(cmul([k.w, 0], cpow(cdiv([k.rate, 0], [k.rate + beta, -t]), k.shape)), cexp([-beta * k.at, t * k.at]));
        r -= g[0];
        i -= g[1];
        size += Math.abs(k.w) * Math.pow(k.rate / Math.hypot(k.rate + beta, t), k.shape);
      }
      // the kernels' values here in doubles: a few eps of the magnitudes they cancel, plus the phase t at (u t at each)
      return { v: [r, i] as Cx, round: 64 * Number.EPSILON * size * (1 + t * Math.max(...ks.map((k) => k.at))) + check };
    };
    let gain = Infinity;
    for (const beta of ["0", "0.05", "0.7"]) {
      const rows = c.rows.filter((r) => r.beta === beta);
      let prev: { v: Cx; round: number } | null = null;
      let prevB: { rest: number; slope: number } | null = null;
      let prevT = 0;
      for (const row of rows) {
        const b = Number(beta);
        const t = Number(row.t);
        const cur = rest(b, t, [Number(row.re), Number(row.im)], row.check);
        const a = Math.hypot(cur.v[0], cur.v[1]);
        const bd = kr.at(b, t);
        if (!(a <= bd.rest + cur.round)) expect.fail(`beta ${b}, t ${t}: |psi - K| ${a} above rest ${bd.rest}`);
        if (prev && prevB) {
          // non-increasing: the previous frequency's bound holds here; the mean value theorem over the step
          if (!(a <= prevB.rest + cur.round)) expect.fail(`beta ${b}, t ${t}: |psi - K| ${a} above the bound at ${prevT}`);
          const step = Math.hypot(cur.v[0] - prev.v[0], cur.v[1] - prev.v[1]);
          if (!(step <= prevB.slope * (t - prevT) + cur.round + prev.round)) expect.fail(`beta ${b}, t ${t}: step ${step} above slope x dt ${prevB.slope * (t - prevT)}`);
        }
        if (t >= 20 && t <= 1e4 && Number.isFinite(bd.rest)) {
          let old = m.dampedMajorant!.rest(b, t);
          for (const k of ks) old += Math.abs(k.w) * Math.exp(-b * k.at) * Math.pow(k.rate / Math.hypot(k.rate + b, t), k.shape);
          gain = Math.min(gain, old / bd.rest);
        }
        prev = cur;
        prevB = bd;
        prevT = t;
      }
      // the power past t0: |psi - K| <= R (t0 / t)^q at the rows past t0
      for (const t0 of [1e2, 1e4]) {
        const d = kr.decay(Number(beta), t0);
        expect(d.q).toBeGreaterThan(0);
        for (const row of rows.filter((r) => Number(r.t) >= t0)) {
          const t = Number(row.t);
          const cur = rest(Number(beta), t, [Number(row.re), Number(row.im)], row.check);
          const a = Math.hypot(cur.v[0], cur.v[1]);
          if (!(a <= d.R * Math.pow(t0 / t, d.q) + cur.round)) expect.fail(`beta ${beta}, t ${t}: ${a} above the decay from ${t0}: ${d.R} (t0/t)^${d.q}`);
        }
      }
    }
    // the point of it: below the bound that does not see the kernels cancel the gamma term's powers (20 <= t <= 1e4)
    expect(gain).toBeGreaterThan(2);
  });
});
