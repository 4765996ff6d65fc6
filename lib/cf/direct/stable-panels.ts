import type { StableIntegrals } from "./stable-integral";
import type { StableSide } from "./stable-kernel";

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

/** Bounds on log V (not less wRef) over a rectangle [x1, x2] x [-Y, Y] of u, the distance from one end. */
export interface Box {
  rLo: number;
  rHi: number;
  iMax: number;
}

export interface PanelSide {
  side: StableSide;
  /**
   * bounds on Re log V and |Im log V| over the rectangle, u measured from the end `from` (0 low, 1 high); false when
   * the rectangle leaves the region where the bounds hold (then the panel is split)
   */
  box(from: 0 | 1, x1: number, x2: number, Y: number, out: Box): boolean;
}

const RHO = 3;
const NODES = 16;
/** the window's high end in v: beyond it K(v) < 1e-27 and exp(-e^v) < 1e-28 */
const V1 = 4.2;
const BF = (RHO - 1 / RHO) / 2;
const AF = (RHO + 1 / RHO) / 2;
const THM = (64 / 15) * Math.pow(RHO, -2 * NODES) / (RHO * RHO - 1);

let gl: { x: Float64Array; w: Float64Array } | null = null;
/** Gauss-Legendre nodes and weights on [-1, 1] (Newton on the three-term recurrence of P_n; A&S 25.4.29). */
export function gaussLegendre(): { x: Float64Array; w: Float64Array } {
  if (gl) return gl;
  const n = NODES;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = z;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (z * p1 - p0)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x[i] = z;
    w[i] = 2 / ((1 - z * z) * dp * dp);
  }
  gl = { x, w };
  return gl;
}

/** sup over R in [lo, hi] of exp(R - e^R c) (the bound of |K| for cos(Im v) >= c) */
function supK(lo: number, hi: number, c: number): number {
  if (c <= 0) return Math.exp(hi - Math.exp(hi) * c);
  const r = Math.min(Math.max(-Math.log(c), lo), hi);
  return Math.exp(r - Math.exp(r) * c);
}

/** panels stored per end at most (far out at alpha = 1 the window moves by |log h| units of v, a few per panel) */
const CAP = 4096;
/**
 * |Im log V| allowed over a panel's rectangle: coarse panels serve where Re v <= -2.5 over the rectangle (there
 * |K| <= e^R exp(e^R) whatever Im v), fine ones (a coarse panel cut into equal parts) elsewhere, where |K| and
 * |exp(-e^v)| stay within 1/cos(1.2) = 2.8 of their size on the real line
 */
const IMAX_COARSE = 6;
const IMAX_FINE = 1.2;
const R_COARSE = -2.5;

/** One panel [lo, lo + 2 hl] of u: its rectangle's bounds on log V and its nodes. */
interface Panel {
  lo: number;
  hl: number;
  rLo: number;
  rHi: number;
  iMax: number;
  /** per node: u, log V - wRef, |d log V / du|, the magnitude of log V's parts */
  u: Float64Array;
  lv: Float64Array;
  d: Float64Array;
  mag: Float64Array;
}

function makePanel(ps: PanelSide, from: 0 | 1, lo: number, hl: number, bx: Box): Panel {
  const { x: gx } = gaussLegendre();
  const o = { lv: 0, d: 0, mag: 0 };
  const p: Panel = { lo, hl, rLo: bx.rLo, rHi: bx.rHi, iMax: bx.iMax, u: new Float64Array(NODES), lv: new Float64Array(NODES), d: new Float64Array(NODES), mag: new Float64Array(NODES) };
  const m = lo + hl;
  for (let i = 0; i < NODES; i++) {
    const u = m + hl * gx[i];
    ps.side.logV(from, u, o);
    p.u[i] = u;
    p.lv[i] = o.lv;
    p.d[i] = Math.abs(o.d);
    p.mag[i] = o.mag;
  }
  return p;
}

