import type { Atom } from "./types";
import type { Node } from "./node";
import { majorant, type LogMajorant } from "./majorant";
import { pgfAt } from "./compound";
import type { ContinuousMajorant } from "./layer-majorant";

const EPS = Number.EPSILON;

/**
 * Compound S = X_1 + ... + X_N with a continuous severity whose |phi_X| <= M(t) (derived): phi_S - P(N = 0) =
 * sum_{k >= 1} p_k phi_X^k, so |phi_S - p_0| <= P(M) - p_0 (P the count's pgf, increasing on [0, 1]), and by P's
 * convexity P(M) - p_0 <= M P'(M) <= M min(E N, (1 - P(M)) / (1 - M)) (the secant from M to 1 is at least P'(M); common
 * practice). This form has no cancellation when M is small; past t, M(s) <= v (t / s)^q and P'(M(s)) <= P'(M(t)) give the
 * tail v P'(M(t)) (t / s)^q. The atom at 0 (mass p_0) is the one the compound lists; with p_0 = 0 the bound is the
 * law's own majorant. pgfAt carries a relative error of a few units of rounding per operation of the count's cgf:
 * 1e-12 absolute is allowed on 1 - P(M), and the secant is only used where 1 - M >= 1e-3.
 */
export function compoundMajorant(N: Node, mx: LogMajorant, atoms: Atom[]): ContinuousMajorant | undefined {
  const mean = N.cumulants(1)[0];
  if (!N.countCgf || mean === null || mean === undefined || !Number.isFinite(mean)) return undefined;
  const en = mean * (1 + 1e-12);
  const slopeAt = (M: number) => (1 - M >= 1e-3 ? Math.min(en, (1 - pgfAt(N, M) + 1e-12) / (1 - M)) : en) * (1 + 16 * EPS);
  const one = new Float64Array(1);
  const at = (t: number) => {
    mx(Float64Array.of(t), one);
    return Math.exp(one[0]);
  };
  const maj = majorant(
    (t, out) => {
      mx(t, out);
      for (let i = 0; i < t.length; i++) {
        const M = Math.exp(out[i]);
        out[i] = Math.log(Math.min(1, M * slopeAt(M)));
      }
    },
    mx.tail
      ? (t) => {
          const r = mx.tail!(t);
          return { log: r.log + Math.log(slopeAt(at(t))), q: r.q };
        }
      : undefined,
  );
  return { atoms, maj };
}
