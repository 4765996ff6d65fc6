import { checkDeadline } from "../deadline";
import { directPoint, type DirectLaw } from "./types";
import { modeRange } from "./shortfall-mode";

// One sweep of derived brackets on the tail integrals of a directly evaluated law, shared by every level on one side.

/** A bound on the tail integral past u: int_u^inf S (side 1) or int_-inf^u F (side -1); Infinity where none is known. */
export type RestBound = (u: number, side: 1 | -1) => number;

/** One level's tail integral: a value inside the derived bracket [lo, hi] */
export interface TailIntegral {
  val: number;
  lo: number;
  hi: number;
  /** the sweep reached a narrow bracket on what lies past its last node: val is accurate (else a partial sum) */
  whole: boolean;
}

/**
 * the panels' bracket width allowed, relative to G(0) times their length: the bound is about ES_TOL times the tail
 * integral times a few dozen (1e-7 costs 3x the evaluations for a 10x tighter bound)
 */
const ES_TOL = 1e-6;
/**
 * the same for a law with derived bounds on its density's derivatives (DirectLaw.pdfDeriv), whose panels' brackets are
 * the corrected trapezoid rule's O(length^5) remainder: about the values' own rounding
 */
const ES_TOL_SMOOTH = 1e-13;
/**
 * panels at most under ES_TOL_SMOOTH from a level's point on; the rest of the segment takes ES_TOL's rule (the brackets
 * still the narrower of both): a tail near 1 over many spreads (the far side of a heavy lower tail) would spend all the
 * panels at that tolerance and end with the bound on what lies past them, far wider
 */
const SMOOTH_PANELS = 6000;
/** 4-point Gauss-Legendre nodes on [-1, 1] and weights (Abramowitz & Stegun Table 25.4), and the remainder's constant */
const GL4_T = [-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526];
const GL4_W = [0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538];
const GL4_REM = (24 ** 4 / (9 * 40320 ** 3)) * (1 + 1e-12);
/**
 * A caller's allowance A on a level's bracket (an absolute width it may take, e.g. a mixture's component whose tail is a
 * small part of the mixture's) acts as the floor A / (ES_TOL ALLOW_SPAN s) under G_i(0) in the panels' rule, which then
 * takes longer panels where the floor is the larger: the brackets stay derived, only their widths follow the floor. The
 * rule's widths sum to about ES_TOL G_i(0) s times a few (the log of the reach over the spread); ALLOW_SPAN 4 kept the
 * widths below the allowances on the benchmark's mixtures (seeds 1, 2, 20261203: bounds at most 2.6% above those without)
 */
const ALLOW_SPAN = 4;
/** panels at most between two levels' points, and past the last (a derived bound is still returned, if a looser one) */
const ES_PANELS = 20000;

/**
 * Derived brackets on int_{q_i}^inf S (dir 1) or int_-inf^{q_i} F (dir -1) for the points qs, ordered outwards
 * (ascending for dir 1, descending for dir -1), in one sweep: G(d), the tail at qs[0] + dir d, is summed over panels
 * [a, b] with a node at every q_i, and level i's integral is the sum of the panels past its node. G is non-increasing, so
 * a panel's integral lies in [(b - a) G(b), (b - a) G(a)]; on the far side of the law's mode (DirectLaw.mode, or an
 * interval derived for a unimodal law, ./shortfall-mode.ts) G is convex with slope -f, so it lies between the envelope of
 * the two end tangents and the chord, and on the near side G is concave (chord and tangents swap); each value taken at
 * the matching end of its own bound (sfErr/cdfErr, pdfErr). The panels grow while the bracket's width stays below
 * ES_TOL G_i(0) (b - a) (times s / (a - d_i) past the spread s) for every level i whose node is passed: a panel is held
 * to the tightest allowance among the levels it counts for, so each level keeps the accuracy its own sweep would have.
 * Past the last node the integral is at most (D - d) G(d) towards a finite end at distance D, else the caller's derived
 * bound (`rest`: the moments' stop-loss bound) and the law's own stop-loss transform (value and bound), else Infinity.
 * The value: the panels' trapezoid sums with the end-slope correction, each kept inside its panel's bracket, plus an
 * estimate of the part past the last node kept inside its bracket (`whole` false where that bracket stayed wide: the
 * caller estimates apart). An O(length^3) bracket per panel (the trapezoid's own error is far smaller): the bound is a
 * few thousand times the actual error.
 */
