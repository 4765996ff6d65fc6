import type { PowerSide, PowerTail, PowerTerms } from "../direct/power-tail";
import type { DirectLaw } from "../direct/types";
import type { TailTerm } from "../types";
import { momentBounds } from "./moment-tails";

/**
 * A derived bound on the aliasing the power-tail route leaves once the images of the heaviest term G = D + E[Y] are taken
 * out (./images.ts, or G's CF subtracted: ../invert/part.ts withTailLaw). With X = G + R, R = Y - E[Y] independent of G,
 * the mid-point sums of period T alias (header of ./images.ts) by
 *   cdf: sum_{m >= 1} (-1)^(m+1) [D_S(x + mT) - D_F(x - mT)],  pdf: sum_{m >= 1} (-1)^m [D_f(x + mT) + D_f(x - mT)],
 *   E|X - q|: 2 sum_{m >= 1} (-1)^m [D_pi(q + mT) + D_pi-(q - mT)],
 * where D_S(y) = E[S_G(y - R)] - S_G(y) and likewise for F, f and the stop-loss transforms pi, pi- (linear in the law).
 * Each is bounded by Taylor's theorem with the remainder in integral form, split at |R| <= r = z/2 (z the image's distance
 * from G's tail origin), with E R^2 <= v, |E R| <= mu, P(|R| >= r) <= P(r) and E[|R| 1{|R| > r}] <= E(r) from Markov's
 * inequality on R's even moments (./moment-tails.ts: the cumulants of Y with their derived bounds, Smith 1995):
 *   |D_S| <= (v/2) sup_{|u - y| <= r} |f_G'(u)| + P(r) + f_G(y) (mu + E(r))
 *     (S_G(y - R) - S_G(y) - R f_G(y) = int_{y-R}^y (f_G(u) - f_G(y)) du on |R| <= r, |S_G(y - R) - S_G(y)| <= 1 beyond),
 *   |D_f| <= (v/2) sup |f_G''| + fmax P(r) + |f_G'(y)| (mu + E(r)),
 *   |D_pi| <= (v/2) sup f_G + E(r) + S_G(y) (mu + E(r))   (pi_G'' = f_G, |pi_G'| <= 1),
 * with the suprema over the window from G's power-law majorants (../direct/power-tail.ts), which fall with the distance,
 * so a bound at the nearest image distance holds for every x farther in. Beyond a support's end e (G's density zero past
 * it) D_F(y) = F_X(y) <= P(|R| >= d), D_f <= fmax P(|R| >= d), D_pi- <= E(d), d = |y - e|. The images' sum is bounded in
 * absolute value: the first IMAGES terms one by one, the rest by the integral of the power laws in z (each term falls in m).
 * Leading order: T^(-alpha-2) for the cdf and pdf, T^(-alpha-1) for E|X - q| (alpha G's index); R's own tail adds T^(-n)
 * for its highest usable even moment n.
 */

const IMAGES = 8;
const U = Number.EPSILON;

export interface ResidualLaw {
  /** G's law (its density at the images gives the second-order term of the stop-loss residual) */
  law: DirectLaw;
  tail: PowerTail;
  /** log E|R|^n (even n; NaN where unknown) */
  lm: Float64Array;
  v: number;
  mu: number;
  /** kappa_2 of Y (= Var R) and its derived bound; E|R|^3 <= sqrt(E R^2 E R^4) (Cauchy-Schwarz), Infinity without a fourth moment */
  k2: number;
  e2: number;
  m3: number;
}

/** G's majorants and R's moments, when G's law has power-tail majorants and R has a finite variance with derived bounds */
export function residualLaw(term: TailTerm): ResidualLaw | null {
  const tail = term.direct.powerTail;
  const Y = term.others;
  if (!tail || !Y || !(Y.momentIndex > 2)) return null;
  const mb = momentBounds(Y, term.shift);
  if (!mb || mb.logU.length < 3 || !Number.isFinite(mb.logU[2])) return null;
  const k1 = Y.cumulants(1)[0];
  const e1 = Y.cumulantErrors?.(1)[0];
  if (k1 === null || e1 === null || e1 === undefined || !Number.isFinite(k1) || !Number.isFinite(e1)) return null;
  const lc = Math.log(mb.c);
  const lm = new Float64Array(mb.logU.length).fill(NaN);
  for (let n = 2; n < mb.logU.length; n += 2) if (Number.isFinite(mb.logU[n])) lm[n] = mb.logU[n] + n * lc + 4 * U * (Math.abs(mb.logU[n]) + n * Math.abs(lc) + 1);
  const k2 = Y.cumulants(2)[1];
  const e2 = Y.cumulantErrors?.(2)[1];
  const ok2 = k2 !== null && e2 !== null && e2 !== undefined && Number.isFinite(k2) && Number.isFinite(e2);
  return {
    law: term.direct,
    tail,
    lm,
    v: Math.exp(lm[2]) * (1 + 4 * U),
    mu: (Math.abs(k1 - term.shift) + e1) * (1 + 4 * U),
    k2: ok2 ? k2 : NaN,
    e2: ok2 ? e2 : Infinity,
    m3: lm.length > 4 && Number.isFinite(lm[4]) ? Math.exp((lm[2] + lm[4]) / 2) * (1 + 8 * U) : Infinity,
  };
}

