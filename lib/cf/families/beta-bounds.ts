/**
 * The beta CF's rules (./beta-unit.ts) with derived bounds on their errors, each over the route's whole range of tau.
 * Rounding: u = 2^-53 per operation, Math.exp/log/log1p/atan/cos/sin within one ulp (the project's standing
 * assumption), each step to first order with a 1% margin; log B carries its own error eLB. Aliasing of a trapezoidal
 * rule of step h on a strip of half-width a: at most 2M/(e^{2 pi a/h} - 1), M the largest integral of |integrand|
 * along a line in the strip (Trefethen & Weideman 2014, SIAM Review 56(3), thm 5.1).
 */
import { lgamma } from "./special";
import { checkDeadline } from "../deadline";
import { CfError } from "../errors";

/** the most nodes a fixed rule may take (8 arrays of doubles: 256 MB); shapes past it are refused, not attempted */
const MAX_RULE_NODES = 1 << 22;

/** the node count of a rule, or a clear refusal where the shapes make it non-finite or past MAX_RULE_NODES */
function ruleNodes(span: number, h: number, what: string): number {
  const n = Math.ceil(span / h) + 1;
  if (!(n >= 1 && n <= MAX_RULE_NODES)) {
    throw new CfError("limit_exceeded", "/model", `the characteristic function's ${what} rule (beta, PERT, generalized Pareto with xi < 0) would need ${Number.isFinite(n) ? n.toExponential(2) : "unboundedly many"} nodes for these shapes (extremely small or large alpha, beta): outside what it can bound`);
  }
  return n;
}

const U = Number.EPSILON / 2;
const LOG2 = Math.LN2;
/** log(e^a + e^b) */
const lse = (a: number, b: number) => (a > b ? a + Math.log1p(Math.exp(b - a)) : b + Math.log1p(Math.exp(a - b)));

/**
 * Kummer's series sum_k c_k (i tau)^k, c_k = (alpha)_k / (alpha+beta)_k / k! > 0, summed while c_k >= 1e-18 or k < 4:
 * c_k within 7k u of itself (two sums, a division, tau/k, two products a step, and alpha + beta's rounding), each
 * addition within u of the partial sum (of the real or imaginary part, at most the sum of the c_j so far); the rest
 * after the last term K at most c_K r/(1 - r) < 1e-18 * 2/3, r = tau/(K+1) <= 2/5 (the term ratios fall). Every c_k,
 * every partial sum and the count of terms grow with tau, so tau = 2 bounds them all.
 */
export function seriesBound(alpha: number, beta: number): number {
  const ab = alpha + beta;
  let c = 1;
  let S = 1;
  let acc = 0;
  for (let k = 1; k < 200; k++) {
    c *= ((alpha + (k - 1)) / (ab + (k - 1))) * (2 / k);
    S += c;
    acc += 7 * k * c + S;
    if (c < 1e-18 && k >= 4) break;
  }
  return 1.01 * U * acc + 1e-18;
}

export interface RaySet {
  cRe: Float64Array;
  cIm: Float64Array;
  /** y_j = e^{v_j}, ascending: term j at tau is c_j exp(-tau y_j) */
  e: Float64Array;
  /** log |c_j| (and its largest value) and the direction of c_j */
  lc: Float64Array;
  lcMax: number;
  cosP: Float64Array;
  sinP: Float64Array;
  /** the rule's error (aliasing, ends, rounding) for every tau >= T */
  bound: number;
}

