import { incGammaBounded, incGammaShape, type IncGamma } from "./incgamma-bounded";

const U = Number.EPSILON / 2;
const HALF = incGammaShape(0.5);
const SQ2PI = Math.sqrt(2 * Math.PI);

/** a value with a bound on its absolute error */
export interface Bounded {
  v: number;
  e: number;
}

/**
 * Standard normal cdf Phi(z) with a derived bound on its absolute error: Phi(z) = Q(1/2, z^2/2)/2 for z <= 0 and
 * 1 - Q(1/2, z^2/2)/2 above (A&S 7.1.2, 6.5.17), Q with the bound of ./incgamma-bounded.ts. The argument z^2/2 is
 * within u of itself relative (one product; the halving is exact), which moves Q by at most
 * |dQ/dx| x u = sqrt(x) e^{-x} u / sqrt(pi), i.e. Phi by |z| phi(z) u / 2; the subtraction from 1 adds u. The bound
 * itself is formed with Math.exp within one ulp (the project's standing assumption) and a 1% margin. `out` is reused
 * when given (no allocation on the hot path).
 */
export function normalCdfBounded(z: number, out: Bounded = { v: NaN, e: NaN }, scratch?: IncGamma): Bounded {
  if (Number.isNaN(z)) {
    out.v = NaN;
    out.e = NaN;
    return out;
  }
  if (!Number.isFinite(z)) {
    out.v = z > 0 ? 1 : 0;
    out.e = 0;
    return out;
  }
  const x = 0.5 * z * z;
  const r = incGammaBounded(HALF, x, scratch);
  const h = 0.5 * r.q;
  // (where z^2/2 falls below the normal range its relative rounding is not u: Phi is then within |z| phi(0) of 1/2)
  const arg = x < 2 ** -1000 ? Math.abs(z) / SQ2PI : (Math.abs(z) * Math.exp(-x) * U) / SQ2PI;
  if (z <= 0) {
    out.v = h;
    out.e = 0.5 * r.qErr + 1.01 * arg;
  } else {
    out.v = 1 - h;
    out.e = 0.5 * r.qErr + 1.01 * arg + U * out.v;
  }
  return out;
}
