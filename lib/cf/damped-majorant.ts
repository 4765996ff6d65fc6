import type { Node } from "./node";
import type { DampedLogCf } from "./damped-cf";
import { lognormalDampedBounds } from "./lognormal-majorant";
import { pgfBounds } from "./count-pgf";
import { convexDensityModulus } from "./families/log-round";
import { weibullDampedMajorant } from "./weibull-majorant";
import type { Claims, KernelRest } from "./damped-kernel-rest";
import type { LatticeTable } from "./types";
import { claimsFrom } from "./claims-from";

const EPS = Number.EPSILON;

/**
 * Derived bounds on a law's damped transform away from its lower end lo, through the operators: with atom = P(X = lo),
 * rest(beta, t) >= |E[e^{(i t - beta)(X - lo)}; X > lo]| and slope(beta, t) >= |d/dt of it| at every frequency from t on
 * (both non-increasing in t). For a sum of compounds and gamma terms (no kernels taken out: a lognormal compound has no
 * endpoint expansion), psi_c = phi e^{beta lo} e^{-i t lo} - atom is exactly that remainder, so its frequency truncation
 * is bounded from these instead of sampled sizes (./invert/damped-psi.ts). Valid only with the dampedLogCf named here.
 *  - gamma(k, rho): E e^{(i t - beta) X} = (rho / (rho + beta - i t))^k (JKB vol. 1, ch. 17), derivative i k / (rho + beta - i t) times it;
 *  - lognormal: the bounds of every order from the density's derivatives (./lognormal-majorant.ts);
 *  - weibull: by parts from the density (its singularity at 0 split off for shapes below 1) and along a rotated ray
 *    (./weibull-majorant.ts);
 *  - a compound of such claims (no atom, support from 0): the part past 0 is P_N(phi) - p_0 = sum_{n >= 1} p_n phi^n, at most
 *    sum_{n >= 1} p_n m^n = P_N(m) - p_0 and (1 - p_0) m for |phi| <= m <= 1 (the count's pgf at m from its cumulant
 *    function, within its stated errors); its derivative P_N'(phi) phi' is at most P_N'(m) m' with P_N'(m) <= E N and the
 *    secant (P_N(m2) - P_N(m)) / (m2 - m) for m < m2 <= 1 (P_N' increases on [0, 1]);
 *  - an independent sum: prod (a_i + psi_i) - prod a_i = sum_i (prod_{j < i} a_j) psi_i prod_{j > i} (a_j + psi_j), so
 *    |.| <= sum_i (prod_{j < i} a_j) r_i prod_{j > i} (a_j + r_j) (no cancellation), the derivative by the product rule;
 *  - a X (a > 0): the child's at (a beta, a t), the bounds taken at a t (1 - 2u) (below the rounded argument), slope times a;
 *  - X + b: unchanged (the transform is taken relative to lo).
 * Past a frequency t0 each also gives a power: rest(t) <= R (t0 / t)^q for t >= t0 (gamma: |rho + beta - i t| >= t, so
 * R = (rho / t0)^k, q = k; lognormal: the order least at t0; a compound: (1 - p_0) times its claims'; a sum: each product
 * above with the continuous factors' powers added, the atoms' factors held at their values at t0).
 * Where that power is 1 (exponential claims or terms), the density's truncation past t0 is not bounded by integrating it;
 * `split` then writes the transform as F + G, |F| <= R (t0 / t)^q with q > 1 and G the damped transform of a function of
 * total variation at most tv (whose truncated inversion is within tv everywhere: ./invert/damped-psi.ts jumpTail):
 *  - exponential(rho) (gamma of shape 1): G is the whole transform, rho e^{-(rho + beta) y}: a jump of rho, then falling
 *    (tv = 2 rho), F = 0;
 *  - a compound: P_N(phi) - p_0 = p_1 G_X + (p_1 F_X + sum_{n >= 2} p_n phi^n), so tv = p_1 tv_X and |F| <= p_1 R_FX
 *    (t0/t)^q_FX + (1 - p_0) m^2, m = R_X (t0/t)^q_X; p_1 <= (P_N(m') - p_0) / m' at m' = 2^-10 (every p_n >= 0);
 *  - a sum: the terms of the telescoped product linear in one G_i with every other factor at its atom,
 *    (prod_{j != i} a_j) G_i, make G (tv = sum of those weights times tv_i); the rest are (prod_{j != i} a_j) F_i and
 *    products of two rests at least (their powers added);
 *  - a X: tv / a (the function at y / a, over a), the child's at (a beta, a t); X + b: unchanged.
 */
