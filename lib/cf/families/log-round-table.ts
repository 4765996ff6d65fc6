// Node.logRoundSlope / logRoundAt / logRoundDampedAt of claim laws whose |phi| need not decrease (no generalized gamma
// convolution: Weibull shape > 1, Burr and log-logistic gamma > 1), so the continuous argument is bounded from a table of
// lower bounds on |phi| (the law's own evaluation and its error bound, |phi'| <= E X) up to where the large-t expansion's
// first term dominates; and of laws on a lattice (zero-modified counts, lattice tables) from such a table over one period.
// See ./log-round.ts for the rounding model (8 ulps of |L|, so 8 u |phi| |L|) and the compound's use (../compound-errors.ts).
import type { Node } from "../node";
import { lgamma } from "./special";
import { unwrapFrom } from "../complex";

const EPS = Number.EPSILON;
const U8 = 8 * EPS;

/** the law's own route: its log-CF at equispaced t (values within `err` in phi, the log's own rounding aside); past
 *  |z| >= from, |phi~(beta, t)| <= modulus(|z|) (|z| = hypot(t, beta), non-increasing) and the undamped argument moves by
 *  at most `drift` (any two frequencies past `from`) */
export interface PhaseRoute {
  mean: number;
  logCf: (t: Float64Array, re: Float64Array, im: Float64Array) => void;
  err: number;
  /** a bound on |phi'| from t on (non-increasing), at most E X */
  slope: (t: number) => number;
  tail: { from: number; modulus: (absZ: number) => number; drift: number };
  /** the most frequencies the table may take; past it the rounding is not derived */
  budget: number;
}

interface Table {
  d: number; // the cells [j d, (j + 1) d], up to `end`
  B: Float64Array; // the cell's bound on 8 u |phi| |L|
  slope: number; // R: sup over t of the bound / t, the damped one's (1 + pi) E X included
  end: number; // K d >= tail.from
  thetaEnd: number; // Theta past the table: its last value plus the tail's drift
}

/**
 * The table (undamped), on cells [s_j, s_j + d] (s_j = j d, one batch of the law's own log-CF): lo_j <= |phi(s_j)| <= up_j
 * (the computed modulus less or plus err and its log's and exp's rounding), D_j = slope(s_j) >= |phi'| on the cell, so
 * there |phi| >= f_j = min(lo_j, lo_{j+1}, (lo_j + lo_{j+1} - D_j d) / 2) and <= h_j = (up_j + up_{j+1} + D_j d) / 2 (the
 * crossing of the Lipschitz lines from both ends); the continuous argument's total variation Theta (int |theta'| <=
 * int |phi'| / |phi|) grows by at most D_j d / f_j a cell. Past `from` the tail's drift. An unwrap from any t0 <= t (along a
 * grid that resolves the argument) then gives |Im L(t)| <= pi min(1, m t0) (the principal argument at t0: |arg w| <= (pi / 2)
 * |1 - w|) + Theta(t), and |phi| |log |phi|| <= min(1/e, 1 - |phi|, m t, h |log h| for |phi| <= h <= 1/e). The step d from
 * the tail's floor at `from` (|phi| >= modulus / 3 there), halved up to three times where a floor is not positive; null
 * where it stays so or the budget is spent.
 */
function buildTable(p: PhaseRoute): Table | null {
  const m = p.mean * (1 + 4 * EPS);
  const from = p.tail.from;
  if (!(m > 0 && Number.isFinite(m) && from > 0 && Number.isFinite(from))) return null;
  const lo0 = p.tail.modulus(from) / 3 - p.err;
  let d = Math.min(from / 64, lo0 / (2 * Math.min(m, p.slope(from))));
  for (let attempt = 0; attempt < 4 && d > 0; attempt++, d /= 2) {
    const t = tryTable(p, m, d);
    if (t) return t;
  }
  return null;
}

/**
 * The law's log-CF at t_j = j d (j = 1..K) in one batch, and lower / upper bounds on |phi(t_j)| from it (j = 0: t = 0,
 * |phi| = 1): e^{Re L} within 4 eps (2 + |Re L|) relative for the exp's rounding, then the declared absolute CF error.
 */
