/** Counts of the (a, b, 1) class: logarithmic, zero-truncated and zero-modified Poisson, negative binomial, binomial. */
import { cumulantsToRaw, rawToCumulants, type Node } from "../node";
import { nearestZero, sortedAnchor, unwrapFrom } from "../complex";
import type { LatticeTable } from "../types";
import { eulerianRow } from "./special";
import { withPeriodicLogRound } from "./log-round-table";

const TAIL_EPS = 1e-18;

/**
 * Logarithmic (log-series) law: P(N = k) = -p^k / (k log(1 - p)), k >= 1; P_N(z) = log(1 - p z) / log(1 - p)
 * (Johnson, Kemp & Kotz, Univariate Discrete Distributions, ch. 7; Loss Models, (a, b, 1) class with a = p,
 * b = -p, p0 = 0). E N^n = Li_{1-n}(p) / (-log(1-p)) = p A_{n-1}(p) / ((1-p)^n (-log(1-p))), A the Eulerian
 * polynomial (polylogarithm of negative order, recalled from memory).
 */
export function logarithmic(p: number): Node {
  const ell = Math.log1p(-p); // < 0
  const cgfAt = (er: number, ei: number, k: number, re: Float64Array, im: Float64Array) => {
    // log(1 - p z), z = (er, ei): |p z| < 1 keeps 1 - p z in the right half plane
    const ar = -p * er;
    const ai = -p * ei;
    const lr = 0.5 * Math.log1p(2 * ar + ar * ar + ai * ai);
    const li = Math.atan2(ai, 1 + ar);
    // log(L / ell), ell < 0
    re[k] = 0.5 * Math.log(lr * lr + li * li) - Math.log(-ell);
    im[k] = Math.atan2(-li, -lr);
  };
  const raw = (n: number) => {
    const row = eulerianRow(n - 1);
    let v = 0;
    for (let j = row.length - 1; j >= 0; j--) v = v * p + row[j];
    return (p * v) / ((1 - p) ** n * -ell);
  };
  const mean = raw(1);
  const p1 = -p / ell;
  return {
    kind: { type: "lattice", origin: 0, step: 1, atoms: null },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
    location: mean,
    scale: Math.sqrt(Math.max(raw(2) - mean * mean, 0)) || 1,
    support: [1, Infinity],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) cgfAt(Math.cos(t[k]), Math.sin(t[k]), k, re, im);
      const a = sortedAnchor(t);
      if (a >= 0) unwrapFrom(im, a);
    },
    cumulants: (n) => rawToCumulants(Array.from({ length: n }, (_, i) => raw(i + 1))),
    table(maxLength) {
      const buf: number[] = [0];
      let q = p1;
      let total = 0;
      let k = 1;
      while (buf.length < maxLength) {
        buf.push(q);
        total += q;
        k++;
        q *= (p * (k - 1)) / k;
        if (q < TAIL_EPS * total) break;
      }
      // dropped tail: sum_{j>=k} p1 p^{j-1}/j <= q / (1 - p)
      // p1 = -p / log1p(-p) within 2 eps (an ulp of log1p and a division); each step p (k - 1)/k times q: four roundings
      return { origin: 0, step: 1, p: Float64Array.from(buf), tailMass: q / (1 - p), pointRel: (j) => 1.01 * (2 * Number.EPSILON + 2 * j * Number.EPSILON) };
    },
    countCgf(wr, wi, re, im) {
      for (let k = 0; k < wr.length; k++) {
        const e = Math.exp(wr[k]);
        cgfAt(e * Math.cos(wi[k]), e * Math.sin(wi[k]), k, re, im);
      }
      unwrapFrom(im, nearestZero(wr, wi));
    },
    // a = p and b = -p exactly; p1 within 2 eps (above)
    panjer: { a: p, b: -p, p0: 0, c1: p1, err: { a: 0, b: 0, p0: 0, c1: 2.02 * Number.EPSILON * p1 } },
    p0: 0,
    ...logarithmicLogRound(p, mean),
  };
}

/**
 * Node.logRoundSlope / logRoundAt of the logarithmic law as a claim (./log-round.ts: 8 u |phi| |L|): -log(1 - p e^{it}) =
 * zeta G(zeta), zeta = p e^{it}, G(zeta) = int_0^1 ds / (1 - s zeta) with Re G >= int_0^1 (1 - s p) / (1 + s p)^2 ds =
 * (2p / (1 + p) - log(1 + p)) / p =: G_lo > 0, so the continuous argument is t + g(t), |g| < pi / 2 and |g'| <= c =
 * p G'(p) / G_lo (|G'(zeta)| <= G'(p) = (p / (1 - p) + log(1 - p)) / p^2, non-negative coefficients). An unwrap from any
 * t0 <= t then gives |Im L(t)| <= pi min(1, m t0) + t + min(pi, c t), and |phi| |log |phi|| <= min(1/e, m t) (|1 - phi| <= m t):
 * R = 8 u (m (1 + pi) + 1 + c); per frequency with |phi(t)| = |log(1 - p e^{it})| / -log(1 - p) in closed form.
 */