/**
 * The panels of one end, from the middle (u = L/2) towards the end (u -> 0), with log V at their upper ends; they do
 * not depend on log h (|Im v| = |Im log V|), so every point reuses them.
 */
class PanelStore {
  n = 0;
  panels: Panel[] = [];
  fine: (Panel[] | null | undefined)[] = [];
  /** log V - wRef and its magnitude (rounding) at each panel's upper end */
  lvHi: number[] = [];
  magHi: number[] = [];
  full = false;
  private guess = Infinity;
  private o = { lv: 0, d: 0, mag: 0 };
  private bx: Box = { rLo: 0, rHi: 0, iMax: 0 };
  constructor(
    readonly ps: PanelSide,
    readonly from: 0 | 1,
  ) {}
  /** one more panel below the last; false at the cap or when none can be placed */
  extend(): boolean {
    if (this.full) return false;
    if (this.n >= CAP) {
      this.full = true;
      return false;
    }
    const side = this.ps.side;
    const o = this.o;
    const hi = this.n ? this.panels[this.n - 1].lo : side.L / 2;
    side.logV(this.from, hi, o);
    const lvHi = o.lv;
    const magHi = o.mag;
    // |Im log V| is about |d| Y over the rectangle; the rectangle stays clear of u = 0
    let hl = Math.min(IMAX_COARSE / (Math.abs(o.d) * BF), (0.9 * hi) / (1 + AF), 2 * this.guess);
    let ok = false;
    for (let k = 0; k < 80 && hl > 1e-300; k++) {
      const m = hi - hl;
      if (this.ps.box(this.from, m - AF * hl, m + AF * hl, BF * hl, this.bx) && this.bx.iMax <= IMAX_COARSE) {
        ok = true;
        break;
      }
      hl *= 0.5;
    }
    if (!ok || !(hi - 2 * hl > 0)) {
      this.full = true;
      return false;
    }
    this.guess = hl;
    this.panels.push(makePanel(this.ps, this.from, hi - 2 * hl, hl, this.bx));
    this.fine.push(undefined);
    this.lvHi.push(lvHi);
    this.magHi.push(magHi);
    this.n++;
    return true;
  }
  /** panel k cut into equal parts whose rectangles keep |Im log V| <= IMAX_FINE; null when none is found */
  fineOf(k: number): Panel[] | null {
    const f = this.fine[k];
    if (f !== undefined) return f;
    const p = this.panels[k];
    let parts: Panel[] | null = null;
    for (let S = Math.max(2, Math.ceil(p.iMax / IMAX_FINE)); S <= 256 && !parts; S *= 2) {
      const hl = p.hl / S;
      const out: Panel[] = [];
      for (let j = 0; j < S; j++) {
        const lo = p.lo + 2 * hl * j;
        const m = lo + hl;
        if (!(this.ps.box(this.from, m - AF * hl, m + AF * hl, BF * hl, this.bx) && this.bx.iMax <= IMAX_FINE)) break;
        out.push(makePanel(this.ps, this.from, lo, hl, this.bx));
      }
      if (out.length === S) parts = out;
    }
    this.fine[k] = parts;
    return parts;
  }
  /** log V - wRef at u = lo of panel k (the upper end of panel k + 1), extending by one panel when needed */
  lvLo(k: number): [number, number] {
    if (k + 1 >= this.n && !this.extend()) {
      const o = this.o;
      this.ps.side.logV(this.from, this.panels[k].lo, o);
      return [o.lv, o.mag];
    }
    return [this.lvHi[k + 1], this.magHi[k + 1]];
  }
}

interface Sums {
  i0: number;
  i1: number;
  ip: number;
  e0: number;
  e1: number;
  ep: number;
  nodes: number;
}

function kernelAt(v: number): number {
  return Math.exp(v - Math.exp(v));
}

