// Evaluation of a damped solution (see damped.ts): the mid-point sums at a point and on an FFT grid, undamped, with bounds.
import type { DampedSolution } from "./damped";
import { nextPowerOfTwo } from "../fftplan";
import { checkDeadline } from "../deadline";
import { sumOnGrid } from "./fft";
import { kernelsAt } from "../damped-kernels";
import type { Nodes } from "./nodes";

const EPS = Number.EPSILON;

/** the gamma kernels and the one-claim term at x: what the inverted remainder leaves out */
export function takenOutAt(s: DampedSolution, x: number): { F: number; f: number; I: number; err: number; errf: number; errI: number } {
  const kv = s.kernels.length ? kernelsAt(s.kernels, x) : { F: 0, f: 0, I: 0, err: 0, errf: 0, errI: 0 };
  if (!s.severity) return kv;
  const v = s.severity.at(x);
  const out = { F: kv.F + v.F, f: kv.f + v.f, I: kv.I + v.I, err: kv.err + v.err, errf: kv.errf + v.errf, errI: kv.errI + v.errI };
  if (!s.pair) return out;
  const u = s.pair.at(x);
  return { F: out.F + u.F, f: out.f + u.f, I: out.I + u.I, err: out.err + u.errF, errf: out.errf + u.errf, errI: out.errI + u.errI };
}

/** Values and error bounds of the continuous part at x (cdf, density, integrated cdf). */
export interface DampedPoint {
  Fc: number;
  fc: number;
  Ic: number;
  errF: number;
  errf: number;
  errI: number;
}

/** The three mid-point sums at one point (phase advanced by a rotation, resynchronised every 64 terms). */
export function dampedAt(s: DampedSolution, x: number, wantPdf: boolean, wantInt: boolean): DampedPoint {
  const y = x - s.lo;
  if (y < 0) return { Fc: 0, fc: 0, Ic: 0, errF: 0, errf: 0, errI: 0 };
  const { h, K, pRe, pIm, cRe, cIm, iRe, iIm } = s;
  const th = h * y;
  const rc = Math.cos(th);
  const rs = -Math.sin(th);
  let aP = 0;
  let aC = 0;
  let aI = 0;
  let k = 0;
  checkDeadline("pointwise");
  while (k < K) {
    const a0 = (k + 0.5) * th;
    let zr = Math.cos(a0);
    let zi = -Math.sin(a0);
    const end = Math.min(K, k + 64);
    for (; k < end; k++) {
      aC += zr * cRe[k] - zi * cIm[k];
      if (wantPdf) aP += zr * pRe[k] - zi * pIm[k];
      if (wantInt) aI += zr * iRe[k] - zi * iIm[k];
      const nr = zr * rc - zi * rs;
      zi = zr * rs + zi * rc;
      zr = nr;
    }
  }
  const g = Math.exp(s.beta * y);
  const f = (g * h) / Math.PI;
  const kv = takenOutAt(s, x);
  // the phase recurrence drifts by ~ eps per step between resyncs: inside the rounding allowance of the setup;
  // clamping to the known range [0, Mc] only moves a value toward the truth
  const Fc = Math.min(Math.max(f * aC + kv.F + s.cdfShift, 0), s.Mc);
  const fc = Math.max(f * aP + kv.f, 0);
  // images of the integrated cdf: sum_{m >= 1} (-1)^m q^m (A (y + m T) - B) in closed form
  // (sum (-1)^m q^m = -q/(1+q), sum (-1)^m m q^m = -q/(1+q)^2); what is left is at most
  // q/(1-q) E[(Y - (y + T))^+] <= q/(1-q) E[Y^2] / (4 (y + T)) for Y >= 0 ((u - c)^+ <= u^2 / (4c), common practice)
  let images = 0;
  let aliasI = s.aliasIntCoef * (y + s.T / (1 - s.q));
  if (s.intImages) {
    const { A, B, second } = s.intImages;
    const r = s.q / (1 + s.q);
    images = -r * (A * y - B) - (A * s.T * r) / (1 + s.q);
    aliasI = (s.q / (1 - s.q)) * (second / (4 * (y + s.T))) + 8 * EPS * (Math.abs(A) * (y + s.T) + Math.abs(B)) * r;
  }
  const Ic = Math.min(Math.max(f * aI - images + kv.I, 0), s.Mc * y);
  return {
    Fc,
    fc,
    Ic,
    errF: g * s.sumCdf + s.aliasCdf + kv.err,
    errf: g * s.sumPdf + s.aliasPdf + kv.errf,
    errI: g * s.sumInt + aliasI + kv.errI,
  };
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
  for (let j = 0; j < count; j++) {
    const y = from + j * dx - s.lo;
    if (y < 0) continue;
    const g = Math.exp(s.beta * y);
    const kv = takenOutAt(s, from + j * dx);
    Fc[j] = Math.min(Math.max(g * gC[j] + kv.F + s.cdfShift, 0), s.Mc);
    fc[j] = wantPdf ? Math.max(g * gP[j] + kv.f, 0) : 0;
    errF[j] = g * s.sumCdf + s.aliasCdf + kv.err;
    errf[j] = g * s.sumPdf + s.aliasPdf + kv.errf;
  }
  return { fc, Fc, errF, errf };
}

/** FFT size and period for a grid: N dx >= the period the tolerance needs and the grid fits in [lo, lo + N dx). */
export function gridPeriod(lo: number, from: number, dx: number, count: number, T: number): { N: number; T: number } {
  const last = from + (count - 1) * dx;
  const need = Math.max(T, last - Math.min(lo, from) + dx);
  const N = nextPowerOfTwo(Math.max(count, Math.ceil(need / dx)));
  return { N, T: N * dx };
}
