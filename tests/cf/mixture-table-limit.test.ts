// A mixture of lattice laws on very different steps (a compound on step 0.5 from origin 0.623 beside a compound
// on whole numbers: a common step of 0.001) has no table of useful length: latticeTable answers null (its contract in
// lib/cf/types.ts) instead of allocating billions of entries (it threw "RangeError: Invalid typed array length:
// 4956084376", found by tests/cf/properties-1.test.ts, seed 20261204, path 169). The inverse gamma compound is a lattice
// law only when its severity is discretised, which is opt-in (inverse gamma compounds are continuous by default).
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";

describe("mixture lattice tables stay within their length", () => {
  it("two lattice laws whose common step is a thousandth of theirs", () => {
    const model = {"mix": [{"weight": 0.44654088050314467, "of": {"compound": {"count": {"sample": [12, 2, 4, 0, 4, 8, 7, 9, 5, 3, 1, 0], "weights": [3, 2, 17, 16, 10, 14, 2, 17, 13, 7, 8, 19]}, "each": {"family": "inverse_gamma", "alpha": 2.636, "theta": 0.605}}}}, {"weight": 0.5534591194968553, "of": {"compound": {"count": {"family": "zero_truncated_negative_binomial", "r": 3.668, "p": 0.25}, "each": {"lattice": {"origin": 0.623, "step": 0.5, "p": [0.0743801652892562, 0.01652892561983471, 0.07851239669421488, 0.10950413223140495, 0.05785123966942149, 0.14049586776859505, 0.1384297520661157, 0.19834710743801653, 0.05578512396694215, 0.13016528925619836]}}}}}]} as Model;
    const c = compile(model, { discretise: {} });
    expect(c.kind.type).toBe("lattice");
    const max = 1 << 20;
    const t = c.latticeTable!(max);
    if (t) expect(t.p.length, JSON.stringify(model)).toBeLessThanOrEqual(max);
  });
});