function sampleModuli(p: { logCf: PhaseRoute["logCf"]; err: number }, d: number, K: number) {
  const t = Float64Array.from({ length: K }, (_, j) => (j + 1) * d);
  const re = new Float64Array(K);
  const im = new Float64Array(K);
  p.logCf(t, re, im);
  const lo = (j: number) => (j === 0 ? 1 : Math.exp(re[j - 1]) * (1 - 4 * EPS * (2 + Math.abs(re[j - 1]))) - p.err);
  const up = (j: number) => (j === 0 ? 1 : Math.exp(re[j - 1]) * (1 + 4 * EPS * (2 + Math.abs(re[j - 1]))) + p.err);
  return { re, im, lo, up };
}

function tryTable(p: PhaseRoute, m: number, d: number): Table | null {
  const K = Math.ceil(p.tail.from / d);
  if (!(K <= p.budget)) return null;
  const { im, lo, up } = sampleModuli(p, d, K);
  const B = new Float64Array(K);
  let theta = 0;
  let slope = U8 * (1 + Math.PI) * m * (1 + 32 * EPS);
  for (let j = 0; j < K; j++) {
    const s0 = j * d;
    const s1 = (j + 1) * d;
    const D = Math.min(m, p.slope(s0) * (1 + 4 * EPS));
    const Dd = D * d * (1 + 4 * EPS);
    const [l0, l1] = [lo(j), lo(j + 1)];
    const f = Math.min(l0, l1, (l0 + l1 - Dd) / 2) * (1 - 4 * EPS);
    if (!(f > 0)) return null;
    const th0 = theta;
    theta = (theta + Dd / f) * (1 + 8 * EPS);
    const hi = Math.min(1, ((up(j) + up(j + 1) + Dd) / 2) * (1 + 4 * EPS));
    const reB = Math.min(1 / Math.E, 1 - f, m * s1, hi <= 1 / Math.E ? -hi * Math.log(hi) * (1 + 4 * EPS) : Infinity);
    B[j] = U8 * (reB + hi * (Math.PI * Math.min(1, m * s1) + theta)) * (1 + 16 * EPS);
    // sup of the bound / t on the cell: Theta(t) <= th0 + D (t - s0) / f is largest over t at an end, m t and the
    // principal part pi min(1, m t) at most m and pi min(m, 1 / s0) per unit t
    const thT = j === 0 ? theta / s1 : Math.max(th0 / s0, theta / s1);
    const own = j === 0 ? m : Math.min(m, reB / s0);
    slope = Math.max(slope, U8 * (own + hi * (Math.PI * (j === 0 ? m : Math.min(m, 1 / s0)) + thT)) * (1 + 32 * EPS));
  }
  const end = K * d;
  const thetaEnd = (theta + p.tail.drift) * (1 + 4 * EPS);
  // past the table B(t) does not increase, so B / t is largest at its start
  slope = Math.max(slope, tailBound(p, end, thetaEnd) / end) * (1 + 4 * EPS);
  return { d, B, slope, end, thetaEnd };
}

/** past the table: |phi| <= M = modulus(t) (non-increasing), 8 u (min(1/e, M |log M|) + M (pi + Theta_end)) */
function tailBound(p: PhaseRoute, t: number, thetaEnd: number): number {
  const M = Math.min(1, p.tail.modulus(t));
  const re = Math.min(1 / Math.E, M <= 1 / Math.E ? (M > 0 ? -M * Math.log(M) * (1 + 4 * EPS) : 0) : Infinity);
  return U8 * (re + M * (Math.PI + thetaEnd)) * (1 + 16 * EPS);
}

/**
 * The claim-law rounding of a positive law by its phase table (buildTable above) for the undamped CF (its log unwrapped
 * along t), and for the damped transform, whose log is principal at each frequency (../damped-cf.ts fromPhiDamped):
 * |phi~| |L~| <= min(1/e, m w, M |log M|) + pi min(M, m w), w = hypot(t, beta) (|1 - phi~| <= m w), M a bound on |phi~|
 * (the tail's modulus past `from`, the node's damped majorant), so R (t + beta) with R >= 8 u (1 + pi) m holds for both.
 * The table is built at the first read of the slope (lazily: a law outside a compound never pays it); where it fails
 * (a lower bound on |phi| not positive, or past the budget) nothing is declared and the compound's notes say so.
 */
