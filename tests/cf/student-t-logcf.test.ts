// The Student t's log-CF (real part: the law is centred) on the inversion's equispaced grids (one trapezoidal rule for the
// whole batch) and one frequency at a time, against mpmath at 40 digits (tests/fixtures/student-t-logcf/generate.py: the
// Bessel form by mpmath.besselk and the normal variance mixture by mpmath.quad, their difference stored beside each
// value). Tolerance: the derived bound on the log-CF's absolute error the model declares (logCfExtraError).
import { afterAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf";

interface Row {
  params: { nu: number; scale: number };
  h: number | null;
  K: number | null;
  k: number | null;
  t: number;
  logphi: string;
  diff: number;
}
const fixture = JSON.parse(readFileSync(new URL("../fixtures/student-t-logcf/student-t-logcf.json", import.meta.url), "utf8")) as { values: Row[] };

const worst: Record<string, number> = {};
afterAll(() => console.log("worst |log phi - reference| / declared bound:", JSON.stringify(worst)));

describe("Student t log-CF vs mpmath, within its derived bound", () => {
  const laws = [...new Set(fixture.values.map((r) => JSON.stringify(r.params)))];
  it.each(laws)("%s", (law) => {
    const rows = fixture.values.filter((r) => JSON.stringify(r.params) === law);
    const p = JSON.parse(law) as { nu: number; scale: number };
    const model = compile({ family: "student_t", nu: p.nu, loc: 0, scale: p.scale });
    const bound = model.logCfExtraError;
    expect(bound).toBeTypeOf("function");
    const check = (got: number, r: Row, how: string) => {
      const err = Math.abs(got - Number(r.logphi));
      const b = bound!(r.t);
      // the reference's own uncertainty (its two methods' difference) is far below the engine's bound
      expect(r.diff).toBeLessThan(1e-3 * b);
      if (!(err <= b)) throw new Error(`nu ${p.nu} scale ${p.scale} t ${r.t} (${how}): |error| ${err} > bound ${b}`);
      worst[`nu ${p.nu} ${how}`] = Math.max(worst[`nu ${p.nu} ${how}`] ?? 0, err / b);
    };
    const re1 = new Float64Array(1);
    const im1 = new Float64Array(1);
    for (const r of rows) {
      if (r.h !== null && r.K !== null && r.k !== null) {
        const t = Float64Array.from({ length: r.K }, (_, k) => (k + 0.5) * r.h!);
        if (t[r.k] !== r.t) throw new Error(`grid node ${r.k} is ${t[r.k]}, the fixture has ${r.t}`);
        const re = new Float64Array(r.K);
        const im = new Float64Array(r.K);
        model.logCf(t, re, im);
        check(re[r.k], r, "grid");
      }
      model.logCf(Float64Array.of(r.t), re1, im1);
      check(re1[0], r, "alone");
    }
  });
});
