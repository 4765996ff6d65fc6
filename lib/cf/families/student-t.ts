/**
 * Student t (nu, loc, scale): phi = e^{i loc t} K_{nu/2}(z) z^{nu/2} / (Gamma(nu/2) 2^{nu/2-1}), z = sqrt(nu) scale |t|
 * (JKB vol. 2, ch. 28, sec. 2; Hurst 1995, recalled from memory), and the derived bound on its log-CF's error
 * (studentTLogCfError). Up to nu = 100, K by one trapezoidal rule for a batch of equispaced frequencies (besselBatch),
 * the same rule per point (besselPoint, z <= 64, nu >= 1) or logBesselKScaledBounded (./bessel-bounded.ts); beyond, where the Bessel form cancels terms of
 * size nu log nu, the normal-mixture form with its own derived bound (./student-mixture.ts).
 */
import { lgamma, lgammaErr } from "./special";
import { cumulantList, rawToCumulants, type Node } from "../node";
import { EXP_SUM_DROP, EXP_SUM_REL, arithmeticNodes, expSumArithmetic } from "./cf-quadrature";
import { besselTrapezoidStep, logBesselKScaledBounded } from "./bessel-bounded";
import { base } from "./continuous";
import { studentMixtureLog0, studentMixtureLogCf } from "./student-mixture";
import { linearLogRound } from "./log-round";

const U = Number.EPSILON / 2;

/** the largest z = sqrt(nu) scale t that besselBatch takes (beyond, one rule per z) */
const BATCH_Z = 64;
/**
 * besselBatch keeps a frequency only where expSumArithmetic's bound there (per frequency for its positive terms,
 * EXP_SUM_REL of the sum plus n EXP_SUM_DROP) is at most this much of the sum (the others go to the single-point route):
 * the dropped terms at most 2^-54 of it.
 */
const BATCH_REL = EXP_SUM_REL + 2 ** -54;
/** the batch's discretisation, relative to K (besselTrapezoidStep's TARGET, with 1% for the rounding of h) */
const BATCH_DISC = 1.01 * 2 ** -58;
/** the batch's truncation, relative to the sum: nodes past u_n are below h e^{-41.5} and fall by e^{-1} a step */
const BATCH_TAIL = 1.17 * Math.exp(-41.5);

export function studentT(nu: number, loc: number, scale: number): Node {
  const half = nu / 2;
  const c0 = (1 - half) * Math.LN2 - lgamma(half);
  const sq = Math.sqrt(nu) * scale;
  // E T^{2k} = nu^k prod_{j=1}^k (2j-1)/(nu-2j) for 2k < nu (JKB vol. 2, ch. 28)
  const raw = (m: number): number => {
    if (m % 2 === 1) return 0;
    let v = 1;
    for (let j = 1; j <= m / 2; j++) v *= (nu * (2 * j - 1)) / (nu - 2 * j);
    return v;
  };
  // for large nu the Bessel form cancels terms of size nu log nu: the normal-mixture form (./student-mixture.ts) instead
  const log0 = nu > 100 ? studentMixtureLog0(half) : { v: 0, e: 0 };
  const direct = nu <= 100 && half >= 0.5;
  const one = (z: number) =>
    z === 0
      ? 0
      : z === Infinity
        ? -Infinity
        : nu > 100 && z < 1e100
          ? studentMixtureLogCf(half, z, log0).v
          : c0 + half * Math.log(z) + (direct && z <= BATCH_Z ? besselPoint(half, z) : logBesselKScaledBounded(half, z).v) - z;
  return base({
    logCf(t, re, im) {
      let k0 = 0;
      // equispaced t (the inversion's nodes) up to z = 64: one trapezoidal rule for every z (below)
      if (nu <= 100 && arithmeticNodes(t)) {
        while (k0 < t.length && sq * t[k0] <= BATCH_Z) k0++;
        if (k0 >= 64) k0 = besselBatch(half, t.subarray(0, k0), sq, c0, re);
        else k0 = 0;
      }
      for (let k = k0; k < t.length; k++) re[k] = one(sq * Math.abs(t[k]));
      for (let k = 0; k < t.length; k++) im[k] = loc * t[k];
    },
    momentIndex: nu,
    cumulants: (n) => {
      const raws: (number | null)[] = cumulantList(n, nu, (m) => raw(m) * scale ** m);
      const k = rawToCumulants(raws);
      if (n > 0 && k[0] !== null) k[0] = loc;
      return k;
    },
    location: loc,
    scale: nu > 2 ? scale * Math.sqrt(nu / (nu - 2)) : scale,
    support: [-Infinity, Infinity],
    tails: { left: nu, right: nu },
    ...studentLogRound(nu, loc, scale),
  });
}

