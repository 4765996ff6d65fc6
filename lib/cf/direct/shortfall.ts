import type { CompiledModel } from "../types";
import { stopLossBounds } from "../invert/tail-moments";
import { checkDeadline } from "../deadline";
import { directPoint, type DirectLaw, type DirectPoint } from "./types";

// Expected shortfall of a directly evaluated law, with a derived bound on its tail integral.

/** A bound on the tail integral past u: int_u^inf S (side 1) or int_-inf^u F (side -1); Infinity where none is known. */
export type RestBound = (u: number, side: 1 | -1) => number;

/**
 * The model's derived stop-loss bounds from its central moments (../invert/tail-moments.ts: E[(X - u)^+] and
 * E[(u - X)^+] by the best even order), as a RestBound; undefined where the moments or their bounds are missing.
 */
export function momentRest(model: CompiledModel): RestBound | undefined {
  const sl = stopLossBounds(model);
  return sl ? (u, side) => (side === 1 ? sl.right(u) : sl.left(u)) : undefined;
}

/**
 * Expected shortfall ES_p = q + E[(X - q)^+]/(1 - p) (Acerbi & Tasche 2002). Above the median
 * E[(X - q)^+] = int_q^inf S(y) dy; below it, where that integral would be most of the mean and ES a small difference,
 * E[(X - q)^+] = (mean - q) + int_-inf^q F(y) dy. A law with its own stop-loss transform at q (DirectLaw.stopLoss) gives the
 * tail integral and its bound. Else the value: the tail integral as a trapezoid sum in t with y = q +- s e^t
 * (s the law's spread; towards a finite end D e^t / (1 + e^t)), the part within s e^t0 of q as half its largest size.
 * Its error: the distance to the farther end of a derived bracket on the same integral (tailBracket), never an estimate.
 * A law without a finite mean (index <= 1) has no ES: NaN.
 */
export function directShortfall(
  law: DirectLaw,
  q: number,
  qErr: number,
  p: number,
  index: { left: number; right: number },
  mean: number | null,
  rest?: RestBound,
): { value: number; error: number } {
  if (p >= 1) return { value: q, error: qErr };
  if (index.right <= 1 || mean === null) return { value: NaN, error: NaN };
  const lower = p < 0.5 && index.left > 1;
  const dir = lower ? -1 : 1;
  const tailIndex = lower ? index.left : index.right;
  const s = law.spread;
  const h = 0.25;
  const pt = directPoint();
  const tailOf = (o: DirectPoint) => (lower ? o.cdf : o.sf);
  // a law with its own stop-loss transform at q answers the tail integral from it, value and bound
  const own = law.stopLoss?.(q, dir);
  const closed = own && Number.isFinite(own.v) && Number.isFinite(own.e) ? own : null;
  let A = closed ? closed.v : 0;
  const t0 = -32;
  const end = lower ? law.support[0] : law.support[1];
  const D = Math.abs(end - q);
  const finite = Number.isFinite(end);
  for (let t = t0; !closed && t < 400; t += h) {
    let d: number;
    let jac: number;
    if (finite) {
      const e = Math.exp(-Math.abs(t));
      const sg = t >= 0 ? 1 / (1 + e) : e / (1 + e);
      d = D * sg;
      jac = D * sg * (1 - sg);
    } else {
      d = s * Math.exp(t);
      jac = d;
    }
    law.at(q + dir * d, pt);
    const term = h * jac * tailOf(pt);
    A += term;
    // where to stop only (the bound is tailBracket's): the terms are negligible and the tail's rough size past y too
    if (t > 0 && term <= 1e-17 * A) {
      const g = tailOf(pt);
      const left = finite ? (D - d) * g : Number.isFinite(tailIndex) ? (4 * d * g) / (tailIndex - 1) : 8 * s * g;
      if (left <= 1e-13 * A) break;
    }
  }
  law.at(q, pt);
  if (!closed) A += ((finite ? D : s) * Math.exp(t0) * tailOf(pt)) / 2;
  const fq = pt.pdf + pt.pdfErr;
  const br = closed ? { lo: closed.v - closed.e, hi: closed.v + closed.e } : tailBracket(law, q, dir, rest, pt);
  const w = 1 - p;
  const excess = lower ? mean - q + A : A;
  const value = q + excess / w;
  const meanErr = lower ? 4 * Number.EPSILON * (Math.abs(mean) + Math.abs(q)) : 0;
  const quad = Math.max(A - br.lo, br.hi - A) + 8 * Number.EPSILON * A;
  // ES(q') - ES(q) = (q' - q)(1 - S(xi)/(1 - p)) for xi between: second order in |q' - q| <= qErr
  const error = (quad + meanErr) / w + (2 * fq * qErr * qErr) / w + 4 * Number.EPSILON * Math.abs(value);
  return { value, error };
}

