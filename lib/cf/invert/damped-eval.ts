// Evaluation of a damped solution (see damped.ts): the mid-point sums at a point and on an FFT grid, undamped, with bounds.
import type { DampedSolution } from "./damped";
import { combineRounding, compositeSize } from "../fftplan";
import { checkDeadline } from "../deadline";
import { sumOnGrid } from "./fft";
import { kernelsAt } from "../damped-kernels";
import type { Nodes } from "./nodes";
import { imageIntegralTail } from "./damped-images";
import { truncationAtY } from "./damped-slope";
import { cabs } from "../complex";

const EPS = Number.EPSILON;

/**
 * the gamma kernels and the one- and two-claim terms at x: what the inverted remainder leaves out. The density and the
 * integrated cdf only where asked (the two-claim term's quadrature then skips their transcendental calls; a part not
 * asked for may be NaN with an Infinity bound)
 */
export function takenOutAt(
  s: DampedSolution,
  x: number,
  wantPdf = true,
  wantInt = true,
): { F: number; f: number; I: number; err: number; errf: number; errI: number } {
  const kv = s.kernels.length ? kernelsAt(s.kernels, x, wantInt) : { F: 0, f: 0, I: 0, err: 0, errf: 0, errI: 0 };
  if (!s.severity) return kv;
  const v = s.severity.at(x, wantPdf, wantInt);
  const out = { F: kv.F + v.F, f: kv.f + v.f, I: kv.I + v.I, err: kv.err + v.err, errf: kv.errf + v.errf, errI: kv.errI + v.errI };
  if (!s.pair) return out;
  const u = s.pair.at(x, wantPdf, wantInt, s.pairTol);
  return { F: out.F + u.F, f: out.f + u.f, I: out.I + u.I, err: out.err + u.errF, errf: out.errf + u.errf, errI: out.errI + u.errI };
}

/** Values and error bounds of the continuous part at x (cdf, density, integrated cdf; those not asked for NaN, bound Infinity). */
export interface DampedPoint {
  Fc: number;
  fc: number;
  Ic: number;
  errF: number;
  errf: number;
  errI: number;
}

/** Dekker's exact product (Ogita, Rump & Oishi 2005, TwoProduct): a b = out[0] + out[1] exactly (no overflow) */
const SPLIT = 134217729;
export function twoProduct(a: number, b: number, out: Float64Array): void {
  const p = a * b;
  let c = SPLIT * a;
  const ah = c - (c - a);
  const al = a - ah;
  c = SPLIT * b;
  const bh = c - (c - b);
  const bl = b - bh;
  out[0] = p;
  out[1] = ah * bh - p + ah * bl + al * bh + al * bl;
}

/** terms per block: the block's phases are a start phase times the table e^{-i j h y}, j < B */
const B = 64;
const tabRe = new Float64Array(B);
const tabIm = new Float64Array(B);
const tp = new Float64Array(2);
const ph = new Float64Array(2);

/**
 * e^{-i a y} for an exact double a and y = yh + yl exactly: a yh split into p + e exactly, cos and sin of p (correctly
 * reduced, within an ulp) times e^{-i (e + a yl)}, whose argument is below a few ulps of p
 */
function phase(a: number, yh: number, yl: number, out: Float64Array): void {
  twoProduct(a, yh, tp);
  const p = tp[0];
  const e = tp[1] + a * yl;
  const c = Math.cos(p);
  const sn = Math.sin(p);
  const ce = Math.cos(e);
  const se = Math.sin(e);
  out[0] = c * ce - sn * se;
  out[1] = -(sn * ce + c * se);
}

/**
 * The three mid-point sums at one point. With exact nodes (s.pointwise) the phase of each block's first term and the
 * table e^{-i j h y} come from exact arguments, each term is their product (no recurrence, so no drift), and the sums
 * run in groups of 8, 8 groups a block, the blocks compensated: the rounding is within SUM_REL of sum |c_k| (see
 * damped-transform.ts), which is what the solution's bounds carry.
 */