/**
 * Node.logRoundSlope of Student t (./log-round.ts, L = i loc t + v, v real <= 0, |phi| |L| <= |loc| |t| + |v| e^v): |v| e^v <= 1 - e^v =
 * E[1 - cos(t (X - loc))] <= |t| E|X - loc| (x |log x| <= 1 - x; 1 - cos y <= |y|), E|X - loc| = scale E|T_nu| = scale
 * 2 sqrt(nu) Gamma((nu+1)/2) / (sqrt(pi) (nu - 1) Gamma(nu/2)) <= scale sqrt(2/pi) nu / (nu - 1) (Gamma(x + 1/2) / Gamma(x) <=
 * sqrt x, Wendel 1948), and <= scale sqrt(nu / (nu - 2)) (the sd) for nu > 2; nu = 1 is Cauchy (v = -scale |t|). Below
 * nu = 1, 1 - e^v grows like |t|^nu, faster than |t|: not derived. The slope alone, R |t| at every frequency (a Bessel rule per
 * frequency would cost the inversions' node-by-node bounds more than their sums).
 */
function studentLogRound(nu: number, loc: number, scale: number): Pick<Node, "logRoundSlope" | "logRoundAt"> {
  if (nu < 1) return {};
  const k = nu === 1 ? scale : scale * Math.min((Math.sqrt(2 / Math.PI) * nu) / (nu - 1), nu > 2 ? Math.sqrt(nu / (nu - 2)) : Infinity) * (1 + 8 * Number.EPSILON);
  return linearLogRound((Math.abs(loc) + k) * (1 + 8 * Number.EPSILON));
}

/**
 * log of c0 z^nu K_nu(z) at z_k = sq t_k for equispaced t_k > 0 (the Student t CF), from
 * e^z K_nu(z) = int_0^inf e^{-z (cosh u - 1)} cosh(nu u) du (A&S 9.6.24) by the trapezoidal rule on the even
 * integrand with one step for every z of the batch: the step of z_max from the strip bound (besselTrapezoidStep,
 * Trefethen & Weideman 2014, SIAM Review 56, Thm 5.1), whose discretisation error is at most 2^-58 of K_nu(z) for every
 * z <= z_max (the bound grows with z); the nodes reach U where the integrand at the smallest z is below 1e-18 of the
 * u = 0 term and falls by e^{-1} per step or faster. The terms are positive (no cancellation), summed by
 * expSumArithmetic in the Laplace form exp(-z (cosh u_j - 1)). Writes the first frequencies where that sum's bound is at
 * most BATCH_REL of the sum (the sums fall with z, so these are a prefix) and returns how many.
 */
function besselBatch(nu: number, t: Float64Array, sq: number, c0: number, re: Float64Array): number {
  const K = t.length;
  const zMin = sq * t[0];
  const zMax = sq * t[K - 1];
  const { h } = besselTrapezoidStep(nu, zMax);
  let n = 1;
  for (; n < 1e6; n++) {
    const u = n * h;
    if (-zMin * (Math.cosh(u) - 1) + nu * u < -41.5 && zMin * Math.sinh(u) >= nu + 1 / h) break;
  }
  const cRe = new Float64Array(n + 1);
  const cIm = new Float64Array(n + 1);
  const e = new Float64Array(n + 1);
  for (let j = 0; j <= n; j++) {
    const u = j * h;
    cRe[j] = (j === 0 ? 0.5 : 1) * h * Math.cosh(nu * u);
    // cosh u - 1 = 2 sinh^2(u/2), without cancellation near u = 0
    e[j] = 2 * Math.sinh(u / 2) ** 2;
  }
  const sr = new Float64Array(K);
  const si = new Float64Array(K);
  // the returned bound is relative to the sums at the first frequency; per frequency it is EXP_SUM_REL of the sum there
  // plus the dropped terms (EXP_SUM_REL's note), kept within BATCH_REL of the sum
  expSumArithmetic(cRe, cIm, e, -sq, 0, t, sr, si);
  const dropped = (n + 1) * EXP_SUM_DROP;
  let k = 0;
  for (; k < K && EXP_SUM_REL * sr[k] + dropped <= BATCH_REL * sr[k]; k++) {
    const z = sq * t[k];
    re[k] = c0 + nu * Math.log(z) + Math.log(sr[k]) - z;
  }
  return k;
}