/**
 * One ray, int e^{p v} (1 + i s e^v)^{q-1} exp(-tau e^v) dv / B for every tau >= T, on nodes fixed at T: step
 * h = 2 pi (pi/4) / (40 + max(0, Lc)), Lc = p log(sqrt 2 (p + |q-1|) + 1) + |q-1| log(2 + 64/T) + 2, nodes
 * v_j = v_hi - j h down to v_lo, v_hi = log(E/T), E = 60 + 4 (p + |q-1|), v_lo = (-42 - max(0, Lc))/p - log T.
 * Aliasing: in w = v + log tau the integrand is f(tau) exp(p w - e^w) (1 + i s e^w/tau)^{q-1}, f = tau^-p / B; on the
 * strip |Im w| < pi/4, |exp(p w - e^w)| = e^{p v - e^v cos y} and max(1, rho)/sqrt 2 <= |1 + i s e^w/tau| <= 1 + rho
 * (rho = e^{Re w}/tau, the direction within pi/4 of +-i), so with cos y >= 1/sqrt 2 its integral is at most
 * M = f 2^{q-1} (Gamma(p) 2^{p/2} + tau^{1-q} Gamma(p+q-1) 2^{(p+q-1)/2}) for q >= 1 ((1 + rho)^{q-1} <= 2^{q-1}
 * (1 + rho^{q-1})), f 2^{(1-q)/2} Gamma(p) 2^{p/2} for q < 1, largest at tau = T. Ends (e^{-tau y} <= 1 below, and
 * past v_hi tau y >= E so the log of a term falls at rate at least E - p - (q-1)+): below v_lo the terms sum to at most
 * e^{p v_lo} (1 + e^{2 v_lo})^{(q-1)+/2} (1/p + h) / B, above v_hi to at most E^p e^{-E} f(T) (1 + E^2/T^2)^{(q-1)+/2} /
 * (E - p - (q-1)+). Rounding of term j, relative: the node v_j = v_hi - j h within u (|v| + j h), which moves the term by
 * |d log/dv| <= p + 1.25 |q-1| + tau y; the exponent p v + (q-1)/2 log1p(y^2) - log B (its three sums, log1p's 2u and
 * its argument's 5u, eLB); exp, h; the phase atan(s y)(q-1) (5.8 |q-1| u); cos, sin and the products; per tau, tau y
 * (u tau y), exp, the product, Kahan's sum (2 sqrt 2 u) and the final rotations and difference (8u): A_j + tau y_j B_j
 * (in u), times |c_j| e^{-tau y_j}, whose largest value over tau >= T is taken node by node.
 */
export function raySet(p: number, q: number, sign: number, lB: number, eLB: number, T: number): RaySet {
  const qm = q - 1;
  const aq = Math.abs(qm);
  const qp = Math.max(qm, 0);
  const E = 60 + 4 * (p + aq);
  const Lc = p * Math.log(Math.SQRT2 * (p + aq) + 1) + aq * Math.log(2 + 64 / T) + 2;
  const h = (2 * Math.PI * (Math.PI / 4)) / (40 + Math.max(Lc, 0));
  const vHi = Math.log(E) - Math.log(T);
  const vLo = (-42 - Math.max(0, Lc)) / p - Math.log(T);
  const n = ruleNodes(vHi - vLo, h, "ray");
  const cRe = new Float64Array(n);
  const cIm = new Float64Array(n);
  const e = new Float64Array(n);
  const lc = new Float64Array(n);
  const cosP = new Float64Array(n);
  const sinP = new Float64Array(n);
  let round = 0;
  let lcMax = -Infinity;
  for (let j = 0; j < n; j++) {
    // long rules (large shapes) check the deadline every 2^16 nodes
    if ((j & 65535) === 65535) checkDeadline("beta-cf");
    const v = vHi - j * h;
    const y = Math.exp(v);
    const u = sign * y; // 1 + i u
    const L = Math.log1p(u * u);
    const lr = 0.5 * L * qm;
    const pv = p * v;
    const X = pv + lr - lB;
    const lmag = Math.log(h) + X;
    const mag = Math.exp(lmag);
    const ph = Math.atan(u) * qm;
    // stored with y ascending (expSumArithmetic's order): index n - 1 - j; the size also as its log (for large shapes
    // c_j itself may overflow where c_j e^{-tau y_j} does not)
    const k = n - 1 - j;
    cRe[k] = mag * Math.cos(ph);
    cIm[k] = mag * Math.sin(ph);
    lc[k] = lmag;
    cosP[k] = Math.cos(ph);
    sinP[k] = Math.sin(ph);
    e[k] = y;
    const node = Math.abs(v) + j * h;
    const A = (p + 1.25 * aq) * node + Math.abs(pv) + Math.abs(pv + lr) + Math.abs(X) + aq * (L + 2.5) + Math.abs(lr) + 5.8 * aq + 8 + 2 * Math.SQRT2 + 8 + eLB / U;
    const B = node + 1;
    // max over x = tau y >= T y of e^{-x} (A + x B): at T y when B <= A or past the peak x* = 1 - A/B, else B e^{-x*}
    const x0 = T * y;
    const xs = 1 - A / B;
    const lw = xs > x0 ? Math.log(B) - xs : Math.log(A + x0 * B) - x0;
    round += Math.exp(lmag + lw);
    if (lmag > lcMax) lcMax = lmag;
  }
  const logF = -p * Math.log(T) - lB;
  const lgp = lgamma(p);
  const logM = qm >= 0 ? logF + qm * LOG2 + lse(lgp + (p / 2) * LOG2, -qm * Math.log(T) + lgamma(p + qm) + ((p + qm) / 2) * LOG2) : logF + (-qm / 2) * LOG2 + lgp + (p / 2) * LOG2;
  const alias = (2 * Math.exp(logM - 40 - Math.max(0, Lc))) / (1 - Math.exp(-40));
  const low = Math.exp(p * vLo - lB + (qp / 2) * Math.log1p(Math.exp(2 * vLo))) * (1 / p + h);
  const high = Math.exp(logF + p * Math.log(E) - E + (qp / 2) * Math.log1p((E * E) / (T * T))) / (E - p - qp);
  // the per-tau sum stops where tau y_j - max log |c| passes 745: every term left out is below e^-745 < 2^-1074
  return { cRe, cIm, e, lc, cosP, sinP, lcMax, bound: alias + low + high + 1.01 * U * round + n * Number.MIN_VALUE };
}

