import type { Atom } from "../types";
import { checkDeadline } from "../deadline";

/** cdf, sf and density of the whole law at x, with the cdf error bound; one evaluation backend per law. */
export interface Evaluator {
  eval(x: number): { F: number; S: number; f: number };
  errCdf: number;
  /** the cdf bound at one point where the backend has one (never above errCdf); the quantile's error then uses it */
  errAt?: (x: number) => number;
  lo: number;
  hi: number;
  terms: number;
}

/**
 * Per level: jumps first (the level falls inside an atom's jump -> the atom), otherwise bracket between
 * atoms and solve F(x) = p (or S(x) = 1 - p above the median) by safeguarded Newton; a flat stretch to the
 * left (F within its error bound of p) sends the answer to the stretch's left end.
 */
export function solveLevels(
  ev: Evaluator,
  atoms: Atom[],
  p: Float64Array,
  support: readonly [number, number],
  spread: number,
  notes: string[],
): { x: Float64Array; err: Float64Array } {
  const n = p.length;
  const x = new Float64Array(n);
  const err = new Float64Array(n);
  const e = ev.errCdf;
  const inAtoms = atoms.filter((a) => a.x >= ev.lo && a.x <= ev.hi);
  const Fa = inAtoms.map((a) => ev.eval(a.x));
  const eL = ev.eval(ev.lo);
  const eH = ev.eval(ev.hi);
  let warned = false;
  let warnedFlat = false;
  for (let i = 0; i < n; i++) {
    const pi = p[i];
    if (pi === 0) {
      x[i] = atoms.length && atoms[0].x <= support[0] ? atoms[0].x : support[0];
      continue;
    }
    if (pi === 1) {
      x[i] = support[1];
      continue;
    }
    let L = ev.lo;
    let R = ev.hi;
    let done = false;
    for (let j = 0; j < inAtoms.length; j++) {
      const Fj = Fa[j].F;
      if (Fj >= pi - e) {
        if (Fj - inAtoms[j].p < pi - e) {
          x[i] = inAtoms[j].x;
          err[i] = 0;
          done = true;
        } else {
          R = inAtoms[j].x;
        }
        break;
      }
      L = inAtoms[j].x;
    }
    if (done) continue;
    if (eL.F >= pi || eH.S > 1 - pi) {
      x[i] = NaN;
      err[i] = Infinity;
      if (!warned) notes.push("levels beyond the resolved range come back as NaN (tolerance too loose for such tails)");
      warned = true;
      continue;
    }
    const upper = pi > 0.5;
    const target = upper ? 1 - pi : pi;
    const g = (v: { F: number; S: number }) => (upper ? target - v.S : v.F - target);
    const r = rootMonotone(ev, g, L, R, spread);
    let q = r.x;
    // flat stretch: F already within e of p a little to the left -> move to the stretch's left end
    // a step over which F must rise by 8 e unless the cdf is flat there
    const dx = Math.min(Math.max(1e-7 * Math.max(Math.abs(q), spread), r.f > 0 ? (8 * e) / r.f : Infinity), 0.01 * spread);
    const left = ev.eval(q - dx);
    if (left.F >= pi - e && q - dx > L) {
      const gl = (v: { F: number; S: number }) => (upper ? target + e - v.S : v.F - (target - e));
      q = rootMonotone(ev, gl, L, q - dx, spread).x;
      // a level on a flat stretch is ill-posed within the cdf error: the answer lies anywhere from q up to where
      // F_h exceeds p + e, and that whole width is the honest error
      const gh = (v: { F: number; S: number }) => (upper ? target - e - v.S : v.F - (target + e));
      const hiV = ev.eval(R);
      const qHi = g(hiV) >= 0 && (upper ? target - e - hiV.S : hiV.F - (target + e)) >= 0 ? rootMonotone(ev, gh, q, R, spread).x : R;
      err[i] = qHi - q + dx;
      if (!warnedFlat) notes.push("a level falls on a flat stretch of the cdf: the left end is returned, the error spans the stretch");
      warnedFlat = true;
    } else if (r.f > 0 && ev.errAt) {
      // the bound at the bracket's upper end (the larger of the two where the bound grows with x, as the damped
      // route's does), checked against the bracket it implies
      const e0 = Math.min(ev.errAt(q + (2 * e) / r.f), e);
      const eq = Math.max(e0, ev.errAt(q + (2 * e0) / r.f), ev.errAt(q - (2 * e0) / r.f));
      err[i] = (2 * Math.min(eq, e)) / r.f + r.width;
    } else {
      err[i] = r.f > 0 ? (2 * e) / r.f + r.width : Infinity;
    }
    x[i] = q;
  }
  return { x, err };
}

/** Smallest root of a non-decreasing g on [L, R] (g(L) < 0 <= g(R)) by Newton steps kept inside the bracket. */
export function rootMonotone(
  ev: Evaluator,
  g: (v: { F: number; S: number }) => number,
  L0: number,
  R0: number,
  spread: number,
): { x: number; f: number; width: number } {
  let L = L0;
  let R = R0;
  let x = 0.5 * (L + R);
  let f = 0;
  for (let it = 0; it < 200; it++) {
    checkDeadline("quantile-root");
    const v = ev.eval(x);
    const gv = g(v);
    f = v.f;
    if (gv < 0) L = x;
    else R = x;
    let nx = f > 0 ? x - gv / f : NaN;
    if (!(nx > L && nx < R)) nx = 0.5 * (L + R);
    const tolX = 4 * Number.EPSILON * Math.max(Math.abs(nx), 1e-3 * spread);
    if (Math.abs(nx - x) <= tolX || R - L <= tolX) {
      x = nx;
      break;
    }
    x = nx;
  }
  return { x, f: ev.eval(x).f, width: 8 * Number.EPSILON * Math.max(Math.abs(x), 1e-3 * spread) };
}

