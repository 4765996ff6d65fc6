import type { StableIntegrals } from "./stable-integral";
import { EV_MAX, NODES, NodePool, R_COARSE, R_FAR, THM, V1, nodesOf, type Panel, PanelStore, type PanelSide } from "./stable-panel-store";

/**
 * The integrals of the stable representation in theta itself (./stable-integral.ts):
 *   I0 = int exp(-e^v) dtheta,  I1 = int (1 - exp(-e^v)) dtheta,  Ip = int e^v exp(-e^v) dtheta,  v = log h + log V(theta),
 * by composite Gauss-Legendre panels over the window of theta where v lies in [V0, V1], with an error bound derived
 * for each panel from Trefethen, Approximation Theory and Approximation Practice (SIAM 2013), Theorem 19.3: for f
 * analytic in the open Bernstein ellipse E_rho of [-1, 1] with |f| <= M there, the n-point Gauss rule is off by at
 * most (64/15) M rho^(-2n) / (rho^2 - 1); a panel of half-length hl multiplies it by hl. E_rho lies in the rectangle
 * [-(rho + 1/rho)/2, (rho + 1/rho)/2] x [-(rho - 1/rho)/2, (rho - 1/rho)/2], over which the side's `box` bounds Re v
 * and |Im v| by inequalities on each factor of V (no sampling). With R = Re v and |Im v| <= I:
 *   |e^v exp(-e^v)| = exp(R - e^R cos Im v) <= max over R of exp(R - e^R cos I),  |exp(-e^v)| <= exp(-e^R cos I),
 *   |1 - exp(-s)| <= |s| max(1, e^(-Re s)) (Taylor's remainder in integral form), s = e^v.
 * Outside the window v is monotone in theta: with a the window's low end (v(a) <= V0) and b its high end (v(b) >= V1),
 *   on [0, a]: Ip <= a e^v(a), 1 - exp(-e^v) <= a e^v(a) (I1 takes 0, I0 takes a, each off by at most a e^v(a));
 *   on [b, L]: Ip <= (L - b) K(v(b)) (K falls beyond v = 0), exp(-e^v) <= exp(-e^v(b)) (I0 takes 0, I1 takes L - b).
 * Distances from either end are kept as such (u from the nearer end), so the tails keep their relative precision.
 */

/** sup over R in [lo, hi] of exp(R - e^R c) (the bound of |K| for cos(Im v) >= c) */
function supK(lo: number, hi: number, c: number): number {
  if (c <= 0) return Math.exp(hi - Math.exp(hi) * c);
  const r = Math.min(Math.max(-Math.log(c), lo), hi);
  return Math.exp(r - Math.exp(r) * c);
}

export interface Sums {
  i0: number;
  i1: number;
  ip: number;
  e0: number;
  e1: number;
  ep: number;
  nodes: number;
  /** a bound on the error of log h itself (from the rounding of the point), added to every v's */
  dl: number;
}

export function kernelAt(v: number): number {
  return Math.exp(v - Math.exp(v));
}

/**
 * A stretch of length len over which v >= vb >= V1: I1 takes it whole, I0 and Ip are at most len times their
 * integrands at vb (each falls as v grows); `extra` joins I1's bound (the rounding of a length taken from L2).
 */
export function flatHigh(acc: Sums, len: number, vb: number, extra = 0): void {
  acc.i1 += len;
  const b = len * Math.exp(-Math.exp(vb));
  acc.e0 += b;
  acc.e1 += b + extra;
  acc.ep += len * kernelAt(vb);
}

