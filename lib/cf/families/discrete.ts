import { binomialPmf, eulerianRow, negativeBinomialPmf, poissonPmf } from "./special";
import type { Node } from "../node";
import { pointDamped } from "../damped-cf";
import { pointSeries } from "../damped-kernels";
import { nearestZero, unwrapFrom } from "../complex";
import type { LatticeTable } from "../types";
import { bulkRound } from "./bulk-bound";
import { QUOTIENT_DW_REL, quotientDW, type DW } from "./dd-telescope";
import { linearLogRound } from "./log-round";

const ALL = Infinity;
const LIGHT = { left: ALL, right: ALL };
/** tables are extended until the remaining tail is below this (or the length limit is reached) */
const TAIL_EPS = 1e-18;

/**
 * Node.logRoundSlope of the point mass at `at`: L = i at t within 8 ulps relative to |L| (../invert/part.ts cfUlps), |phi| = 1,
 * so R = 8 u |at|, and per frequency the same (|phi| does not fall). Damped, L~ = at (i t - beta): |phi~| = e^{-beta at}
 * (at >= 0 for a claim), |L~| = |at| hypot(t, beta) <= |at| (t + beta).
 */
function pointLogRound(at: number): Pick<Node, "logRoundSlope" | "logRoundAt" | "logRoundDampedAt" | "logRoundDampedOn"> {
  const slope = 8 * Number.EPSILON * Math.abs(at) * (1 + 8 * Number.EPSILON);
  // over [t0, t1] at the larger frequency (|L~| grows with t); one frequency is the run [t, t]
  const on = (beta: number, t0: number, t1: number) =>
    Math.min(1, Math.exp(-beta * at) * (1 + 4 * Number.EPSILON)) * slope * Math.hypot(Math.max(Math.abs(t0), Math.abs(t1)), beta) * (1 + 4 * Number.EPSILON);
  return {
    logRoundSlope: slope,
    logRoundAt: (t) => slope * Math.abs(t),
    logRoundDampedAt: (beta, t) => on(beta, t, t),
    logRoundDampedOn: on,
  };
}

/** Point mass at `at`: log phi = i at t. Kept as a lattice of step 0 internally (any step fits). */
export function point(at: number): Node {
  return {
    kind: { type: "lattice", origin: at, step: 0, atoms: [{ x: at, p: 1 }] },
    momentIndex: ALL,
    tails: LIGHT,
    nodes: 1,
    notes: [],
    location: at,
    scale: 0,
    support: [at, at],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        re[k] = 0;
        im[k] = at * t[k];
      }
    },
    cumulants: (n) => Array.from({ length: n }, (_, i) => (i === 0 ? at : 0)),
    table: () => ({ origin: at, step: 1, p: Float64Array.of(1), tailMass: 0 }),
    dampedLogCf: pointDamped(at),
    ...pointLogRound(at),
    transformSeries: pointSeries(at),
    countCgf(wr, wi, re, im) {
      for (let k = 0; k < wr.length; k++) {
        re[k] = at * wr[k];
        im[k] = at * wi[k];
      }
    },
    p0: at === 0 ? 1 : 0,
  };
}

const EPS = Number.EPSILON;

/**
 * Finish a table: p[0..len) from a generator p_k = next(k, p_{k-1}), stopping when the tail is negligible. rel0 bounds
 * the relative error of p0 and step that of one ratio times its product (roundings of eps/2 each, Higham, Accuracy and
 * Stability of Numerical Algorithms, sec. 3.1): p[k] is then within rel0 + k step relative (first order; the factor
 * 1.01 covers the second).
 */