/** the even order n minimising E|R|^n / r^(n - k) (k = 0: P(|R| >= r); k = 1: E[|R| 1{|R| > r}]), n >= minN */
function bestOrder(L: ResidualLaw, r: number, k: number, minN: number): number {
  const lr = Math.log(r);
  let best = NaN;
  let bv = Infinity;
  for (let n = Math.max(2, minN); n < L.lm.length; n += 2) {
    const v = L.lm[n] - (n - k) * lr;
    if (v < bv) {
      bv = v;
      best = n;
    }
  }
  return best;
}

/** E|R|^n r^(k - n), rounded up */
function momentOver(L: ResidualLaw, n: number, r: number, k: number): number {
  if (!Number.isFinite(n)) return Infinity;
  const lr = Math.log(r);
  return Math.exp(L.lm[n] - (n - k) * lr + 4 * U * (Math.abs(L.lm[n]) + n * Math.abs(lr) + 1)) * (1 + 4 * U);
}

/**
 * E[(|R| - r)^+] <= E|R|^n (n - 1)^(n-1) / (n^n r^(n-1)) for even n >= 2 ((y - r)^+ / y^n is largest at y = n r/(n - 1);
 * as ./moment-tails.ts markovExcess), rounded up
 */
function excessOver(L: ResidualLaw, n: number, r: number): number {
  if (!Number.isFinite(n)) return Infinity;
  const shape = (n - 1) * Math.log(n - 1) - n * Math.log(n);
  return momentOver(L, n, r, 1) * Math.exp(shape + 8 * U * (Math.abs(shape) + n)) * (1 + 4 * U);
}

export type ResidualKind = "cdf" | "pdf" | "stopLoss" | "stopLoss2";

/** power terms of S_G from f_G's: int_z^inf a u^-p du = a z^(1-p)/(p - 1) */
function integrated(t: PowerTerms): PowerTerms {
  return { a: t.a.map((a, i) => (a / (t.p[i] - 1)) * (1 + 4 * U)), p: t.p.map((p) => p - 1) };
}

/** list of (A, q): the bound at distance z is at most sum A z^-q for every z >= z* (the image from which the tail is integrated) */
type Powers = { A: number[]; q: number[] };

function pushScaled(out: Powers, t: PowerTerms, k: number, zScale: number, extraQ: number): void {
  // k sum a (z zScale)^-p z^-extraQ
  for (let i = 0; i < t.a.length; i++) {
    out.A.push(k * t.a[i] * Math.pow(zScale, -t.p[i]) * (1 + 8 * U * (t.p[i] + 2)));
    out.q.push(t.p[i] + extraQ);
  }
}

/**
 * One side's images at distances z_m = z1 + (m - 1) T from the side's origin (or past its support's end), m >= 1: the sum
 * of the bounds above. Infinity where the first image is too near (inside the window the majorants need).
 */
function sideSum(L: ResidualLaw, side: PowerSide, z1: number, T: number, kind: ResidualKind): number {
  const fmax = L.tail.fmax;
  const stop = kind === "stopLoss" || kind === "stopLoss2";
  const minN = stop ? 4 : 2;
  if ("end" in side) {
    if (!(z1 > 0)) return Infinity;
    const at = (z: number, n: number) => (stop ? momentOver(L, n, z, 1) : (kind === "pdf" ? fmax : 1) * Math.min(1, momentOver(L, n, z, 0)));
    let s = 0;
    for (let m = 0; m < IMAGES; m++) {
      const z = z1 + m * T;
      s += at(z, bestOrder(L, z, stop ? 1 : 0, minN));
    }
    // the rest: A z^-q with q = n (or n - 1 for E), integrated from the last explicit image
    const zl = z1 + (IMAGES - 1) * T;
    const zt = zl + T;
    const n = bestOrder(L, zt, stop ? 1 : 0, minN);
    const q = stop ? n - 1 : n;
    if (!(q > 1)) return Infinity;
    const A = (stop ? momentOver(L, n, 1, 1) : (kind === "pdf" ? fmax : 1) * momentOver(L, n, 1, 0));
    return (s + (A * Math.pow(zl, 1 - q)) / ((q - 1) * T)) * (1 + 1e-12);
  }
  let best = Infinity;
  for (const rho of RHOS) best = Math.min(best, powerSide(L, side, z1, T, kind, rho));
  return best;
}

