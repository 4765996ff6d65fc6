// Many arbitrary points of a damped solution: the damped sums once on a fine FFT grid, then local interpolation at
// each point, with the interpolation error bounded from the sums' own coefficients.
import type { DampedSolution } from "./damped";
import { getFftPlan, nextPowerOfTwo } from "../fftplan";
import { checkDeadline } from "../deadline";
import { scratch } from "../damped-scratch";
import { sumOnGrid } from "./fft";
import { aliasCdfAt, takenOutAt, twoProduct } from "./damped-eval";
import { FFT_REL } from "./damped-transform";
import { truncationAtY } from "./damped-slope";
import type { Nodes } from "./nodes";

/** |x + i y| at least: the square root of the squares widened by 4 eps (hypot, slower, where they could underflow) */
function modulus(x: number, y: number): number {
  const s2 = x * x + y * y;
  return s2 > 1e-290 ? Math.sqrt(s2) * (1 + 4 * Number.EPSILON) : Math.hypot(x, y);
}

/** interpolation stencils: M equispaced grid values around the point (M/2 on each side); the plan takes the M that
 * needs the smallest FFT (a wider stencil lets the grid step approach the sums' Nyquist step pi / t_max) */
const STENCILS = [10, 16, 24, 32, 48, 64] as const;
/** largest FFT the interpolation route takes (above it the pointwise sums are used) */
const MAX_N = 1 << 22;

/**
 * max over u in [0, 1] of prod_{j = -M/2 + 1}^{M/2} |u - j| (the node polynomial of the stencil on a unit grid),
 * sampled finely and widened by 1% (it is smooth, with its maximum at u = 1/2 for this symmetric stencil)
 */
function nodePoly(M: number): number {
  let best = 0;
  for (let i = 0; i <= 1000; i++) {
    const u = i / 1000;
    let p = 1;
    for (let j = -M / 2 + 1; j <= M / 2; j++) p *= Math.abs(u - j);
    best = Math.max(best, p);
  }
  return 1.01 * best;
}
const NODE_POLY = STENCILS.map(nodePoly);
/** 1 / prod_{b != a} (a - b) = (-1)^{M-1-a} / (a! (M-1-a)!) for each stencil width (its factorials within M eps relative) */
const INV_DEN: Record<number, Float64Array> = {};
for (const M of STENCILS) {
  const f = new Float64Array(M);
  f[0] = 1;
  for (let j = 1; j < M; j++) f[j] = f[j - 1] * j;
  INV_DEN[M] = Float64Array.from({ length: M }, (_, a) => ((M - 1 - a) % 2 === 0 ? 1 : -1) / (f[a] * f[M - 1 - a]));
}
const FACT = STENCILS.map((M) => {
  let f = 1;
  for (let j = 2; j <= M; j++) f *= j;
  return f;
});

/**
 * The plan of the interpolation route for n points up to R: the stencil width M and the grid step dx = T / N such that
 * the Lagrange remainder D_M dx^M NODE_POLY / M! stays below `target` (before undamping), where
 * D_M = (h/pi) sum_k t_k^M |c_k| bounds the M-th derivative of the truncated damped sum
 * g(y) = (h/pi) sum_k Re(e^{-i t_k y} c_k) everywhere (the remainder of Lagrange interpolation, e.g. Atkinson, An
 * Introduction to Numerical Analysis, thm 3.2). D_M is carried as tau^M Ds_M with tau = t_{K-1} and
 * Ds_M = (h/pi) sum_k (t_k / tau)^M |c_k| (no overflow for any M). Null when the FFT would cost more than the n
 * pointwise sums.
 */