/** The nodes of panel p at log h (lhAbs), added to acc with the panel's bound (Theorem 19.3) and the nodes' rounding. */
function panel(p: Panel, lhAbs: number, lh: number, acc: Sums): void {
  const { w: gw } = gaussLegendre();
  const hl = p.hl;
  const rLo = lhAbs + p.rLo;
  const rHi = lhAbs + p.rHi;
  const c = Math.cos(Math.min(p.iMax, Math.PI));
  const Mp = supK(rLo, rHi, c);
  const M0 = c >= 0 ? Math.exp(-Math.exp(rLo) * c) : Math.exp(-Math.exp(rHi) * c);
  const eh = Math.exp(rHi);
  const M1 = Math.min(1 + M0, eh * (c >= 0 ? 1 : Math.exp(-eh * c)));
  let s0 = 0, s1 = 0, sp = 0, q0 = 0, q1 = 0, qp = 0;
  for (let i = 0; i < NODES; i++) {
    const v = lh + p.lv[i];
    const ev = Math.exp(v);
    const f0 = Math.exp(-ev);
    // 1 - f0 has no cancellation once f0 <= 1/2
    const f1 = ev < 0.7 ? -Math.expm1(-ev) : 1 - f0;
    const fp = ev * f0;
    const W = hl * gw[i];
    s0 += W * f0;
    s1 += W * f1;
    sp += W * fp;
    // error of v: rounding of log V and of lh + lv, and of the node's position (the computed Gauss-Legendre node is off
    // by a few eps of hl); |d f / d v| is K for f0 and f1 and K |1 - e^v| for Ip; plus the rounding of exp, expm1, the
    // products and the computed weight (8 eps)
    const dv = 4 * Number.EPSILON * (p.mag[i] + Math.abs(lh) + Math.abs(v)) + 2 * Number.EPSILON * (p.u[i] + 2 * hl) * p.d[i];
    q0 += W * (fp * dv + 8 * Number.EPSILON * f0);
    q1 += W * (fp * dv + 8 * Number.EPSILON * f1);
    qp += W * (fp * (Math.abs(1 - ev) * dv + 8 * Number.EPSILON));
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
  if (lhAbs + p.rHi <= R_COARSE) {
    panel(p, lhAbs, lh, acc);
    return true;
  }
  const parts = st.fineOf(k);
  if (!parts) return false;
  for (const q of parts) panel(q, lhAbs, lh, acc);
  return true;
}

/**
 * One end's half of the integrals (u in (0, L/2] from the end `from`): the region beyond the window in bulk, the
 * window by its panels, the rest up to the end in bulk. False when the store cannot reach the window.
 */
function half(st: PanelStore, lhAbs: number, V0: number, acc: Sums): boolean {
  const side = st.ps.side;
  const lh = lhAbs + side.wRef;
  const L2 = side.L / 2;
  if (st.n === 0 && !st.extend()) return false;
  // v at u (as evaluated) rounded down (lower) or up
  const vDown = (lv: number, mag: number) => lh + lv - 8 * Number.EPSILON * (mag + Math.abs(lh) + Math.abs(lv));
  const vUp = (lv: number, mag: number) => lh + lv + 8 * Number.EPSILON * (mag + Math.abs(lh) + Math.abs(lv));
  // from the middle towards the end, v falls (low end) or rises (high end); skip the panels wholly beyond the window
  let k = 0;
  const rising = st.from === 1;
  for (;;) {
    const e = st.lvLo(k);
    const vEnd = rising ? vUp(e[0], e[1]) : vDown(e[0], e[1]);
    // v over panel k lies between v(hi_k) and v(lo_k): the window starts where it can reach [V0, V1]
    if (rising ? vEnd > V0 : vEnd < V1) break;
    k++;
    if (k >= st.n && !st.extend()) return false;
  }
  // [hi_k, L/2] lies beyond the window: v <= v(hi_k) <= V0 (high end) or v >= v(hi_k) >= V1 (low end)
  const hiK = k === 0 ? L2 : st.panels[k - 1].lo;
  const len = L2 - hiK;
  if (len > 0) {
    const lvk = st.lvHi[k];
    const mk = st.magHi[k];
    if (rising) {
      const vb = vUp(lvk, mk);
      const b = len * Math.exp(vb);
      acc.i0 += len;
      acc.e0 += b + 2 * Number.EPSILON * L2;
      acc.e1 += b;
      acc.ep += b;
    } else {
      const vb = vDown(lvk, mk);
      acc.i1 += len;
      const b = len * Math.exp(-Math.exp(vb));
      acc.e0 += b;
      acc.e1 += b + 2 * Number.EPSILON * L2;
      acc.ep += len * kernelAt(vb);
    }
  }
  // the window, panel by panel, until the rest up to the end is negligible
  for (;; k++) {
    if (k >= st.n && !st.extend()) return false;
    if (!panelOrParts(st, k, lhAbs, lh, acc)) return false;
    const e = st.lvLo(k);
    const lo = st.panels[k].lo;
    if (rising) {
      const vb = vDown(e[0], e[1]);
      if (vb >= V1) {
        // [0, lo]: v >= vb
        acc.i1 += lo;
        const b = lo * Math.exp(-Math.exp(vb));
        acc.e0 += b;
        acc.e1 += b;
        acc.ep += lo * kernelAt(vb);
        return true;
      }
    } else {
      const vb = vUp(e[0], e[1]);
      const b = lo * Math.exp(vb);
      if (vb <= V0 || (b <= 1e-17 * acc.ip && b <= 1e-17 * acc.i1)) {
        // [0, lo]: v <= vb
        acc.i0 += lo;
        acc.e0 += b;
        acc.e1 += b;
        acc.ep += b;
        return true;
      }
    }
  }
}

const stores = new Map<PanelSide, [PanelStore, PanelStore]>();

/**
 * I0, I1, Ip of `ps` at log h = lhAbs by the panels, or null when the panels cannot reach the window or the bounds
 * exceed `rel` of a value (the caller then takes another route).
 */
export function stablePanels(ps: PanelSide, lhAbs: number, rel: number): StableIntegrals | null {
  let st = stores.get(ps);
  if (!st) {
    if (stores.size > 64) stores.clear();
    st = [new PanelStore(ps, 0), new PanelStore(ps, 1)];
    stores.set(ps, st);
  }
  // V0 falls with log h far out so that what lies below it stays under 1e-16 of the mass near the window
  const V0 = -37 - Math.log(Math.max(1, Math.abs(lhAbs)));
  const acc: Sums = { i0: 0, i1: 0, ip: 0, e0: 0, e1: 0, ep: 0, nodes: 0 };
  if (!half(st[0], lhAbs, V0, acc) || !half(st[1], lhAbs, V0, acc)) return null;
  // the sums' rounding: at most (terms - 1) u times the sum of the (positive) terms (Higham 2002, eq. 4.4), terms
  // counted generously
  const g = (acc.nodes + 16) * Number.EPSILON;
  const res: StableIntegrals = {
    I0: acc.i0,
    I1: acc.i1,
    Ip: acc.ip,
    e0: acc.e0 + g * acc.i0,
    e1: acc.e1 + g * acc.i1,
    ep: acc.ep + g * acc.ip,
    nodes: acc.nodes,
  };
  if (!(res.e0 <= rel * res.I0 && res.e1 <= rel * res.I1 && res.ep <= rel * res.Ip)) return null;
  return res;
}

/** min and max of sin over [a, b] */
export function sinRange(a: number, b: number): [number, number] {
  let lo = Math.min(Math.sin(a), Math.sin(b));
  let hi = Math.max(Math.sin(a), Math.sin(b));
  // critical points pi/2 + k pi inside
  const k0 = Math.ceil((a - Math.PI / 2) / Math.PI);
  for (let k = k0; Math.PI / 2 + k * Math.PI <= b; k++) {
    if (k % 2 === 0) hi = 1;
    else lo = -1;
  }
  return [lo, hi];
}