export interface DampedMajorant {
  cf: DampedLogCf;
  atom: number;
  rest(beta: number, t: number): number;
  slope(beta: number, t: number): number;
  /** rest(beta, t) <= R (t0 / t)^q for every t >= t0 (the tail past the last probe frequency); split: see above */
  decay(beta: number, t0: number): MajorantDecay;
  /** an exact gamma(shape, rate) term from its lower end (its transform in closed form): a sum sees its kernels cancel it */
  gamma?: { shape: number; rate: number };
  /** a compound of exact gamma claims: its count's first probabilities (the kernel rest expands it, ./damped-kernel-rest.ts) */
  claims?: Claims;
  /** a sum's bounds on the transform past lo less the atom and its gamma kernels (`kernels`, the node's own), ./damped-kernel-rest.ts */
  kernelRest?: KernelRest;
}

export interface MajorantDecay {
  R: number;
  q: number;
  split?: { R: number; q: number; tv: number };
}

const up = (v: number, k = 8) => v * (1 + k * EPS);

/** the named families with such bounds, else undefined */
export function familyDampedMajorant(family: string, p: Record<string, number>, node: Node): DampedMajorant | undefined {
  const cf = node.dampedLogCf;
  if (!cf) return undefined;
  if (family === "gamma" || family === "exponential") {
    const k = family === "gamma" ? p.shape : 1;
    const rho = p.rate;
    if (!(k > 0 && rho > 0 && Number.isFinite(k) && Number.isFinite(rho))) return undefined;
    const size = (beta: number, t: number) => {
      const r = Math.hypot(rho + beta, t);
      return { r, v: Math.min(1, up(Math.pow(rho / r, k), 16)) };
    };
    return {
      cf,
      atom: 0,
      gamma: { shape: k, rate: rho },
      rest: (beta, t) => size(beta, t).v,
      decay: (_beta, t0) => ({ R: up(Math.pow(rho / t0, k), 16), q: k, ...(k === 1 ? { split: { R: 0, q: Infinity, tv: up(2 * rho) } } : {}) }),
      slope: (beta, t) => {
        const s = size(beta, t);
        return up((k * s.v) / s.r, 8);
      },
    };
  }
  if (family === "pareto" || family === "lomax") {
    const m = lomaxDampedMajorant(p.alpha, family === "pareto" ? p.xm : p.theta);
    return m ? { cf, ...m } : undefined;
  }
  if (family === "weibull") {
    const m = weibullDampedMajorant(p.shape, p.scale);
    return m ? { cf, ...m } : undefined;
  }
  if (family === "lognormal") {
    const b = lognormalDampedBounds(p.mu, p.sigma);
    return {
      cf,
      atom: 0,
      rest: (beta, t) => (t > 0 ? Math.min(1, b.abs(beta, t)) : 1),
      slope: (beta, t) => (t > 0 ? b.slope(beta, t) : Infinity),
      decay: (beta, t0) => (t0 > 0 ? b.decay(beta, t0) : { R: 1, q: 0 }),
    };
  }
  return undefined;
}

