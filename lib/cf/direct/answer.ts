import type { DensityResult } from "../invert/types";
import type { QuantileResult } from "../invert/quantile";
import { directPoint, type DirectLaw, type DirectPoint } from "./types";
import { directShortfalls, type RestBound } from "./shortfall";

/** Density, cdf and sf of a directly evaluated law at the points xs; each point's bounds, and the largest over the points. */
export function directDensity(law: DirectLaw, xs: Float64Array, modelNotes: string[], out?: { pdf?: Float64Array; cdf?: Float64Array; sf?: Float64Array }): DensityResult {
  const n = xs.length;
  const fits = (b: Float64Array | undefined): b is Float64Array => !!b && b.length === n;
  const pdf = fits(out?.pdf) ? out!.pdf! : new Float64Array(n);
  const cdf = fits(out?.cdf) ? out!.cdf! : new Float64Array(n);
  const sf = fits(out?.sf) ? out!.sf! : new Float64Array(n);
  const pt = directPoint();
  let ePdf = 0;
  let eCdf = 0;
  const pointError = { pdf: new Float64Array(n), cdf: new Float64Array(n), sf: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    law.at(xs[i], pt);
    tighten(pt);
    pdf[i] = pt.pdf;
    cdf[i] = pt.cdf;
    sf[i] = pt.sf;
    pointError.pdf[i] = pt.pdfErr;
    pointError.cdf[i] = pt.cdfErr;
    pointError.sf[i] = pt.sfErr;
    ePdf = Math.max(ePdf, pt.pdfErr);
    eCdf = Math.max(eCdf, pt.cdfErr, pt.sfErr);
  }
  return {
    x: Float64Array.from(xs),
    pdf,
    cdf,
    sf,
    atoms: (law.atoms ?? []).map((a) => ({ x: a.x, p: a.p })),
    diagnostics: {
      method: law.method,
      gridSize: n,
      terms: 0,
      frequencyStep: 0,
      maxFrequency: 0,
      // the span of the points evaluated (the support may be infinite, and diagnostics are finite numbers)
      range: span(xs, law),
      capturedMass: 1,
      error: { aliasing: 0, truncation: 0, rounding: Math.max(ePdf, eCdf), pdf: ePdf, cdf: eCdf },
      levels: 1,
      notes: [...law.notes, ...modelNotes],
      pointError,
    },
  };
}

/** Of cdf and sf, the smaller is computed directly; the larger may be replaced by 1 - smaller when that is tighter. */
function tighten(p: DirectPoint) {
  if (p.sf <= 0.5 && p.sfErr + Number.EPSILON < p.cdfErr) {
    p.cdf = 1 - p.sf;
    p.cdfErr = p.sfErr + Number.EPSILON;
  } else if (p.cdf <= 0.5 && p.cdfErr + Number.EPSILON < p.sfErr) {
    p.sf = 1 - p.cdf;
    p.sfErr = p.cdfErr + Number.EPSILON;
  }
}

interface Probe {
  x: number;
  /** F(x) - p (lower half) or p' - S(x) (upper half, p' = 1 - p), signed so that it increases with x */
  r: number;
  e: number;
  f: number;
}

/**
 * Quantile q_p of a continuous law from its direct cdf/sf: the closed-form quantile when the family has one, else a
 * bracketed secant-bisection on F(x) = p (or S(x) = 1 - p above the median, keeping relative accuracy in the upper
 * tail). The error bound is rigorous given the cdf bounds: points xl < q < xr are searched where F(xl) + e < p and
 * F(xr) - e > p, so the true quantile lies in [xl, xr]; the bound is max(q - xl, xr - q). `known`: points already
 * evaluated, from which the search starts its bracket. `newton`: where the density at the last point is positive and the
 * Newton step from it lands inside the bracket, that step is taken instead of false position (for laws whose every point
 * is costly: a mixture's, ../invert/mixture.ts).
 */