/**
 * log(e^z K_nu(z)) for 0 < z <= BATCH_Z, nu >= 1/2 (the single-point route up to nu = 100): the batch's rule for one z
 * (A&S 9.6.24, step besselTrapezoidStep(nu, z): discretisation <= 2^-58), each term scaled by e^{-G}, G = max_u
 * [nu u - z (cosh u - 1)] = nu asinh(nu/z) - (hypot(z, nu) - z) >= the log-integrand's peak (log cosh v <= v) and
 * within log 2 of it, so that no term overflows; summed compensated (Kahan). It stops past the peak
 * (z sinh u >= nu + 1/h: the log-term falls by 1 or more a step from there on) once a term is below 2^-60 of the sum,
 * so the rest is below 0.582 2^-60 of it. Its bound is derived in studentTLogCfError (no per-z work).
 */
function besselPoint(nu: number, z: number): number {
  const { h } = besselTrapezoidStep(nu, z);
  const G = nu * Math.asinh(nu / z) - (Math.hypot(z, nu) - z);
  let s = 0;
  let c = 0;
  for (let j = 0; j < 100000; j++) {
    const u = j * h;
    const sh = Math.sinh(0.5 * u);
    const g = logcosh(nu * u) - 2 * z * sh * sh;
    const v = h * Math.exp(g - G) * (j === 0 ? 0.5 : 1);
    const y = v - c;
    const tt = s + y;
    c = tt - s - y;
    s = tt;
    if (v <= 2 ** -60 * s && z * Math.sinh(u) >= nu + 1 / h) return G + Math.log(s);
  }
  return NaN;
}

/** log cosh v for v >= 0 (no overflow) */
function logcosh(v: number): number {
  return v + Math.log1p(Math.exp(-2 * v)) - Math.LN2;
}

/**
 * A bound on the absolute error of the Student t's log-CF real part (studentT above) at t, for either route.
 * Common terms: z = (sqrt(nu) scale) |t| is rounded three times (3u relative), which moves the exact log-CF
 * F(z) = c0 + nu' log z + log K_nu'(z) (nu' = nu/2) by at most 3u z |F'|, F' = -K_{nu'-1}/K_nu' (DLMF 10.29.4) and
 * K_{nu'-1}/K_nu' <= 1 + max(0, 1/2 - nu')/z (besselKLogSlope, DLMF 10.29.2); c0 by lgammaErr plus its two roundings
 * and LN2's; nu' log z by the logarithm (one ulp) and the product; the three additions u of each partial sum.
 * Single point: logBesselKScaledBounded's own bound, or for besselPoint (nu' >= 1/2, z <= BATCH_Z) the batch's terms
 * below without the shortcuts, with its stop (0.6 2^-60) and the scaling by G (the node note beside the code), |log(e^z K)|
 * bracketed in closed form. Batch (z <= BATCH_Z): the sum's relative error is the
 * discretisation 2^-58 (besselTrapezoidStep), the truncation (BATCH_TAIL), the shortcuts (<= BATCH_REL, enforced by
 * besselBatch), the compensated summation of positive terms (2u), and the nodes' roundings: term j moves by at most
 * u (3 + 2 nu' u_j + u_j z sinh u_j + 6 z e_j) relative (cosh 2u and h u; u_j = jh and nu' u_j through the log-term's
 * u-slope nu' tanh(nu' u) - z sinh u; e_j = 2 sinh^2(u_j/2) 5u; the sum taken at (sqrt(nu) scale) t_k, not at the
 * rounded z, u more in the exponent), whose mean under the weight e^{-z cosh u} cosh(nu' u) is bounded through
 * E[z (cosh u - 1)] <= max(nu', 1/2) (besselKLogSlope), z E[u sinh u] = 1 + nu' E[u tanh(nu' u)] (by parts) and
 * E[u] <= acosh(1 + max(nu', 1/2)/z) (Jensen, acosh(1 + x) concave); the rule's means are the integral's within its
 * discretisation (2^-58 relative, inside the 1% margin). Then log(sr) adds one ulp of |log sr|.
 * The batch takes nu <= 100 only; the bound is the larger of the two routes wherever the batch may apply. nu > 100
 * (z < 1e100): the z term above plus studentMixtureLogCf's bound.
 */