/**
 * Lomax(alpha, theta) from its lower end, and so pareto(alpha, xm) = xm + lomax(alpha, xm): the density
 * g(y) = (alpha / theta) (1 + y / theta)^{-alpha-1} (Loss Models app. A.2.3.1, section recalled from memory) falls from g(0) = alpha / theta to 0. With s = beta - i t:
 *  - psi(s) = int_0^inf e^{-s y} g = g(0) / s + (1 / s) int e^{-s y} g' (integration by parts), so |psi| <= 2 g(0) / |s|
 *    and, g convex with g'(0) = -alpha (alpha + 1) / theta^2, by parts once more |psi| <= g(0) / |s| + 2 |g'(0)| / |s|^2
 *    (convexDensityModulus, ./families/log-round.ts), and
 *    psi is the transform of h = g e^{-beta y}, a jump of g(0) at 0 then falling: total variation 2 g(0) (`split`: all of it,
 *    as the exponential's);
 *  - psi'(t) = i int y e^{-s y} g: k(y) = y g(y) e^{-beta y} is 0 at 0 and at infinity and has one maximum (k'/k = 1/y -
 *    (alpha + 1) / (theta + y) - beta changes sign once: theta - (alpha + beta theta) y - beta y^2 has one positive root), so
 *    |psi'| <= TV(k) / t = 2 max k / t <= 2 max_y y g(y) / t = 2 (alpha / (alpha + 1))^{alpha + 1} / t, and |psi'| <= int k <=
 *    E Y = theta / (alpha - 1) (alpha > 1) and <= sup y e^{-beta y} = 1 / (e beta) (beta > 0).
 */
function lomaxDampedMajorant(alpha: number, theta: number): Omit<DampedMajorant, "cf"> | undefined {
  if (!(alpha > 0 && theta > 0 && Number.isFinite(alpha) && Number.isFinite(theta))) return undefined;
  const g0 = up(alpha / theta, 2);
  // g is convex too (g'' > 0), g'(0) = -g1: by parts twice, |psi| <= g(0) / |s| + 2 g1 / |s|^2 (half the once-by-parts bound far out)
  const g1 = up((alpha * (alpha + 1)) / (theta * theta), 4);
  const size = convexDensityModulus(0, alpha / theta, g1);
  const kMax = up(Math.pow(alpha / (alpha + 1), alpha + 1), 16);
  const mean = alpha > 1 ? up(theta / (alpha - 1), 4) : Infinity;
  return {
    atom: 0,
    rest: size,
    // for t >= t0: g(0) / t + 2 g1 / t^2 <= (g(0) + 2 g1 / t0) / t
    decay: (_beta, t0) => ({ R: up(Math.min(2 * g0, g0 + up((2 * g1) / t0)) / t0, 8), q: 1, split: { R: 0, q: Infinity, tv: up(2 * g0) } }),
    slope: (beta, t) => Math.min(mean, beta > 0 ? up(1 / (Math.E * beta), 4) : Infinity, t > 0 ? up((2 * kMax) / t, 4) : Infinity),
  };
}

/** the probability P(X = lo) as the node's kind lists it (0 for a continuous law) */
function atomAtLo(node: Node): number | null {
  const lo = node.support[0];
  if (node.kind.type === "continuous") return 0;
  if (node.kind.type !== "mixed" || !node.kind.atomsComplete) return null;
  let p = 0;
  for (const a of node.kind.atoms) {
    if (a.x === lo) p += a.p;
    else return null;
  }
  return p;
}

/** the count's pieces a compound needs (from ./compound.ts) */
export interface CountForMajorant {
  cgf(wr: Float64Array, wi: Float64Array, re: Float64Array, im: Float64Array): void;
  mean: number;
  absError: number;
  relError: number;
  /** the count's pmf table (p_n within its pointRel), where it has one */
  table?: (maxLength: number) => LatticeTable | null;
}

/** p_0 .. p_M of the count at most: a compound's expansion into claims beyond this is not taken */
const CLAIMS_MAX = 12;

/**
 * the count's p_0 .. p_M from its table where each is stated within pointRel (bounded at 1.01 pointRel(n) p_n, as
 * ./compound-remainder.ts takes them), else undefined
 */
function claimsOf(g: { shape: number; rate: number } | undefined, count: CountForMajorant, p0: number): Claims | undefined {
  if (!g || !count.table) return undefined;
  const t = count.table(CLAIMS_MAX + 1);
  if (!t || t.step !== 1 || t.origin !== 0 || !t.pointRel || t.p.length < 2) return undefined;
  const M = Math.min(CLAIMS_MAX, t.p.length - 1);
  const p = Float64Array.from(t.p.subarray(0, M + 1));
  const pErr = Float64Array.from(p, (v, n) => 1.01 * t.pointRel!(n) * v);
  // the table's p_0 is the compound's atom (the count's own P(N = 0)) within its bound
  if (!(Math.abs(p[0] - p0) <= pErr[0] + 4 * EPS * p0) || !p.every(Number.isFinite) || !pErr.every(Number.isFinite)) return undefined;
  return { shape: g.shape, rate: g.rate, p, pErr, mean: up(count.mean, 16) };
}