function logarithmicLogRound(p: number, m: number): Pick<Node, "logRoundSlope" | "logRoundAt" | "logRoundNote"> {
  const EPS = Number.EPSILON;
  const U8 = 8 * EPS;
  const gLo = (((2 * p) / (1 + p) - Math.log1p(p)) / p) * (1 - 1e-12);
  const dG = (p / (1 - p) + Math.log1p(-p)) / (p * p);
  // (dG by cancellation for small p: at most its series' 1/2 + 2 p / 3 + ... <= 1 / (2 (1 - p)^2), taken where smaller than
  // the computed value's rounding allows)
  const c = ((p * Math.max(0, Math.min(dG * (1 + 1e-6) + 1e-9 / (p * p), 1 / (2 * (1 - p) * (1 - p))))) / gLo) * (1 + 1e-12);
  const mm = m * (1 + 4 * EPS);
  const slope = U8 * (mm * (1 + Math.PI) + 1 + c) * (1 + 16 * EPS);
  const ell = -Math.log1p(-p);
  return {
    logRoundSlope: slope,
    logRoundAt: (t) => {
      const a = Math.abs(t);
      const ar = 1 - p * Math.cos(a);
      const ai = -p * Math.sin(a);
      const M = Math.min(1, (Math.hypot(0.5 * Math.log(ar * ar + ai * ai), Math.atan2(ai, ar)) / ell) * (1 + 1e-12));
      const re = Math.min(1 / Math.E, mm * a, M <= 1 / Math.E ? (M > 0 ? -M * Math.log(M) * (1 + 4 * EPS) : 0) : Infinity);
      const b = U8 * (re + M * (Math.PI * Math.min(1, mm * a) + a + Math.min(Math.PI, c * a))) * (1 + 16 * EPS);
      return Math.min(slope * a, b);
    },
    logRoundNote: "the claim law's log rounding is bounded with its phase unwrapped along a grid that resolves it (steps below pi) or principal",
  };
}

/**
 * Zero-modified law of an (a, b, 0) count N, or of the logarithmic law: P(M = 0) = p0M, P(M = k) = (1 - p0M)/(1 - p0) P(N = k), k >= 1
 * (zero-truncated: p0M = 0), P_M(z) = 1 + beta (P_N(z) - 1), beta = (1 - p0M)/(1 - p0) (Loss Models, (a, b, 1) class).
 * `oneMinusP0` is 1 - P(N = 0) computed without cancellation. The generating function is formed as 1 + beta expm1(K_N(w)) against cancellation when P(N = 0) is close to 1.
 */