export function directQuantile(law: DirectLaw, p: number, known: readonly number[] = [], newton = false): { x: number; err: number } {
  const [lo, hi] = law.support;
  if (p <= 0) return { x: lo, err: 0 };
  if (p >= 1) return { x: hi, err: 0 };
  const upper = p > 0.5;
  const target = upper ? 1 - p : p; // exact for p > 0.5 (Sterbenz)
  const pt = directPoint();
  const probe = (x: number): Probe => {
    law.at(x, pt);
    if (upper) return { x, r: target - pt.sf, e: pt.sfErr, f: pt.pdf };
    return { x, r: pt.cdf - target, e: pt.cdfErr, f: pt.pdf };
  };
  // points the caller has evaluated already (a law that remembers them answers again at no cost): the closest on each
  // side of the root start the bracket, so that a run of levels in increasing order walks from the last answer
  let ka: Probe | null = null;
  let kb: Probe | null = null;
  for (const x of known) {
    if (!(x >= lo && x <= hi)) continue;
    const k = probe(x);
    if (k.r < 0 && (!ka || x > ka.x)) ka = k;
    if (k.r > 0 && (!kb || x < kb.x)) kb = k;
  }
  let x0 = ka && kb ? ka.x : ka ? ka.x : kb ? kb.x : law.quantile ? law.quantile(p) : NaN;
  if (!Number.isFinite(x0)) x0 = law.center;
  x0 = Math.min(Math.max(x0, lo), hi);
  // bracket: a with r < 0, b with r > 0
  let a = probe(x0);
  let b = ka && kb ? kb : a;
  if (a.r === 0) return refineBounds(probe, a, lo, hi);
  let step = law.spread;
  if (a.r < 0) {
    for (let k = 0; k < 2100 && b.r < 0; k++) {
      const xn = Number.isFinite(hi) ? Math.min(b.x + step, hi) : b.x + step;
      a = b;
      b = probe(xn);
      if (xn === hi) break;
      step *= 2;
    }
  } else {
    for (let k = 0; k < 2100 && a.r > 0; k++) {
      const xn = Number.isFinite(lo) ? Math.max(a.x - step, lo) : a.x - step;
      b = a;
      a = probe(xn);
      if (xn === lo) break;
      step *= 2;
    }
  }
  if (!(a.r <= 0 && b.r >= 0)) return { x: a.r > 0 ? a.x : b.x, err: Infinity };
  // Illinois false position with bisection fallback, on r; with `newton`, the step x - r/f from the last point instead where
  // the density there is positive and the step lands inside the bracket (r' = f: quadratic convergence near the root, where
  // false position from a wide bracket creeps; the density only places the next point, the bracket decides)
  let side = 0;
  let fa = a.r;
  let fb = b.r;
  let last: Probe | null = null;
  // a Newton step that did not halve the residual: the next step is false position's (the bracket keeps shrinking at its
  // rate whatever the density's accuracy)
  let slow = false;
  for (let it = 0; it < 200; it++) {
    if (b.x - a.x <= 2 * Number.EPSILON * Math.max(Math.abs(a.x), Math.abs(b.x))) break;
    const prev = last;
    let xn: number = newton && !slow && last && last.f > 0 && Number.isFinite(last.f) ? last.x - last.r / last.f : NaN;
    const byNewton: boolean = xn > a.x && xn < b.x;
    if (!byNewton) {
      xn = (a.x * fb - b.x * fa) / (fb - fa);
      if (!(xn > a.x && xn < b.x)) xn = 0.5 * (a.x + b.x);
      // keep bisecting when the bracket spans orders of magnitude (far tails)
      if (a.x > 0 && b.x / a.x > 4) xn = Math.sqrt(a.x * b.x);
      if (b.x < 0 && a.x / b.x > 4) xn = -Math.sqrt(a.x * b.x);
    }
    const c = probe(xn);
    last = c;
    if (c.r === 0) return refineBounds(probe, c, lo, hi);
    if (c.r < 0) {
      a = c;
      fa = c.r;
      if (side === -1) fb /= 2;
      side = -1;
    } else {
      b = c;
      fb = c.r;
      if (side === 1) fa /= 2;
      side = 1;
    }
    slow = byNewton && Math.abs(c.r) > 0.5 * Math.abs(prev!.r);
    if (Math.abs(c.r) <= c.e) break;
  }
  const best = Math.abs(a.r) < Math.abs(b.r) ? a : b;
  return refineBounds(probe, best, lo, hi);
}

/**
 * Walk out from the estimate until the cdf bounds exclude p on both sides; the walk gives the error bound. The walk
 * grows by 1.5 a step; where 60 steps do not reach (a start at the smallest double: a quantile of exactly 0 whose cdf
 * there is exact, as the normal's median), it goes on by 2^10 a step and then halves the last step's exponent down to
 * the least offset whose bounds exclude p (every offset tried is tested, so the bound holds wherever it stops).
 */
