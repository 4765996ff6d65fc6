// Audit of the severity CFs' declared error: every continuous severity family at t from 1e-3 to 1e5 (and at z = t + i a,
// a > 0, for those with a damped transform), each value through every route the engine has for it: the CF at that t
// alone, the CF on equispaced frequencies (the inversion's nodes, where the rules are summed across t by recurrence),
// and the damped transform alone and on equispaced frequencies. Each must be within the engine's declared error of phi
// (the stated cfAbsError plus the per-value rounding allowance of lib/cf/invert/part.ts cfRelError) of
// the reference: mpmath at 30 digits, two independent methods per value (turned rays of two angles, or a closed form:
// Pareto's incomplete gamma, the inverse gamma's Bessel K, Kummer's 1F1 for beta, erfc for the truncated normal;
// tests/fixtures/severity-cf/generate-audit.py). The looseness bound / actual is printed per family, not asserted.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf";
import { FAMILY_SPECS } from "@/lib/cf/families/spec";
import type { FamilyName } from "@/lib/cf/families/spec-types";
import type { Model } from "@/lib/cf/types";
import { cfRelError } from "@/lib/cf/invert/part";

interface Case { family: FamilyName; params: Record<string, number>; t: number; a: number; re: string; im: string; abs_diff: number; methods: string }
const fixture = JSON.parse(readFileSync(new URL("../fixtures/severity-cf/audit.json", import.meta.url), "utf8")) as { cases: Case[] };
const cases = fixture.cases;

const key = (c: Case) => `${c.family} ${JSON.stringify(c.params)}`;
const groups = new Map<string, Case[]>();
for (const c of cases) groups.set(key(c), [...(groups.get(key(c)) ?? []), c]);

type Eval = (t: Float64Array, re: Float64Array, im: Float64Array) => void;

/** phi at the fixture's t by one route (alone, or at index k of an equispaced grid holding t) and its log */
function at(f: Eval, t: number, route: "alone" | "grid, t in the middle" | "grid, t first"): [number, number, number, number] {
  let grid: Float64Array;
  let k: number;
  if (route === "alone") {
    grid = Float64Array.of(t);
    k = 0;
  } else if (route === "grid, t in the middle") {
    // t_j = (t / 64)(j + 1): t / 64 is exact, so t_63 = t
    grid = Float64Array.from({ length: 128 }, (_, j) => (t / 64) * (j + 1));
    k = 63;
  } else {
    grid = Float64Array.from({ length: 64 }, (_, j) => t + (t / 16) * j);
    k = 0;
  }
  const re = new Float64Array(grid.length);
  const im = new Float64Array(grid.length);
  f(grid, re, im);
  const m = Math.exp(re[k]);
  return m === 0 ? [0, 0, re[k], im[k]] : [m * Math.cos(im[k]), m * Math.sin(im[k]), re[k], im[k]];
}

const ROUTES = ["alone", "grid, t in the middle", "grid, t first"] as const;
/** families whose CF on equispaced frequencies is a route of its own (sums across t by recurrence); the others evaluate
 *  each frequency alone either way (the truncated normal's per-frequency quadrature takes 0.2 s at t = 1e5) */
const BATCHED = new Set<FamilyName>(["lognormal", "weibull", "pareto", "lomax", "burr", "loglogistic", "inverse_gamma", "beta", "pert"]);
const looseness: string[] = [];

function quantile(xs: number[], q: number) {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
}

describe("severity CFs: |phi - reference| <= the declared cfAbsError on every route", () => {
  it("the fixture: two methods per value agree within 1e-16, over 700 values, every severity family", () => {
    for (const c of cases) expect(c.abs_diff, JSON.stringify(c)).toBeLessThanOrEqual(1e-16);
    expect(cases.length).toBeGreaterThan(700);
    const fams = new Set(cases.map((c) => c.family));
    for (const f of ["lognormal", "weibull", "pareto", "lomax", "burr", "loglogistic", "inverse_gamma", "inverse_gaussian", "gamma", "beta", "pert", "truncated_normal"]) expect(fams.has(f as FamilyName), f).toBe(true);
  });

  it.each([...groups.keys()])("%s", (g) => {
    const cs = groups.get(g)!;
    const { family, params } = cs[0];
    const model = { family, ...params } as Model;
    const compiled = compile(model);
    const node = FAMILY_SPECS[family].build({ ...params });
    const absBound = compiled.cfAbsError ?? 0;
    expect(node.cfAbsError ?? 0, "the node and the compiled model state the same bound").toBe(absBound);
    // the engine's error of phi at t: the stated absolute bound plus the rounding it allows every log-CF value
    // (lib/cf/invert/part.ts cfRelError: units of rounding relative to 1 + |log phi|; closed forms state only that)
    const ulps = compiled.logCfUlps ?? 8;
    const fails: string[] = [];
    const ratios: number[] = [];
    // the truncated normal's CF costs 0.2 s per frequency at t = 1e5 (panels of 1.5 / t over 40 sd): kept to t <= 1e4 here
    for (const c of cs.filter((q) => q.family !== "truncated_normal" || q.t <= 1e4)) {
      const ref: [number, number] = [Number(c.re), Number(c.im)];
      const routes: [string, Eval][] = [];
      const rs = BATCHED.has(family) ? ROUTES : ROUTES.slice(0, 1);
      if (c.a === 0) for (const r of rs) routes.push([`cf, ${r}`, (t, re, im) => compiled.logCf(t, re, im)]);
      if (node.dampedLogCf) for (const r of rs) routes.push([`damped by ${c.a}, ${r}`, (t, re, im) => node.dampedLogCf!(c.a, t, re, im)]);
      for (const [label, f] of routes) {
        const route = ROUTES.find((r) => label.endsWith(r))!;
        const [pr, pi, lr, li] = at(f, c.t, route);
        const diff = Math.hypot(pr - ref[0], pi - ref[1]);
        const mod = Math.hypot(pr, pi);
        const bound = absBound + (mod > 0 ? mod * (cfRelError(ulps, lr, li, c.t, 0) + (compiled.logCfExtraError?.(c.t) ?? 0)) : 0);
        if (diff > 0) ratios.push(bound / diff);
        if (!(diff <= bound))
          fails.push(`${g} at z = ${c.t} + ${c.a} i (${label}): phi = ${pr} + ${pi} i, reference ${c.re} + ${c.im} i (${c.methods}), difference ${diff.toExponential(3)}, bound ${bound.toExponential(3)}`);
      }
    }
    if (ratios.length)
      looseness.push(`${g.padEnd(64)} cfAbsError ${absBound.toExponential(2)}  bound/actual median ${quantile(ratios, 0.5).toExponential(2)}, tightest ${Math.min(...ratios).toExponential(2)}, loosest ${Math.max(...ratios).toExponential(2)}`);
    expect(fails.length, `${fails.length} values beyond the bound:\n${fails.slice(0, 40).join("\n")}`).toBe(0);
  });

  it("prints the looseness (bound / actual) per family", () => {
    console.log(`severity CF audit, bound / actual per parameter set:\n${looseness.join("\n")}`);
    expect(looseness.length).toBeGreaterThan(0);
  });
});
