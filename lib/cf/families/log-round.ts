// Node.logRoundSlope / logRoundAt of claim laws (a compound carries E N times them, ../compound-errors.ts
// severityRounding): a bound on |phi(t)| times the rounding of the computed log phi(t), taken as 8 ulps relative to |L|
// (the tree's allowance per node, ../invert/part.ts cfUlps), so 8 u times a bound on |phi(t)| |L(t)|.
import type { Node } from "../node";

const U8 = 8 * Number.EPSILON;
type LogRound = Pick<Node, "logRoundSlope" | "logRoundAt">;

/**
 * A law whose log is i loc t + v(t), v real, <= 0 (normal, Cauchy, Laplace, logistic, stable of index 2 and Cauchy's):
 * |phi| = e^v <= 1, so |phi| |L| <= |loc| |t| + |v| e^v <= (|loc| + k) |t|, k the family's bound on |v| e^v per unit |t|
 * (derived beside each call); R = 8 u (|loc| + k). Per frequency, falling with t where |phi| does: e^v (|loc| |t| + |v|),
 * v as the family computes it (a few ulps relative, so e^v within 64 u (1 + |v|) relative). No damped transform (support
 * from -inf).
 */
export function shiftLogRound(loc: number, k: number, v: (t: number) => number): LogRound {
  const slope = U8 * (Math.abs(loc) + k) * (1 + U8);
  return {
    logRoundSlope: slope,
    logRoundAt: (t) => {
      const a = Math.abs(t);
      const w = Math.abs(v(a));
      return Math.min(slope * a, U8 * Math.exp(-w) * (Math.abs(loc) * a + w) * (1 + 64 * Number.EPSILON * (1 + w)));
    },
  };
}

/**
 * A law with |phi(t)| |L(t)| <= c |t| (derived beside each call: where L is the continuous branch, L(0) = 0 and |L'| <= c, as
 * |phi| <= 1), R = 8 u c. Per frequency, from the family's own log at |t| (`logAt`, a closed form within a few ulps relative
 * to |L|): 8 u e^{Re L} |L|, e^{Re L} within 64 u (1 + |L|) relative.
 */
export function linearLogRound(c: number, logAt?: (t: Float64Array, re: Float64Array, im: Float64Array) => void): LogRound {
  const slope = U8 * c * (1 + U8);
  if (!logAt) return { logRoundSlope: slope, logRoundAt: (t) => slope * Math.abs(t) };
  const T = new Float64Array(1);
  const R = new Float64Array(1);
  const I = new Float64Array(1);
  return {
    logRoundSlope: slope,
    logRoundAt: (t) => {
      T[0] = Math.abs(t);
      logAt(T, R, I);
      const l = Math.abs(R[0]) + Math.abs(I[0]);
      const v = Math.exp(R[0]) * l * (1 + 64 * Number.EPSILON * (1 + l));
      return Number.isFinite(v) ? Math.min(slope * Math.abs(t), U8 * v) : slope * Math.abs(t);
    },
  };
}

/**
 * A positive law that is a generalized gamma convolution (Bondesson 1992, Generalized Gamma Convolutions and Related
 * Classes of Distributions and Densities, Springer, ch. 3-5: the lognormal, Pareto and Lomax, Weibull of shape <= 1,
 * Burr and log-logistic of power <= 1, inverse gamma are hyperbolically completely monotone, hence GGC), with mean m:
 * log phi(t) = i a t - int log(1 - i t / x) U(dx) (a >= 0, U >= 0), so its continuous argument a t + int atan(t / x) U(dx)
 * lies in [0, m t] (m = a + int U(dx) / x), and the damped one, a t + int atan(t / (x + beta)) U(dx), in [0, m t] too.
 * Any law: |phi| |log |phi|| <= 1 - |phi| <= |1 - phi| <= m hypot(t, beta) (x |log x| <= 1 - x on [0, 1]; |e^{iy} - 1| <= |y|),
 * and a principal argument (one frequency alone, the damped quadratures) is at most pi min(1, |1 - phi|) (|1 - w| = r < 1
 * gives |arg w| <= asin r <= pi r / 2). The quadrature families' logs are log|phi| plus atan2 plus multiples of fl(2 pi)
 * (../complex.ts unwrapFrom: 0.36 u relative plus the subtraction's rounding, inside the 8 ulps of |L|), continuous when
 * the grid resolves the argument (steps below pi), else principal: |phi| |L| <= (1 + pi) m (|t| + beta) in either case,
 * R = 8 u (1 + pi) m, for the damped transform too (with |t| + beta). Per frequency: |phi(t)| <= M(t) (the family's majorant
 * where it has one, read at the call), so |phi| |L| <= min(1/e, m t, M |log M| where M <= 1/e) + M(t) max(pi, m t); damped,
 * the same with |phi~(beta, t)| <= atom + rest(beta, t) from the family's damped majorant (../damped-majorant.ts, lo >= 0:
 * e^{-beta lo} <= 1) and m hypot(t, beta), m (t + beta). `modulus(beta, t)`: the family's own bound on |phi~| (beta = 0: |phi|)
 * where it derives one, taken where less. Where the unwrap misses a step (a grid coarser than about pi / m)
 * the bound assumes the computed argument stays on the continuous or the principal branch: `logRoundNote` says so, and the
 * compound lists it.
 */
