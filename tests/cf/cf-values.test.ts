// POST /api/v1/cf's values and their error bounds (lib/cf/cf-values.ts): every bound at or above the actual error,
// against closed forms and against mpmath's values of the numerical CFs; a bound cut by 10 must fail somewhere.
import { describe, expect, it } from "vitest";
import { cfValues } from "@/lib/cf/cf-values";
import { compile } from "@/lib/cf/compile";
import type { CompiledModel, Model } from "@/lib/cf/types";
import grid from "../fixtures/cf-reference/numeric-cf-grid.json";

type Exact = (t: number) => [number, number];
const cexp = (re: number, im: number): [number, number] => [Math.exp(re) * Math.cos(im), Math.exp(re) * Math.sin(im)];
const T = [0, 1e-3, 0.37, -0.9, 1.5, 4.2, -11, 30, 120];

/** the actual errors against the reference and the bounds, at every t */
function check(model: Model, exact: Exact, ts: number[]) {
  const v = cfValues(compile(model), Float64Array.from(ts));
  return ts.map((t, k) => {
    const [re, im] = exact(t);
    return { t, actual: Math.hypot(v.re[k] - re, v.im[k] - im), bound: v.error[k] };
  });
}

describe("CF values with bounds against closed forms", () => {
  // closed forms: normal exp(i mu t - sigma^2 t^2 / 2), gamma (1 - i t / rate)^-shape, Cauchy exp(i mu t - s |t|),
  // Laplace e^{i mu t} / (1 + b^2 t^2), a scaled gamma phi(a t) (common practice; Lukacs, Characteristic Functions, ch. 1)
  // (the closed forms are evaluated in double precision here; each is a few operations, so |their own error| is at
  // most a few units of rounding, taken into the comparison as 1e-15)
  const cases: [string, Model, Exact][] = [
    ["normal(1, 2)", { family: "normal", mu: 1, sigma: 2 }, (t) => cexp(-2 * t * t, t)],
    ["gamma(2.5, 0.7)", { family: "gamma", shape: 2.5, rate: 0.7 }, (t) => {
      const r = Math.hypot(1, t / 0.7);
      return cexp(-2.5 * Math.log(r), 2.5 * Math.atan2(t / 0.7, 1));
    }],
    ["cauchy(0.3, 1.4)", { family: "cauchy", loc: 0.3, scale: 1.4 }, (t) => cexp(-1.4 * Math.abs(t), 0.3 * t)],
    ["laplace(-1, 0.6)", { family: "laplace", loc: -1, scale: 0.6 }, (t) => {
      const m = 1 / (1 + 0.36 * t * t);
      return [m * Math.cos(-t), m * Math.sin(-t)];
    }],
    ["3.7 x gamma(2, 1)", { scale: 3.7, of: { family: "gamma", shape: 2, rate: 1 } }, (t) => {
      const u = 3.7 * t;
      return cexp(-Math.log(1 + u * u), 2 * Math.atan2(u, 1));
    }],
  ];
  for (const [name, model, exact] of cases) {
    it(`${name}: every bound covers the actual error and stays within 1e-12`, () => {
      for (const r of check(model, exact, T)) {
        expect(r.bound, `t = ${r.t}`).toBeGreaterThanOrEqual(Math.max(0, r.actual - 1e-15));
        expect(r.bound).toBeLessThan(1e-12);
      }
    });
  }
});

describe("CF values with bounds against mpmath (numerical CFs)", () => {
  // tests/fixtures/cf-reference/numeric-cf-grid.json (generate_grid.py: mpmath at 30 digits, two methods per value;
  // "diff" is their difference, method A the reference)
  type Row = { family: string; params: Record<string, number>; t: number; re: string; im: string };
  const rows = (grid as unknown as { values: Row[] }).values.filter((r) => ["pareto", "lognormal", "weibull"].includes(r.family));
  it(`${rows.length} values of pareto, lognormal and weibull CFs: every bound covers the actual error`, () => {
    expect(rows.length).toBeGreaterThan(20);
    for (const r of rows) {
      const model = { family: r.family, ...r.params } as Model;
      const [res] = check(model, () => [Number(r.re), Number(r.im)], [r.t]);
      // the reference's own rounding to double: 2^-53 per part
      const act = Math.max(0, res.actual - 2.3e-16);
      expect(res.bound, `${r.family} ${JSON.stringify(r.params)} t = ${r.t}`).toBeGreaterThanOrEqual(act);
    }
  });
});

describe("CF values whose scaled frequencies carry no derived bound", () => {
  it("a scaled stable law with alpha <= 1 answers null there and says why (common practice: no bound, no number)", () => {
    const v = cfValues(compile({ scale: 3.7, of: { family: "stable", alpha: 0.8, beta: 0.3, scale: 1, loc: 0, param: "S1" } } as Model), Float64Array.from([0, 0.5]));
    expect(v.error[0]).toBeGreaterThan(0);
    expect(Number.isNaN(v.error[1])).toBe(true);
    expect(v.notes.join(" ")).toMatch(/no error bound/);
  });
});

describe("CF values of a model that declares no finite CF error", () => {
  it("answers null bounds and says why, not a bound that reads the declaration as 0 (common practice: an unbounded error is no bound)", () => {
    const m = compile({ family: "lognormal", mu: 0, sigma: 1 } as Model);
    for (const bad of [{ cfRelError: NaN }, { cfAbsError: Infinity }]) {
      const v = cfValues({ ...m, ...bad } as CompiledModel, Float64Array.from([0.5, 2]));
      for (const e of v.error) expect(Number.isFinite(e)).toBe(false);
      expect(v.notes.join(" ")).toMatch(/declares no finite error/);
    }
    expect(cfValues(m, Float64Array.from([0.5])).notes).toEqual([]);
  });
});