export function withTabulatedLogRound<N extends Node>(node: N, p: PhaseRoute): N {
  let table: Table | null | undefined;
  const get = () => (table === undefined ? (table = buildTable(p)) : table);
  const m = p.mean * (1 + 4 * EPS);
  const at = (t: number) => {
    const g = get();
    if (!g) return NaN;
    const a = Math.abs(t);
    if (a >= g.end) return Math.min(g.slope * a, tailBound(p, a, g.thetaEnd));
    // the cell holding a (a cell's bound serves its two ends, so a rounded index is safe either way)
    const j = Math.min(Math.floor(a / g.d), g.B.length - 1);
    const b = j + 1 < g.B.length ? Math.max(g.B[j], g.B[j + 1]) : g.B[j];
    return Math.min(g.slope * a, j > 0 ? Math.max(b, g.B[j - 1]) : b);
  };
  const dampedOn = (beta: number, t0: number, t1: number, self?: Node): number => {
    const a0 = Math.abs(t0);
    const w = Math.hypot(Math.max(a0, Math.abs(t1)), beta) * (1 + 2 * EPS);
    const z0 = Math.hypot(a0, beta) * (1 - 2 * EPS);
    let M = 1;
    if (z0 >= p.tail.from) M = Math.min(M, p.tail.modulus(z0));
    const n = self ?? node;
    const dm = n.dampedMajorant;
    if (dm && dm.cf === n.dampedLogCf && n.support[0] >= 0) M = Math.min(M, (dm.atom + dm.rest(beta, a0)) * (1 + 4 * EPS));
    const re = Math.min(1 / Math.E, m * w, M <= 1 / Math.E ? (M > 0 ? -M * Math.log(M) * (1 + 4 * EPS) : 0) : Infinity);
    return U8 * (re + Math.PI * Math.min(M, m * w)) * (1 + 16 * EPS);
  };
  Object.defineProperty(node, "logRoundSlope", { get: () => get()?.slope, enumerable: true, configurable: true });
  return Object.assign(node, {
    logRoundAt: (t: number) => at(t),
    logRoundDampedAt: (beta: number, t: number, self?: Node) => (get() ? dampedOn(beta, t, t, self) : NaN),
    logRoundDampedOn: (beta: number, t0: number, t1: number, self?: Node) => (get() ? dampedOn(beta, t0, t1, self) : NaN),
    // |phi~(beta, t)| <= the tail's modulus past `from` (a compound without majorants bounds its count's factor with it)
    logRoundModulus: (beta: number, t: number) => {
      const z = Math.hypot(t, beta) * (1 - 2 * EPS);
      return z >= p.tail.from ? p.tail.modulus(z) : 1;
    },
    logRoundNote:
      "the claim law's log rounding is bounded with its phase unwrapped along a grid that resolves it (steps below pi) or principal",
  });
}

/**
 * Weibull(k > 1, lambda) past |z| >= W* / lambda (z = t + i beta): on the ray x = lambda y e^{i a}, a = min(pi/4, pi/(2k))
 * (Re y^k e^{i k a} >= 0, and Re(-i z e^{i a}) >= |z| sin a), phi~ = sum_{j < J} (-1)^j k Gamma(k (j + 1)) / j! W^{-k (j + 1)}
 * + R_J, W = -i lambda z, |R_J| <= k Gamma(k (J + 1)) / J! (|W| sin a)^{-k (J + 1)} (|e^{-y} - sum_{j<J} (-y)^j / j!| <= |y|^J / J!
 * for Re y >= 0; the term j is int k y^{k-1} y^{kj} e^{-W y} dy). Where the terms j >= 1 and R_J add to at most half of the
 * first, Gamma(k + 1) |W|^{-k}: |phi~| <= 1.5 Gamma(k + 1) |W|^{-k}, and phi / A_0 in the disc |w - 1| <= 1/2 (argument
 * within pi/6), with arg A_0 = k pi / 2 constant on beta = 0: the undamped argument moves by at most pi / 3 past W*.
 * |phi'(t)| <= lambda k Gamma(k + 1) (lambda t sin a)^{-k-1} on the same ray (`slope`, every t > 0).
 * W* the least over J = 1..6 (found by doubling and bisection; the sum taken at 0.45 for its own rounding).
 */