export function ggcLogRound(mean: number, node?: () => Node, modulus?: (beta: number, t: number) => number): LogRound & Pick<Node, "logRoundNote" | "logRoundDampedAt"> {
  if (!(mean >= 0 && Number.isFinite(mean))) return {};
  const slope = U8 * (1 + Math.PI) * mean * (1 + U8);
  const T = new Float64Array(1);
  const M = new Float64Array(1);
  // 8 u (|phi| |log|phi|| + |phi| |arg|) with |phi| <= m, |1 - phi| <= r, the continuous argument at most a
  const part = (m: number, r: number, a: number) => {
    const re = Math.min(1 / Math.E, r, m <= 1 / Math.E ? (m > 0 ? -m * Math.log(m) * (1 + 4 * Number.EPSILON) : 0) : Infinity);
    return U8 * (re + m * Math.max(Math.PI, a)) * (1 + 8 * Number.EPSILON);
  };
  return {
    logRoundSlope: slope,
    logRoundAt: (t, self) => {
      const a = Math.abs(t);
      const maj = (self ?? node?.())?.logMajorant;
      let m = modulus ? modulus(0, a) : 1;
      if (maj) {
        T[0] = a * (1 - Number.EPSILON);
        maj(T, M);
        m = Math.min(m, Math.exp(M[0]) * (1 + 4 * Number.EPSILON));
      }
      return m < 1 ? Math.min(slope * a, part(m, mean * a, mean * a)) : slope * a;
    },
    logRoundDampedAt: (beta, t, self) => {
      const a = Math.abs(t);
      const n = self ?? node?.();
      const dm = n?.dampedMajorant;
      let m = modulus ? modulus(beta, a) : 1;
      if (n && dm && dm.cf === n.dampedLogCf && n.support[0] >= 0) m = Math.min(m, (dm.atom + dm.rest(beta, a)) * (1 + 4 * Number.EPSILON));
      if (!(m < 1)) return slope * (a + beta);
      return Math.min(slope * (a + beta), part(m, mean * Math.hypot(a, beta) * (1 + 2 * Number.EPSILON), mean * (a + beta)));
    },
    logRoundNote:
      "the quadrature claim law's log rounding is bounded with its phase on the continuous or the principal branch (the unwrap along a grid finer than about pi / E X)",
  };
}

/** `node` with ggcLogRound of its mean, its majorant read from the node at each call (compile sets it after the family) */
export function withGgcLogRound<N extends Node>(node: N, mean: number, modulus?: (beta: number, t: number) => number): N {
  return Object.assign(node, ggcLogRound(mean, () => node, modulus));
}

type Carried = Pick<Node, "logRoundSlope" | "logRoundAt" | "logRoundDampedAt" | "logRoundNote">;
const noteOf = (cs: readonly Node[]) => cs.map((c) => c.logRoundNote).find((n) => n !== undefined);

/**
 * X + b (b >= 0): the child's rounding (R t), fl(b t) (u |b t|) and the sum (u |L + i b t| <= u (|L| + |b| t), |phi| |L| <= R t /
 * (8 u)), so R' = R (1 + 1/8) + 2 u b; damped, L~ + b (i t - beta) with |phi~'| = e^{-beta b} |phi~| <= |phi~|, the same with
 * t + beta. b < 0 raises the damped transform by e^{beta |b|}: not derived.
 */
