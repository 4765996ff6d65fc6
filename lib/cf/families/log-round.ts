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
 * Classes of Distributions and Densities, Springer, recalled from memory: the lognormal, Pareto and Lomax, Weibull of shape
 * <= 1, Burr and log-logistic of power <= 1, inverse gamma are hyperbolically completely monotone, hence GGC), with mean m:
 * log phi(t) = i a t - int log(1 - i t / x) U(dx) (a >= 0, U >= 0), so |phi| = exp(-int log(1 + t^2 / x^2) U(dx) / 2) does
 * not increase in t and the continuous argument theta = a t + int atan(t / x) U(dx) lies in [0, m t] (m = a + int U(dx) / x);
 * damped, |phi~(beta, t)| does not increase in t either and theta~ = a t + int atan(t / (x + beta)) U(dx) in [0, m t].
 * Since theta' <= |phi'| / |phi| and |phi| does not increase, |phi(t)| theta(t) <= int_0^t |phi'(s)| ds =: I(t), bounded by
 * the family's derivative majorant (../majorant.ts slope, or the damped majorant's) summed on a geometric grid (upper sums:
 * the majorants do not increase). Any law: |phi| |log |phi|| <= min(1/e, 1 - |phi|) <= |1 - phi| <= m hypot(t, beta)
 * (x |log x| <= 1 - x on [0, 1]; |e^{iy} - 1| <= |y|), and a principal argument (one frequency alone, the damped
 * quadratures) is at most pi min(1, |1 - phi|) (|1 - w| = r < 1 gives |arg w| <= asin r <= pi r / 2). The quadrature
 * families' logs are log|phi| plus atan2 plus multiples of fl(2 pi) (../complex.ts unwrapFrom: 0.36 u relative plus the
 * subtraction's rounding, inside the 8 ulps of |L|), continuous when the grid resolves the argument (steps below pi), else
 * principal: |phi| |L| <= (1 + pi) m (|t| + beta) either way, R = 8 u (1 + pi) m, damped with |t| + beta. Per frequency,
 * with |phi| <= M (the family's majorant, or `modulus`, its own bound on |phi~| at (beta, t)), |phi| |L| <= min(1/e, m t,
 * M |log M| where M <= 1/e) + max(pi M, min(M m t, I(t))). `shift` c: a family whose log is the quadrature's less i c t
 * (the Lomax, X = P - c): the rounding is 8 ulps of |L_P| <= |L| + c (|t| + beta) plus u |L|, so R = 9 u (1 + pi) (m + c) and
 * per frequency c (|t| + beta) M joins the argument. `thorin` {drift a, mass T}: a bound T on U's total mass (a law from 0
 * with a density at 0 that is finite and positive: T <= 1, as |phi| = O(t^-U[0, x0]) would beat t |phi| -> f(0) > 0, by parts
 * and Riemann-Lebesgue), so theta~ <= a t + T pi / 2 and the argument's part is also at most M (a w + T pi / 2) (pareto(alpha,
 * xm): a = xm, T <= 1: M (xm w + pi / 2) against M E X w). `units` {re, im, c}: a family whose damped log rounds within
 * u (re |Re L| + im |Im L| + c) (derived beside the call) takes that in place of 8 ulps of |L| in the damped bounds
 * (logRoundDampedAt / On; shift 0). Where the unwrap misses a step (a grid coarser than about pi / m)
 * the bound assumes the computed argument stays on the continuous or the principal branch: `logRoundNote` says so, and the
 * compound lists it.
 */
