import type { Node } from "./node";
import { cumulantEst } from "./cumulant-bounds";

/**
 * The frequency's rounding before a CF is called. A node that scales its argument (aX: phi_X(a t)) evaluates its child
 * at fl(a t) = a t (1 + d), |d| <= u = 2^-53 (one rounding, Higham, Accuracy and Stability of Numerical Algorithms, 2nd
 * ed., sec. 2.2), and the inversions evaluate the model at fl((k + 1/2) h) in place of (k + 1/2) h. A CF is Lipschitz
 * with constant E|X|: |phi(s) - phi(r)| = |E[e^{irX} (e^{i(s - r)X} - 1)]| <= |s - r| E|X| (|e^{iy} - 1| <= |y|); for
 * the damped transform E[e^{(is - b)(X - lo)}] of a law bounded below the same holds in w = is - b with E|X - lo| (the
 * derivative E[(X - lo) e^{w (X - lo)}] has |.| <= E[X - lo] for Re w <= 0). A slope of NaN says it is not derived (a
 * law without a first absolute moment bound under a scale): the inversions then leave the term out and say so.
 */

const U = Number.EPSILON / 2;

/**
 * A bound on E|X - lo| + 2 |lo| >= E|X| for a node bounded below (E|X - lo| = kappa_1 - lo, kappa_1 with its derived
 * error), else sqrt(kappa_2 + kappa_1^2) >= E|X| (Lyapunov), else the node's own bound on E|X| (Node.absMomentAbout: two-
 * sided laws without a variance, ./abs-moment.ts); undefined when none is known. The lower-end form also
 * bounds the damped transform's slope: the child's transform at w~ in place of a w changes by |w~ - a w| (E|X - lo| + |lo|)
 * once its factor e^{w lo} is counted (X's transform is e^{w lo} E[e^{w (X - lo)}], the caller's damping taken at lo).
 */
export function absFirstMoment(node: Node): number | undefined {
  const k = node.momentIndex > 1 ? cumulantEst(node, node.momentIndex > 2 ? 2 : 1) : [];
  const k1 = k[0];
  if (!k1 || !Number.isFinite(k1.e)) return ownAbsMoment(node);
  const lo = node.support[0];
  const hi = node.support[1];
  const slack = 1 + 8 * Number.EPSILON;
  if (Number.isFinite(lo)) return (Math.max(k1.v + k1.e - lo, 0) + 2 * Math.abs(lo)) * slack;
  if (Number.isFinite(hi)) return (Math.max(hi - k1.v + k1.e, 0) + 2 * Math.abs(hi)) * slack;
  const k2 = k[1];
  if (!k2 || !Number.isFinite(k2.e)) return ownAbsMoment(node);
  const m1 = Math.abs(k1.v) + k1.e;
  return Math.sqrt((k2.v + k2.e + m1 * m1) * slack) * slack;
}

/** E|X| from the node's own bound, for a law unbounded on both sides (no damped transform reads it) */
function ownAbsMoment(node: Node): number | undefined {
  if (Number.isFinite(node.support[0]) || Number.isFinite(node.support[1]) || !node.absMomentAbout) return undefined;
  const m = node.absMomentAbout(0);
  return Number.isFinite(m) ? m : undefined;
}

/**
 * Node.argSlope of aX: the child's own slope at |fl(a t)| <= |a t| (1 + u), plus u |a t| E|X| from the rounding of a t
 * (both components of a damped argument, so |w| <= |t| + beta). 0 when a is a power of two (a t exact, barring under- and
 * overflow, far outside the frequencies used); NaN (not derived) when X has no first absolute moment bound.
 */
export function scaleArgSlope(a: number, c: Node): number {
  const aa = Math.abs(a);
  const own = c.argSlope ?? 0;
  // a power of two: a t is exact
  if (Math.log2(aa) === Math.round(Math.log2(aa))) return aa * own;
  const m = absFirstMoment(c);
  if (m === undefined) return NaN;
  return aa * (own * (1 + U) + U * m) * (1 + 4 * U);
}

/** Sums, mixtures (weights ws), n-fold sums: the children's slopes add (each factor or component has |phi| <= 1). */
export function addArgSlopes(cs: readonly Node[], ws?: readonly number[]): number {
  let s = 0;
  cs.forEach((c, j) => (s += (ws ? Math.abs(ws[j]) : 1) * (c.argSlope ?? 0)));
  return s * (1 + cs.length * Number.EPSILON);
}

