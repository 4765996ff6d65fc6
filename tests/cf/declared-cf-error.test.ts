import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { declaredCfError } from "@/lib/cf/invert/part";
import type { CompiledModel, Model } from "@/lib/cf/types";

// A model's declared CF error feeds every inversion bound. One that declares no finite bound must not be read as exact
// (it was: a non-finite sum became 0). Common practice: an unbounded error is no bound.
describe("declared CF error", () => {
  it("a finite declaration is kept, a non-finite one stays infinite", () => {
    const m = compile({ family: "lognormal", mu: 0, sigma: 1 } as Model);
    const e = declaredCfError(m);
    expect(e).toBeGreaterThan(0);
    expect(e).toBeLessThan(1e-10);
    expect(declaredCfError({ ...m, cfAbsError: Infinity } as CompiledModel)).toBe(Infinity);
    expect(declaredCfError({ ...m, cfAbsError: NaN } as CompiledModel)).toBe(Infinity);
    expect(declaredCfError({ ...m, cfAbsError: 0, cfRelError: 0 } as CompiledModel)).toBe(0);
  });
});