export function ggcLogRound(
  mean: number,
  node?: () => Node,
  modulus?: (beta: number, t: number) => number,
  shift = 0,
  thorin?: { drift: number; mass: number },
  units?: { re: number; im: number; c: number },
): LogRound & Pick<Node, "logRoundNote" | "logRoundDampedAt" | "logRoundDampedOn" | "logRoundModulus"> {
  if (!(mean >= 0 && Number.isFinite(mean))) return {};
  const k = shift > 0 ? 1.125 : 1;
  const slope = U8 * k * (1 + Math.PI) * (mean + shift) * (1 + U8);
  const T = new Float64Array(1);
  const M = new Float64Array(1);
  const V = new Float64Array(1);
  // the per-frequency bound: |phi| <= m, |1 - phi| <= r, int_0^t |phi'| <= I, the frequency (plus beta) w
  // `damped`: the damped transform's log, rounded within u (units.re |Re L| + units.im |Im L| + units.c) where the family
  // derives it (shift 0 only): |phi| times that, with |phi| |Re L| <= re, |phi| |Im L| <= arg, |phi| <= m
  // (the slope R (t + beta) rests on 8 ulps of |L| and is not taken beside it: `units` carries a constant part)
  const dUnits = !!units && shift === 0;
  const part = (m: number, r: number, I: number, w: number, damped = false) => {
    const re = Math.min(1 / Math.E, r, m <= 1 / Math.E ? (m > 0 ? -m * Math.log(m) * (1 + 4 * Number.EPSILON) : 0) : Infinity);
    const th = thorin ? m * (thorin.drift * w + thorin.mass * (Math.PI / 2)) * (1 + 8 * Number.EPSILON) : Infinity;
    const arg = Math.max(Math.PI * m, Math.min(m * mean * w, I, th)) + m * shift * w;
    if (damped && dUnits) return (Number.EPSILON / 2) * (units!.re * re + units!.im * arg + units!.c * m) * (1 + 16 * Number.EPSILON);
    return (U8 * k * (re + arg) + (shift > 0 ? Number.EPSILON * m * shift * w : 0)) * (1 + 16 * Number.EPSILON);
  };
  // I(t) of the undamped CF (per node: the majorants are the compiled node's), and of the damped one per beta
  const undamped = new WeakMap<Node, (t: number) => number>();
  const damped = new WeakMap<Node, Map<number, (t: number) => number>>();
  const s0 = 1e-3 / Math.max(mean, Number.MIN_VALUE);
  const integralOf = (n: Node): ((t: number) => number) | null => {
    let f = undamped.get(n);
    if (f) return f;
    const maj = n.logMajorant;
    const sl = maj?.slope;
    if (!maj || !sl) return null;
    const c = Math.abs(sl.center);
    f = upperIntegral((s) => {
      T[0] = s * (1 - 2 * Number.EPSILON);
      sl.at(T, V);
      maj(T, M);
      return (V[0] + c * Math.exp(M[0])) * (1 + 8 * Number.EPSILON);
    }, s0, mean);
    undamped.set(n, f);
    return f;
  };
  const dampedIntegralOf = (n: Node, beta: number): ((t: number) => number) | null => {
    const dm = n.dampedMajorant;
    const lo = n.support[0];
    if (!dm || dm.cf !== n.dampedLogCf || !(lo >= 0)) return null;
    let byBeta = damped.get(n);
    if (!byBeta) damped.set(n, (byBeta = new Map()));
    let f = byBeta.get(beta);
    if (f) return f;
    // d/dt of e^{(i t - beta) lo} (atom + rest part): at most lo (atom + rest) + slope (e^{-beta lo} <= 1)
    f = upperIntegral((s) => (dm.slope(beta, s) + lo * (dm.atom + dm.rest(beta, s))) * (1 + 8 * Number.EPSILON), s0, mean);
    if (byBeta.size > 16) byBeta.clear();
    byBeta.set(beta, f);
    return f;
  };
  // over [t0, t1]: part does not decrease in any argument, the modulus bounds (`modulus`, the majorant's rest: each
  // valid from its frequency on) are taken at t0, r, I and the frequency at t1; one frequency is the run [t, t]
  const dampedOn = (beta: number, t0: number, t1: number, self?: Node): number => {
    const a0 = Math.abs(t0);
    const a1 = Math.max(Math.abs(t1), a0);
    const n = self ?? node?.();
    const dm = n?.dampedMajorant;
    let m = modulus ? modulus(beta, a0) : 1;
    if (n && dm && dm.cf === n.dampedLogCf && n.support[0] >= 0) m = Math.min(m, (dm.atom + dm.rest(beta, a0)) * (1 + 4 * Number.EPSILON));
    const I = n ? dampedIntegralOf(n, beta) : null;
    const r = mean * Math.hypot(a1, beta) * (1 + 2 * Number.EPSILON);
    const p = part(Math.min(1, m), r, I ? I(a1) : Infinity, a1 + beta, true);
    return dUnits ? p : Math.min(slope * (a1 + beta), p);
  };
  return {
    logRoundSlope: slope,
    logRoundAt: (t, self) => {
      const a = Math.abs(t);
      const n = self ?? node?.();
      const maj = n?.logMajorant;
      let m = modulus ? modulus(0, a) : 1;
      if (maj) {
        T[0] = a * (1 - 2 * Number.EPSILON);
        maj(T, M);
        m = Math.min(m, Math.exp(M[0]) * (1 + 4 * Number.EPSILON));
      }
      const I = n ? integralOf(n) : null;
      return Math.min(slope * a, part(Math.min(1, m), mean * a, I ? I(a) : Infinity, a));
    },
    logRoundDampedAt: (beta, t, self) => dampedOn(beta, t, t, self),
    logRoundDampedOn: dampedOn,
    logRoundNote:
      "the quadrature claim law's log rounding is bounded with its phase on the continuous or the principal branch (the unwrap along a grid finer than about pi / E X)",
    ...(modulus ? { logRoundModulus: modulus } : {}),
  };
}