export function dampedAt(s: DampedSolution, x: number, wantPdf: boolean, wantInt: boolean): DampedPoint {
  // y = x - lo exactly, as yh + yl (Knuth's TwoSum)
  const yh = x - s.lo;
  const bv = yh - x;
  const yl = x - (yh - bv) + (-s.lo - bv);
  const y = yh;
  if (y < 0) return { Fc: 0, fc: 0, Ic: 0, errF: 0, errf: 0, errI: 0 };
  const { h, K, pRe, pIm, cRe, cIm, iRe, iIm } = s;
  if (wantInt && iRe.length < K) throw new Error("dampedAt: the solution was set up without the integrated cdf");
  if (wantPdf && pRe.length < K) throw new Error("dampedAt: the solution was set up without the density");
  // the table's entries past the last term are not used (a solution of fewer than B terms)
  const J = Math.min(B, K);
  for (let j = 0; j < J; j++) {
    phase(j * h, yh, yl, ph);
    tabRe[j] = ph[0];
    tabIm[j] = ph[1];
  }
  // compensated block totals (Neumaier): sum and correction per sum
  let aC = 0;
  let eC = 0;
  let aP = 0;
  let eP = 0;
  let aI = 0;
  let eI = 0;
  checkDeadline("pointwise");
  for (let k0 = 0; k0 < K; k0 += B) {
    phase((k0 + 0.5) * h, yh, yl, ph);
    const zr0 = ph[0];
    const zi0 = ph[1];
    const end = Math.min(K, k0 + B);
    let bC = 0;
    let bP = 0;
    let bI = 0;
    for (let g0 = k0; g0 < end; g0 += 8) {
      const gEnd = Math.min(end, g0 + 8);
      let sC = 0;
      let sP = 0;
      let sI = 0;
      for (let k = g0; k < gEnd; k++) {
        const wr = tabRe[k - k0];
        const wi = tabIm[k - k0];
        const zr = zr0 * wr - zi0 * wi;
        const zi = zr0 * wi + zi0 * wr;
        sC += zr * cRe[k] - zi * cIm[k];
        if (wantPdf) sP += zr * pRe[k] - zi * pIm[k];
        if (wantInt) sI += zr * iRe[k] - zi * iIm[k];
      }
      bC += sC;
      bP += sP;
      bI += sI;
    }
    let t = aC + bC;
    eC += Math.abs(aC) >= Math.abs(bC) ? aC - t + bC : bC - t + aC;
    aC = t;
    if (wantPdf) {
      t = aP + bP;
      eP += Math.abs(aP) >= Math.abs(bP) ? aP - t + bP : bP - t + aP;
      aP = t;
    }
    if (wantInt) {
      t = aI + bI;
      eI += Math.abs(aI) >= Math.abs(bI) ? aI - t + bI : bI - t + aI;
      aI = t;
    }
  }
  aC += eC;
  aP += eP;
  aI += eI;
  const g = Math.exp(s.beta * y);
  const f = (g * h) / Math.PI;
  const kv = takenOutAt(s, x, wantPdf, wantInt);
  // clamping to the known range [0, Mc] only moves a value toward the truth
  const Fc = Math.min(Math.max(f * aC + kv.F + s.cdfShift, 0), s.Mc);
  const fc = wantPdf ? Math.max(f * aP + kv.f, 0) : NaN;
  // images of the integrated cdf: sum_{m >= 1} (-1)^m q^m (A (y + m T) - B) in closed form
  // (sum (-1)^m q^m = -q/(1+q), sum (-1)^m m q^m = -q/(1+q)^2); what is left is at most
  // q/(1-q) E[(Y - (y + T))^+] <= q/(1-q) E[Y^2] / (4 (y + T)) for Y >= 0 ((u - c)^+ <= u^2 / (4c), common practice)
  let images = 0;
  let aliasI = s.aliasIntCoef * (y + s.T / (1 - s.q));
  // without the integrated cdf asked for, its value and bound are not formed (the per-point image bound costs a Riemann
  // sum of the tail bound): Ic is NaN and errI Infinity then
  if (!wantInt) aliasI = Infinity;
  else if (s.intImages) {
    const { A, B, second } = s.intImages;
    const r = s.q / (1 + s.q);
    images = -r * (A * y - B) - (A * s.T * r) / (1 + s.q);
    // per point from the cdf's image tail where there is one (./damped-images.ts imageIntegralTail), else the second moment
    const rest = s.imageTail ? imageIntegralTail(s.imageTail, y + s.T, second) : second / (4 * (y + s.T));
    aliasI = (s.q / (1 - s.q)) * rest + 8 * EPS * (Math.abs(A) * (y + s.T) + Math.abs(B)) * r;
  }
  const Ic = wantInt ? Math.min(Math.max(f * aI - images + kv.I, 0), s.Mc * y) : NaN;
  // the undamping product f * a: exp(beta y) within (1 + beta y) eps, the products within 4 eps
  const fin = (8 + s.beta * y) * EPS;
  return {
    Fc,
    fc,
    Ic,
    errF: g * sumCdfAt(s, y) + aliasCdfAt(s, y) + kv.err + fin * Math.abs(f * aC),
    errf: wantPdf ? g * sumPdfAt(s, y) + s.aliasPdf + kv.errf + fin * Math.abs(f * aP) : Infinity,
    errI: g * s.sumInt + aliasI + kv.errI + fin * Math.abs(f * aI),
  };
}

