// CFs of the severities without a closed-form CF (pareto, lognormal, weibull) and of the Student t, evaluated on the
// equispaced frequency grids the inversion uses (one quadrature rule shared by all nodes) and one frequency at a time,
// against mpmath at 30 digits (tests/fixtures/cf-reference/generate_grid.py: two independent methods per value, their
// difference stored beside it). Tolerance: the absolute error bound the model declares (cfAbsError), and for a CF
// declared closed-form (the Student t) the relative error the inversion derives for such CFs from |log phi|
// (cfRelError in lib/cf/invert/part.ts).
import { afterAll, describe, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf";
import { cfRelError, cfUlps } from "@/lib/cf/invert/part";
import { closeC, record, worst } from "./model-assert";

interface Row {
  family: string;
  params: Record<string, number>;
  h: number;
  K: number;
  k: number;
  t: number;
  re: string;
  im: string;
  diff: number | null;
}
const fixture = JSON.parse(readFileSync(new URL("../fixtures/cf-reference/numeric-cf-grid.json", import.meta.url), "utf8")) as { values: Row[] };

// one case per (family, parameters, grid)
const groups = new Map<string, Row[]>();
for (const r of fixture.values) {
  const key = JSON.stringify([r.family, r.params, r.h, r.K]);
  groups.set(key, [...(groups.get(key) ?? []), r]);
}

afterAll(() => console.log("worst |phi - reference| / declared bound:", JSON.stringify(worst)));

describe("numerical CFs on the inversion's equispaced grids vs mpmath (generate_grid.py)", () => {
  it.each([...groups.keys()])("%s", (key) => {
    const rows = groups.get(key)!;
    const { family, params, h, K } = rows[0];
    const model = compile({ family, ...params } as never);
    const bound = model.cfAbsError ?? 0;
    const t = Float64Array.from({ length: K }, (_, k) => (k + 0.5) * h);
    const re = new Float64Array(K);
    const im = new Float64Array(K);
    model.cf(t, re, im);
    const lre = new Float64Array(K);
    const lim = new Float64Array(K);
    model.logCf(t, lre, lim);
    const relOf = (k: number) => cfRelError(cfUlps(model), lre[k], lim[k], t[k], 0) + (model.logCfExtraError?.(t[k]) ?? 0);
    const one = new Float64Array(1);
    const r1 = new Float64Array(1);
    const i1 = new Float64Array(1);
    for (const r of rows) {
      if (t[r.k] !== r.t) throw new Error(`grid node ${r.k} is ${t[r.k]}, the fixture has ${r.t}`);
      const tol = { abs: bound, rel: relOf(r.k) };
      const er = Number(r.re);
      const ei = Number(r.im);
      const what = `${family} ${JSON.stringify(params)} at t = ${r.t} (grid h = ${h}, node ${r.k})`;
      // the whole grid in one call (the shared rule) and the same frequency alone (one rule per t)
      const dGrid = closeC(re[r.k], im[r.k], er, ei, tol, `${what}, grid`);
      one[0] = r.t;
      model.cf(one, r1, i1);
      const dOne = closeC(r1[0], i1[0], er, ei, tol, `${what}, alone`);
      const mag = Math.hypot(er, ei);
      const allowed = Math.max(bound, relOf(r.k) * mag);
      record(`${family} grid`, (dGrid * (mag > 0 ? mag : 1)) / allowed);
      record(`${family} alone`, (dOne * (mag > 0 ? mag : 1)) / allowed);
    }
  });
});