/**
 * An upper bound on int_0^t D(s) ds for a non-increasing D <= cap: upper sums on the grid s_j = s0 2^{j/4} (the interval
 * [s_{j-1}, s_j] at D(s_{j-1}), [0, s0] at cap), the next grid point's sum at t; past the grid, its last sum plus
 * (t - s_last) D(s_last). Built at the first call.
 */
function upperIntegral(D: (s: number) => number, s0: number, cap: number): (t: number) => number {
  let grid: { s: Float64Array; I: Float64Array; dLast: number } | null = null;
  const build = () => {
    const s = new Float64Array(481);
    const I = new Float64Array(481);
    s[0] = s0;
    I[0] = s0 * cap;
    let d = Math.min(cap, D(s0));
    let n = 1;
    for (; n < 481 && d > 0; n++) {
      s[n] = s0 * 2 ** (n / 4);
      I[n] = (I[n - 1] + (s[n] - s[n - 1]) * d) * (1 + 4 * Number.EPSILON);
      d = Math.min(d, D(s[n]));
    }
    return { s: s.subarray(0, n), I: I.subarray(0, n), dLast: d };
  };
  return (t) => {
    if (!(t > s0)) return t * cap;
    const g = (grid ??= build());
    const last = g.s.length - 1;
    if (t > g.s[last]) return (g.I[last] + (t - g.s[last]) * g.dLast) * (1 + 4 * Number.EPSILON);
    let lo = 0;
    let hi = last;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (g.s[mid] >= t) hi = mid;
      else lo = mid;
    }
    return g.I[hi];
  };
}

/** `node` with ggcLogRound of its mean, its majorants read from the node at each call (compile sets them after the family) */
export function withGgcLogRound<N extends Node>(
  node: N,
  mean: number,
  modulus?: (beta: number, t: number) => number,
  shift = 0,
  thorin?: { drift: number; mass: number },
  units?: { re: number; im: number; c: number },
): N {
  return Object.assign(node, ggcLogRound(mean, () => node, modulus, shift, thorin, units));
}

type Carried = Pick<Node, "logRoundSlope" | "logRoundAt" | "logRoundDampedAt" | "logRoundDampedOn" | "logRoundNote" | "logRoundModulus">;
const noteOf = (cs: readonly Node[]) => cs.map((c) => c.logRoundNote).find((n) => n !== undefined);

/**
 * X + b (b >= 0): the child's rounding (R t), fl(b t) (u |b t|) and the sum (u |L + i b t| <= u (|L| + |b| t), |phi| |L| <= R t /
 * (8 u)), so R' = R (1 + 1/8) + 2 u b; damped, L~ + b (i t - beta) with |phi~'| = e^{-beta b} |phi~| <= |phi~|, the same with
 * t + beta. b < 0 raises the damped transform by e^{beta |b|}: not derived.
 */