export function studentTLogCfError(nu: number, scale: number): (t: number) => number {
  const half = nu / 2;
  const c0 = (1 - half) * Math.LN2 - lgamma(half);
  const c0Err = lgammaErr(half) + 2 * U * Math.abs((1 - half) * Math.LN2) + U * Math.abs(c0) + U * Math.abs(1 - half);
  const sq = Math.sqrt(nu) * scale;
  const nm = Math.max(half, 0.5);
  const log0 = nu > 100 ? studentMixtureLog0(half) : null;
  const direct = nu <= 100 && half >= 0.5;
  const lgH = lgamma(half) + lgammaErr(half);
  return (t) => {
    const z = sq * Math.abs(t);
    if (z === 0) return 0;
    // phi(+-inf) = 0 exactly (the value -Infinity)
    if (z === Infinity) return 0;
    if (Number.isNaN(z)) return NaN;
    const zMove = 3.03 * U * (z + Math.max(0, 0.5 - half)) * 1.01;
    if (log0 && z < 1e100) return 1.01 * (zMove + studentMixtureLogCf(half, z, log0).e);
    const lz = Math.log(z);
    const a = c0 + half * lz;
    if (direct && z <= BATCH_Z) {
      // L = log(e^z K) in [log sqrt(pi/(2z)), z + log(Gamma(nu') 2^{nu'-1}) - nu' log z] (K_nu' >= K_{1/2} for
      // nu' >= 1/2; z^nu' K_nu'(z) decreasing to Gamma(nu') 2^{nu'-1}, DLMF 10.30.2)
      const lUp = z + lgH + (half - 1) * Math.LN2 - half * lz;
      const lLo = 0.5 * Math.log(Math.PI / (2 * z));
      const L = 1.01 * Math.max(Math.abs(lUp), Math.abs(lLo)) + 1e-12;
      const A = Math.acosh(1 + nm / z);
      const G = Math.max(0, half * Math.asinh(half / z) - (Math.hypot(z, half) - z)) * 1.01 + 1e-12;
      const common = zMove + c0Err + 3 * U * half * Math.abs(lz) + U * (Math.abs(a) + (Math.abs(a) + L) + (Math.abs(a) + L + z));
      // the batch: its nodes' mean rounding; the point: u_j, nu' u_j, log cosh (4u (nu' u + 1)), 6u z (cosh u - 1),
      // g and g - G, exp, h: U (9 nu' E[u] + 8 nm + G + 8) with E|g| <= nu' E[u] + nm, E|g - G| <= G + E|g|
      const relB = BATCH_DISC + BATCH_TAIL + BATCH_REL + 2 * U + U * (5 + 6 * nm + 3 * half * A) * 1.01;
      const relP = BATCH_DISC + 0.6 * 2 ** -60 + 2 * U + 1e-25 + U * (9 * half * A + 8 * nm + G + 8) * 1.01;
      const eB = (1.01 * relB) / (1 - relB) + 2.02 * U * L;
      const eP = (1.01 * relP) / (1 - relP) + 2.02 * U * (L + G) + U * L;
      return 1.01 * (common + Math.max(eB, eP));
    }
    const b = logBesselKScaledBounded(half, z);
    const common = zMove + c0Err + 3 * U * half * Math.abs(lz) + U * (Math.abs(a) + Math.abs(a + b.v) + Math.abs(a + b.v - z));
    let route = b.e;
    if (nu <= 100 && z <= BATCH_Z) {
      const eu = Math.acosh(1 + nm / z);
      const nodes = U * (5 + 6 * nm + 3 * half * eu) * 1.01;
      const rel = BATCH_DISC + BATCH_TAIL + BATCH_REL + 2 * U + nodes;
      route = Math.max(route, (1.01 * rel) / (1 - rel) + 2.02 * U * (Math.abs(b.v) + b.e));
    }
    return 1.01 * (common + route);
  };
}