export function tailSweep(law: DirectLaw, qs: readonly number[], dir: 1 | -1, rest: RestBound | undefined, allow?: readonly number[]): TailIntegral[] {
  const K = qs.length;
  // a level's allowance as a floor under its G_i(0) in the panels' rule (see ALLOW_SPAN)
  const deriv = law.pdfDeriv;
  let smooth = deriv !== undefined;
  let tol = smooth ? ES_TOL_SMOOTH : ES_TOL;
  // the floors as absolute widths per unit length (at most tol each, as a G_i(0) of 1)
  const floorAbs = new Float64Array(K);
  if (allow && law.spread > 0) for (let i = 0; i < K; i++) floorAbs[i] = Math.max(allow[i], 0) / (ALLOW_SPAN * law.spread);
  const q0 = qs[0];
  const lower = dir < 0;
  const end = lower ? law.support[0] : law.support[1];
  const D = Number.isFinite(end) ? Math.abs(end - q0) : Infinity;
  // the levels' distances from the first; the node at distance ds[i] is taken at qs[i] itself, off q_0 + dir ds[i] by
  // at most half an ulp of ds[i] (covered per level below)
  // (a typed array: its map is one whatever the values, so the optimised sweep is not thrown away on meeting another)
  const ds = new Float64Array(K);
  for (let i = 0; i < K; i++) ds[i] = Math.min(Math.abs(qs[i] - q0), D);
  // the mode's distance, where known: G is concave before mL and convex after mH (the mode is rounded by a few ulps,
  // types.ts, the distance by one more: both are covered by the margin)
  const range = modeRange(law);
  const margin = 16 * Number.EPSILON * (Math.abs(range[0]) + Math.abs(range[1]) + Math.abs(q0));
  const [m0, m1] = dir > 0 ? [range[0] - q0, range[1] - q0] : [q0 - range[1], q0 - range[0]];
  const mL = Number.isFinite(m0) ? m0 - margin : -Infinity;
  const mH = Number.isFinite(m1) ? Math.max(m1 + margin, 0) : Infinity;
  const pt = directPoint();
  const ptI = directPoint();
  law.at(q0, pt);
  let gA = lower ? pt.cdf : pt.sf;
  let xA = q0;
  let eA = lower ? pt.cdfErr : pt.sfErr;
  let fA = pt.pdf;
  let efA = pt.pdfErr;
  // per segment (the panels between level k's node and the next): value, bracket and the nodes' rounding slack
  const segVal = new Float64Array(K);
  const segLo = new Float64Array(K);
  const segHi = new Float64Array(K);
  const segSlack = new Float64Array(K);
  // each level's G at its own node (upper end of its bound), and the slack for its node's offset
  const G0 = new Float64Array(K);
  const offset = new Float64Array(K);
  G0[0] = Math.min(gA + eA, 1);
  if (!(G0[0] > 0)) return qs.map(() => ({ val: 0, lo: 0, hi: 0, whole: true }));
  const s = law.spread;
  let cur = 0;
  let a = 0;
  let step = Math.min(s * 1e-3, D);
  // the integral past the last node: within [pastLo, past]; pastEst, an estimate inside for the value only (the law's
  // stop-loss value, else G^2/f, exact for an exponential tail)
  let past = Infinity;
  let pastLo = 0;
  let pastEst = NaN;
  let whole = false;
  // where the law's own stop-loss transform is asked next (outside the gate below)
  let check = law.stopLoss && !Number.isFinite(D) ? s : Infinity;
  let low = 0.5;
  // ES_PANELS panels from each level's point on: a sweep held up short of the next level (a law without a known mode:
  // monotone bounds only) leaves the levels past it to sweeps of their own, as each alone had
  let segStart = 0;
  for (let n = 0; n - segStart < ES_PANELS; n++) {
    // up to 20 000 evaluations a level of a law that may take tens of microseconds each (stable, VG, NIG)
    if ((n & 255) === 255) checkDeadline("direct shortfall bracket");
    if (smooth && n - segStart >= SMOOTH_PANELS) [smooth, tol] = [false, ES_TOL];
    const want = step;
    let b = a + step;
    // a node at each side of the mode, at the next level's point, and at the support's end
    if (a < mL && b > mL) b = mL;
    else if (a < mH && b > mH) b = mH;
    const next = cur + 1 < K ? ds[cur + 1] : Infinity;
    const atNext = b >= next;
    if (atNext) b = next;
    if (b >= D) b = D;
    // a slow tail without a bound on what is left walks out until the steps overflow: nothing more to gain
    if (!Number.isFinite(b)) break;
    const wd = b - a;
    const xB = atNext ? qs[cur + 1] : q0 + dir * b;
    law.at(xB, pt);
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
    segSlack[cur] += wd * (nodeSlack(fA, efA, xA) + (atEnd ? 0 : nodeSlack(f, ef, xB)));
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
    let v = (wd * (gA + g)) / 2 + (fin ? (wd * wd * (f - fA)) / 12 : 0);
    // with the density's derivatives bounded over the panel (DirectLaw.pdfDeriv): the 4-point Gauss-Legendre rule at
    // interior nodes (remainder wd^9 (4!)^4 / (9 (8!)^3) |G^(8)|, G^(8) = -f^(7): Abramowitz & Stegun 25.4.30) while
    // `smooth`, else the corrected trapezoid rule (remainder wd^5 |G^(4)| / 720, G^(4) = -f^(3)); either with the nodes'
    // value bounds through the rule, their offsets (formed within 4 eps (|q| + b): G moves by the density times that;
    // the end nodes' move of G is in segSlack) and the rule's roundings
    let quadGap = NaN;
    if (deriv !== undefined && fin) {
      const xa = q0 + dir * a;
      const xb = q0 + dir * b;
      const [x0, x1] = xa < xb ? [xa, xb] : [xb, xa];
      // (each node q0 + dir d is one rounding from its place: within an ulp of itself)
      const off = 2 * Number.EPSILON * Math.max(Math.abs(x0), Math.abs(x1));
      let rem: number;
      let r: number;
      if (smooth) {
        let sum = 0;
        let errs = 0;
        for (let j = 0; j < 4; j++) {
          law.at(q0 + dir * (a + (wd * (1 + GL4_T[j])) / 2), ptI);
          sum += GL4_W[j] * (lower ? ptI.cdf : ptI.sf);
          errs += GL4_W[j] * ((lower ? ptI.cdfErr : ptI.sfErr) + (ptI.pdf + ptI.pdfErr) * off);
        }
        v = (wd / 2) * sum;
        rem = wd ** 9 * GL4_REM * deriv(7, x0, x1) * (1 + 8 * Number.EPSILON);
        r = rem + (wd / 2) * errs + 16 * Number.EPSILON * v;
      } else {
        rem = (wd ** 5 / 720) * deriv(3, x0, x1) * (1 + 8 * Number.EPSILON);
        const nodes = (wd * (eA + eg)) / 2 + (wd * wd * (efA + ef + deriv(1, x0, x1) * off)) / 12;
        r = rem + nodes + 4 * Number.EPSILON * ((wd * (gA + g)) / 2 + (wd * wd * (f + fA)) / 12);
      }
      if (Number.isFinite(r)) {
        pLo = Math.max(pLo, v - r);
        pHi = Math.min(pHi, v + r);
        if (smooth) quadGap = 2 * rem;
      } else v = (wd * (gA + g)) / 2 + (wd * wd * (f - fA)) / 12;
    }
    segVal[cur] += Math.min(Math.max(v, pLo), pHi);
    segLo[cur] += pLo;
    segHi[cur] += pHi;
    a = b;
    xA = xB;
    gA = g;
    eA = eg;
    fA = f;
    efA = ef;
    if (atNext) {
      // every level whose point is here starts its sum; its node's offset from q_0 + dir d_i (half an ulp of d_i) moves
      // its integral by at most that times G there: G(q_i) plus the density times the offset, doubled (aHi where the
      // density is infinite)
      for (; cur + 1 < K && ds[cur + 1] <= a; cur++) {
        G0[cur + 1] = bHi;
        const off = Number.EPSILON * ds[cur + 1];
        offset[cur + 1] = off * (Number.isFinite(f + ef) ? bHi + 2 * (f + ef) * off : aHi);
      }
      // the allowance may have shrunk by the new level's tail: the next panel may be much shorter, once, and starts no
      // longer than a level's own sweep would (its first panels, far below their allowance, keep its bound as tight)
      low = 0.01;
      segStart = n + 1;
      if (deriv !== undefined) [smooth, tol] = [true, ES_TOL_SMOOTH];
    }
    if (a >= D || (cur === K - 1 && bHi === 0)) {
      // G is 0 past here (the support's end, or an upper bound of 0 on a non-increasing tail)
      past = 0;
      whole = true;
      break;
    }
    // far enough when what is left is below a quarter of the bracket's own tolerance for the farthest level (the smallest
    // sum; a quarter: where a sweep stops moves with its panels, and no level's bound is to exceed its own sweep's);
    // a law with its own stop-loss transform is asked each time the distance doubles, and stops the sweep as soon as
    // that transform's bracket is as narrow (a stable law's tail series, long before its power tail would be negligible)
    const scale = Math.max(segVal[cur], Math.min(floorAbs[K - 1], tol) * (s / tol));
    const gate = bHi * s <= tol * 1e-3 * scale;
    if (cur === K - 1 && (gate || a >= check)) {
      if (a >= check) check = 2 * a;
      const r = Number.isFinite(D) ? { lo: 0, hi: (D - a) * bHi, v: NaN } : restAt(law, rest, q0 + dir * a, dir);
      if (r.hi - r.lo <= (tol * scale) / 4 || (gate && !Number.isFinite(r.hi))) {
        [pastLo, past, pastEst] = [r.lo, r.hi, Number.isFinite(r.v) ? r.v : (g * g) / f];
        whole = r.hi - r.lo <= (tol * scale) / 4;
        break;
      }
    }
    // the next panel: the bracket's width grows like its length cubed, its allowance like the length (beyond the spread,
    // like the length relative to the distance: a slow tail's long reach adds to the total only as its logarithm); the
    // tightest allowance among the levels passed
    // (never below ES_TOL G(b): the panel's own integral is at least its length times that, so such widths stay ES_TOL
    // relative to every level's integral; a law whose tail stays near 1 over many spreads, the far side of a heavy
    // lower tail, then takes long panels instead of running out of them)
    let unit = Infinity;
    for (let i = 0; i <= cur; i++) unit = Math.min(unit, Math.max(tol * G0[i], Math.min(floorAbs[i], tol)) * Math.min(1, s / (a - ds[i])));
    unit = Math.max(unit, (tol * bLo) / 16);
    // (the Gauss rule's remainder: its length^8 relative to the length; the nodes' bounds do not shrink with it)
    const gap = pHi - pLo;
    const grow = quadGap >= 0 ? (quadGap > 0 ? 0.9 * Math.pow((unit * wd) / quadGap, 1 / 8) : 2) : gap > 0 ? 0.9 * Math.sqrt((unit * wd) / gap) : 2;
    // a panel cut short (by a node) does not hold back the next beyond twice the step it was meant to take
    step = Math.min(Math.max(grow * wd, low * wd), 2 * Math.max(wd, want));
    if (!(step > 0)) step = want;
    if (low < 0.5) step = Math.min(step, s * 1e-3);
    low = 0.5;
  }
  if (past === Infinity && Number.isFinite(D)) past = (D - a) * Math.min(gA + eA, 1);
  else if (past === Infinity) ({ lo: pastLo, hi: past, v: pastEst } = restAt(law, rest, q0 + dir * a, dir));
  if (!Number.isFinite(pastEst)) pastEst = (gA * gA) / fA;
  const pastVal = Math.min(Math.max(Number.isFinite(pastEst) ? pastEst : 0, pastLo), past);
  let val = 0;
  let lo = 0;
  let hi = 0;
  let slack = 0;
  const res = new Array<TailIntegral>(K);
  for (let i = K - 1; i >= 0; i--) {
    val += segVal[i];
    lo += segLo[i];
    hi += segHi[i];
    slack += segSlack[i];
    // a sweep stopped before a level's point (panels spent, steps overflowed): that level's integral lies in [0, past]
    const reached = i <= cur;
    const H = (reached ? hi : 0) + past + (reached ? slack + offset[i] : 0);
    const L = reached ? lo + pastLo - slack - offset[i] : 0;
    if (reached && !(G0[i] > 0)) res[i] = { val: 0, lo: 0, hi: 0, whole: true };
    else if (!(H >= L)) res[i] = { val: NaN, lo: 0, hi: Infinity, whole: false };
    // each panel's few roundings, relative to the sum of their sizes
    else res[i] = { val: reached ? val + pastVal : pastVal, lo: L * (1 - 16 * Number.EPSILON), hi: H * (1 + 16 * Number.EPSILON), whole: whole && reached };
  }
  if (cur + 1 < K) tailSweep(law, qs.slice(cur + 1), dir, rest, allow?.slice(cur + 1)).forEach((r, k) => (res[cur + 1 + k] = r));
  return res;
}