export function pointsPlan(s: DampedSolution, n: number, target: number, wantPdf: boolean): PointsPlan | null {
  const L = STENCILS.length;
  const dC = new Float64Array(L);
  const dP = new Float64Array(L);
  let dP1 = 0;
  const tau = (s.K - 0.5) * s.h;
  const pw = new Float64Array(L);
  for (let k = 0; k < s.K; k++) {
    const t = (k + 0.5) * s.h;
    const r = t / tau;
    const r2 = r * r;
    const r4 = r2 * r2;
    const r8 = r4 * r4;
    const r16 = r8 * r8;
    pw[0] = r8 * r2;
    pw[1] = r16;
    pw[2] = r16 * r8;
    pw[3] = r16 * r16;
    pw[4] = pw[3] * r16;
    pw[5] = pw[3] * pw[3];
    const c = modulus(s.cRe[k], s.cIm[k]);
    const a = wantPdf ? modulus(s.pRe[k], s.pIm[k]) : 0;
    for (let m = 0; m < L; m++) {
      dC[m] += pw[m] * c;
      dP[m] += pw[m] * a;
    }
    dP1 += t * a;
  }
  const f = s.h / Math.PI;
  dP1 *= f;
  // cost in multiply-adds: the FFTs (5 N log2 N each), the node loads and the stencil weights (M^2 a point), against
  // n K per pointwise sum; the stencil with the cheapest route wins
  const passes = wantPdf ? 2 : 1;
  let best: PointsPlan | null = null;
  let bestCost = passes * n * s.K;
  for (let m = 0; m < L; m++) {
    const M = STENCILS[m];
    // the powers and moduli were rounded (M + 8 eps) and their sums of K positive terms (K eps): widen by both
    const widen = 1 + (M + 8 + s.K) * Number.EPSILON;
    const D = Math.max(dC[m], dP[m]) * f * widen;
    if (!(D > 0) || !(target > 0)) return null;
    const dx = Math.pow((target * FACT[m]) / (NODE_POLY[m] * D), 1 / M) / tau;
    const N = nextPowerOfTwo(Math.max(2 * M, Math.ceil(s.T / dx)));
    if (N > MAX_N) continue;
    // one FFT serves both sums (packedSums)
    const cost = 5 * N * Math.log2(N) + passes * s.K + n * M * (4 + passes);
    if (cost < bestCost) {
      bestCost = cost;
      best = { N, M, nodePoly: NODE_POLY[m], fact: FACT[m], tau, dC: dC[m] * f * widen, dP: dP[m] * f * widen, dP1: dP1 * widen };
    }
  }
  return best;
}

/**
 * the plan: FFT size, stencil width M (its node polynomial's maximum and M!), and bounds on the M-th derivatives of the
 * cdf and density sums divided by tau^M, and on the density sum's first derivative
 */
export interface PointsPlan {
  N: number;
  M: number;
  nodePoly: number;
  fact: number;
  tau: number;
  dC: number;
  dP: number;
  dP1: number;
}

/**
 * The cdf and density sums g_C(y_j), g_P(y_j) = (h/pi) sum_k Re(e^{-i t_k y_j} c_k) on y_j = j T / N by one complex FFT
 * of size N. With omega = e^{-2 pi i / N} and C_b the coefficients wrapped mod N (t_k y_j = (k + 1/2) 2 pi j / N),
 * Re sum_b C_b omega^{(b + 1/2) j} = sum_b H_b omega^{(b + 1/2) j}, H_b = (C_b + conj(C_{N-1-b})) / 2 (the conjugate
 * term's exponent -(b + 1/2) is (N - 1 - b) + 1/2 - N), a sum that is real for every j; so the transform of
 * H^C + i s H^P gives g_C in its real part and s g_P in its imaginary part. s, a power of 2 (exact products), near
 * sum |c_k| / sum |p_k| evens the two sums' shares of the rounding. Rounding of each output, per unit of the inputs'
 * absolute sum sum |c_k| + s sum |p_k|: FFT_REL (the transform and the post-rotation) and ROT_TABLE_REL (the rotation's
 * tables) plus the wrapped bins (each bin
 * sums up to 2 ceil(K / N) halves) and the half-sums (a few eps); the caller charges it. Without the density (gP null)
 * the transform takes H^C alone and s = 1. Returns s.
 */