/**
 * the panels' bracket width allowed, relative to G(0) times their length: the bound is about ES_TOL times the tail
 * integral times a few dozen (1e-7 costs 3x the evaluations for a 10x tighter bound)
 */
const ES_TOL = 1e-6;
/** panels at most (a derived bound is still returned, if a looser one) */
const ES_PANELS = 20000;

/**
 * A derived bracket [lo, hi] on int_0^inf G(d) dd, G(d) the tail (sf, or cdf for dir -1) at q + dir d, summed over panels
 * [a, b]: G is non-increasing, so a panel's integral lies in [(b - a) G(b), (b - a) G(a)]; on the far side of the law's
 * mode (DirectLaw.mode, or an interval derived for a unimodal law, modeRange) G is convex with slope -f, so it lies
 * between the envelope of the two end tangents and the chord, and on the near side G is concave (chord and tangents
 * swap); each value taken at the matching end of its own bound (sfErr/cdfErr, pdfErr). The panels grow while the
 * bracket's width stays below ES_TOL G(0) (b - a) (times s / a past the spread s). Past the last node the integral is
 * at most (D - d) G(d) towards a finite end at distance D, else the caller's derived bound (`rest`: the moments'
 * stop-loss bound) or the law's own stop-loss transform, else Infinity. An O(length^3) bracket per panel (the
 * trapezoid's own error is far smaller): the bound is a few thousand times the actual error.
 */
