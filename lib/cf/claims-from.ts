// A claim law's damped bounds taken from 0 where the claims start at a > 0 (pareto claims in a compound from 0).
import type { DampedMajorant } from "./damped-majorant";

const EPS = Number.EPSILON;

/**
 * X = a + Y with Y >= 0 continuous (m bounds Y's damped transform psi_Y from its lower end): X's transform from 0 is
 * phi(s) = e^{-s a} psi_Y(s), s = beta - i t (common practice: the shift theorem), so with |e^{-s a}| = e^{-beta a} <= 1
 *  - |phi| <= e^{-beta a} rest_Y;
 *  - phi' = e^{-s a} (i a psi_Y + psi_Y') (product rule), |phi'| <= e^{-beta a} (a rest_Y + slope_Y);
 *  - past t0 |phi| <= e^{-beta a} R (t0 / t)^q; psi_Y = F + G (G the transform of h of total variation tv) gives
 *    e^{-s a} G, the transform of h(y - a) e^{-beta a} (the same steps, scaled: tv e^{-beta a}), and |e^{-s a} F| <=
 *    e^{-beta a} |F|.
 * The factor e^{-beta a} is raised by 4 eps for its rounding (exp within one ulp, the product u) and capped at 1. The
 * result bounds the claims' transform from 0 with no atom there (X > 0), as ./damped-majorant.ts's compound takes it.
 */
export function claimsFrom(m: DampedMajorant, a: number): DampedMajorant {
  const damp = (beta: number) => Math.min(1, Math.exp(-beta * a) * (1 + 4 * EPS));
  const up = (v: number) => v * (1 + 4 * EPS);
  return {
    cf: m.cf,
    atom: 0,
    rest: (beta, t) => up(damp(beta) * m.rest(beta, t)),
    slope: (beta, t) => up(damp(beta) * up(up(a * m.rest(beta, t)) + m.slope(beta, t))),
    decay: (beta, t0) => {
      const d = m.decay(beta, t0);
      const e = damp(beta);
      const R = up(e * d.R);
      return d.split ? { R, q: d.q, split: { R: up(e * d.split.R), q: d.split.q, tv: up(e * d.split.tv) } } : { R, q: d.q };
    },
  };
}