function tabulate(maxLength: number, first: number, p0: number, ratio: (k: number) => number, rel0: number, step: number, hardEnd = Infinity, ratioLimit = 0): LatticeTable {
  const buf: number[] = [p0];
  let k = 1;
  let prev = p0;
  let total = p0;
  // grow while terms matter; the upper tail of these laws decays at least geometrically past the mode
  while (k <= hardEnd) {
    const next = prev * ratio(k);
    if (buf.length >= maxLength) break;
    if (next < TAIL_EPS * total && ratio(k) < 1 && k > first) {
      break;
    }
    buf.push(next);
    total += next;
    prev = next;
    k++;
  }
  // remaining mass: continue the recursion past the table (bounded)
  let tail = 0;
  let q = prev;
  let j = k;
  let last = k;
  for (; j <= hardEnd && j < k + 1e7; j++) {
    q *= ratio(j);
    tail += q;
    last = j;
    if (q <= TAIL_EPS * tail * 1e-3 && ratio(j) < 1) break;
    if (q === 0) break;
  }
  const len = buf.length;
  const rel = (j: number) => 1.01 * (rel0 + j * step);
  // an upper bound on that mass: the terms past the last one summed (at most q R / (1 - R), R the ratios' supremum
  // there: the next ratio or their limit, the ratio being monotone in k), each term within rel(j) relative and their
  // sum of m terms within gamma_m (Higham, sec. 3.1); a tail that cannot be bounded so stays as summed (hardEnd laws)
  if (tail > 0 && !(last >= hardEnd)) {
    const R = Math.max(ratio(last + 1), ratioLimit);
    const m = last - k + 2;
    tail = R < 1 ? (tail + (q * R) / (1 - R)) * (1 + rel(last + 1)) * (1 + (m + 2) * EPS) : tail;
  }
  // past the end: the recursion continued from the last entry (within rel(j) of p_j); the dropped tail where that is far
  const beyond = (j: number) => {
    if (j > hardEnd) return 0;
    if (j - len > 1e5) return tail * (1 + rel(len + 1e5));
    let v = buf[len - 1];
    for (let i = len; i <= j; i++) v *= ratio(i);
    return v * (1 + 2 * rel(j));
  };
  return { origin: 0, step: 1, p: Float64Array.from(buf), tailMass: tail, pointRel: rel, beyond };
}

/**
 * Binomial(n, p): log phi = n log(1 - p + p e^{it}) (Johnson, Kemp & Kotz, Univariate Discrete Distributions, ch. 3).
 * For p <= 1/2 the factor has Re > 0 on |z| = 1; for p > 1/2 it is written e^{it}(p + (1-p)e^{-it}), again with
 * Re > 0, which gives the continuous branch in closed form.
 */
export function binomial(n: number, p: number): Node {
  const q = 1 - p;
  const logTerm = (cr: number, ci: number, sr: number, si: number, outK: number, re: Float64Array, im: Float64Array) => {
    // log(1 + a (z - 1)) with z - 1 = (cr, ci) (cr = cos - 1 computed accurately), a = p or (1-p)
    const r2 = 2 * cr + cr * cr + ci * ci;
    re[outK] = 0.5 * Math.log1p(r2) * n + sr;
    im[outK] = Math.atan2(ci, 1 + cr) * n + si;
  };
  const cumulants = (m: number) => {
    // c_1 = p, c_{j+1} = p(1-p) dc_j/dp (JKK ch. 3), as polynomials in p
    let poly = [0, 1];
    const out: number[] = [];
    for (let j = 1; j <= m; j++) {
      let v = 0;
      for (let i = poly.length - 1; i >= 0; i--) v = v * p + poly[i];
      out.push(n * v);
      const der = poly.slice(1).map((c, i) => c * (i + 1));
      const next = new Array<number>(der.length + 2).fill(0);
      for (let i = 0; i < der.length; i++) {
        next[i + 1] += der[i];
        next[i + 2] -= der[i];
      }
      poly = next;
    }
    return out;
  };
  const support: [number, number] = p === 0 ? [0, 0] : p === 1 ? [n, n] : [0, n];
  const single = p === 0 || p === 1 || n === 0;
  const node: Node = {
    kind: single
      ? { type: "lattice", origin: support[0], step: 0, atoms: [{ x: support[0], p: 1 }] }
      : { type: "lattice", origin: 0, step: 1, atoms: n <= 4096 ? binomialAtoms(n, p) : null },
    momentIndex: ALL,
    tails: LIGHT,
    nodes: 1,
    notes: [],
    location: n * p,
    scale: Math.sqrt(n * p * q) || 1,
    support,
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const x = t[k];
        const cm1 = -2 * Math.sin(0.5 * x) ** 2;
        const sn = Math.sin(x);
        if (p <= 0.5) logTerm(p * cm1, p * sn, 0, 0, k, re, im);
        else logTerm(q * cm1, -q * sn, 0, n * x, k, re, im);
      }
    },
    cumulants,
    table: (maxLength) => {
      if (single) return { origin: support[0], step: 1, p: Float64Array.of(1), tailMass: 0 };
      const tab = binomialTable(n, p, maxLength);
      return tab;
    },
    countCgf(wr, wi, re, im) {
      for (let k = 0; k < wr.length; k++) {
        const e = Math.exp(wr[k]);
        const zr = e * Math.cos(wi[k]) - 1;
        const zi = e * Math.sin(wi[k]);
        logTerm(p * zr, p * zi, 0, 0, k, re, im);
      }
      unwrapFrom(im, nearestZero(wr, wi));
    },
    panjer: p < 1 ? { a: -p / q, b: ((n + 1) * p) / q, p0: q ** n } : undefined,
    p0: q ** n,
  };
  // claim-law rounding (./log-round.ts): p <= 1/2, L = n log z, z = 1 - p + p e^{it}, Re z >= 1 - 2p >= 0, so |arg z| <=
  // (pi/2) |Im z| / |z| and |phi| n |arg z| <= (pi/2) n p |t| |z|^{n-1}; |phi| |log|phi|| <= 1 - |phi| <= |1 - phi| <= n p |t|.
  // p > 1/2: L = i n t + n log(1 - q + q e^{-it}), the same with q, plus n |t|. So c = (1 + pi/2) n p, or n + (1 + pi/2) n q
  const c = p <= 0.5 ? (1 + Math.PI / 2) * n * p : n + (1 + Math.PI / 2) * n * q;
  return Object.assign(node, linearLogRound(c * (1 + 8 * EPS), node.logCf));
}

