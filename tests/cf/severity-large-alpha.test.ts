// Burr XII and inverse gamma CFs with a large shape alpha (30 to 200) against mpmath at 30 digits
// (tests/fixtures/severity-cf/generate-large-alpha.py: Burr by two contour paths, inverse gamma by its Bessel closed form
// and a real-line quadrature, the two methods' difference stored beside each value). The contour rules once summed terms
// up to 2^(alpha/2) times |phi| for the inverse gamma (its CF was off by 1e-2 at alpha = 80); each value must lie within
// the absolute error the model declares (cfAbsError), on the inversion's equispaced grid (all t in one call) and one t
// at a time, and within 1e-12 of the reference.
import { afterAll, describe, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf";
import { closeC, record, worst } from "./model-assert";

interface Row {
  family: string;
  params: Record<string, number>;
  t: number;
  re: string;
  im: string;
  abs_diff: number;
}
const fixture = JSON.parse(readFileSync(new URL("../fixtures/severity-cf/large-alpha.json", import.meta.url), "utf8")) as { cases: Row[] };
const groups = new Map<string, Row[]>();
for (const r of fixture.cases) {
  const key = JSON.stringify([r.family, r.params]);
  groups.set(key, [...(groups.get(key) ?? []), r]);
}

afterAll(() => console.log("worst |phi - reference| / declared bound:", JSON.stringify(worst)));

describe("severity CFs with a large shape vs mpmath (generate-large-alpha.py)", () => {
  it.each([...groups.keys()])("%s", (key) => {
    const rows = groups.get(key)!;
    const { family, params } = rows[0];
    const model = compile({ family, ...params } as never);
    const bound = (model.cfAbsError ?? 0) + (model.cfRelError ?? 0);
    // each row one t at a time, and as node m of an equispaced grid (k + 1/2) h (the inversion's nodes, summed by recurrence)
    const one = new Float64Array(1);
    const r1 = new Float64Array(1);
    const i1 = new Float64Array(1);
    for (const r of rows) {
      const want = [Number(r.re), Number(r.im)] as const;
      const what = `${family} ${JSON.stringify(params)} at t = ${r.t}`;
      one[0] = r.t;
      model.cf(one, r1, i1);
      const tol = { abs: Math.max(bound, 1e-300) + r.abs_diff };
      const d1 = closeC(r1[0], i1[0], want[0], want[1], tol, `${what}, alone (declared ${bound})`);
      closeC(r1[0], i1[0], want[0], want[1], { abs: 1e-12 }, `${what}, alone, accuracy`);
      // the grid t_k = (k + 1/2) h with h = 2 t / (2 m + 1) puts node m on t
      const m = 40;
      const h = (2 * r.t) / (2 * m + 1);
      const t = Float64Array.from({ length: 2 * m }, (_, k) => (k + 0.5) * h);
      const re = new Float64Array(t.length);
      const im = new Float64Array(t.length);
      model.cf(t, re, im);
      const dg = closeC(re[m], im[m], want[0], want[1], tol, `${what}, grid h = ${h} (declared ${bound})`);
      closeC(re[m], im[m], want[0], want[1], { abs: 1e-12 }, `${what}, grid, accuracy`);
      const mag = Math.hypot(want[0], want[1]);
      record(`${family} alone`, (d1 * (mag > 0 ? mag : 1)) / bound);
      record(`${family} grid`, (dg * (mag > 0 ? mag : 1)) / bound);
    }
  });
});
