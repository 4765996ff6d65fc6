// The parts of a CF value's error budget that the claim-law rounding tests compare (tests/cf/arg-rounding*.test.ts): the
// value's actual error against an outside reference phi, the engine's own allowance (units of rounding relative to
// 1 + |L| and the declared CF error) and the declared argument slope at t (per frequency where derived).
import { cfRelError, cfUlps, declaredCfError } from "@/lib/cf/invert/part";
import type { CompiledModel } from "@/lib/cf/types";

export function cfValueErrors(m: CompiledModel, re: number, im: number, t: number, phi: readonly number[]): { err: number; own: number; slope: number } {
  const own = Math.exp(re) * cfRelError(cfUlps(m), re, im, t, 0) + declaredCfError(m);
  const err = Math.hypot(Math.exp(re) * Math.cos(im) - phi[0], Math.exp(re) * Math.sin(im) - phi[1]);
  const S = m.cfArgSlope ?? 0;
  const slope = Math.min(S * t, m.cfArgErrAt ? m.cfArgErrAt(t) : Infinity);
  return { err, own, slope };
}