export function shiftedLogRound(c: Node, b: number): Carried {
  const R = c.logRoundSlope;
  if (b === 0) return { logRoundSlope: R, logRoundAt: c.logRoundAt, logRoundDampedAt: c.logRoundDampedAt, logRoundNote: c.logRoundNote };
  if (R === undefined || !(b > 0)) return { logRoundSlope: undefined, logRoundAt: undefined, logRoundDampedAt: undefined, logRoundNote: undefined };
  const k = (1 + 4 * Number.EPSILON);
  const own = 2 * Number.EPSILON * b;
  const at = c.logRoundAt;
  const dAt = c.logRoundDampedAt;
  return {
    logRoundSlope: (1.125 * R + own) * k,
    logRoundAt: at ? (t) => (1.125 * at(t, c) + own * Math.abs(t)) * k : undefined,
    logRoundDampedAt: dAt ? (beta, t) => (1.125 * dAt(beta, t, c) + own * (Math.abs(t) + beta)) * k : undefined,
    logRoundNote: c.logRoundNote,
  };
}

/** aX (a > 0): L_X(t) = L_Y(fl(a t)) (the argument's rounding is the scale node's argSlope), so R' = a R, at fl(a t); damped at
 *  (a beta, a t). a < 0 turns the damped transform (of a law bounded above): not derived. */
export function scaledLogRound(c: Node, a: number): Carried {
  const R = c.logRoundSlope;
  if (R === undefined || !(a > 0)) return {};
  const at = c.logRoundAt;
  const dAt = c.logRoundDampedAt;
  return {
    logRoundSlope: a * R * (1 + Number.EPSILON),
    logRoundAt: at ? (t) => at(a * t, c) * (1 + Number.EPSILON) : undefined,
    logRoundDampedAt: dAt ? (beta, t) => dAt(a * beta, a * t, c) * (1 + Number.EPSILON) : undefined,
    logRoundNote: c.logRoundNote,
  };
}

/**
 * Sums (weights 1; n-fold sums: one child, weight n): L = sum w_j L_j, |phi| <= |phi_j| for each factor, the children's
 * roundings add, and the sum of k terms rounds within (k - 1) u sum w_j |L_j| (Higham, Accuracy and Stability of Numerical
 * Algorithms, 2nd ed., sec. 4.2; n L_Y one product, u n |L_Y|): R' = sum w_j R_j (1 + max(k - 1, 1) / 8). Not derived
 * unless every child declares it.
 */
export function summedLogRound(cs: readonly Node[], ws?: readonly number[]): Carried {
  if (!cs.every((c) => c.logRoundSlope !== undefined)) return {};
  const w = cs.map((_, j) => (ws ? ws[j] : 1));
  const f = (1 + Math.max(cs.length - 1, 1) / 8) * (1 + (cs.length + 4) * Number.EPSILON);
  let R = 0;
  cs.forEach((c, j) => (R += w[j] * (c.logRoundSlope as number)));
  const ats = cs.map((c) => c.logRoundAt ?? ((t: number) => (c.logRoundSlope as number) * Math.abs(t)));
  const dAts = cs.every((c) => c.logRoundDampedAt) ? cs.map((c) => c.logRoundDampedAt!) : null;
  return {
    logRoundSlope: R * f,
    logRoundAt: (t) => {
      let s = 0;
      for (let j = 0; j < ats.length; j++) s += w[j] * ats[j](t, cs[j]);
      return s * f;
    },
    logRoundDampedAt: dAts
      ? (beta, t) => {
          let s = 0;
          for (let j = 0; j < dAts.length; j++) s += w[j] * dAts[j](beta, t, cs[j]);
          return s * f;
        }
      : undefined,
    logRoundNote: noteOf(cs),
  };
}

/**
 * |E e^{(i t - beta) X}| for a law on [lo, inf) with a non-increasing density f: by parts, int e^{w x} f = -e^{w lo} f(lo) / w -
 * int e^{w x} f' / w (w = i t - beta), so it is at most 2 f(lo) e^{-beta lo} / |w| (int |f'| = f(lo)); at most 1 besides.
 */
export function decreasingDensityModulus(lo: number, f0: number): (beta: number, t: number) => number {
  return (beta, t) => Math.min(1, ((2 * f0 * Math.exp(-beta * lo)) / Math.hypot(beta, t)) * (1 + 8 * Number.EPSILON));
}
