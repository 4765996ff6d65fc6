/**
 * Reusable buffers for the damped route's temporaries (frequency nodes, per-node noise, the severity's transform
 * values, FFT grids before interpolation). A fresh Float64Array of a few hundred thousand doubles costs its zeroing,
 * page faults and the garbage collections its external memory triggers: on this 2-core machine 10 such arrays of
 * 180 000 doubles cost 20 to 60 ms CPU, as much as the transform itself. Each slot is one grow-only buffer, valid until
 * the next take of the same slot: callers take a slot only for their own synchronous use and never return it or keep
 * it in a result. Up to MAX_POOLED doubles a slot (4 MB) are kept; longer requests get a fresh array.
 */
const MAX_POOLED = 1 << 19;

export type ScratchSlot =
  | "nodes"
  | "noise"
  | "psiRe"
  | "psiIm"
  | "sevRe"
  | "sevIm"
  | "gridC"
  | "gridP"
  // a Poisson compound's severity transform (damped-cf.ts compoundDamped), and the equispaced quadrature sums with their
  // compensations (families/cf-quadrature.ts expSumArithmetic; the pareto's, weibull's and lognormal's sums): none of them calls another
  // user of its slot while it holds it
  | "cmpRe"
  | "cmpIm"
  | "expKr"
  | "expKi"
  | "expSr"
  | "expSi"
  // a transient solution's coefficients (DampedOptions.transient)
  | "solPRe"
  | "solPIm"
  | "solCRe"
  | "solCIm"
  | "solIRe"
  | "solIIm";

const slots = new Map<ScratchSlot, Float64Array>();

/** n doubles of the slot (contents undefined: the caller writes every entry before reading it) */
export function scratch(slot: ScratchSlot, n: number): Float64Array {
  if (n > MAX_POOLED) return new Float64Array(n);
  let b = slots.get(slot);
  if (!b || b.length < n) {
    b = new Float64Array(Math.min(MAX_POOLED, Math.max(n, 2 * (b?.length ?? 0))));
    slots.set(slot, b);
  }
  return b.subarray(0, n);
}