/**
 * A node q + dir d is formed in one rounding, within an ulp of x, its computed place: G there is off by the mass so
 * close, taken as twice the density at the node times that distance (a density changing by a factor 2 within 1e-16
 * relative is met only at a singular point, where a node has no reason to fall), the whole panel's width where the
 * density is infinite.
 */
function nodeSlack(f: number, ef: number, x: number): number {
  return Number.isFinite(f + ef) ? 2 * (f + ef) * Number.EPSILON * Math.abs(x) : 1;
}

/**
 * int_0^w of the envelope of the lines L_a(x) = ga + sa x and L_b(x) = gb + sb (x - w): their maximum (kind 1, lower
 * bound of a convex function) or minimum (kind -1, upper bound of a concave one), the lines meeting at x* in [0, w].
 */
function envelope(w: number, ga: number, sa: number, gb: number, sb: number, kind: 1 | -1): number {
  // the empty case's value is formed ahead of its test: a branch first taken after the sweep (which inlines this) is
  // optimised throws that code away (a deopt and a recompile, tens of ms of compiler CPU on a cold call)
  const none = kind * -Infinity;
  if (!(kind * (sb - sa) > 0)) return none;
  const xs = Math.min(Math.max((gb - ga - sb * w) / (sa - sb), 0), w);
  return xs * (ga + (sa * xs) / 2) + (w - xs) * (gb - (sb * (w - xs)) / 2);
}

/**
 * The derived bracket on the tail integral past y: [0, the caller's bound (moments)], narrowed by the law's own stop-loss
 * transform there (its value within its bound) where it has one.
 */
function restAt(law: DirectLaw, rest: RestBound | undefined, y: number, dir: 1 | -1): { lo: number; hi: number; v: number } {
  let hi = rest ? rest(y, dir) : Infinity;
  let lo = 0;
  const o = law.stopLoss?.(y, dir);
  if (o && Number.isFinite(o.v) && Number.isFinite(o.e)) {
    hi = Math.min(hi, o.v + o.e);
    lo = Math.max(lo, o.v - o.e);
  }
  return hi >= lo ? { lo, hi, v: o ? o.v : NaN } : { lo: 0, hi: Infinity, v: NaN };
}