export function weibullPhaseTail(k: number, lambda: number): { from: number; modulus: (absZ: number) => number; drift: number; slope: (t: number) => number } | null {
  if (!(k > 1 && lambda > 0 && Number.isFinite(k))) return null;
  const lsa = Math.log(Math.sin(Math.min(Math.PI / 4, Math.PI / (2 * k))));
  const lk = Math.log(k);
  const lg1 = lgamma(k + 1);
  const q = (lW: number, J: number) => {
    let s = Math.exp(lk + lgamma(k * (J + 1)) - lgamma(J + 1) - lg1 - k * (J + 1) * lsa - k * J * lW);
    for (let j = 1; j < J; j++) s += Math.exp(lk + lgamma(k * (j + 1)) - lgamma(j + 1) - lg1 - k * j * lW);
    return s;
  };
  let best = Infinity;
  for (let J = 1; J <= 6; J++) {
    let hi = 0;
    while (!(q(hi, J) <= 0.45) && hi < 690) hi += 1;
    if (!(q(hi, J) <= 0.45)) continue;
    let lo = hi - 1;
    for (let i = 0; i < 60; i++) {
      const mid = (lo + hi) / 2;
      if (q(mid, J) <= 0.45) hi = mid;
      else lo = mid;
    }
    best = Math.min(best, hi);
  }
  if (!Number.isFinite(best)) return null;
  const wStar = Math.exp(best) * (1 + 1e-12);
  const l15 = Math.log(1.5) + lg1;
  return {
    from: (wStar / lambda) * (1 + 4 * EPS),
    modulus: (z) => Math.min(1, Math.exp(l15 - k * Math.log(lambda * z)) * (1 + 1e-12)),
    drift: Math.PI / 3,
    // |phi'(t)| = |E X e^{i t X}| <= lambda k int y^k e^{-lambda t y sin a} dy on the same ray
    slope: (t) => Math.exp(Math.log(lambda) + lk + lg1 - (k + 1) * (Math.log(lambda * t) + lsa)) * (1 + 1e-12),
  };
}

/**
 * Burr XII (alpha, gamma > 1, theta; log-logistic alpha = 1), density alpha gamma y^{gamma-1} (1 + y^gamma)^{-alpha-1} of
 * Y = X / theta (Loss Models, app. A.2.1): on the ray y = r e^{i a}, a = min(pi/4, pi/(2 gamma)), Re y^gamma >= 0, so
 * |1 + y^gamma| >= 1, |(1 + y^gamma)^{-alpha-1}| <= 1 and |(1 + y^gamma)^{-alpha-1} - 1| <= (alpha + 1) r^gamma; the first
 * term alpha Gamma(gamma + 1) W^{-gamma} (W = -i theta z) then holds phi~ within alpha gamma (alpha + 1) Gamma(2 gamma)
 * (|W| sin a)^{-2 gamma}, half of it from |W|^gamma >= (alpha + 1) Gamma(2 gamma) / (0.45 Gamma(gamma)) sin(a)^{-2 gamma}:
 * |phi~| <= 1.5 alpha Gamma(gamma + 1) |W|^{-gamma}, the argument moves by at most pi / 3 past it (arg of the first term
 * gamma pi / 2 on beta = 0), and |phi'(t)| <= theta alpha gamma Gamma(gamma + 1) (theta t sin a)^{-gamma-1} at every t > 0.
 */
export function burrPhaseTail(alpha: number, gamma: number, theta: number): { from: number; modulus: (absZ: number) => number; drift: number; slope: (t: number) => number } | null {
  if (!(gamma > 1 && alpha > 0 && theta > 0 && Number.isFinite(gamma) && Number.isFinite(alpha))) return null;
  const lsa = Math.log(Math.sin(Math.min(Math.PI / 4, Math.PI / (2 * gamma))));
  const lW = (Math.log(alpha + 1) + lgamma(2 * gamma) - lgamma(gamma) - 2 * gamma * lsa - Math.log(0.45)) / gamma;
  const lA = Math.log(alpha) + lgamma(gamma + 1);
  if (!Number.isFinite(lW)) return null;
  return {
    from: (Math.exp(lW) / theta) * (1 + 1e-12),
    modulus: (z) => Math.min(1, Math.exp(Math.log(1.5) + lA - gamma * Math.log(theta * z)) * (1 + 1e-12)),
    drift: Math.PI / 3,
    slope: (t) => Math.exp(Math.log(theta) + lA + Math.log(gamma) - (gamma + 1) * (Math.log(theta * t) + lsa)) * (1 + 1e-12),
  };
}