function tailBracket(law: DirectLaw, q: number, dir: 1 | -1, rest: RestBound | undefined, pt: DirectPoint): { lo: number; hi: number } {
  const lower = dir < 0;
  const end = lower ? law.support[0] : law.support[1];
  const D = Number.isFinite(end) ? Math.abs(end - q) : Infinity;
  // the mode's distance, where known: G is concave before mL and convex after mH (the mode is rounded by a few ulps,
  // types.ts, the distance by one more: both are covered by the margin)
  const range = modeRange(law);
  const margin = 16 * Number.EPSILON * (Math.abs(range[0]) + Math.abs(range[1]) + Math.abs(q));
  const [m0, m1] = dir > 0 ? [range[0] - q, range[1] - q] : [q - range[1], q - range[0]];
  const mL = Number.isFinite(m0) ? m0 - margin : -Infinity;
  const mH = Number.isFinite(m1) ? Math.max(m1 + margin, 0) : Infinity;
  law.at(q, pt);
  let gA = lower ? pt.cdf : pt.sf;
  let eA = lower ? pt.cdfErr : pt.sfErr;
  let fA = pt.pdf;
  let efA = pt.pdfErr;
  const G0 = gA + eA;
  if (!(G0 > 0)) return { lo: 0, hi: 0 };
  const s = law.spread;
  let a = 0;
  let step = Math.min(s * 1e-3, D);
  let val = 0;
  let lo = 0;
  let hi = 0;
  let past = Infinity;
  let slack = 0;
  for (let n = 0; n < ES_PANELS; n++) {
    // up to 20 000 evaluations of a law that may take tens of microseconds each (stable, VG, NIG)
    if ((n & 255) === 255) checkDeadline("direct shortfall bracket");
    let b = a + step;
    // a node at each side of the mode, and at the support's end
    if (a < mL && b > mL) b = mL;
    else if (a < mH && b > mH) b = mH;
    if (b >= D) b = D;
    // a slow tail without a bound on what is left walks out until the steps overflow: nothing more to gain
    if (!Number.isFinite(b)) break;
    const wd = b - a;
    law.at(q + dir * b, pt);
    const g = lower ? pt.cdf : pt.sf;
    const eg = lower ? pt.cdfErr : pt.sfErr;
    const f = pt.pdf;
    const ef = pt.pdfErr;
    const aLo = Math.max(gA - eA, 0);
    const aHi = Math.min(gA + eA, 1);
    // at a finite end G is 0 exactly (where the node, rounded, may fall just short of it)
    const atEnd = b >= D;
    const bLo = atEnd ? 0 : Math.max(g - eg, 0);
    const bHi = Math.min(g + eg, 1);
    // the nodes q + dir d are formed within u (|q| + d): G there is off by the mass so close, taken as twice the density
    // at the node times that distance (a density changing by a factor 2 within 1e-16 relative is met only at a
    // singular point, where a node has no reason to fall), the whole panel's width where the density is infinite
    const fEnd = (fx: number, ex: number, d: number) => (Number.isFinite(fx + ex) ? 2 * (fx + ex) * Number.EPSILON * (Math.abs(q) + d) : 1);
    slack += wd * (fEnd(fA, efA, a) + (atEnd ? 0 : fEnd(f, ef, b)));
    // monotone: between the right and left Riemann sums
    let pLo = wd * bLo;
    let pHi = wd * aHi;
    const fin = Number.isFinite(fA + efA + f + ef);
    if (a >= mH && fin) {
      // convex: below the chord, above each tangent at a slope at least as steep as its own (right of a) or at most
      // as steep (left of b)
      pHi = Math.min(pHi, (wd * (aHi + bHi)) / 2);
      pLo = Math.max(pLo, envelope(wd, aLo, -(fA + efA), bLo, -Math.max(f - ef, 0), 1));
    } else if (b <= mL && fin) {
      // concave: above the chord, below the tangents with the slopes swapped
      pLo = Math.max(pLo, (wd * (aLo + bLo)) / 2);
      pHi = Math.min(pHi, envelope(wd, aHi, -Math.max(fA - efA, 0), bHi, -(f + ef), -1));
    }
    const v = (wd * (gA + g)) / 2 + (fin ? (wd * wd * (f - fA)) / 12 : 0);
    val += Math.min(Math.max(v, pLo), pHi);
    lo += pLo;
    hi += pHi;
    a = b;
    gA = g;
    eA = eg;
    fA = f;
    efA = ef;
    if (a >= D) {
      past = 0;
      break;
    }
    // far enough when what is left is below the bracket's own tolerance
    if (bHi * s <= ES_TOL * 1e-3 * val || bHi === 0) {
      past = Number.isFinite(D) ? (D - a) * bHi : restAt(law, rest, q + dir * a, dir);
      if (past <= ES_TOL * val || !Number.isFinite(past)) break;
    }
    // the next panel: the bracket's width grows like its length cubed, its allowance like the length (beyond the spread,
    // like the length relative to the distance: a slow tail's long reach adds to the total only as its logarithm)
    const gap = pHi - pLo;
    const allow = ES_TOL * G0 * wd * Math.min(1, s / a);
    const grow = gap > 0 ? 0.9 * Math.sqrt(allow / gap) : 2;
    step = wd * Math.min(Math.max(grow, 0.5), 2);
  }
  if (past === Infinity && Number.isFinite(D)) past = (D - a) * Math.min(gA + eA, 1);
  else if (past === Infinity) past = restAt(law, rest, q + dir * a, dir);
  hi += past + slack;
  lo -= slack;
  if (!(hi >= lo)) return { lo: 0, hi: Infinity };
  // each panel's few roundings, relative to the sum of their sizes
  return { lo: lo * (1 - 16 * Number.EPSILON), hi: hi * (1 + 16 * Number.EPSILON) };
}

