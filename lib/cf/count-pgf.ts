/** a count's cumulant function log P_N(e^w) on arrays (Node.countCgf, SeverityKernel.count.cgf) */
export type CountCgf = (wr: Float64Array, wi: Float64Array, re: Float64Array, im: Float64Array) => void;

const EPS = Number.EPSILON;

/** log P_N(e^w) at one real w, through one-element buffers kept with the closure (called once per probe frequency) */
export function realCgf(cg: CountCgf): (w: number) => number {
  const wr = new Float64Array(1);
  const wi = new Float64Array(1);
  const or = new Float64Array(1);
  const oi = new Float64Array(1);
  return (w) => {
    wr[0] = w;
    cg(wr, wi, or, oi);
    return or[0];
  };
}

/**
 * Bounds on P_N(s) for real s in (0, 1), from the count's cumulant function at log s within its stated errors (relative
 * relError, absolute absError) and the exp and log within 64 u (1 + |log P_N|); at s >= 1 the value 1 (upper) and
 * 1 - absError (lower). `atZero`: what each returns at s <= 0, the caller's choice.
 */
export function pgfBounds(count: { cgf: CountCgf; relError: number; absError: number }, atZero: { upper: number; lower: number }) {
  const c = realCgf(count.cgf);
  return {
    upper(s: number): number {
      if (!(s > 0)) return atZero.upper;
      if (s >= 1) return 1;
      const v = c(Math.log(s));
      return Math.exp(v) * (1 + count.relError + 64 * EPS * (1 + Math.abs(v))) + count.absError;
    },
    lower(s: number): number {
      if (!(s > 0)) return atZero.lower;
      if (s >= 1) return 1 - count.absError;
      const v = c(Math.log(s));
      return Math.max(0, Math.exp(v) * (1 - count.relError - 64 * EPS * (1 + Math.abs(v))) - count.absError);
    },
  };
}