export function shiftedLogRound(c: Node, b: number): Carried {
  const R = c.logRoundSlope;
  if (b === 0)
    return { logRoundSlope: R, logRoundAt: c.logRoundAt, logRoundDampedAt: c.logRoundDampedAt, logRoundDampedOn: c.logRoundDampedOn, logRoundNote: c.logRoundNote, logRoundModulus: c.logRoundModulus };
  if (R === undefined || !(b > 0))
    return { logRoundSlope: undefined, logRoundAt: undefined, logRoundDampedAt: undefined, logRoundDampedOn: undefined, logRoundNote: undefined, logRoundModulus: undefined };
  const k = (1 + 4 * Number.EPSILON);
  const own = 2 * Number.EPSILON * b;
  const at = c.logRoundAt;
  const dAt = c.logRoundDampedAt;
  const dOn = dAt ? c.logRoundDampedOn : undefined;
  return {
    logRoundSlope: (1.125 * R + own) * k,
    logRoundAt: at ? (t) => (1.125 * at(t, c) + own * Math.abs(t)) * k : undefined,
    logRoundDampedAt: dAt ? (beta, t) => (1.125 * dAt(beta, t, c) + own * (Math.abs(t) + beta)) * k : undefined,
    logRoundDampedOn: dOn ? (beta, t0, t1) => (1.125 * dOn(beta, t0, t1, c) + own * (Math.max(Math.abs(t0), Math.abs(t1)) + beta)) * k : undefined,
    logRoundNote: c.logRoundNote,
    // |phi~| of X + b is e^{-beta b} times X's
    logRoundModulus: c.logRoundModulus,
  };
}

/** aX (a > 0): L_X(t) = L_Y(fl(a t)) (the argument's rounding is the scale node's argSlope), so R' = a R, at fl(a t); damped at
 *  (a beta, a t). a < 0 turns the damped transform (of a law bounded above): not derived. */
export function scaledLogRound(c: Node, a: number): Carried {
  const R = c.logRoundSlope;
  if (R === undefined || !(a > 0)) return {};
  const at = c.logRoundAt;
  const dAt = c.logRoundDampedAt;
  const dOn = dAt ? c.logRoundDampedOn : undefined;
  return {
    logRoundSlope: a * R * (1 + Number.EPSILON),
    logRoundAt: at ? (t) => at(a * t, c) * (1 + Number.EPSILON) : undefined,
    logRoundDampedAt: dAt ? (beta, t) => dAt(a * beta, a * t, c) * (1 + Number.EPSILON) : undefined,
    // fl(a t) lies in [fl(a t0), fl(a t1)] (rounding is monotone)
    logRoundDampedOn: dOn ? (beta, t0, t1) => dOn(a * beta, a * t0, a * t1, c) * (1 + Number.EPSILON) : undefined,
    logRoundNote: c.logRoundNote,
    logRoundModulus: c.logRoundModulus ? (beta, t) => c.logRoundModulus!(a * beta, a * t) : undefined,
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
  const dOns = dAts && cs.every((c) => c.logRoundDampedOn) ? cs.map((c) => c.logRoundDampedOn!) : null;
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
    logRoundDampedOn: dOns
      ? (beta, t0, t1) => {
          let s = 0;
          for (let j = 0; j < dOns.length; j++) s += w[j] * dOns[j](beta, t0, t1, cs[j]);
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

/**
 * decreasingDensityModulus for a density that is also convex with f'(lo) = -f1 (f' rises to 0): by parts twice,
 * int e^{w x} f' = -e^{w lo} f'(lo) / w - int e^{w x} f'' / w with int |f''| = f1, so |E e^{(i t - beta) X}| <=
 * e^{-beta lo} (f0 / |w| + 2 f1 / |w|^2), the lesser of that and the once-by-parts bound taken (half of it where |w| >> f1 / f0)
 */
export function convexDensityModulus(lo: number, f0: number, f1: number): (beta: number, t: number) => number {
  const once = decreasingDensityModulus(lo, f0);
  return (beta, t) => {
    const w = Math.hypot(beta, t);
    return Math.min(once(beta, t), ((f0 / w + (2 * f1) / (w * w)) * Math.exp(-beta * lo)) * (1 + 16 * Number.EPSILON));
  };
}