/** A compound P_N(phi_X): |P_N'(z)| <= E N on the unit disc, so X's slope moves P_N by E N times it. */
export function compoundArgSlope(meanN: number | null, X: Node): number {
  const s = X.argSlope ?? 0;
  if (s === 0) return 0;
  return meanN !== null && Number.isFinite(meanN) ? meanN * s * (1 + 2 * Number.EPSILON) : Infinity;
}

/**
 * A grid's nodes fl((k + 1/2) h), k < K, where the inversion takes its phases at the exact (k + 1/2) h: node k's value
 * moves by at most (u L + S) t_k with L the Lipschitz constant of what is evaluated there (the transform and the phase
 * it carries) and S the model's own slope (CompiledModel.cfArgSlope, divided by the part's weight by the caller). The
 * cdf sum (1/pi) sum |e_k| / (k + 1/2) then moves by (u L + S) K h / pi, the pdf sum (h/pi) sum |e_k| by
 * (u L + S) h^2 K^2 / (2 pi) (sum_{k < K} (k + 1/2) = K^2 / 2).
 */
export function gridRounding(lipschitz: number, slope: number, h: number, K: number): { cdf: number; pdf: number } {
  const per = (U * lipschitz + slope) * (1 + 4 * Number.EPSILON);
  return { cdf: (per * K * h) / Math.PI * (1 + 4 * Number.EPSILON), pdf: ((per * h * h * K * K) / (2 * Math.PI)) * (1 + 6 * Number.EPSILON) };
}

/** h rounded down to 29 significant bits: (k + 1/2) h is then exact for 2k + 1 < 2^24 (the product has at most 53 bits) */
export function exactGridStep(h: number): number {
  const q = Math.pow(2, Math.floor(Math.log2(h)) - 28);
  return Math.floor(h / q) * q;
}

/** whether every node (k + 1/2) h, k < K, is exact in floating point (h of at most 29 significant bits, 2K - 1 < 2^24) */
export function exactGrid(h: number, K: number): boolean {
  return h > 1e-290 && 2 * K - 1 < 2 ** 24 && exactGridStep(h) === h;
}

/** a node's argument error at t >= 0: min(argSlope t, argErrAt(t)) (argErrAt where derived) */
export function argErrorOf(c: Node): (t: number) => number {
  const s = c.argSlope ?? 0;
  const f = c.argErrAt;
  return f ? (t) => Math.min(s * t, f(t)) : (t) => s * t;
}

const ONE_T = new Float64Array(1);
const ONE_V = new Float64Array(1);
const ONE_M = new Float64Array(1);

/**
 * Node.argErrAt of aX where X's tree derives a slope majorant S_X about c0 (../majorant.ts): phi_X moves between a t and
 * fl(a t) by at most u |a t| sup |phi_X'| there, and |phi_X'(s)| <= S_X(s) + |c0| M_X(s) (both non-increasing: taken at
 * |a t| (1 - u)), plus X's own error at |fl(a t)| <= |a t| (1 + u). Undefined where X has no slope majorant.
 */
export function scaleArgErrAt(a: number, c: Node): ((t: number) => number) | undefined {
  const maj = c.logMajorant;
  const sl = maj?.slope;
  const m = absFirstMoment(c);
  if (!maj || !sl) return undefined;
  const aa = Math.abs(a);
  const own = argErrorOf(c);
  const c0 = Math.abs(sl.center);
  const exact = Math.log2(aa) === Math.round(Math.log2(aa));
  return (t) => {
    const s = aa * t;
    let d = 0;
    if (!exact) {
      ONE_T[0] = s * (1 - 2 * U);
      sl.at(ONE_T, ONE_V);
      maj(ONE_T, ONE_M);
      d = (ONE_V[0] + c0 * Math.exp(ONE_M[0])) * (1 + 8 * Number.EPSILON);
      if (m !== undefined && m < d) d = m;
      d *= U * s;
    }
    return (own(s * (1 + U)) + d) * (1 + 4 * U);
  };
}

/** sums (weights 1), mixtures (ws), n-fold sums (one child, weight n), compounds (E N): the children's errors at t added */
export function addArgErrAt(cs: readonly Node[], ws?: readonly number[]): ((t: number) => number) | undefined {
  if (!cs.some((c) => c.argErrAt)) return undefined;
  const fs = cs.map(argErrorOf);
  const w = cs.map((_, j) => (ws ? Math.abs(ws[j]) : 1));
  return (t) => {
    let e = 0;
    for (let j = 0; j < fs.length; j++) e += w[j] * fs[j](t);
    return e * (1 + (cs.length + 2) * Number.EPSILON);
  };
}