/**
 * An interval holding the law's mode: [mode, mode] where DirectLaw.mode gives it; for a unimodal law (DirectLaw.unimodal)
 * one derived from density values with their bounds: f non-decreasing up to the mode M and non-increasing after, so
 * f(x1) < f(x2) (beyond both bounds) with x1 < x2 puts M above x1, and f(x1) > f(x2) puts it below x2; else unknown.
 */
export function modeRange(law: DirectLaw): readonly [number, number] {
  if (law.mode !== undefined && Number.isFinite(law.mode)) return [law.mode, law.mode];
  if (!law.unimodal) return [-Infinity, Infinity];
  let r = MODES.get(law);
  if (!r) MODES.set(law, (r = searchMode(law)));
  return r;
}

const MODES = new WeakMap<DirectLaw, readonly [number, number]>();

function searchMode(law: DirectLaw): readonly [number, number] {
  const pt = directPoint();
  const [sLo, sHi] = law.support;
  const at = (x: number): [number, number] => {
    law.at(x, pt);
    return Number.isFinite(pt.pdf) ? [pt.pdf - pt.pdfErr, pt.pdf + pt.pdfErr] : [Infinity, Infinity];
  };
  // the largest density on a grid of 129 points over 16 spreads; its neighbours bracket the mode when the bounds part them
  const n = 64;
  const xs: number[] = [];
  const fs: [number, number][] = [];
  for (let j = -n; j <= n; j++) {
    const x = Math.min(Math.max(law.center + (law.spread * j) / 8, sLo), sHi);
    xs.push(x);
    fs.push(at(x));
  }
  let k = 0;
  for (let j = 1; j < xs.length; j++) if (fs[j][0] + fs[j][1] > fs[k][0] + fs[k][1]) k = j;
  let L = k > 0 && fs[k - 1][1] < fs[k][0] ? xs[k - 1] : xs[k] === sLo ? sLo : -Infinity;
  let R = k < xs.length - 1 && fs[k + 1][1] < fs[k][0] ? xs[k + 1] : xs[k] === sHi ? sHi : Infinity;
  if (!(Number.isFinite(L) && Number.isFinite(R))) return [L, R];
  // narrowed by thirds while the bounds still tell the two inner points apart
  for (let it = 0; it < 60 && R - L > 1e-12 * (Math.abs(L) + Math.abs(R) + law.spread); it++) {
    const x1 = L + (R - L) / 3;
    const x2 = R - (R - L) / 3;
    const f1 = at(x1);
    const f2 = at(x2);
    if (f1[1] < f2[0]) L = x1;
    else if (f1[0] > f2[1]) R = x2;
    else break;
  }
  return [L, R];
}

/**
 * int_0^w of the envelope of the lines L_a(x) = ga + sa x and L_b(x) = gb + sb (x - w): their maximum (kind 1, lower
 * bound of a convex function) or minimum (kind -1, upper bound of a concave one), the lines meeting at x* in [0, w].
 */
function envelope(w: number, ga: number, sa: number, gb: number, sb: number, kind: 1 | -1): number {
  if (!(kind * (sb - sa) > 0)) return kind * -Infinity;
  const xs = Math.min(Math.max((gb - ga - sb * w) / (sa - sb), 0), w);
  return xs * (ga + (sa * xs) / 2) + (w - xs) * (gb - (sb * (w - xs)) / 2);
}

/** The derived bound on the tail integral past y: the caller's (moments) and the law's own stop-loss transform, the smaller. */
function restAt(law: DirectLaw, rest: RestBound | undefined, y: number, dir: 1 | -1): number {
  let r = rest ? rest(y, dir) : Infinity;
  const o = law.stopLoss?.(y, dir);
  if (o && Number.isFinite(o.e)) r = Math.min(r, Math.abs(o.v) + o.e);
  return r >= 0 ? r : Infinity;
}