/** the split points r = rho z tried (the least bound is kept): a smaller rho keeps the window's majorant nearer its value at z */
const RHOS = [1 / 2, 1 / 4, 1 / 8, 3 / 4];

/**
 * A tail side's images with the split at r = rho z: per image (v/2) win(z (1 - rho)) plus the parts beyond the split
 * (see the module notes); the corrected stop-loss kind (its second-order term (kappa_2/2) f_G subtracted by the caller)
 * (m3/6) f_G'(window) + 2 E(r) + f_G(z) E[R^2 1{|R| > r}]/2 + mu S_G(z) + (mu^2 + e2)/2 f_G(z) (Taylor to third order:
 * pi_G(c - R) - pi_G(c) - R S_G(c) - R^2/2 f_G(c), at most |R|^3/6 sup |f_G'| inside the split and 2|R| + R^2/2 f_G(c)
 * beyond it; E R^2 = kappa_2 + (E R)^2).
 */
function powerSide(L: ResidualLaw, side: { origin: number; from: number; d: [PowerTerms, PowerTerms, PowerTerms] }, z1: number, T: number, kind: ResidualKind, rho: number): number {
  const { from, d } = side;
  if (!(z1 * (1 - rho) >= from) || !(z1 > 0)) return Infinity;
  const fmax = L.tail.fmax;
  const second = kind === "stopLoss2";
  if (second && !Number.isFinite(L.m3 + L.e2 + L.k2)) return Infinity;
  const stop = kind === "stopLoss" || second;
  const minN = stop ? 4 : 2;
  // the window's majorant (at z (1 - rho)) and its coefficient, the value's majorant (at z) multiplying mu + E(r)
  const win = second ? d[1] : stop ? d[0] : kind === "cdf" ? d[1] : d[2];
  const cw = second ? L.m3 / 6 : L.v / 2;
  const own = stop ? integrated(d[0]) : kind === "cdf" ? d[0] : d[1];
  // pi_G's majorant: f_G's integrated twice (p > 2 where G has a mean)
  const pi2 = stop ? integrated(own) : own;
  if (stop && !pi2.p.every((p) => p > 0)) return Infinity;
  const pk = kind === "pdf" ? fmax : 1;
  const one = (z: number): number => {
    const r = rho * z;
    const nE = bestOrder(L, r, 1, minN);
    const E = momentOver(L, nE, r, 1);
    let b = cw * evalTerms(win, z * (1 - rho));
    const Pr = Math.min(1, momentOver(L, bestOrder(L, r, 0, minN), r, 0));
    if (stop) {
      // beyond the split: |pi_G(c - R) - pi_G(c)| <= pi_G(c - r) + (|R| - r)^+ (pi_G convex, falling, slope >= -1)
      const nX = bestOrder(L, r, 1, minN);
      b += evalTerms(pi2, z * (1 - rho)) * Pr + excessOver(L, nX, r);
    }
    if (second) {
      const n2 = bestOrder(L, r, 2, 4);
      const f0 = evalTerms(d[0], z);
      return b + evalTerms(own, z) * (E + L.mu) + (f0 / 2) * momentOver(L, n2, r, 2) + ((L.mu * L.mu + L.e2) / 2) * f0;
    }
    if (!stop) b += pk * Pr;
    return b + evalTerms(own, z) * (L.mu + E);
  };
  let s = 0;
  for (let m = 0; m < IMAGES; m++) s += one(z1 + m * T);
  const zl = z1 + (IMAGES - 1) * T;
  const rt = rho * (zl + T);
  const nP = bestOrder(L, rt, 0, minN);
  const nE = bestOrder(L, rt, 1, minN);
  const n2 = bestOrder(L, rt, 2, 4);
  if (!Number.isFinite(nE) || !Number.isFinite(nP) || (second && !Number.isFinite(n2))) return Infinity;
  // the same bounds as sums of powers of z past the explicit images (r = rho z; momentOver at r = rho gives E|R|^n rho^(k-n))
  const P: Powers = { A: [], q: [] };
  pushScaled(P, win, cw, 1 - rho, 0);
  const eA = momentOver(L, nE, rho, 1);
  if (stop) {
    if (!Number.isFinite(nP)) return Infinity;
    pushScaled(P, pi2, momentOver(L, nP, rho, 0), 1 - rho, nP);
    P.A.push(excessOver(L, nE, rho));
    P.q.push(nE - 1);
  } else {
    P.A.push(pk * momentOver(L, nP, rho, 0));
    P.q.push(nP);
  }
  pushScaled(P, own, L.mu, 1, 0);
  pushScaled(P, own, eA, 1, nE - 1);
  if (second) {
    pushScaled(P, d[0], momentOver(L, n2, rho, 2) / 2, 1, n2 - 2);
    pushScaled(P, d[0], (L.mu * L.mu + L.e2) / 2, 1, 0);
  }
  let tail = 0;
  for (let i = 0; i < P.A.length; i++) {
    if (!(P.q[i] > 1)) return Infinity;
    tail += (P.A[i] * Math.pow(zl, 1 - P.q[i])) / ((P.q[i] - 1) * T);
  }
  return (s + tail) * (1 + 1e-12);
}