/** The nodes of panel p at log h (lhAbs), added to acc with the panel's bound (Theorem 19.3) and the nodes' rounding. */
export function panel(p: Panel, lhAbs: number, lh: number, acc: Sums): void {
  const hl = p.hl;
  const rLo = lhAbs + p.rLo;
  const rHi = lhAbs + p.rHi;
  const c = Math.cos(Math.min(p.iMax, Math.PI));
  const Mp = supK(rLo, rHi, c);
  const M0 = c >= 0 ? Math.exp(-Math.exp(rLo) * c) : Math.exp(-Math.exp(rHi) * c);
  const eh = Math.exp(rHi);
  const M1 = Math.min(1 + M0, eh * (c >= 0 ? 1 : Math.exp(-eh * c)));
  // e^v as e^lh e^(log V - wRef) (one more rounding, 2 eps relative, counted in the rounding of v below) where both
  // factors are in range
  const elh = Math.abs(lh) <= EV_MAX ? Math.exp(lh) : NaN;
  const dvh = 4 * Number.EPSILON * (Math.abs(lh) + 1) + acc.dl;
  let s0 = 0, s1 = 0, sp = 0, q0 = 0, q1 = 0, qp = 0;
  const { lv, elv, wt, dv0 } = p;
  for (let i = 0; i < NODES; i++) {
    const v = lh + lv[i];
    const e = elh * elv[i];
    const ev = e === e ? e : Math.exp(v);
    const f0 = Math.exp(-ev);
    // 1 - f0 has no cancellation once f0 <= 1/2
    const f1 = ev < 0.7 ? -Math.expm1(-ev) : 1 - f0;
    // e^v exp(-e^v) is 0 where exp(-e^v) underflows (also for e^v = inf)
    const fp = f0 > 0 ? ev * f0 : 0;
    const W = wt[i];
    s0 += W * f0;
    s1 += W * f1;
    sp += W * fp;
    // error of v: rounding of log V and of lh + lv, and of the node's position (dv0, stored); |d f / d v| is K for f0
    // and f1 and K |1 - e^v| for Ip; plus the rounding of exp, expm1, the products and the computed weight (8 eps)
    const dv = dv0[i] + dvh + 4 * Number.EPSILON * Math.abs(v);
    const t = W * fp * dv;
    q0 += t + W * 8 * Number.EPSILON * f0;
    q1 += t + W * 8 * Number.EPSILON * f1;
    if (fp > 0) qp += W * fp * (Math.abs(1 - ev) * dv + 8 * Number.EPSILON);
  }
  const t = hl * THM;
  acc.i0 += s0;
  acc.i1 += s1;
  acc.ip += sp;
  acc.e0 += t * M0 + q0;
  acc.e1 += t * M1 + q1;
  acc.ep += t * Mp + qp;
  acc.nodes += NODES;
}

/** panel k of st at log h: as it is where Re v <= R_COARSE over its rectangle, else its fine parts; false if none */
function panelOrParts(st: PanelStore, k: number, lhAbs: number, lh: number, acc: Sums): boolean {
  const p = st.panels[k];
  const vMax = lhAbs + p.rHi + acc.dl;
  // far out at alpha = 1 the kernel's support in u is 1/|log h| of the far left's, whose e^2v share must stay small
  if (vMax <= R_FAR - Math.log(Math.max(1, Math.abs(lhAbs)))) {
    // far left: e^v - e^2v <= K(v) <= e^v, e^v - e^2v / 2 <= 1 - exp(-e^v) <= e^v, so the panel's stored rule of V gives
    // all three (I0 as the panel's length less I1's part), off by the rule's bound, e^2v and log h's own error
    nodesOf(st.ps, st.from, p, st.pool);
    const s = Math.exp(lhAbs + p.rHi);
    const b = s * p.J;
    const e = s * p.eJ * (1 + s) + s * b + 2 * acc.dl * b;
    acc.i1 += b;
    acc.ip += b;
    acc.i0 += 2 * p.hl - b;
    acc.e0 += e + 2 * Number.EPSILON * p.hl;
    acc.e1 += e;
    acc.ep += e;
    acc.nodes += 1;
    return true;
  }
  if (vMax <= R_COARSE) {
    panel(nodesOf(st.ps, st.from, p, st.pool), lhAbs, lh, acc);
    return true;
  }
  const parts = st.fineOf(k);
  if (!parts) return false;
  for (const q of parts) panel(nodesOf(st.ps, st.from, q, st.pool), lhAbs, lh, acc);
  return true;
}