/** the cdf sum's truncation and rounding bound at y = x - lo (before undamping): per point where the solution has tau */
export function sumCdfAt(s: DampedSolution, y: number): number {
  if (!(s.truncTau < s.truncCdf)) return s.sumCdf;
  return s.roundCdf * (1 + 4 * EPS) + truncationAtY(s.truncCdf, s.truncTau, s.h, y);
}

/** the density sum's truncation and rounding bound at y (before undamping): per point where the solution has its tau */
export function sumPdfAt(s: DampedSolution, y: number): number {
  if (!(s.truncTauPdf < s.truncPdf)) return s.sumPdf;
  return s.roundPdf * (1 + 4 * EPS) + truncationAtY(s.truncPdf, s.truncTauPdf, s.h, y);
}

/**
 * The cdf's image remainder at y = x - lo: at most q / (1 - q) B(y + T) (B from ./damped-images.ts, non-increasing, so
 * it bounds every image y + m T, m >= 1) plus the rounding of the closed-form shift; never above the uniform bound.
 */
export function aliasCdfAt(s: DampedSolution, y: number): number {
  if (!s.imageTail) return s.aliasCdf;
  return Math.min(s.aliasCdf, (s.q / (1 - s.q)) * s.imageTail(y + s.T) + 4 * EPS * Math.abs(s.cdfShift));
}