function evalTerms(t: PowerTerms, z: number): number {
  let s = 0;
  for (let i = 0; i < t.a.length; i++) s += t.a[i] * Math.pow(z, -t.p[i]);
  return s * (1 + 4 * (t.a.length + 2) * U);
}

/**
 * Bound on the residual aliasing at period T for every x in [xLo, xHi] (one point: xLo = xHi): images x + mT on the right,
 * x - mT on the left, their distances taken inward by a few ulps of the points (the rounding of the image points and of
 * the origin). For the stop-loss kind the factor 2 of the E|X - q| sum is included.
 */
export function residualAliasing(L: ResidualLaw, xLo: number, xHi: number, T: number, kind: ResidualKind): number {
  const slack = (y: number, o: number) => 8 * U * (Math.abs(y) + Math.abs(o) + T);
  const r = L.tail.right;
  const l = L.tail.left;
  const y1 = xLo + T;
  const y2 = xHi - T;
  // a support's end on the right: the images beyond it lie at y > end (distance y - end); on the left at y < end
  const zR = ("end" in r ? y1 - r.end : y1 - r.origin) - slack(y1, "end" in r ? r.end : r.origin);
  const zL = ("end" in l ? l.end - y2 : l.origin - y2) - slack(y2, "end" in l ? l.end : l.origin);
  const s = sideSum(L, r, zR, T, kind) + sideSum(L, l, zL, T, kind);
  return (kind === "stopLoss" || kind === "stopLoss2" ? 2 * s : s) * (1 + 4 * U);
}

/**
 * Weights of the Richardson table's entries of the last row in the raw levels: R_{b,j} = sum_l w[j][l] v_l, from
 * R_{l,j} = R_{l,j-1} + (R_{l,j-1} - R_{l-1,j-1}) / (2^p_{j-1} - 1) (./richardson.ts). A bound e_l on each raw level's
 * error bounds R_{b,j}'s by sum_l |w[j][l]| e_l: no asymptotic assumption.
 */
export function lastRowWeights(exps: readonly number[], levels: number): number[][] {
  // rows[l][j] = weight vector of R_{l,j}
  let prev: number[][] = [];
  for (let l = 0; l < levels; l++) {
    const row: number[][] = [];
    const e = new Array(levels).fill(0);
    e[l] = 1;
    row.push(e);
    for (let j = 1; j <= l; j++) {
      const d = 2 ** exps[j - 1] - 1;
      row.push(row[j - 1].map((w, k) => w + (w - prev[j - 1][k]) / d));
    }
    prev = row;
  }
  return prev;
}

/**
 * The entry of the last row with the least derived bound given each raw level's bound errs[l] (the weights' rounding and
 * the sum's folded into a relative 1e-12): its index j and the bound.
 */
export function bestDerivedEntry(W: number[][], errs: readonly number[]): { j: number; err: number } {
  let best = { j: 0, err: Infinity };
  for (let j = 0; j < W.length; j++) {
    let e = 0;
    for (let l = 0; l < errs.length; l++) if (W[j][l] !== 0) e += Math.abs(W[j][l]) * errs[l];
    e *= 1 + 1e-12;
    if (e < best.err) best = { j, err: e };
  }
  return best;
}