/** v at u (as evaluated) rounded down (lower), from log V - wRef = lv of magnitude mag, log h known to within dl */
function vDown(lh: number, lv: number, mag: number, dl: number): number {
  return lh + lv - 8 * Number.EPSILON * (mag + Math.abs(lh) + Math.abs(lv)) - dl;
}

/** v at u rounded up (see vDown) */
function vUp(lh: number, lv: number, mag: number, dl: number): number {
  return lh + lv + 8 * Number.EPSILON * (mag + Math.abs(lh) + Math.abs(lv)) + dl;
}

/** whether v over panel k of st can reach [V0, V1] (module-level, not a closure per half(): no set-up per call) */
function reaches(st: PanelStore, k: number, rising: boolean, lh: number, dl: number, V0: number): boolean {
  const e = st.lvLo(k);
  return rising ? vUp(lh, e[0], e[1], dl) > V0 : vDown(lh, e[0], e[1], dl) < V1;
}

/**
 * One end's half of the integrals (u in (0, L/2] from the end `from`): the region beyond the window in bulk, the
 * window by its panels, the rest up to the end in bulk. False when the store cannot reach the window.
 */
export function half(st: PanelStore, lhAbs: number, V0: number, acc: Sums): boolean {
  const side = st.ps.side;
  const lh = lhAbs + side.wRef;
  const L2 = side.L / 2;
  const bounded = st.from === 0 && Number.isFinite(side.wLowEnd);
  const vEndLow = lh - 8 * Number.EPSILON * Math.abs(lh) - acc.dl;
  if (bounded && vEndLow >= V1) {
    // v >= v(end) = lh >= V1 over the whole half (v falls towards the finite end): I1 takes it, I0 and Ip are at most
    // its length times their values at V1 or beyond
    flatHigh(acc, L2, vEndLow, 2 * Number.EPSILON * L2);
    return true;
  }
  if (st.n === 0 && !st.extend()) return false;
  const dl = acc.dl;
  // from the middle towards the end, v falls (low end) or rises (high end); skip the panels wholly beyond the window
  const rising = st.from === 1;
  // v over panel k lies between v(hi_k) and v(lo_k): the window starts at the first panel that can reach [V0, V1]
  // (monotone in k: bisection over the stored panels, then a walk with extensions)
  let k = 0;
  const last = st.n - 2;
  if (last >= 0 && reaches(st, last, rising, lh, dl, V0)) {
    let a = -1;
    k = last;
    while (k - a > 1) {
      const m = (a + k) >> 1;
      if (reaches(st, m, rising, lh, dl, V0)) k = m;
      else a = m;
    }
  } else {
    k = Math.max(0, last + 1);
    for (;;) {
      if (k >= st.n && !st.extend()) return false;
      if (reaches(st, k, rising, lh, dl, V0)) break;
      k++;
    }
  }
  // [hi_k, L/2] lies beyond the window: v <= v(hi_k) <= V0 (high end) or v >= v(hi_k) >= V1 (low end)
  const hiK = k === 0 ? st.start : st.panels[k - 1].lo;
  const len = L2 - hiK;
  if (len > 0) {
    const lvk = st.lvHi[k];
    const mk = st.magHi[k];
    if (rising) {
      const vb = vUp(lh, lvk, mk, dl);
      const b = len * Math.exp(vb);
      acc.i0 += len;
      acc.e0 += b + 2 * Number.EPSILON * L2;
      acc.e1 += b;
      acc.ep += b;
    } else {
      const vb = vDown(lh, lvk, mk, dl);
      flatHigh(acc, len, vb, 2 * Number.EPSILON * L2);
    }
  }
  // the window, panel by panel, until the rest up to the end is negligible
  for (;; k++) {
    if (k >= st.n && !st.extend()) return false;
    if (!panelOrParts(st, k, lhAbs, lh, acc)) return false;
    const e = st.lvLo(k);
    const lo = st.panels[k].lo;
    if (rising) {
      const vb = vDown(lh, e[0], e[1], dl);
      if (vb >= V1) {
        // [0, lo]: v >= vb
        flatHigh(acc, lo, vb);
        return true;
      }
    } else {
      // [0, lo]: v between v at the end (lh where log V has a finite end, else -inf) and vb; each integrand is monotone
      // or unimodal in v there, so it lies between its values at the two, and [0, lo] takes the middle of that range
      const vb = vUp(lh, e[0], e[1], dl);
      const vm = bounded ? lh - 8 * Number.EPSILON * Math.abs(lh) - acc.dl : -Infinity;
      const f0m = Math.exp(-Math.exp(vm));
      // exp(-e^vm) - exp(-e^vb) without cancellation
      const w = 0.5 * lo * f0m * -Math.expm1(-(Math.exp(vb) - Math.exp(vm)));
      const kb = kernelAt(vb);
      const km = bounded ? kernelAt(vm) : 0;
      const kHi = vm <= 0 && vb >= 0 ? 1 / Math.E : Math.max(kb, km);
      const wp = 0.5 * lo * (kHi - Math.min(kb, km));
      if (vb <= V0 || (w <= 1e-17 * acc.i0 && w <= 1e-17 * acc.i1 && wp <= 1e-17 * acc.ip)) {
        // each value's rounding: a few eps of itself
        const a0 = lo * f0m - w;
        const a1 = lo * -Math.expm1(-Math.exp(vm)) + w;
        const ap = 0.5 * lo * (kHi + Math.min(kb, km));
        acc.i0 += a0;
        acc.i1 += a1;
        acc.ip += ap;
        acc.e0 += w + 8 * Number.EPSILON * (a0 + w);
        acc.e1 += w + 8 * Number.EPSILON * (a1 + w);
        acc.ep += wp + 8 * Number.EPSILON * (ap + wp);
        return true;
      }
    }
  }
}