/** Density and cdf of the continuous part on a uniform grid by two FFTs (the period is N dx). */
export function dampedGrid(
  s: DampedSolution,
  from: number,
  dx: number,
  count: number,
  N: number,
  wantPdf: boolean,
): { fc: Float64Array; Fc: Float64Array; errF: Float64Array; errf: Float64Array } {
  const mk = (re: Float64Array, im: Float64Array): Nodes => ({
    h: s.h,
    K: s.K,
    re,
    im,
    wre: re,
    wim: im,
    absCdf: 0,
    absPdf: 0,
    mass: 0,
  });
  const gC = new Float64Array(count);
  const gP = new Float64Array(count);
  sumOnGrid(mk(s.cRe, s.cIm), s.lo, from, N, 0, count, gC, null, null);
  if (wantPdf) sumOnGrid(mk(s.pRe, s.pIm), s.lo, from, N, 0, count, gP, null, null);
  const fc = new Float64Array(count);
  const Fc = new Float64Array(count);
  const errF = new Float64Array(count);
  const errf = new Float64Array(count);
  // the grid's own rounding beyond sumAllowance's GRID_REL (./fft.ts): the pre-rotation's angle (k + 1/2) h y0 is off
  // by at most 3 u t_k |y0| (y0 = from - lo, h y0 and the product); h = 2 pi / (N dx) within 3 u, so the transform's
  // exact kernel puts the values at points within 3 u N dx of the grid's, and the node (k + 1/2) h one more rounding:
  // 4 u t_k N dx in all; each bin sums ceil(K/N) terms ((ceil(K/N) - 1) u of their moduli, Higham 2002 eq. 4.4):
  // (h/pi) u sum |c_k| (t_k (3 |y0| + 4 N dx) + ceil(K/N)); a composite N's combining step adds combineRounding(N) u of
  // the bins' absolute sum, at most sum |c_k| (../fftplan.ts)
  const u = Number.EPSILON / 2;
  const y0 = 3 * Math.abs(from - s.lo) + 4 * N * dx;
  const bins = Math.ceil(s.K / N) + combineRounding(N);
  const own = (re: Float64Array, im: Float64Array) => {
    const { a, at } = moduliSums(re, im, s.K, s.h);
    return (s.h / Math.PI) * u * (y0 * at + bins * a) * (1 + 1e-10);
  };
  const ownC = own(s.cRe, s.cIm);
  const ownP = wantPdf ? own(s.pRe, s.pIm) : 0;
  // the cdf's image bound at y holds at every larger y (aliasCdfAt is non-increasing in y): refreshed every 64 points from
  // the first point in the support (a grid starting below lo kept the uniform bound, the largest, for up to 63 points)
  let alias = s.aliasCdf;
  let refresh = 0;
  for (let j = 0; j < count; j++) {
    const y = from + j * dx - s.lo;
    if (y < 0) continue;
    if (j >= refresh) {
      alias = aliasCdfAt(s, y);
      refresh = j + 64;
    }
    const g = Math.exp(s.beta * y);
    const kv = takenOutAt(s, from + j * dx, wantPdf, false);
    Fc[j] = Math.min(Math.max(g * gC[j] + kv.F + s.cdfShift, 0), s.Mc);
    fc[j] = wantPdf ? Math.max(g * gP[j] + kv.f, 0) : 0;
    errF[j] = g * (sumCdfAt(s, y) + ownC) + alias + kv.err;
    errf[j] = wantPdf ? g * (sumPdfAt(s, y) + ownP) + s.aliasPdf + kv.errf : NaN;
  }
  return { fc, Fc, errF, errf };
}

/**
 * sum_k |c_k| and sum_k |c_k| t_k, t_k = (k + 1/2) h, k < K: |c_k| by cabs (within 2 eps, below dampedGrid's 1e-10 margin;
 * Math.hypot is not inlined by V8 and boxes its result, and this runs over every term of every grid); a function of its own,
 * so the loop is optimised on its own type feedback
 */
function moduliSums(re: Float64Array, im: Float64Array, K: number, h: number): { a: number; at: number } {
  let a = 0;
  let at = 0;
  for (let k = 0; k < K; k++) {
    const m = cabs(re[k], im[k]);
    a += m;
    at += m * (k + 0.5) * h;
  }
  return { a, at };
}

/** FFT size and period for a grid: N dx >= the period the tolerance needs and the grid fits in [lo, lo + N dx). */
export function gridPeriod(lo: number, from: number, dx: number, count: number, T: number): { N: number; T: number } {
  const last = from + (count - 1) * dx;
  const need = Math.max(T, last - Math.min(lo, from) + dx);
  // N = m 2^p (m odd, at most 15: ../fftplan.ts compositeSize), within 12.5% of what is needed: the terms grow with N dx
  const N = compositeSize(Math.max(count, Math.ceil(need / dx)));
  return { N, T: N * dx };
}