export function compoundDampedMajorant(node: Node, X: Node, count: CountForMajorant | null): DampedMajorant | undefined {
  const xm0 = X.dampedMajorant;
  const cf = node.dampedLogCf;
  const a = X.support[0];
  if (!cf || !count || !xm0 || xm0.cf !== X.dampedLogCf || xm0.atom !== 0 || !(a >= 0 && a < Infinity) || node.support[0] !== 0) return undefined;
  // claims from a > 0 (pareto): their transform from the compound's lower end 0 (./claims-from.ts)
  const xm = a === 0 ? xm0 : claimsFrom(xm0, a);
  const p0 = atomAtLo(node);
  if (p0 === null || !(count.mean >= 0) || !Number.isFinite(count.mean)) return undefined;
  // P_N(s) for s in [0, 1], raised (lowered) by its stated errors (../count-pgf.ts)
  const { upper: pgf, lower: pgfLower } = pgfBounds(count, { upper: p0 + count.absError, lower: Math.max(0, p0 - count.absError) });
  const p0lo = p0 * (1 - 64 * EPS) - count.absError;
  // p_1 <= (P_N(m) - p_0) / m (P_N(m) - p_0 = sum_{n >= 1} p_n m^n), at m = 2^-10 (exact in binary)
  const p1up = Math.min(1, Math.max(0, up(pgf(1 / 1024) - p0lo)) * 1024);
  const rest = (beta: number, t: number) => {
    const m = Math.min(1, xm.rest(beta, t));
    return Math.min(up((1 - p0lo) * m), Math.max(0, up(pgf(m) - p0lo)));
  };
  const claims = claimsOf(xm.gamma, count, p0);
  return {
    cf,
    atom: p0,
    ...(claims ? { claims } : {}),
    rest,
    decay: (beta, t0) => {
      const d = xm.decay(beta, t0);
      const whole = { R: up((1 - p0lo) * d.R), q: d.q };
      if (!(d.q <= 1)) return whole;
      const f = d.split ?? { R: d.R, q: d.q, tv: 0 };
      const a = up(p1up * f.R);
      const b = up((1 - p0lo) * d.R * d.R);
      return { ...whole, split: { R: up(a + b), q: Math.min(f.q, 2 * d.q), tv: up(p1up * f.tv) } };
    },
    slope: (beta, t) => {
      const m = Math.min(1, xm.rest(beta, t));
      const m2 = m + 0.5 * (1 - m);
      const secant = m < 1 ? (pgf(m2) - pgfLower(m)) / (m2 - m) : Infinity;
      return up(Math.min(count.mean, up(secant)) * xm.slope(beta, t));
    },
  };
}