const stores = new Map<PanelSide, [PanelStore, PanelStore]>();

/** V0: v below it leaves under 1e-16 of the mass near the window (it falls with log h far out) */
export function lowCut(lhAbs: number): number {
  return -37 - Math.log(Math.max(1, Math.abs(lhAbs)));
}

/** both halves on the stores st at log h = lhAbs, with the sums' rounding; null when a store cannot reach its window */
function integrals(st: [PanelStore, PanelStore], lhAbs: number, dl: number): StableIntegrals | null {
  const V0 = lowCut(lhAbs);
  const acc: Sums = { i0: 0, i1: 0, ip: 0, e0: 0, e1: 0, ep: 0, nodes: 0, dl };
  if (!half(st[0], lhAbs, V0, acc) || !half(st[1], lhAbs, V0, acc)) return null;
  return finish(acc);
}

/** the integrals of acc with the sums' rounding */
export function finish(acc: Sums): StableIntegrals {
  // the sums' rounding: at most (terms - 1) u times the sum of the (positive) terms (Higham 2002, eq. 4.4), terms
  // counted generously
  const g = (acc.nodes + 16) * Number.EPSILON;
  return {
    I0: acc.i0,
    I1: acc.i1,
    Ip: acc.ip,
    e0: acc.e0 + g * acc.i0,
    e1: acc.e1 + g * acc.i1,
    ep: acc.ep + g * acc.ip,
    nodes: acc.nodes,
  };
}

/** the shared stores of ps (both ends, from the middle) */
export function sharedStores(ps: PanelSide): [PanelStore, PanelStore] {
  let st = stores.get(ps);
  if (!st) {
    // a law's panels take up to a few MB next to alpha = 1: keep the last few laws
    if (stores.size > 8) stores.clear();
    st = [new PanelStore(ps, 0), new PanelStore(ps, 1)];
    stores.set(ps, st);
  }
  return st;
}

/** whether each of r's bounds is within rel of its value */
export function within(r: StableIntegrals, rel: number): boolean {
  return r.e0 <= rel * r.I0 && r.e1 <= rel * r.I1 && r.ep <= rel * r.Ip;
}

/**
 * I0, I1, Ip of `ps` at log h = lhAbs (known to within dl) by the panels, or null when the panels cannot reach the
 * window or the bounds exceed `rel` of a value (the caller then takes another route).
 */
