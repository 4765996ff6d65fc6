import type { StableSide } from "./stable-kernel";

/**
 * The stored panels of ./stable-panels.ts: per law and end, a partition of u (the distance from that end) into
 * Gauss-Legendre panels whose rectangles (the bounding boxes of their Bernstein ellipses E_rho) keep |Im log V| small,
 * with the rectangles' bounds on log V (./stable-box.ts tightens the side's own) and the nodes' log V, evaluated on a
 * panel's first use. None of it depends on log h, so every point reuses it.
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

export const RHO = 3;
export const NODES = 16;
/** the window's high end in v: beyond it K(v) < 2e-20 and exp(-e^v) < 4e-22 */
export const V1 = 3.9;
export const BF = (RHO - 1 / RHO) / 2;
export const AF = (RHO + 1 / RHO) / 2;
export const THM = (64 / 15) * Math.pow(RHO, -2 * NODES) / (RHO * RHO - 1);

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

/**
 * panels stored per end at most: next to alpha = 1 the window moves by alpha/(alpha - 1) log z units of v, a few per
 * panel (at alpha = 1.0003 the body's points need up to about 5 000); a panel without nodes is a small object, and
 * nodes are evaluated only for the panels a window reaches
 */
const CAP = 16384;
/**
 * |Im log V| allowed over a panel's rectangle: coarse panels serve where Re v <= 0 over the rectangle (there
 * |K| <= e^R exp(e^R) <= e whatever Im v), fine ones (a coarse panel cut into equal parts) elsewhere, where |K| and
 * |exp(-e^v)| stay within 1/cos(1.3) = 3.7 of their size on the real line
 */
export const IMAX_COARSE = 6;
export const IMAX_FINE = 1.3;
export const R_COARSE = 0;
/** where Re v <= R_FAR over a panel's rectangle, K(v) = e^v to within e^(2 R_FAR) = 7e-13 relative (of a part that is itself small) */
export const R_FAR = -14;

/** |log V - wRef| up to which a node keeps e^(log V - wRef), so that e^v = e^lh e^(log V - wRef) takes one product */
export const EV_MAX = 600;

/** One panel [lo, lo + 2 hl] of u: its rectangle's bounds on log V and its nodes. */
export interface Panel {
  lo: number;
  hl: number;
  rLo: number;
  rHi: number;
  iMax: number;
  /**
   * per node: log V - wRef; e^(log V - wRef) where |log V - wRef| <= EV_MAX (else NaN); the weight hl w_i; the part of
   * the bound on the error of v that does not depend on log h: 4 eps (magnitude of log V's parts) for their rounding
   * plus 2 eps (u + 2 hl) |d log V / du| for the node's position (the computed Gauss-Legendre node is off by a few eps of hl)
   */
  lv: Float64Array;
  elv: Float64Array;
  wt: Float64Array;
  dv0: Float64Array;
  /** the rule's sum of V e^-rHi over the panel (for the far left, where K(v) = e^v to within e^2v) and its error bound */
  J: number;
  eJ: number;
}

const EMPTY = new Float64Array(0);

/** a panel's rectangle bounds; its nodes come with nodesOf on first use (the panels a point only skips never need them) */
export function makePanel(lo: number, hl: number, bx: Box): Panel {
  return { lo, hl, rLo: bx.rLo, rHi: bx.rHi, iMax: bx.iMax, lv: EMPTY, elv: EMPTY, wt: EMPTY, dv0: EMPTY, J: 0, eJ: 0 };
}

const nodeOut = { lv: 0, d: 0, mag: 0 };
/** one buffer for a panel's four node arrays */
function nodeArrays(p: Panel, buf: Float64Array) {
  p.lv = buf.subarray(0, NODES);
  p.elv = buf.subarray(NODES, 2 * NODES);
  p.wt = buf.subarray(2 * NODES, 3 * NODES);
  p.dv0 = buf.subarray(3 * NODES, 4 * NODES);
}