export function sumDampedMajorant(node: Node, cs: Node[]): DampedMajorant | undefined {
  const cf = node.dampedLogCf;
  if (!cf || cs.length === 0) return undefined;
  const ms: DampedMajorant[] = [];
  for (const c of cs) {
    const m = c.dampedMajorant;
    if (!m || m.cf !== c.dampedLogCf) return undefined;
    ms.push(m);
  }
  const n = ms.length;
  const atom = ms.reduce((s, m) => s * m.atom, 1);
  const r = new Float64Array(n);
  const s = new Float64Array(n);
  const eval_ = (beta: number, t: number, withSlope: boolean) => {
    for (let i = 0; i < n; i++) {
      r[i] = ms[i].rest(beta, t);
      if (withSlope) s[i] = ms[i].slope(beta, t);
    }
  };
  // each factor a_i + r_i <= 1 + r_i; products rounded up per factor
  const g = 1 + 4 * n * EPS;
  return {
    cf,
    atom,
    rest(beta, t) {
      eval_(beta, t, false);
      let total = 0;
      for (let i = 0; i < n; i++) {
        let p = r[i];
        for (let j = 0; j < i; j++) p *= ms[j].atom;
        for (let j = i + 1; j < n; j++) p *= ms[j].atom + r[j];
        total += p;
      }
      return total * g;
    },
    decay(beta, t0) {
      eval_(beta, t0, false);
      const ds = ms.map((m) => m.decay(beta, t0));
      let R = 0;
      let q = Infinity;
      for (let i = 0; i < n; i++) {
        let c = ds[i].R;
        let Q = ds[i].q;
        for (let j = 0; j < i; j++) c *= ms[j].atom;
        for (let j = i + 1; j < n; j++) {
          if (ms[j].atom > 0) c *= ms[j].atom + r[j];
          else {
            c *= ds[j].R;
            Q += ds[j].q;
          }
        }
        if (c > 0) {
          R += c;
          q = Math.min(q, Q);
        }
      }
      const whole = { R: R * g, q: Number.isFinite(q) ? q : 0 };
      if (!(whole.q <= 1)) return whole;
      // the split: (prod_{j != i} a_j) F_i and tv_i, plus every product with two rests or more, i.e. term i's factor
      // prod_{j > i} (a_j + psi_j) less prod_{j > i} a_j, whose telescoped terms k > i hold r_k and the factors past k
      let sR = 0;
      let sq = Infinity;
      let tv = 0;
      for (let i = 0; i < n; i++) {
        let others = 1;
        for (let j = 0; j < n; j++) if (j !== i) others *= ms[j].atom;
        const f = ds[i].split ?? { R: ds[i].R, q: ds[i].q, tv: 0 };
        if (others > 0) {
          if (f.R > 0) {
            sR += others * f.R;
            sq = Math.min(sq, f.q);
          }
          tv += others * f.tv;
        }
        let before = 1;
        for (let j = 0; j < i; j++) before *= ms[j].atom;
        for (let k = i + 1; k < n; k++) {
          let c = before * ds[i].R * ds[k].R;
          let Q = ds[i].q + ds[k].q;
          for (let j = i + 1; j < k; j++) c *= ms[j].atom;
          for (let j = k + 1; j < n; j++) {
            if (ms[j].atom > 0) c *= ms[j].atom + r[j];
            else {
              c *= ds[j].R;
              Q += ds[j].q;
            }
          }
          if (c > 0) {
            sR += c;
            sq = Math.min(sq, Q);
          }
        }
      }
      return { ...whole, split: { R: sR * g, q: sq, tv: tv * g } };
    },
    slope(beta, t) {
      eval_(beta, t, true);
      let total = 0;
      for (let i = 0; i < n; i++) {
        let p = s[i];
        for (let j = 0; j < n; j++) if (j !== i) p *= ms[j].atom + r[j];
        total += p;
      }
      return total * g;
    },
  };
}

export function scaleDampedMajorant(node: Node, a: number, c: Node): DampedMajorant | undefined {
  const m = c.dampedMajorant;
  const cf = node.dampedLogCf;
  if (!cf || !m || m.cf !== c.dampedLogCf || !(a > 0) || !Number.isFinite(a)) return undefined;
  const down = (t: number) => a * t * (1 - 2 * EPS);
  // a X of a gamma(k, rho) term is gamma(k, rho / a); kept only where that rate is exact (a a power of 2) or not needed
  const gamma = m.gamma && Number.isInteger(Math.log2(a)) ? { shape: m.gamma.shape, rate: m.gamma.rate / a } : undefined;
  return {
    cf,
    atom: m.atom,
    ...(gamma ? { gamma } : {}),
    rest: (beta, t) => m.rest(a * beta, down(t)),
    slope: (beta, t) => up(a * m.slope(a * beta, down(t)), 4),
    decay: (beta, t0) => {
      const d = m.decay(a * beta, down(t0));
      return d.split ? { ...d, split: { ...d.split, tv: up(d.split.tv / a, 4) } } : d;
    },
  };
}

export function shiftDampedMajorant(node: Node, c: Node): DampedMajorant | undefined {
  const m = c.dampedMajorant;
  const cf = node.dampedLogCf;
  if (!cf || !m || m.cf !== c.dampedLogCf) return undefined;
  return { cf, atom: m.atom, rest: m.rest, slope: m.slope, decay: m.decay, ...(m.gamma ? { gamma: m.gamma } : {}) };
}