function refineBounds(probe: (x: number) => Probe, c: Probe, lo: number, hi: number): { x: number; err: number } {
  const x = c.x;
  const base = Math.max(4 * Number.EPSILON * Math.abs(x), c.f > 0 ? (1.25 * (Math.abs(c.r) + c.e)) / c.f : 0, Number.MIN_VALUE);
  const walk = (dir: 1 | -1): number => {
    // the offset d: its end past the support's (the support's end is then the bound), excluded (true) or not (false)
    const test = (d: number): number | boolean => {
      const xe = x + dir * d;
      if (dir < 0 && xe <= lo) return x - lo;
      if (dir > 0 && xe >= hi) return hi - x;
      const q = probe(xe);
      return dir < 0 ? q.r + q.e < 0 : q.r - q.e > 0;
    };
    let d = base;
    for (let k = 0; k < 60; k++) {
      const t = test(d);
      if (typeof t === "number") return t;
      if (t) return d;
      d *= 1.5;
    }
    let fail = d;
    for (let k = 0; k < 110; k++) {
      const t = test(d);
      if (typeof t === "number") return t;
      if (t) break;
      fail = d;
      d *= 1024;
      if (k === 109) return Infinity;
    }
    // fail is not excluded, d is: narrow the ratio d / fail (at most 2^10) to below 1.5 by halving its exponent
    while (d / fail > 1.5) {
      // the geometric mean without forming d * fail, which underflows for offsets near the smallest doubles
      const m = Math.sqrt(d) * Math.sqrt(fail);
      if (!(m > fail && m < d)) break;
      const t = test(m);
      if (typeof t === "number") return Math.min(t, d);
      if (t) d = m;
      else fail = m;
    }
    return d;
  };
  const eL = c.r - c.e > 0 ? base : walk(-1);
  const eR = c.r + c.e < 0 ? base : walk(1);
  // the quantile lies in [x - eL, x + eR]
  return { x, err: Math.max(eL, eR) };
}

/** Quantiles (and ES) of a directly evaluated law, shaped like the inversion's result. */
export function directQuantiles(
  law: DirectLaw,
  p: Float64Array,
  wantEs: boolean,
  index: { left: number; right: number },
  mean: number | null,
  /** the mean's derived bound (Infinity where none is known) */
  meanErr: number,
  modelNotes: string[],
  rest?: RestBound,
): QuantileResult {
  const n = p.length;
  const x = new Float64Array(n);
  const err = new Float64Array(n);
  let maxCdf = 0;
  const pt = directPoint();
  for (let i = 0; i < n; i++) {
    const r = atAtom(law, p[i]) ?? directQuantile(law, p[i]);
    x[i] = r.x;
    err[i] = r.err;
    if (Number.isFinite(r.x)) {
      law.at(r.x, pt);
      maxCdf = Math.max(maxCdf, pt.cdfErr, pt.sfErr);
    }
  }
  let es: Float64Array | undefined;
  let esErr: Float64Array | undefined;
  if (wantEs) {
    // the levels on each side of the median share one sweep of the tail (./shortfall.ts)
    const r = directShortfalls(law, x, err, p, index, mean, meanErr, rest);
    es = r.value;
    esErr = r.error;
  }
  return {
    p,
    x,
    expectedShortfall: es,
    diagnostics: {
      method: law.method,
      terms: 0,
      range: span(x, law),
      cdfError: maxCdf,
      quantileError: err,
      expectedShortfallError: esErr,
      notes: [...law.notes, ...(wantEs && index.right <= 1 ? ["expected shortfall does not exist: the law's upper tail has no finite mean"] : []), ...modelNotes],
    },
  };
}

/**
 * A level inside an atom's jump, decided beyond the bounds: F(a-) + its bound < p <= F(a-) + mass - both bounds gives
 * q_p = a (within the atom's place's own rounding); null otherwise (the search answers, its bound honest at a jump too).
 */
function atAtom(law: DirectLaw, p: number): { x: number; err: number } | null {
  if (!law.atoms || !(p > 0 && p < 1)) return null;
  for (const a of law.atoms) {
    if (a.below + a.belowErr + 2 * Number.EPSILON < p && p <= a.below + a.p - a.belowErr - a.pErr - 2 * Number.EPSILON) return { x: a.x, err: a.xErr };
  }
  return null;
}

/** Smallest and largest finite value of xs (the law's center when there is none). */
function span(xs: Float64Array, law: DirectLaw): { from: number; to: number } {
  let from = Infinity;
  let to = -Infinity;
  for (const v of xs) {
    if (!Number.isFinite(v)) continue;
    if (v < from) from = v;
    if (v > to) to = v;
  }
  return from <= to ? { from, to } : { from: law.center, to: law.center };
}
