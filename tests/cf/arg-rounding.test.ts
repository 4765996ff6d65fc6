import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { cfRelError, cfUlps, declaredCfError } from "@/lib/cf/invert/part";
import type { Model } from "@/lib/cf/types";
import ref from "../fixtures/arg-rounding/arg-rounding.json";

// The frequency's rounding before a CF is called: a X evaluates phi_X at fl(a t), off by up to u |a t|. References:
// mpmath's closed forms at the exact a t and at the IEEE product fl(a t) (tests/fixtures/arg-rounding/generate.py, two
// methods, their difference in crossCheck). Model: a times compound Poisson(1) of gamma(1e8, 1), whose CF turns fast in
// s (E X = 1e8) while its log stays small: the rounding of a t shows far above the units of rounding allowed for log phi.
const model = (a: number) =>
  ({ scale: a, of: { compound: { count: { family: "poisson", lambda: ref.model.lambda }, each: { family: "gamma", shape: ref.model.shape, rate: ref.model.rate } } } }) as unknown as Model;

describe("argument rounding of scaled laws", () => {
  it("the fixture's two methods agree", () => {
    for (const r of ref.rows) expect(r.crossCheck, `a ${r.a} t ${r.t}`).toBeLessThan(1e-30);
  });

  it("the declared slope bounds the CF's change from fl(a t) to a t (mpmath), and is 0 where a t is exact", () => {
    for (const r of ref.rows) {
      const m = compile(model(r.a));
      const slope = m.cfArgSlope ?? 0;
      const bound = slope * r.t;
      // a power of two scales exactly: nothing to bound (and the reference shows nothing)
      if (r.a === 0.25) expect(slope, `a ${r.a}`).toBe(0);
      expect(r.argEffect, `a ${r.a} t ${r.t}: argument effect ${r.argEffect}, bound ${bound}`).toBeLessThanOrEqual(bound);
    }
  });

  it("the effect is above what the CF values' relative allowance carried before (so the term is needed)", () => {
    let above = 0;
    for (const r of ref.rows.filter((x) => x.a === 0.3)) {
      const m = compile(model(r.a));
      const t = Float64Array.of(r.t);
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      m.logCf(t, re, im);
      // the allowance of ./invert/part.ts for one value (centre 0) plus the declared absolute error
      const allowance = Math.exp(re[0]) * cfRelError(cfUlps(m), re[0], im[0], r.t, 0) + declaredCfError(m);
      if (r.argEffect > 4 * allowance) above++;
    }
    expect(above).toBeGreaterThan(0);
  });
});