function packedSums(s: DampedSolution, N: number, gC: Float64Array, gP: Float64Array | null, jHi: number, M: number): number {
  const plan = getFftPlan(N);
  const X = plan.a;
  const out = plan.b;
  X.fill(0);
  const sc = gP && s.scaleP > 0 && s.scaleC > 0 ? Math.pow(2, Math.round(Math.log2(s.scaleC / s.scaleP))) : 1;
  const half = 0.5 * sc;
  const { K, cRe, cIm, pRe, pIm } = s;
  if (gP) {
    for (let k = 0; k < K; k++) {
      const b = k & (N - 1);
      const b2 = N - 1 - b;
      const cr = 0.5 * cRe[k];
      const ci = 0.5 * cIm[k];
      const pr = half * pRe[k];
      const pi = half * pIm[k];
      X[2 * b] += cr - pi;
      X[2 * b + 1] += ci + pr;
      X[2 * b2] += cr + pi;
      X[2 * b2 + 1] += pr - ci;
    }
  } else {
    // the cdf sum alone: H^C in the real part, the imaginary part of the transform then holds rounding only
    for (let k = 0; k < K; k++) {
      const b = k & (N - 1);
      const b2 = N - 1 - b;
      const cr = 0.5 * cRe[k];
      const ci = 0.5 * cIm[k];
      X[2 * b] += cr;
      X[2 * b + 1] += ci;
      X[2 * b2] += cr;
      X[2 * b2 + 1] -= ci;
    }
  }
  checkDeadline("fft");
  plan.forward(X, out);
  const f = s.h / Math.PI;
  const step = Math.PI / N;
  // the post-rotation e^{-i pi j / N} as the product of two tables, e^{-i pi (64 a) / N} e^{-i pi b / N} (j = 64 a + b): a
  // cos and a sin per 64 outputs instead of per output. Each entry is within 4 eps of its exact value (its angle, below pi,
  // within 2u pi, cos and sin an ulp each) and their complex product within 2 eps more: 10 eps in all against the direct
  // form's 4, the 6 eps more charged with the post-rotation by the caller (ROT_TABLE_REL)
  const top = Math.min(N, jHi + 1);
  const nA = (N >> 6) + 1;
  const aRe = new Float64Array(nA);
  const aIm = new Float64Array(nA);
  for (let a = 0; a < nA; a++) {
    const ang = 64 * a * step;
    aRe[a] = Math.cos(ang);
    aIm[a] = -Math.sin(ang);
  }
  for (let b = 0; b < 64; b++) {
    const ang = b * step;
    ROT_RE[b] = Math.cos(ang);
    ROT_IM[b] = -Math.sin(ang);
  }
  // only the grid values a stencil can reach: j <= jHi, and the last M (the anti-periodic images of j < 0)
  for (let j = 0; j < N; j++) {
    if (j === top) j = Math.max(top, N - M);
    if (j >= N) break;
    const ar = aRe[j >> 6];
    const ai = aIm[j >> 6];
    const br = ROT_RE[j & 63];
    const bi = ROT_IM[j & 63];
    const er = ar * br - ai * bi;
    const ei = ar * bi + ai * br;
    const zr = out[2 * j];
    const zi = out[2 * j + 1];
    gC[j] = f * (er * zr - ei * zi);
    if (gP) gP[j] = (f * (er * zi + ei * zr)) / sc;
  }
  return sc;
}

/** the post-rotation's table of e^{-i pi b / N}, b < 64 (packedSums) */
const ROT_RE = new Float64Array(64);
const ROT_IM = new Float64Array(64);
/** what the post-rotation's two tables add to FFT_REL's allowance for it, per unit of the inputs' absolute sum (packedSums) */
const ROT_TABLE_REL = 6 * Number.EPSILON;

const TWO_PI_HI = 6.283185307179586;
const TWO_PI_LO = 2.4492935982947064e-16;
const tp = new Float64Array(2);

/**
 * The position u = (x - lo) N h / (2 pi) of x on the grid of spacing 2 pi / (N h), as its integer part and the fraction
 * (out[0], out[1]), from y = x - lo split exactly (TwoSum), y h by Dekker's product and the division by 2 pi in
 * double-double: the fraction is within a few eps of the exact one, whatever the size of u
 */