/**
 * Node buffers for the panels of one point's own (./stable-panels.ts stableWindowPanels, ./stable-light.ts): taken in
 * turn and handed out again from the start by reset() at the next point, whose panels replace them (allocating a
 * typed array per panel took a tenth of the time there)
 */
export class NodePool {
  private bufs: Float64Array[] = [];
  private used = 0;
  take(): Float64Array {
    if (this.used === this.bufs.length) this.bufs.push(new Float64Array(4 * NODES));
    return this.bufs[this.used++];
  }
  reset(): void {
    this.used = 0;
  }
}

/** panel p (of the end `from` of ps) with its nodes evaluated */
export function nodesOf(ps: PanelSide, from: 0 | 1, p: Panel, pool?: NodePool): Panel {
  if (p.lv.length) return p;
  const { x: gx, w: gw } = gaussLegendre();
  const o = nodeOut;
  const { lo, hl } = p;
  nodeArrays(p, pool ? pool.take() : new Float64Array(4 * NODES));
  const m = lo + hl;
  // |V e^-rHi| <= 1 on the rectangle: Theorem 19.3 with M = 1, plus each node's rounding (as in panel())
  let J = 0;
  let eJ = hl * THM;
  for (let i = 0; i < NODES; i++) {
    const u = m + hl * gx[i];
    ps.side.logV(from, u, o);
    p.lv[i] = o.lv;
    p.elv[i] = Math.abs(o.lv) <= EV_MAX ? Math.exp(o.lv) : NaN;
    p.wt[i] = hl * gw[i];
    p.dv0[i] = 4 * Number.EPSILON * o.mag + 2 * Number.EPSILON * (u + 2 * hl) * Math.abs(o.d);
    const t = hl * gw[i] * Math.exp(o.lv + ps.side.wRef - p.rHi);
    J += t;
    eJ += t * (4 * Number.EPSILON * (Math.abs(p.rHi) + 1) + p.dv0[i] + 8 * Number.EPSILON);
  }
  p.J = J;
  p.eJ = eJ + NODES * Number.EPSILON * J;
  return p;
}

/**
 * The panels of one end, from the middle (u = L/2) towards the end (u -> 0), with log V at their upper ends; they do
 * not depend on log h (|Im v| = |Im log V|), so every point reuses them.
 */
export class PanelStore {
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
  /** the u where the panels start (towards the end): L/2 for the shared stores, nearer the window for one point's own */
  readonly start: number;
  constructor(
    readonly ps: PanelSide,
    readonly from: 0 | 1,
    start?: number,
    /** one point's own store: its nodes' buffers come from (and go back to) this pool */
    readonly pool?: NodePool,
  ) {
    this.start = start ?? ps.side.L / 2;
  }
  /** one more panel below the last; false at the cap or when none can be placed */
  extend(): boolean {
    if (this.full) return false;
    if (this.n >= CAP) {
      this.full = true;
      return false;
    }
    const side = this.ps.side;
    const o = this.o;
    const hi = this.n ? this.panels[this.n - 1].lo : this.start;
    side.logV(this.from, hi, o);
    const lvHi = o.lv;
    const magHi = o.mag;
    // at a finite end (log V analytic there) one panel may reach the end itself
    if (this.from === 0 && Number.isFinite(side.wLowEnd)) {
      const h = hi / 2;
      if (this.ps.box(0, h - AF * h, h + AF * h, BF * h, this.bx) && this.bx.iMax <= IMAX_COARSE) {
        this.panels.push(makePanel(0, h, this.bx));
        this.fine.push(undefined);
        this.lvHi.push(lvHi);
        this.magHi.push(magHi);
        this.n++;
        this.full = true;
        return true;
      }
    }
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
    this.panels.push(makePanel(hi - 2 * hl, hl, this.bx));
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
        out.push(makePanel(lo, hl, this.bx));
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