/**
 * The line x = 1/(1 + e^{-s}) for tau in (2, T]: m(s) = x^alpha (1-x)^beta / B, nodes s_j = s_lo + j h, s_lo = (-42 -
 * max(0, -log B))/alpha, up to s_hi = (42 + max(0, -log B))/beta, step h = 2 pi a / (40 + max(0, Lc)) with a = 2/T,
 * Lt = T tan(a/2)/2 + (alpha+beta) log(1/cos(a/2)), Lc = Lt - log B + 1. Aliasing: on |Im s| < a, |x| <= x(Re s) /
 * cos(a/2) (likewise 1 - x) and |Im x| <= tan(a/2)/2, so int |m e^{i tau x}| ds <= e^Lt for every tau <= T (int m ds = 1).
 * Ends: below s_lo m <= e^{alpha s}/B, above s_hi m <= e^{-beta s}/B: each tail's terms at most e^-42 (1/alpha + h)
 * (resp. beta). Rounding of term j, relative: the node within u (|s| + j h), which moves the term by |d log/ds| <=
 * max(alpha, beta) + tau x (1 - x); log x and log(1 - x) (u (|s| + |log| + 3) each), the exponent's two products and
 * two sums, exp, h; x = e^{log x} (u (|s| + |log x| + 5)) and tau x (u tau x (|s| + |log x| + 6)); cos, sin, the
 * product, Kahan's sum (2 sqrt 2 u): A_j + tau B_j (in u), times m_j h, largest at tau = T.
 */
export function lineSet(alpha: number, beta: number, lB: number, eLB: number, T: number): { m: Float64Array; x: Float64Array; bound: number } {
  const ab = alpha + beta;
  const mx = Math.max(alpha, beta);
  const a = 2 / T;
  const Lt = T * Math.tan(a / 2) / 2 + ab * Math.log(1 / Math.cos(a / 2));
  const Lc = Lt - lB + 1;
  const h = (2 * Math.PI * a) / (40 + Math.max(0, Lc));
  const sLo = (-42 - Math.max(0, -lB)) / alpha;
  const sHi = (42 + Math.max(0, -lB)) / beta;
  const n = ruleNodes(sHi - sLo, h, "line");
  const m = new Float64Array(n);
  const x = new Float64Array(n);
  let round = 0;
  for (let j = 0; j < n; j++) {
    if ((j & 65535) === 65535) checkDeadline("beta-cf");
    const s = sLo + j * h;
    // log x = -log(1 + e^{-s}), log(1 - x) = -log(1 + e^{s})
    const lx = s < 0 ? s - Math.log1p(Math.exp(s)) : -Math.log1p(Math.exp(-s));
    const l1x = s > 0 ? -s - Math.log1p(Math.exp(-s)) : -Math.log1p(Math.exp(s));
    const ax = alpha * lx;
    const bx = beta * l1x;
    const X = ax + bx - lB;
    m[j] = h * Math.exp(X);
    x[j] = Math.exp(lx);
    const as = Math.abs(s);
    const node = as + j * h;
    const A = alpha * (as + Math.abs(lx) + 3) + beta * (as + Math.abs(l1x) + 3) + Math.abs(ax) + Math.abs(bx) + Math.abs(ax + bx) + Math.abs(X) + 3 + mx * node + 4 + 2 * Math.SQRT2 + eLB / U;
    const B = x[j] * (as + Math.abs(lx) + 6) + x[j] * (1 - x[j]) * node;
    round += m[j] * (A + T * B);
  }
  const alias = (2 * Math.exp(Lt - 40 - Math.max(0, Lc))) / (1 - Math.exp(-40));
  const ends = Math.exp(-42) * (1 / alpha + 1 / beta + 2 * h);
  return { m, x, bound: alias + ends + 1.01 * U * round };
}