function binomialAtoms(n: number, p: number) {
  const t = binomialTable(n, p, n + 1);
  return Array.from(t.p, (v, k) => ({ x: k, p: v }));
}

/**
 * Table of a law on 0, 1, 2, ... over its bulk [mean - 20 sd, mean + 20 sd] (beyond it the mass is far below 1e-40
 * for these near-Gaussian laws) from an accurate pmf, for laws whose P(N = 0) underflows; the origin is the first
 * index kept. With the law's ratio p_{k+1} / p_k (non-increasing, within relRatio of itself) the table carries a bound
 * derived a posteriori (./bulk-bound.ts) and tailMass is its bound on the mass left out; else 1 - kept mass.
 */
function bulkTable(
  mean: number,
  sd: number,
  top: number,
  maxLength: number,
  pmf: (k: number) => number,
  ratio?: (k: number) => number,
  relRatio = 0,
  ratioDW?: { at: (k: number) => DW | null; rel: number },
): LatticeTable {
  const k0 = Math.max(0, Math.floor(mean - 20 * sd - 40));
  const k1 = Math.min(top, Math.ceil(mean + 20 * sd + 40), k0 + maxLength - 1);
  const out = new Float64Array(k1 - k0 + 1);
  let s = 0;
  for (let k = k0; k <= k1; k++) {
    out[k - k0] = pmf(k);
    s += out[k - k0];
  }
  const b = ratio ? bulkRound(out, k0, ratio, relRatio, k0 === 0, k1 === top, ratioDW) : null;
  if (b) return { origin: k0, step: 1, p: out, tailMass: b.tail, round: b.round, pointErr: b.pointErr };
  return { origin: k0, step: 1, p: out, tailMass: Math.max(0, 1 - s) };
}

/** Binomial pmf: multiplicative recursion from k = 0 when (1-p)^n is representable, else log-gamma form. */
function binomialTable(n: number, p: number, maxLength: number): LatticeTable {
  const q = 1 - p;
  const start = q ** n;
  // ratio (n - k) / (k + 1) p / q: q = 1 - p (u), p / q (u), the integer quotient (u), the product (u)
  if (!(start > 1e-280 && n <= 1e5)) return bulkTable(n * p, Math.sqrt(n * p * q), n, maxLength, (k) => binomialPmf(k, n, p), (k) => ((n - k) / (k + 1)) * (p / q), 2.02 * EPS);
  const len = Math.min(n + 1, maxLength);
  const out = new Float64Array(len);
  out[0] = start;
  const r = p / q;
  for (let k = 1; k < len; k++) out[k] = (out[k - 1] * (n - k + 1) * r) / k;
  let s = 0;
  for (let k = 0; k < len; k++) s += out[k];
  // q = 1 - p within eps/2, so q^n within n eps/2 and pow's own ulp; each step: r = p/q within eps, three roundings
  const rel0 = (n / 2 + 2) * EPS;
  return { origin: 0, step: 1, p: out, tailMass: len === n + 1 ? 0 : Math.max(0, 1 - s), pointRel: (j) => 1.01 * (rel0 + 2.5 * j * EPS) };
}

