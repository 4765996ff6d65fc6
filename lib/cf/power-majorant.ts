import { majorant, type LogMajorant, type Slope } from "./majorant";

/**
 * Derived non-increasing majorants of |phi| (and of the recentred CF's derivative) for continuous families whose |phi| is
 * not monotone, by integration by parts of the Fourier-Stieltjes integral (common practice; e.g. Katznelson, An
 * Introduction to Harmonic Analysis, ch. I, the Fourier coefficients of a function of bounded variation): for g of
 * bounded variation on R vanishing at +-inf, |int g e^{itx} dx| <= TV(g) / |t|; applied to f and to f' (where f
 * vanishes at the support's ends and f' has bounded variation) it gives |phi(t)| <= TV(f) / t and <= TV(f') / t^2, and
 * where f jumps by J at an end, |phi(t)| <= J / t + TV(f' 1_support) / t^2. A unimodal g vanishing at both ends has
 * TV(g) = 2 sup g; the suprema below are at closed-form critical points (the roots of g' = 0). The same bounds applied to
 * x f(x) bound |phi'(t)| = |int x f e^{itx}| (the slope about 0), besides |phi'| <= E|X|.
 *
 * Each bound is a polynomial in 1/t with non-negative coefficients (coefs[k] multiplies t^{-k}); M = the least of them.
 * Past t, the least one there, B, bounds M and B(s) <= B(t) (t / s)^k0 (k0 its lowest power), which is the tail power.
 */
export type PowerBounds = number[][];

const EPS = Number.EPSILON;

/** the bounds' non-zero terms as (power, log coefficient), for evaluation in logs (no overflow of t^-k) */
type Sparse = { k: number; lc: number }[][];
const SPARSE = new WeakMap<PowerBounds, Sparse>();
function sparse(bs: PowerBounds): Sparse {
  let s = SPARSE.get(bs);
  if (!s) {
    s = bs.map((c) => c.flatMap((v, k) => (v > 0 ? [{ k, lc: Math.log(v) }] : [])));
    SPARSE.set(bs, s);
  }
  return s;
}

/** min over the bounds, and the index of the least one (rounding: exp and log of each term, a relative 64 eps). */
export function least(bs: PowerBounds, t: number): { v: number; j: number } {
  const sp = sparse(bs);
  const lt = Math.log(t);
  let v = Infinity;
  let j = 0;
  for (let i = 0; i < sp.length; i++) {
    let x = 0;
    for (const { k, lc } of sp[i]) x += Math.exp(lc - k * lt);
    if (x < v) {
      v = x;
      j = i;
    }
  }
  return { v: v * (1 + 64 * EPS), j };
}

function lowest(c: number[]): number {
  for (let k = 0; k < c.length; k++) if (c[k] > 0) return k;
  return 0;
}

/** |phi| <= min over bounds; slope bounds (about `center`) where given. */
export function powerMajorant(bs: PowerBounds, slope?: { center: number; bounds: PowerBounds }): LogMajorant {
  const sl: Slope | undefined = slope && {
    center: slope.center,
    at: (t, out) => {
      for (let i = 0; i < t.length; i++) out[i] = least(slope.bounds, Math.abs(t[i])).v;
    },
  };
  return majorant(
    (t, out) => {
      for (let i = 0; i < t.length; i++) out[i] = Math.log(least(bs, Math.abs(t[i])).v);
    },
    (t) => {
      const { v, j } = least(bs, t);
      return { log: Math.log(v), q: lowest(bs[j]) };
    },
    sl,
  );
}