export function gridPosition(x: number, lo: number, h: number, N: number, out: Float64Array): void {
  const yh = x - lo;
  const bv = yh - x;
  const yl = x - (yh - bv) + (-lo - bv);
  twoProduct(yh, h, tp);
  const p = tp[0] * N;
  const e = (tp[1] + yl * h) * N;
  const q1 = p / TWO_PI_HI;
  twoProduct(q1, TWO_PI_HI, tp);
  const q2 = (p - tp[0] - tp[1] + e - q1 * TWO_PI_LO) / TWO_PI_HI;
  let j = Math.floor(q1);
  let r = q1 - j + q2;
  if (r < 0) {
    j -= 1;
    r += 1;
  } else if (r >= 1) {
    j += 1;
    r -= 1;
  }
  out[0] = j;
  out[1] = r;
}

/** Density and cdf of the continuous part at arbitrary points by the plan above, each value with its bound. */
export function dampedPoints(
  s: DampedSolution,
  xs: Float64Array,
  wantPdf: boolean,
  plan: PointsPlan,
): { fc: Float64Array; Fc: Float64Array; errF: Float64Array; errf: Float64Array } {
  const { N, M } = plan;
  const dx = s.T / N;
  const mk = (re: Float64Array, im: Float64Array): Nodes => ({ h: s.h, K: s.K, re, im, wre: re, wim: im, absCdf: 0, absPdf: 0, mass: 0 });
  // the grid values are temporaries (reused buffers, ../damped-scratch.ts): every entry is written by sumOnGrid
  const gC = scratch("gridC", N);
  const gP = wantPdf ? scratch("gridP", N) : null;
  // with the density, one FFT for both sums: the rounding of each then counts the other's inputs too (times the scale)
  let fftC = 0;
  let fftP = 0;
  if (gP || s.pointwise) {
    // the furthest grid index a stencil reaches: the largest point's position, its M/2 right neighbours, 2 for rounding
    let yMax = 0;
    for (let i = 0; i < xs.length; i++) if (xs[i] - s.lo > yMax) yMax = xs[i] - s.lo;
    const jHi = Math.floor(yMax / dx) + M / 2 + 2;
    const sc = packedSums(s, N, gC, gP, jHi, M);
    const r = FFT_REL + ROT_TABLE_REL + (2 * Math.ceil(s.K / N) + 6) * Number.EPSILON;
    // what the transform rounds beyond the setup's allowance s.rel, which the sums' bounds already charge to their own
    // scale (scaleC, scaleP); packed, each sum's outputs also carry the other's inputs (times the scale)
    fftC = Math.max(0, r - s.rel) * s.scaleC + (gP ? r * sc * s.scaleP : 0);
    fftP = gP ? (r * s.scaleC) / sc + Math.max(0, r - s.rel) * s.scaleP : 0;
  } else sumOnGrid(mk(s.cRe, s.cIm), s.lo, s.lo, N, 0, N, gC, null, null);
  const n = xs.length;
  const fc = new Float64Array(n);
  const Fc = new Float64Array(n);
  const errF = new Float64Array(n);
  const errf = new Float64Array(n);
  const w = new Float64Array(M);
  // the truncated sums are anti-periodic with period T: g(y + T) = -g(y) (t_k T = (k + 1/2) 2 pi)
  const at = (g: Float64Array, j: number) => (j < 0 ? -g[j + N] : j >= N ? -g[j - N] : g[j]);
  // with exact nodes the grid's points are exactly j 2 pi / (N h): each point's grid position is found in double-double,
  // so only the FFT's own rounding (fftC: FFT_REL, and the wrapped bins' sums) is left; without them, the setup's allowance
  const pos = new Float64Array(2);
  // the cdf's image bound is non-increasing in y (aliasCdfAt): its values at 65 steps of [0, yMax] bound every point at or
  // right of each step
  let yTop = 0;
  for (let i = 0; i < n; i++) if (xs[i] - s.lo > yTop) yTop = xs[i] - s.lo;
  const yStep = yTop > 0 ? yTop / 64 : 1;
  const alias = new Float64Array(65);
  for (let k = 0; k <= 64; k++) alias[k] = aliasCdfAt(s, k * yStep);
  for (let i = 0; i < n; i++) {
    if ((i & 1023) === 0) checkDeadline("pointwise");
    const x = xs[i];
    const y = x - s.lo;
    if (y < 0) continue;
    let j: number;
    let r: number;
    if (s.pointwise) {
      gridPosition(x, s.lo, s.h, N, pos);
      j = pos[0];
      r = pos[1];
    } else {
      const u = y / dx;
      j = Math.floor(u);
      r = u - j;
    }
    const j0 = j - M / 2 + 1;
    // rho = u - j0: the point's position on the stencil j0 .. j0 + M - 1
    const rho = r + (M / 2 - 1);
    // Lagrange weights on the stencil at rho, l_a = prod_{b != a} (rho - b) / (a - b) = node(rho) c_a / (rho - a) with
    // c_a = 1 / prod_{b != a} (a - b) (each weight within (2 M + 4) eps relative: the product, c_a's factorials, the
    // division and the product), e_a where rho is a node; and the node polynomial at rho
    let node = 1;
    let signed = 1;
    let onNode = -1;
    for (let a = 0; a < M; a++) {
      const d = rho - a;
      if (d === 0) onNode = a;
      signed *= d;
      node *= Math.abs(d);
    }
    const ca = INV_DEN[M];
    for (let a = 0; a < M; a++) w[a] = onNode >= 0 ? (a === onNode ? 1 : 0) : (signed * ca[a]) / (rho - a);
    let vC = 0;
    let vP = 0;
    let aC = 0;
    let aP = 0;
    for (let a = 0; a < M; a++) {
      const tc = w[a] * at(gC, j0 + a);
      vC += tc;
      aC += Math.abs(tc);
      if (gP) {
        const tq = w[a] * at(gP, j0 + a);
        vP += tq;
        aP += Math.abs(tq);
      }
    }
    const step = Math.pow(dx * plan.tau, M) * (1 + 4 * M * Number.EPSILON);
    const interpC = (plan.dC * step * node) / plan.fact;
    const interpP = (plan.dP * step * node) / plan.fact;
    // the Lebesgue sum of the weights: how much the grid values' errors can grow through the interpolation
    let leb = 0;
    for (let a = 0; a < M; a++) leb += Math.abs(w[a]);
    const g = Math.exp(s.beta * y);
    const kv = takenOutAt(s, x, wantPdf, false);
    Fc[i] = Math.min(Math.max(g * vC + kv.F + s.cdfShift, 0), s.Mc);
    fc[i] = gP ? Math.max(g * vP + kv.f, 0) : 0;
    // the truncation part of the sums' bound holds at every y (no stencil factor; by parts where the solution has tau); their rounding and CF-value parts
    // sit in the grid values and pass through the weights (times the Lebesgue sum); the weights and the stencil's sum
    // round within (3 M + 4) eps of sum |w_a g_a|; rho's own rounding (4 eps of a grid step) moves the point by
    // 4 eps dx, over which the sums change by at most their derivative's bound (h/pi) sum t_k |c_k| <= scaleP
    const roundC = s.roundCdf + fftC;
    const roundP = s.roundPdf + fftP;
    const wr = (3 * M + 4) * Number.EPSILON;
    const shift = 8 * Number.EPSILON * dx;
    errF[i] = g * (truncationAtY(s.truncCdf, s.truncTau, s.h, y) + leb * roundC + interpC + wr * aC + shift * s.scaleP) + alias[Math.min(64, Math.floor(y / yStep))] + kv.err;
    errf[i] = gP ? g * (truncationAtY(s.truncPdf, s.truncTauPdf, s.h, y) + leb * roundP + interpP + wr * aP + shift * plan.dP1) + s.aliasPdf + kv.errf : NaN;
  }
  return { fc, Fc, errF, errf };
}