/** Poisson(lambda): log phi = lambda (e^{it} - 1) (JKK ch. 4); entire, so the branch is continuous as written. */
export function poisson(lambda: number): Node {
  const node: Node = {
    kind: lambda === 0 ? { type: "lattice", origin: 0, step: 0, atoms: [{ x: 0, p: 1 }] } : { type: "lattice", origin: 0, step: 1, atoms: null },
    momentIndex: ALL,
    tails: LIGHT,
    nodes: 1,
    notes: [],
    location: lambda,
    scale: Math.sqrt(lambda) || 1,
    support: [0, lambda === 0 ? 0 : Infinity],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const x = t[k];
        re[k] = -2 * lambda * Math.sin(0.5 * x) ** 2;
        im[k] = lambda * Math.sin(x);
      }
    },
    cumulants: (n) => new Array(n).fill(lambda),
    table(maxLength) {
      if (lambda === 0) return { origin: 0, step: 1, p: Float64Array.of(1), tailMass: 0 };
      // e^-lambda within an ulp; each step lambda/k and the product, two roundings
      if (lambda < 700) return tabulate(maxLength, Math.ceil(lambda), Math.exp(-lambda), (k) => lambda / k, 2 * EPS, EPS);
      // large mean: saddle-point pmf over the bulk
      // ratio lambda / (k + 1): one division
      // (and as a double word, within 4 u^2: ./dd-telescope.ts)
      return bulkTable(lambda, Math.sqrt(lambda), Infinity, maxLength, (k) => poissonPmf(k, lambda), (k) => lambda / (k + 1), 0.51 * EPS, { at: (k) => quotientDW(lambda, k), rel: QUOTIENT_DW_REL });
    },
    countCgf(wr, wi, re, im) {
      for (let k = 0; k < wr.length; k++) {
        const e = Math.exp(wr[k]);
        re[k] = lambda * (e * Math.cos(wi[k]) - 1);
        im[k] = lambda * e * Math.sin(wi[k]);
      }
    },
    // log P_N(z) = lambda (z - 1)
    countLogPgf(zr, zi, re, im) {
      for (let k = 0; k < zr.length; k++) {
        re[k] = lambda * (zr[k] - 1);
        im[k] = lambda * zi[k];
      }
    },
    // P_N'(z) = lambda P_N(z) and P_N(z) = P_N(z0) e^{lambda (z - z0)}, so |P_N'(z)| <= lambda |P_N(z0)| e^{lambda d}
    countSlopeNear: (absPgf, d) => lambda * absPgf * Math.exp(lambda * d),
    // a = 0 and b = lambda exactly; e^-lambda within an ulp
    panjer: { a: 0, b: lambda, p0: Math.exp(-lambda), err: { a: 0, b: 0, p0: EPS, c1: 0 } },
    // |P'(z) / P(z)| = lambda on the unit disc (P(z) = e^{lambda (z - 1)})
    cgfSlope: lambda,
    divide: (m) => ({ a: 0, b: lambda / m, pgf: (z) => Math.exp((lambda / m) * (z - 1)) }),
    p0: Math.exp(-lambda),
  };
  // claim-law rounding (./log-round.ts): L = lambda (e^{it} - 1), |L| <= lambda |e^{it} - 1| <= lambda |t|
  return Object.assign(node, linearLogRound(lambda * (1 + 8 * EPS), node.logCf));
}

/**
 * Negative binomial (failures before the r-th success): log phi = r (log p - log(1 - (1-p) e^{it})) (JKK ch. 5);
 * Re(1 - (1-p) z) >= p > 0 for |z| <= 1, so the principal log is continuous.
 */