export function zeroModified(base: Node, p0M: number, oneMinusP0: number): Node {
  const p0 = base.p0!;
  // a degenerate base (binomial with p = 1: N = n) has no (a, b, 0) recursion; the modified law then has none either
  const pan = base.panjer;
  const beta = (1 - p0M) / oneMinusP0;
  const mix = (re: Float64Array, im: Float64Array, n: number) => {
    for (let k = 0; k < n; k++) {
      // expm1(K), K = (re, im)
      const em = Math.expm1(re[k]);
      const c = Math.cos(im[k]);
      const xr = em * c - 2 * Math.sin(0.5 * im[k]) ** 2;
      const xi = Math.exp(re[k]) * Math.sin(im[k]);
      const zr = 1 + beta * xr;
      const zi = beta * xi;
      re[k] = 0.5 * Math.log(zr * zr + zi * zi);
      im[k] = Math.atan2(zi, zr);
    }
  };
  const baseRaw = (n: number) => cumulantsToRaw(base.cumulants(n));
  const raw = (n: number) => baseRaw(n).map((v) => (v === null ? null : beta * v));
  const r2 = raw(2);
  const mean = r2[0] as number;
  const node: Node = {
    kind: { type: "lattice", origin: 0, step: 1, atoms: null },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
    location: mean,
    scale: Math.sqrt(Math.max((r2[1] as number) - mean * mean, 0)) || 1,
    support: [p0M > 0 ? 0 : 1, base.support[1]],
    logCf(t, re, im) {
      base.logCf(t, re, im);
      mix(re, im, t.length);
      const a = sortedAnchor(t);
      if (a >= 0) unwrapFrom(im, a);
    },
    cumulants: (n) => rawToCumulants(raw(n)),
    table(maxLength) {
      const t = base.table?.(maxLength);
      if (!t || t.origin !== 0) return null;
      const p = new Float64Array(t.p.length);
      for (let k = 1; k < p.length; k++) p[k] = beta * t.p[k];
      p[0] = p0M;
      // beta = (1 - p0M) / oneMinusP0: 1 - p0M and the division within eps/2 each; oneMinusP0 = -expm1(y), y = log P(N = 0)
      // within 1.5 eps relative, is within 1.5 eps + an ulp relative (|y| e^y / (1 - e^y) <= 1), or exact (1); the product
      // beta p[k] one more rounding
      const rel = t.pointRel;
      const far = t.beyond;
      const out: LatticeTable = {
        origin: 0,
        step: 1,
        p,
        tailMass: beta * t.tailMass,
        ...(rel ? { pointRel: (j: number) => rel(j) + 4.5 * Number.EPSILON } : {}),
        ...(rel && far ? { beyond: (j: number) => beta * far(j) * (1 + 5 * Number.EPSILON) } : {}),
      };
      return out;
    },
    countCgf(wr, wi, re, im) {
      base.countCgf!(wr, wi, re, im);
      mix(re, im, wr.length);
      unwrapFrom(im, nearestZero(wr, wi));
    },
    // (a, b, 1): P(M = k) = (a + b/k) P(M = k-1) for k >= 2; c1 = p1M - (a + b) p0M with p1M = beta P(N = 1) and
    // P(N = 1) = (a + b) p0 + c1 of the base (c1 = 0 for an (a, b, 0) base; the logarithmic base has p0 = 0)
    panjer: pan ? zeroModifiedPanjer(pan, p0, p0M, beta) : undefined,
    p0: p0M,
  };
  // claim-law rounding (./log-round-table.ts withPeriodicLogRound, from this logCf over one period): its modulus within
  // beta times the base value's error (declared, plus 8 u (1 + |L_N|) |phi_N| <= 8 u + R_N 2 pi, R_N the base's logRoundSlope;
  // expm1, cos, sin a few u more) plus 1 + beta x's roundings, 2 u (1 + 2 beta) (|x| = |phi_N - 1| <= 2)
  const RN = base.logRoundSlope;
  if (!(RN !== undefined && Number.isFinite(RN) && mean > 0)) return node;
  const err = (beta * ((base.cfAbsError ?? 0) + (base.cfRelError ?? 0) + 16 * Number.EPSILON + 2 * Math.PI * RN) + 2 * Number.EPSILON * (1 + 2 * beta)) * 1.01;
  return withPeriodicLogRound(node, { mean, logCf: node.logCf, err, budget: 4096 });
}

/**
 * The (a, b, 1) recursion of the zero-modified law: a and b the base's, P(M = 0) = p0M (exact, as given), c1 = beta ((a + b)
 * p0 + c1_base) - (a + b) p0M, with the bound on its error: a + b within u of itself and a's and b's errors, p0 within
 * its own, beta within 3.5 eps (above), each product, sum and difference one rounding (Higham, Accuracy and Stability of
 * Numerical Algorithms, 2nd ed., sec. 3.1, first order; the factor 1.01 covers the second).
 */
function zeroModifiedPanjer(pan: NonNullable<Node["panjer"]>, p0: number, p0M: number, beta: number): NonNullable<Node["panjer"]> {
  const U = Number.EPSILON / 2;
  const A = pan.a + pan.b;
  const X = A * p0 + (pan.c1 ?? 0);
  const c1 = beta * X - A * p0M;
  const out: NonNullable<Node["panjer"]> = { a: pan.a, b: pan.b, p0: p0M, c1 };
  const e = pan.err;
  if (!e) return out;
  const eA = U * Math.abs(A) + e.a * Math.abs(pan.a) + e.b * Math.abs(pan.b);
  const eAp0 = eA * p0 + Math.abs(A * p0) * (e.p0 + U);
  const eX = eAp0 + e.c1 + U * Math.abs(X);
  const eY = eA * p0M + U * Math.abs(A * p0M);
  const c1Err = (Math.abs(beta * X) * (3.5 * Number.EPSILON + U) + Math.abs(beta) * eX + eY + U * Math.abs(c1)) * 1.01;
  return { ...out, err: { a: e.a, b: e.b, p0: 0, c1: c1Err } };
}
