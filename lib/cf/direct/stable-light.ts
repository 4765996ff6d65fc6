import type { StableIntegrals } from "./stable-integral";
import { AF, BF, IMAX_FINE, makePanel, nodesOf, type Box, type PanelSide } from "./stable-panel-store";
import { finish, flatHigh, half, lowCut, panel, pointPool, sharedStores, windowStore, type Sums } from "./stable-panels";

/**
 * The integrals of ./stable-panels.ts on a light side (|beta| = 1 where log V has a finite low end, v(end) = log h)
 * far enough out that e^v is large over the whole low half: there I0 and Ip are of the order of exp(-e^(v(end))) and
 * come from next to the end, where the shared panels' rectangles (|Im log V| up to 1.3) let the bound of Theorem 19.3
 * (Trefethen 2013), exp(-e^(Re v) cos(Im v)), exceed the values by as much as exp(e^v (1 - cos 1.3)).
 * Here the low half gets panels of the point's own from the end outwards, each halved until its rectangle keeps both
 * bounds within e^SLACK of the values at the end: e^(R_lo) cos(I) >= E - SLACK and
 * R_hi - log E - (e^(R_lo) cos(I) - E) <= SLACK for |exp(-e^v)| and |e^v exp(-e^v)| (E = e^(v(end)), R_lo, R_hi, I the
 * rectangle's bounds on Re v and |Im v|), so each panel's bound is at most e^SLACK THM of exp(-E) (of E exp(-E)) times
 * its length. The panels stop where v has risen to e^v >= E + STOP (checked at the panel's end with its rounding),
 * beyond which I0 and Ip take at most the rest's length times exp(-e^v) and K(v) there (each falls in v for v > 0).
 */

/** panels per point at most */
const MAX_PANELS = 400;
/** log of the factor by which a panel's bound may exceed the values at the end */
const SLACK = 8;
/** e^v - e^(v(end)) beyond which the rest is bounded in bulk (below e^-45 of the values at the end) */
const STOP = 45;
const o = { lv: 0, d: 0, mag: 0 };
const bx: Box = { rLo: 0, rHi: 0, iMax: 0 };
/** per law, the first panel's half-length times E at the last point: the next point's first guess */
const firstK = new Map<PanelSide, number>();

function lightHalf(ps: PanelSide, lhAbs: number, acc: Sums): boolean {
  const side = ps.side;
  const lh = lhAbs + side.wRef;
  const L2 = side.L / 2;
  const E = Math.exp(lh);
  if (!(E >= 1 && E < Infinity)) return false;
  const logE = lh;
  const fits = (b: Box) => {
    if (!(b.iMax <= IMAX_FINE)) return false;
    const c = Math.cos(b.iMax);
    const elc = Math.exp(lhAbs + b.rLo) * c;
    return elc >= E - SLACK && lhAbs + b.rHi - logE - (elc - E) <= SLACK;
  };
  let lo = 0;
  const k0 = firstK.get(ps);
  let hl = k0 ? Math.min(L2 / 8, (4 * k0) / E) : L2 / 8;
  for (let n = 0; n < MAX_PANELS; n++) {
    let ok = false;
    hl = Math.min(hl, (L2 - lo) / 2);
    for (let k = 0; k < 200 && hl > 1e-300; k++) {
      const m = lo + hl;
      if (ps.box(0, m - AF * hl, m + AF * hl, BF * hl, bx) && fits(bx)) {
        ok = true;
        break;
      }
      hl *= 0.5;
    }
    if (!ok) return false;
    if (n === 0) {
      if (firstK.size > 64) firstK.clear();
      firstK.set(ps, hl * E);
    }
    panel(nodesOf(ps, 0, makePanel(lo, hl, bx), pointPool), lhAbs, lh, acc);
    const hi = lo + 2 * hl;
    side.logV(0, hi, o);
    // v at hi rounded down
    const vb = lh + o.lv - 8 * Number.EPSILON * (o.mag + Math.abs(lh) + Math.abs(o.lv)) - acc.dl;
    if (Math.exp(vb) >= E + STOP || hi >= L2) {
      const rest = Math.max(0, L2 - hi);
      flatHigh(acc, rest, vb, 2 * Number.EPSILON * L2);
      return true;
    }
    lo = hi;
    hl *= 2;
  }
  return false;
}

/**
 * I0, I1, Ip of a light side (finite low end) at log h = lhAbs with its low half by lightHalf and its high half by the
 * shared panels (or the point's own at its window); null where log h is not far enough out (e^v(end) < 1) or the panels
 * cannot be placed.
 */
export function stableLightPanels(ps: PanelSide, lhAbs: number, dl = 0): StableIntegrals | null {
  const side = ps.side;
  if (!Number.isFinite(side.wLowEnd)) return null;
  const acc: Sums = { i0: 0, i1: 0, ip: 0, e0: 0, e1: 0, ep: 0, nodes: 0, dl };
  pointPool.reset();
  if (!lightHalf(ps, lhAbs, acc)) return null;
  const V0 = lowCut(lhAbs);
  const mark = { ...acc };
  if (!half(sharedStores(ps)[1], lhAbs, V0, acc)) {
    Object.assign(acc, mark);
    if (!half(windowStore(ps, 1, lhAbs), lhAbs, V0, acc)) return null;
  }
  return finish(acc);
}