export function negativeBinomial(r: number, p: number): Node {
  const q = 1 - p;
  const lp = Math.log(p);
  const single = q === 0;
  const cgfAt = (er: number, ei: number, k: number, re: Float64Array, im: Float64Array) => {
    // log(1 - q z) with z = (er, ei)
    const ar = -q * er;
    const ai = -q * ei;
    re[k] = r * (lp - 0.5 * Math.log1p(2 * ar + ar * ar + ai * ai));
    im[k] = -r * Math.atan2(ai, 1 + ar);
  };
  const node: Node = {
    kind: single ? { type: "lattice", origin: 0, step: 0, atoms: [{ x: 0, p: 1 }] } : { type: "lattice", origin: 0, step: 1, atoms: null },
    momentIndex: ALL,
    tails: LIGHT,
    nodes: 1,
    notes: [],
    location: (r * q) / p,
    scale: Math.sqrt(r * q) / p || 1,
    support: [0, single ? 0 : Infinity],
    // L = -r log((1 - q z) / p) = -r log(1 + w), w = -(q / p) (z - 1), z - 1 = (-2 sin^2(t/2), sin t) without cancellation
    // (log p - log|1 - q z| loses r u |log p| near t = 0: 6e-9 at r = 1e8, t = 1e-8, against mpmath); Re(1 + w) = Re(1 - q z)
    // / p >= 1, so the principal log is the continuous branch
    logCf(t, re, im) {
      const f = q / p;
      for (let k = 0; k < t.length; k++) {
        const sh = Math.sin(0.5 * t[k]);
        const wr = 2 * f * sh * sh;
        const wi = -f * Math.sin(t[k]);
        re[k] = -0.5 * r * Math.log1p(2 * wr + wr * wr + wi * wi);
        im[k] = -r * Math.atan2(wi, 1 + wr);
      }
    },
    // kappa_n = r q A_{n-1}(q) / p^n, A_m the Eulerian polynomial (from -log(1 - q e^u) = sum_j q^j e^{ju} / j)
    cumulants: (n) =>
      Array.from({ length: n }, (_, i) => {
        const row = eulerianRow(i);
        let v = 0;
        for (let j = row.length - 1; j >= 0; j--) v = v * q + row[j];
        return (r * q * v) / p ** (i + 1);
      }),
    table(maxLength) {
      if (single) return { origin: 0, step: 1, p: Float64Array.of(1), tailMass: 0 };
      const start = Math.exp(r * lp);
      // start = e^{r log p}: log p within an ulp and the product within eps/2 move the exponent by 1.5 eps |r log p|, exp adds
      // an ulp; a step (q (r + k - 1))/k times p_{k-1}: q within eps/2, r + k - 1 within eps/2 of r + k and eps/2 of its own
      // value (r + k <= (1 + 1/r)(r + k - 1): at most 2 past k = 1, whose excess goes in rel0), three more roundings
      if (start > 1e-280)
        return tabulate(maxLength, Math.ceil((r * q) / p), start, (k) => (q * (r + k - 1)) / k, (1.5 * Math.abs(r * lp) + 2 + (1 + 1 / r) / 2) * EPS, 4 * EPS, Infinity, q);
      // ratio q (r + k) / (k + 1) (non-increasing for r >= 1): q = 1 - p (u), r + k (u), the product and the division
      return bulkTable((r * q) / p, Math.sqrt(r * q) / p, Infinity, maxLength, (k) => negativeBinomialPmf(k, r, p), r >= 1 ? (k) => (q * (r + k)) / (k + 1) : undefined, 2.02 * EPS);
    },
    // |P'(z) / P(z)| = r q / |1 - q z| <= r q / p on the unit disc, q = 1 - p
    cgfSlope: (r * (1 - p)) / p,
    countCgf(wr, wi, re, im) {
      for (let k = 0; k < wr.length; k++) {
        const e = Math.exp(wr[k]);
        cgfAt(e * Math.cos(wi[k]), e * Math.sin(wi[k]), k, re, im);
      }
    },
    // a = fl(1 - p) within u; b = fl(fl(r - 1) q) within 3u (and q's u); p^r within pow's ulp
    panjer: { a: q, b: (r - 1) * q, p0: p ** r, err: { a: EPS / 2, b: 2.02 * EPS, p0: EPS, c1: 0 } },
    divide: (m) => ({ a: q, b: (r / m - 1) * q, pgf: (z) => Math.exp((r / m) * (lp - Math.log1p(-q * z))) }),
    p0: p ** r,
  };
  // claim-law rounding (./log-round.ts): L' = i r q e^{it} / (1 - q e^{it}), |1 - q e^{it}| >= p: |L| <= (r q / p) |t| = E X |t|
  return Object.assign(node, linearLogRound(((r * q) / p) * (1 + 8 * EPS), node.logCf));
}
