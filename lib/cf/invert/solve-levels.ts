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
  let warnedOpen = false;
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
    const r = rootMonotone(ev, g, L, R, spread, { upper, target }, 1e-4 * e);
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
    } else if (r.f > 0) {
      const eAt = (y: number) => (ev.errAt ? Math.min(ev.errAt(y), e) : e);
      // a verified bracket; where none closes inside the evaluator's window the level's error is unbounded
      err[i] = verifiedRadius(ev, g, q, r.f, eAt);
      if (err[i] === Infinity && !warnedOpen) notes.push("a quantile's bracket does not close inside the resolved range: its error is reported as unbounded");
      if (err[i] === Infinity) warnedOpen = true;
    } else {
      err[i] = Infinity;
    }
    x[i] = q;
  }
  return { x, err };
}

/**
 * A radius d with |q - q_p| <= d, verified at two points: g(y) = F_h(y) - p (or p - 1 + ... above the median) is within
 * e(y) of the true G(y) = F(y) - p, so g(q - a) + e(q - a) < 0 < g(q + b) - e(q + b) gives F(q - a) < p <= F(q + b), and
 * q_p (the smallest x with F(x) >= p) lies in (q - a, q + b] since F is non-decreasing; d = max(a, b). Each side starts
 * at the first-order value (|g(q)| + e(q)) / f_h(q) (slightly widened) and doubles until it closes, the last try at the
 * evaluator's window end (where e holds); Infinity when a side does not close there.
 */
function verifiedRadius(ev: Evaluator, g: (v: { F: number; S: number }) => number, q: number, f: number, eAt: (y: number) => number): number {
  const d0 = ((Math.abs(g(ev.eval(q))) + eAt(q)) / f) * 1.0625 + 8 * Number.EPSILON * Math.abs(q);
  const side = (s: -1 | 1): number => {
    const end = s < 0 ? ev.lo : ev.hi;
    for (let d = d0, k = 0; k < 1100; k++, d *= 2) {
      checkDeadline("quantile-bracket");
      const beyond = s < 0 ? q - d <= end : q + d >= end;
      const y = beyond ? end : q + s * d;
      const gy = g(ev.eval(y));
      if (s < 0 ? gy + eAt(y) < 0 : gy - eAt(y) > 0) return Math.abs(y - q);
      if (beyond) return Infinity;
    }
    return Infinity;
  };
  const a = side(-1);
  return a === Infinity ? a : Math.max(a, side(1));
}

const LN8 = Math.log(8);

/** Smallest root of a non-decreasing g on [L, R] (g(L) < 0 <= g(R)) by Newton steps kept inside the bracket. */
export function rootMonotone(
  ev: Evaluator,
  g: (v: { F: number; S: number }) => number,
  L0: number,
  R0: number,
  spread: number,
  tail?: { upper: boolean; target: number },
  gTol = 0,
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
    // already within a small share of the cdf bound: further steps only chase rounding (the rest goes in the width)
    if (gTol > 0 && Math.abs(gv) <= gTol && f > 0) return { x, f, width: 8 * Number.EPSILON * Math.max(Math.abs(x), 1e-3 * spread) + Math.abs(gv) / f };
    if (gv < 0) L = x;
    else R = x;
    let nx = f > 0 ? x - gv / f : NaN;
    // far from the root a tail is closer to a power of x than to a line: Newton's step on log S (or log F) against
    // log x, which a power law solves in one step; any step is kept inside the bracket, as before
    if (!(nx > L && nx < R) && tail && x > 0 && f > 0) {
      const m = tail.upper ? v.S : v.F;
      if (m > 0 && tail.target > 0) {
        // at most a factor 8 a step: near a density's singularity (f large) one step could otherwise land where a
        // Newton step is below the stopping rule's size far from the root
        const du = Math.max(-LN8, Math.min(LN8, (Math.log(m / tail.target) * m) / (x * f)));
        const lx = x * Math.exp(tail.upper ? du : -du);
        if (lx > L && lx < R) nx = lx;
      }
    }
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

