/**
 * Direct evaluation of a single named law: pdf, cdf and sf from a closed form, a special function or a
 * one-dimensional integral representation, each value with an absolute error bound.
 *
 * A family declares it through the optional `direct` member of its spec (lib/cf/families/spec.ts):
 * `direct(params) => DirectLaw | null`, where params are the validated model fields (defaults filled in).
 * Return null for parameter values the direct route does not cover; the law is then inverted from its CF.
 * A scaled or shifted family keeps its direct route (see ./affine.ts); sums, mixes and compounds do not.
 *
 * Contract, checked by tests against generated references (tests/fixtures/direct, tests/fixtures/stable):
 *  - `at(x, out)` writes pdf, cdf and sf at x with absolute bounds pdfErr, cdfErr, sfErr that are never below
 *    the actual error; cdf and sf are each computed directly (sf is not 1 - cdf in the upper tail), both lie in
 *    [0, 1], and the cdf is non-decreasing in x within its bound.
 *  - `quantile(p)`, when present, returns x with F(x) = p from a closed form or a special-function inverse; its
 *    error bound is derived afterwards from the residual (see ./answer.ts), so it need not carry one. Without it,
 *    quantiles come from a bracketed root search on `at`.
 */
export interface DirectLaw {
  /** how the values are computed: "closed-form", "special-function" or "stable-integral" */
  readonly method: DirectMethod;
  /** [lo, hi] outside of which the density is zero */
  readonly support: readonly [number, number];
  /** a point inside the bulk and a positive spread, for brackets */
  readonly center: number;
  readonly spread: number;
  at(x: number, out: DirectPoint): void;
  quantile?(p: number): number;
  /**
   * optional: the stop-loss transform int_c^inf S(y) dy (side 1) or int_-inf^c F(y) dy (side -1) with an absolute bound,
   * where the law has one in closed form or by a converged series at c; null where it has not
   */
  stopLoss?(c: number, side: 1 | -1): { v: number; e: number } | null;
  /**
   * optional: a mode, where known in closed form: the density is non-decreasing below it and non-increasing above it
   * (so S is convex above it and F below it, as ./answer.ts's shortfall bound uses), within a few ulps of its rounding;
   * absent where not known
   */
  readonly mode?: number;
  /** optional, with `mode`: the mode is that double exactly (a parameter of the family), so f(mode) is f's largest value */
  readonly modeExact?: boolean;
  /**
   * optional: where the tail from y outward (side 1: S on [y, inf); side -1: F on (-inf, y], as functions of the distance
   * from y) is sum_j c_j g_j + R with each g_j completely monotone (Bernstein: a Laplace transform of a positive measure,
   * e.g. a power of the distance plus a constant): upper bounds at y on sum_j |c_j| g_j for the tail, for the density
   * (the same split differentiated) and for the stop-loss transform (the same split integrated outward), and `rest*`
   * bounds on sum_{m >= 0} |R| at the points y + side m step (zero where the split is exact); null where no such split is
   * known at y. Values at an arithmetic progression outward are then a signed Hausdorff moment sequence plus R, and
   * ../invert/images.ts bounds their accelerated alternating sums by the theorem for those. The stop-loss sizes only
   * when `stopLoss` is set (else Infinity), the tail and density sizes only when it is not (else Infinity).
   */
  monotoneSplit?(y: number, side: 1 | -1, step: number, stopLoss: boolean): MonotoneSplit | null;
  /**
   * optional: an upper bound on |f^(k)| (k = 1, 3 or 7) over [a, b], derived (a stable law's from its CF:
   * ./stable-smooth.ts); ./shortfall-sweep.ts then brackets each panel by a Gauss rule's remainder
   */
  pdfDeriv?(k: 1 | 3 | 7, a: number, b: number): number;
  /** optional: power-law majorants of the density and its first two derivatives in the tails (./power-tail.ts) */
  readonly powerTail?: import("./power-tail").PowerTail;
  /** optional: the law is unimodal (a mode exists, not known in closed form): ./answer.ts derives an interval holding it */
  readonly unimodal?: boolean;
  /**
   * optional: a derived interval holding the mode, where the law's parameters carry rounding (a folded stable sum:
   * ../stable-fold.ts); taken before `unimodal`'s search, whose density bounds may not part the values near the peak
   */
  readonly modeRange?: readonly [number, number];
  /**
   * optional: the law's atoms (a per-claim layer: ./layer.ts), each mass with a bound on its error; `at` counts them in
   * the cdf and sf and leaves them out of the density (the density of the rest)
   */
  readonly atoms?: readonly DirectAtom[];
  /**
   * optional: points where the density is infinite inside the support (a variance-gamma law with nu >= 2 at its
   * location); next to one the density is ill-conditioned in x, and a caller that rounds x (./affine.ts) bounds the
   * density's change over that rounding from the values either side
   */
  readonly singular?: readonly number[];
  /**
   * optional, with `singular`: the density at singular[0] + d for an offset d given exactly (pdf and pdfErr into out),
   * so that a caller which knows the offset better than a rounded point (./affine.ts: (y - b)/a - s by error-free
   * transformations) need not round it through x
   */
  singularPdf?(d: number, out: DirectPoint): void;
  /**
   * optional: expected shortfall is not answered from this law (a sum over lattice points without a stop-loss bound for
   * its dropped tail, ./lattice-sum.ts, whose tail sweep would cost every lattice point per step): a request with ES
   * takes the model's inversion instead
   */
  readonly shortfallByInversion?: boolean;
  /** short notes on the method (source of the formula, accuracy) */
  readonly notes: string[];
}

/** see DirectLaw.monotoneSplit */
export interface MonotoneSplit {
  tail: number;
  pdf: number;
  stopLoss: number;
  restTail: number;
  restPdf: number;
  restStopLoss: number;
}

export type DirectMethod = "closed-form" | "special-function" | "stable-integral";

/** An atom of a directly evaluated law: F(x-) = below within belowErr, the mass p within pErr, x within xErr of its place. */
export interface DirectAtom {
  x: number;
  p: number;
  pErr: number;
  below: number;
  belowErr: number;
  xErr: number;
}

export interface DirectPoint {
  pdf: number;
  cdf: number;
  sf: number;
  pdfErr: number;
  cdfErr: number;
  sfErr: number;
}

export function directPoint(): DirectPoint {
  return { pdf: 0, cdf: 0, sf: 0, pdfErr: 0, cdfErr: 0, sfErr: 0 };
}
