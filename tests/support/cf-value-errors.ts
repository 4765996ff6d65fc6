// The parts of a CF value's error budget that the claim-law rounding tests compare (tests/cf/arg-rounding*.test.ts): the
// value's actual error against an outside reference phi, the engine's own allowance (units of rounding relative to
// 1 + |L| and the declared CF error) and the declared argument slope at t (per frequency where derived).
import { expect } from "vitest";
import { cfRelError, cfUlps, declaredCfError } from "@/lib/cf/invert/part";
import type { CompiledModel } from "@/lib/cf/types";

export function cfValueErrors(m: CompiledModel, re: number, im: number, t: number, phi: readonly number[]): { err: number; own: number; slope: number } {
  const own = Math.exp(re) * cfRelError(cfUlps(m), re, im, t, 0) + declaredCfError(m);
  const err = Math.hypot(Math.exp(re) * Math.cos(im) - phi[0], Math.exp(re) * Math.sin(im) - phi[1]);
  const S = m.cfArgSlope ?? 0;
  const slope = Math.min(S * t, m.cfArgErrAt ? m.cfArgErrAt(t) : Infinity);
  return { err, own, slope };
}

/**
 * Every row's actual error within the allowance plus the declared slope (plus the reference's own cross-check), each
 * failure naming t and the parts; returns the least bound / error over the rows where the error exceeds 4 times the
 * allowance alone (Infinity where none does), for the caller's looseness check.
 */
export function tightestWithinBound<R extends { t: number; crossCheck: number }>(rows: readonly R[], errorAt: (r: R) => { err: number; own: number; slope: number }): number {
  let tightest = Infinity;
  for (const r of rows) {
    const { err, own, slope } = errorAt(r);
    const bound = own + slope + r.crossCheck;
    expect(err, `t ${r.t}: error ${err}, bound ${bound} (allowance ${own}, slope ${slope})`).toBeLessThanOrEqual(bound);
    if (err > 4 * own) tightest = Math.min(tightest, bound / err);
  }
  return tightest;
}