/**
 * The same for a law on the integers 0, 1, 2, ... (a count as a claim: the zero-modified and zero-truncated laws), whose
 * CF has period 2 pi: the table over one period (K cells of d = 2 pi / K, K = 512 doubled up to `budget` where a floor is
 * not positive) gives Theta_P, the argument's total variation over a period, so over [0, t] it is at most
 * floor(t / 2 pi) Theta_P + Theta(t mod 2 pi), and |phi(t)| <= h_j of t mod 2 pi's cell. Where the computed phase
 * resolves the argument (each cell's move and each value's argument error below pi / 4) it also gives the winding number
 * w = (theta(2 pi) - theta(0)) / 2 pi exactly and A = sup |theta| over a period (the computed phase's largest plus pi / 2), so
 * |theta(t)| <= A + 2 pi n |w|. An unwrap from any t0 <= t then gives |Im L(t)| <= pi min(1, m t) + the least of the total
 * variation and |theta(t)| + |theta(t0)|; R from the first period's cells and, past it, per unit t over n >= 1 periods.
 * No damped transform here.
 */
export function withPeriodicLogRound<N extends Node>(
  node: N,
  p: { mean: number; logCf: PhaseRoute["logCf"]; err: number; budget: number; period?: number; origin?: number },
): N {
  const m = p.mean * (1 + 4 * EPS);
  const P = p.period ?? 2 * Math.PI;
  const o = p.origin ?? 0;
  let table: { d: number; H: Float64Array; T: Float64Array; thetaP: number; slope: number; delta: number; A: number } | null | undefined;
  const build = () => {
    if (!(m > 0 && Number.isFinite(m) && p.err >= 0)) return null;
    for (let K = 512; K <= p.budget; ) {
      const d = (P / K) * (1 + 2 * EPS);
      const { im, lo, up } = sampleModuli(p, d, K);
      const H = new Float64Array(K);
      const T = new Float64Array(K);
      let theta = 0;
      let slope = U8 * (1 + Math.PI) * m;
      let ok = true;
      for (let j = 0; j < K && ok; j++) {
        const Dd = m * d * (1 + 4 * EPS);
        const [l0, l1] = [lo(j), lo(j + 1)];
        const f = Math.min(l0, l1, (l0 + l1 - Dd) / 2) * (1 - 4 * EPS);
        if (!(f > 0)) ok = false;
        const th0 = theta;
        theta = (theta + Dd / f) * (1 + 8 * EPS);
        H[j] = Math.min(1, ((up(j) + up(j + 1) + Dd) / 2) * (1 + 4 * EPS));
        T[j] = theta;
        const s0 = j * d;
        const thT = j === 0 ? theta / d : Math.max(th0 / s0, theta / (s0 + d));
        slope = Math.max(slope, U8 * (m + H[j] * (Math.PI * m + thT)) * (1 + 32 * EPS));
      }
      if (!ok) {
        // a value within its error of 0 stays so at any step; else the step that the smallest lower bound asks for (a cost
        // rule: the floors are checked again there)
        let minLo = Infinity;
        for (let j = 1; j <= K; j++) minLo = Math.min(minLo, lo(j));
        if (!(minLo > 0)) return null;
        K = Math.max(2 * K, 2 ** Math.ceil(Math.log2((2 * P * m) / minLo)));
        continue;
      }
      // the winding number w = (theta(2 pi) - theta(0)) / 2 pi from the computed phase, unwrapped from d (principal there:
      // m d < 1): exact where every cell's move (at most D d / f) and each value's argument error (asin of its error over
      // its floor) stay below pi / 4, and |theta(K d - 2 pi)| (one step) below pi / 2; else |w| <= Theta_P / 2 pi
      let exact = m * d < 0.5;
      for (let j = 0; j < K && exact; j++) exact = (m * d) / Math.min(lo(j), lo(j + 1)) < Math.PI / 4 - 1e-9 && p.err / lo(j + 1) < 0.5;
      // the move over a period, theta(P) - theta(0) = o P + 2 pi w (phi(t + P) = e^{i o P} phi(t)), w an integer
      const oP = o * P;
      const w = Math.round((im[K - 1] - oP) / (2 * Math.PI));
      const delta = exact ? Math.abs(oP + 2 * Math.PI * w) * (1 + 4 * EPS) : theta;
      // and then A = sup |theta| over a period: the computed phase's largest plus pi / 2 (a value's error and a cell's move)
      let A = theta;
      if (exact) {
        A = 0;
        for (let j = 0; j < K; j++) A = Math.max(A, Math.abs(im[j]));
        A = Math.min(theta, (A + Math.PI / 2) * (1 + 4 * EPS));
      }
      // |theta(t)| <= A + n |delta|; an unwrap from t0 <= t: |theta(t)| + |theta(t0)|, or the total variation
      slope = Math.max(slope, U8 * ((1 / Math.E + Math.PI) / P + Math.min((2 * theta) / P, (2 * theta + 2 * delta) / P, (2 * A + 2 * delta) / P)) * (1 + 32 * EPS));
      return { d, H, T, thetaP: theta, slope, delta, A };
    }
    return null;
  };
  const get = () => (table === undefined ? (table = build()) : table);
  const at = (t: number) => {
    const g = get();
    if (!g) return NaN;
    const a = Math.abs(t);
    const n = Math.floor(a / P);
    const K = g.H.length;
    // t mod 2 pi's cell, and its neighbours (the reduction's rounding)
    const j = Math.min(Math.max(Math.floor((a - n * P) / g.d), 0), K - 1);
    let h = 0;
    let th = 0;
    for (const i of [j - 1, j, j + 1]) {
      const k = (i + K) % K;
      h = Math.max(h, g.H[k]);
      th = Math.max(th, g.T[k]);
    }
    if (j + 1 >= K) th = g.thetaP;
    const re = Math.min(1 / Math.E, m * a, h <= 1 / Math.E ? -h * Math.log(h) * (1 + 4 * EPS) : Infinity);
    // n periods (one more at the period's ends, for the reduction's rounding): the total variation n Theta_P + Theta(s), or
    // |theta(t)| + |theta(t0)| <= Theta(s) + Theta_P + 4 pi n |w|
    const n1 = n + (j + 1 >= K || j === 0 ? 1 : 0);
    const arg = Math.min(n1 * g.thetaP + th, th + g.thetaP + 2 * n1 * g.delta, 2 * g.A + 2 * n1 * g.delta);
    const b = U8 * (re + h * (Math.PI * Math.min(1, m * a) + arg)) * (1 + 16 * EPS);
    return Math.min(g.slope * a, b);
  };
  Object.defineProperty(node, "logRoundSlope", { get: () => get()?.slope, enumerable: true, configurable: true });
  return Object.assign(node, {
    logRoundAt: (t: number) => at(t),
    logRoundNote:
      "the claim law's log rounding is bounded with its phase unwrapped along a grid that resolves it (steps below pi) or principal",
  });
}