export function stablePanels(ps: PanelSide, lhAbs: number, rel: number, dl = 0): StableIntegrals | null {
  const res = integrals(sharedStores(ps), lhAbs, dl);
  return res && within(res, rel) ? res : null;
}

/**
 * The same integrals with panels started next to the window instead of marched from the middle (the shared stores
 * stop at their cap far out at alpha = 1 and next to it, where log V spans ~1e5 units and the body's windows lie far
 * from the middle): at each end the start is where log V is about a level T_b on the middle's side of the window,
 * T_b a multiple of BUCKET units of v (Newton on log V in log u), so the points whose windows lie in one bucket share
 * one store (panels and nodes kept, as the shared ones); what lies between the start and the middle is bounded in bulk
 * by half() like any region beyond the window. Where the solve misses, the start stays at the middle. The bounds are
 * the panels' own (derived); null when the panels cannot be placed.
 */
export function stableWindowPanels(ps: PanelSide, lhAbs: number, dl = 0): StableIntegrals | null {
  return integrals([windowStore(ps, 0, lhAbs), windowStore(ps, 1, lhAbs)], lhAbs, dl);
}

/** width in v of the levels at which the window stores start (a point's store marches at most this far to its window) */
const BUCKET = 256;
const buckets = new Map<PanelSide, [Map<number, PanelStore>, Map<number, PanelStore>]>();
/** the store of end `from` whose start serves the window at log h = lhAbs (see stableWindowPanels) */
export function windowStore(ps: PanelSide, from: 0 | 1, lhAbs: number): PanelStore {
  const lh = lhAbs + ps.side.wRef;
  // from the low end v falls towards the end (the middle's side lies above V1), from the high end it rises
  const level = from === 0 ? BUCKET * Math.ceil((V1 + 1 - lh) / BUCKET) : BUCKET * Math.floor((lowCut(lhAbs) - 1 - lh) / BUCKET);
  let m = buckets.get(ps);
  if (!m) {
    if (buckets.size > 8) buckets.clear();
    m = [new Map(), new Map()];
    buckets.set(ps, m);
  }
  let st = m[from].get(level);
  if (!st) {
    // a law's stores stay within a few MB
    if (m[from].size > 256) m[from].clear();
    st = new PanelStore(ps, from, uWhere(ps.side, from, level));
    m[from].set(level, st);
  }
  return st;
}

/** the node buffers of one point's own panels (reused from point to point) */
export const pointPool = new NodePool();

const solveOut = { lv: 0, d: 0, mag: 0 };
/**
 * u in (0, L/2] (from the end `from`) where log V - wRef is about T, when the middle lies on the far side of T from
 * the end; else L/2. Bracketed Newton in t = log u.
 */
export function uWhere(side: PanelSide["side"], from: 0 | 1, T: number): number {
  const L2 = side.L / 2;
  const o = solveOut;
  side.logV(from, L2, o);
  // g(t) = sgn (log V(e^t) - T) rises in t; the start is needed only where g(log L/2) > 0
  const sgn = from === 0 ? 1 : -1;
  if (!(sgn * (o.lv - T) > 0)) return L2;
  let tA = -700;
  let tB = Math.log(L2);
  side.logV(from, Math.exp(tA), o);
  if (!(sgn * (o.lv - T) < 0)) return L2;
  let t = tB - 1;
  let gPrev = Infinity;
  for (let it = 0; it < 200; it++) {
    side.logV(from, Math.exp(t), o);
    const g = sgn * (o.lv - T);
    if (g > 0) tB = t;
    else tA = t;
    if (Math.abs(g) < 0.25) break;
    let tn = t - g / (sgn * o.d * Math.exp(t));
    // Newton while it at least halves the residual, else bisection
    const slow = Math.abs(g) > 0.5 * gPrev;
    gPrev = Math.abs(g);
    if (slow || !(tn > tA && tn < tB) || !Number.isFinite(tn)) tn = 0.5 * (tA + tB);
    t = tn;
    if (tB - tA < 1e-14 * Math.max(1, Math.abs(t))) break;
  }
  const u = Math.exp(t);
  return u > 0 && u < L2 ? u : L2;
}
