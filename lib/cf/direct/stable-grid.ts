import { solveY, stableSide, type StableSide, type ThetaNode } from "./stable-kernel";

/**
 * The stored node grid of the stable integrals (./stable-integral.ts): nodes uniform in y = w + log(Theta_low / Theta_high)
 * (w = log V), solved once per law and kept, with prefix sums for the far left of the kernel.
 */

export const DY = 0.25;
/** stored nodes per side at most; farther windows are computed on the fly */
export const CAP = 1 << 16;
/** terms of the series of K(v) summed from the prefix sums; the omitted part is below e^{(M+1) v} / M! per node */
export const TAIL_TERMS = 5;

export interface Row {
  w: number;
  tl: number;
  th: number;
  ww: number;
  wt: number;
  res: number;
}

export class NodeGrid {
  lo = 0;
  n = 0;
  w = new Float64Array(0);
  tl = new Float64Array(0);
  th = new Float64Array(0);
  ww = new Float64Array(0);
  wt = new Float64Array(0);
  res = new Float64Array(0);
  /** first and last index that exist (points closer than e^-740 to an end are left out) */
  jFirst = -Infinity;
  jLast = Infinity;
  private hint = { from: 0 as 0 | 1, t: NaN };
  /**
   * pre[(3 * (m - 1) + t)][i] = sum_{k <= i} c_t(k) e^{m (w_k - w_i)} with c_0 = ww tl, c_1 = ww th, c_2 = wt;
   * alt[...] the same with (-1)^(k+1) c_t(k) (the difference of the every-node and every-second-node sums);
   * qre[t][i] = sum_{k <= i} c_t(k) q(k) e^{w_k - w_i}, q = 4 eps |w| + res (each node's error in v)
   */
  pre: Float64Array[] = [];
  alt: Float64Array[] = [];
  qre: Float64Array[] = [];
  /** index of the first stored node that exists */
  iFirst = 0;
  private preDirty = true;
  yHint = { from: 0 as 0 | 1, t: NaN };
  private node: ThetaNode = { w: 0, thLow: 0, thHigh: 0, dw: 0, dth: 0, res: 0 };
  constructor(readonly side: StableSide) {}
  compute(j: number, out: Row): boolean {
    if (!solveY(this.side, j * DY, this.node, this.hint)) {
      if (j * DY <= this.side.wMid) this.jFirst = Math.max(this.jFirst, j + 1);
      else this.jLast = Math.min(this.jLast, j - 1);
      return false;
    }
    const nd = this.node;
    out.w = nd.w;
    out.tl = nd.thLow;
    out.th = nd.thHigh;
    out.ww = DY * nd.dw;
    out.wt = DY * nd.dth;
    out.res = nd.res;
    return true;
  }
  /** store [a, b] when that keeps the grid under CAP; returns whether [a, b] is stored */
  ensure(a: number, b: number): boolean {
    a = Math.max(a, this.jFirst);
    b = Math.min(b, this.jLast);
    if (this.n > 0 && a >= this.lo && b < this.lo + this.n) return true;
    const lo = this.n ? Math.min(a, this.lo) : a;
    const hi = this.n ? Math.max(b, this.lo + this.n - 1) : b;
    if (hi - lo + 1 > CAP) return false;
    const size = hi - lo + 1;
    const oldLo = this.lo;
    const oldN = this.n;
    const grow = (old: Float64Array) => {
      const nw = new Float64Array(size);
      if (oldN) nw.set(old.subarray(0, oldN), oldLo - lo);
      return nw;
    };
    this.w = grow(this.w);
    this.tl = grow(this.tl);
    this.th = grow(this.th);
    this.ww = grow(this.ww);
    this.wt = grow(this.wt);
    this.res = grow(this.res);
    this.lo = lo;
    this.n = size;
    this.preDirty = true;
    const r: Row = { w: 0, tl: 0, th: 0, ww: 0, wt: 0, res: 0 };
    const fill = (j: number) => {
      const i = j - lo;
      if (!this.compute(j, r)) {
        this.tl[i] = NaN;
        return;
      }
      this.w[i] = r.w;
      this.tl[i] = r.tl;
      this.th[i] = r.th;
      this.ww[i] = r.ww;
      this.wt[i] = r.wt;
      this.res[i] = r.res;
    };
    if (!oldN) {
      for (let j = lo; j <= hi; j++) fill(j);
    } else {
      // extend outward from the stored block so that each solve starts next to a solved neighbour
      this.hint.t = NaN;
      for (let j = oldLo - 1; j >= lo; j--) fill(j);
      this.hint.t = NaN;
      for (let j = oldLo + oldN; j <= hi; j++) fill(j);
    }
    return true;
  }
  /** the prefix sums of the stored grid (recomputed after the grid grew) */
  prefix(): void {
    if (!this.preDirty) return;
    this.preDirty = false;
    const n = this.n;
    const mk = (k: number) => Array.from({ length: k }, () => new Float64Array(n));
    this.pre = mk(3 * TAIL_TERMS);
    this.alt = mk(3 * TAIL_TERMS);
    this.qre = mk(3);
    const accP = new Float64Array(3 * TAIL_TERMS);
    const accA = new Float64Array(3 * TAIL_TERMS);
    const accQ = new Float64Array(3);
    const c = new Float64Array(3);
    let wPrev = NaN;
    this.iFirst = n;
    for (let i = 0; i < n; i++) {
      const tl = this.tl[i];
      if (tl === tl) {
        if (this.iFirst === n) this.iFirst = i;
        const w = this.w[i];
        const d = wPrev === wPrev ? w - wPrev : Infinity;
        const e1 = Math.exp(-d);
        c[0] = this.ww[i] * tl;
        c[1] = this.ww[i] * this.th[i];
        c[2] = this.wt[i];
        const sg = (this.lo + i) & 1 ? 1 : -1;
        const q = 4 * Number.EPSILON * Math.abs(w) + this.res[i];
        let f = 1;
        for (let m = 1; m <= TAIL_TERMS; m++) {
          f *= e1;
          for (let t = 0; t < 3; t++) {
            const k = 3 * (m - 1) + t;
            accP[k] = accP[k] * f + c[t];
            accA[k] = accA[k] * f + sg * c[t];
          }
        }
        for (let t = 0; t < 3; t++) accQ[t] = accQ[t] * e1 + c[t] * q;
        wPrev = w;
      }
      for (let k = 0; k < 3 * TAIL_TERMS; k++) {
        this.pre[k][i] = accP[k];
        this.alt[k][i] = accA[k];
      }
      for (let t = 0; t < 3; t++) this.qre[t][i] = accQ[t];
    }
  }
  /** row j from the store, else computed on the fly; false when the node does not exist */
  row(j: number, out: Row): boolean {
    let i = j - this.lo;
    if (i >= 0 && i < this.n) {
      const tl = this.tl[i];
      if (tl !== tl) return false;
      out.w = this.w[i];
      out.tl = tl;
      out.th = this.th[i];
      out.ww = this.ww[i];
      out.wt = this.wt[i];
      out.res = this.res[i];
      return true;
    }
    if (j < this.jFirst || j > this.jLast) return false;
    if (!(i >= 0 && i < this.n)) {
      // grow by a block in the direction of the march, so that a march beyond the store does not regrow it per node
      const grown = j < this.lo ? this.ensure(j - 63, j) : this.ensure(j, j + 63);
      if (!grown) return this.compute(j, out);
      i = j - this.lo;
    }
    if (Number.isNaN(this.tl[i])) return false;
    out.w = this.w[i];
    out.tl = this.tl[i];
    out.th = this.th[i];
    out.ww = this.ww[i];
    out.wt = this.wt[i];
    out.res = this.res[i];
    return true;
  }
}

const grids = new Map<string, NodeGrid>();
// the last few laws asked for, compared as numbers (the map's string key is a cost of its own at every point)
const recent: { alpha: number; beta: number; g: NodeGrid }[] = [];

export function gridFor(alpha: number, beta: number): NodeGrid {
  for (const r of recent) if (r.alpha === alpha && r.beta === beta) return r.g;
  const key = `${alpha}:${beta}`;
  let g = grids.get(key);
  if (!g) {
    if (grids.size > 64) grids.clear();
    g = new NodeGrid(stableSide(alpha, beta));
    grids.set(key, g);
  }
  recent.unshift({ alpha, beta, g });
  if (recent.length > 4) recent.pop();
  return g;
}