/**
 * A lattice table (origin o, step h, probabilities p_0..p_{n-1}) as a claim: withPeriodicLogRound over the period 2 pi / h
 * with the phase drift o, its moduli |Q(e^{i h t})|, Q(z) = sum_k p_k z^k, by Horner (complex multiply-adds, each within
 * (2 sqrt 2 + 2) u of its terms' moduli: 5 n u of sum p_k = 1, Higham, Accuracy and Stability of Numerical Algorithms, 2nd
 * ed., sec. 5.1) at z within u h t + 2 u of e^{i h t} (|Q'| <= E K on the circle, t <= 2 pi / h: (2 pi + 2) u E K), and its
 * phase o t + arg Q unwrapped along the period's grid. Tables of at most 256 entries (the table costs 512 n to 2048 n products).
 */
export function withLatticeLogRound<N extends Node>(node: N, o: number, h: number, p: ArrayLike<number>): N {
  const n = p.length;
  if (!(n >= 2 && n <= 256 && h > 0 && Number.isFinite(o))) return node;
  let absMean = 0;
  let eK = 0;
  for (let k = 0; k < n; k++) {
    absMean += p[k] * Math.abs(o + k * h);
    eK += p[k] * k;
  }
  const err = (5 * n * (EPS / 2) + (2 * Math.PI + 2) * (EPS / 2) * eK) * 1.1 + 1e-300;
  const logCf = (t: Float64Array, re: Float64Array, im: Float64Array) => {
    for (let j = 0; j < t.length; j++) {
      const zr = Math.cos(h * t[j]);
      const zi = Math.sin(h * t[j]);
      let sr = 0;
      let si = 0;
      for (let k = n - 1; k >= 0; k--) {
        const nr = sr * zr - si * zi + p[k];
        si = sr * zi + si * zr;
        sr = nr;
      }
      re[j] = Math.log(Math.hypot(sr, si));
      im[j] = Math.atan2(si, sr);
    }
    unwrapFrom(im, 0);
    for (let j = 0; j < t.length; j++) im[j] += o * t[j];
  };
  return withPeriodicLogRound(node, { mean: absMean * (1 + n * EPS), logCf, err, budget: 2048, period: (2 * Math.PI) / h, origin: o });
}