/** a compound: E N times X's error at t (compoundArgSlope's argument) */
export function compoundArgErrAt(meanN: number | null, X: Node): ((t: number) => number) | undefined {
  if (!X.argErrAt || meanN === null || !Number.isFinite(meanN)) return undefined;
  const f = argErrorOf(X);
  return (t) => meanN * f(t) * (1 + 2 * Number.EPSILON);
}

/**
 * Node.argErrDampedAt of sums (weights 1) and n-fold sums (one child, weight n), where a child derives it: each child's
 * min(argSlope (t + beta), argErrDampedAt(beta, t)) added (the other factors' damped transforms, taken from the lower end,
 * have modulus at most 1, as for argSlope)
 */
export function addArgErrDampedAt(cs: readonly Node[], ws?: readonly number[]): ((beta: number, t: number) => number) | undefined {
  if (!cs.some((c) => c.argErrDampedAt)) return undefined;
  const w = cs.map((_, j) => (ws ? Math.abs(ws[j]) : 1));
  return (beta, t) => {
    let e = 0;
    for (let j = 0; j < cs.length; j++) {
      const s = (cs[j].argSlope ?? 0) * (t + beta);
      const f = cs[j].argErrDampedAt;
      e += w[j] * (f ? Math.min(s, f(beta, t)) : s);
    }
    return e * (1 + (cs.length + 4) * Number.EPSILON);
  };
}

/** addArgErrDampedAt over [t0, t1] (0 <= t0 <= t1): each child's bound over the run, its slope term at t1 (where every child
 *  deriving argErrDampedAt derives this too) */
export function addArgErrDampedOn(cs: readonly Node[], ws?: readonly number[]): ((beta: number, t0: number, t1: number) => number) | undefined {
  if (!cs.some((c) => c.argErrDampedAt) || cs.some((c) => c.argErrDampedAt && !c.argErrDampedOn)) return undefined;
  const w = cs.map((_, j) => (ws ? Math.abs(ws[j]) : 1));
  return (beta, t0, t1) => {
    let e = 0;
    for (let j = 0; j < cs.length; j++) {
      const s = (cs[j].argSlope ?? 0) * (Math.max(t0, t1) + beta);
      const f = cs[j].argErrDampedAt ? cs[j].argErrDampedOn : undefined;
      e += w[j] * (f ? Math.min(s, f(beta, t0, t1)) : s);
    }
    return e * (1 + (cs.length + 4) * Number.EPSILON);
  };
}

/**
 * Node.argErrDampedAt of aX (a > 0) where X derives one: X's own error at the arguments it is evaluated at (fl(a beta),
 * fl(a t)), at most its slope there, plus scaleArgSlope's u a E|X| (t + beta) from the rounding of those arguments
 */
export function scaleArgErrDampedAt(a: number, c: Node): ((beta: number, t: number) => number) | undefined {
  const f = c.argErrDampedAt;
  if (!f || !(a > 0)) return undefined;
  const own = c.argSlope ?? 0;
  const exact = Math.log2(a) === Math.round(Math.log2(a));
  const m = exact ? 0 : absFirstMoment(c);
  if (m === undefined) return undefined;
  return (beta, t) => (Math.min(own * a * (t + beta) * (1 + U), f(a * beta, a * t)) + U * a * m * (t + beta)) * (1 + 4 * U);
}

/** scaleArgErrDampedAt over [t0, t1] (0 <= t0 <= t1): X's bound over [fl(a t0), fl(a t1)] (rounding is monotone), the rest at t1 */
export function scaleArgErrDampedOn(a: number, c: Node): ((beta: number, t0: number, t1: number) => number) | undefined {
  const f = c.argErrDampedAt ? c.argErrDampedOn : undefined;
  if (!f || !(a > 0)) return undefined;
  const own = c.argSlope ?? 0;
  const exact = Math.log2(a) === Math.round(Math.log2(a));
  const m = exact ? 0 : absFirstMoment(c);
  if (m === undefined) return undefined;
  return (beta, t0, t1) => {
    const t = Math.max(t0, t1);
    return (Math.min(own * a * (t + beta) * (1 + U), f(a * beta, a * t0, a * t1)) + U * a * m * (t + beta)) * (1 + 4 * U);
  };
}
