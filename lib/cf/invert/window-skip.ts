/**
 * The light path's windows (./continuous.ts lightPath): each iteration's geometry, and after a window whose aliasing
 * bound missed its target, which of the next widenings to evaluate. Each evaluation costs a CF value per node (the
 * nodes grow with the window), and a skipped widening only moves the window's ends, so a window that cannot meet the
 * target is better not evaluated. The tails' decay is read from the evaluated window's own edge probes: on each open
 * side the mass within T/5 of the edge against the aliasing at the edge, log-linear in the distance (a tail falling
 * slower than that, lognormal-like, is predicted to meet the target sooner than it does, so its windows are evaluated as
 * before; one falling faster costs a wider window than needed, never a bound: every answer keeps its window's own a
 * posteriori aliasing check).
 */
import { exactGridStep } from "../arg-rounding";
import { MAX_FFT, gridLayout, type Layout, type Request } from "./shared";

/** windows the light path evaluates at most (each failed one widened by a quarter of its width per open side) */
export const ITERATIONS = 5;

export interface Geometry {
  a: number;
  b: number;
  T: number;
  h: number;
  layout: Layout | null;
  method: "fft" | "gil-pelaez";
  /** the grid was too fine for an FFT over the window: point by point from here */
  tooFine: boolean;
}

/**
 * One iteration's window from [a, b): on an FFT grid the layout's (the grid's step ties the period), point by point the
 * step rounded down to an exact one (the nodes (k + 1/2) h then exact, ../arg-rounding.ts; the period grows by at most
 * 2^-28 relative)
 */
export function windowGeometry(req: Request, a: number, b: number, method: "fft" | "gil-pelaez", support: readonly [number, number]): Geometry {
  const [lo, hi] = support;
  let layout: Layout | null = null;
  let tooFine = false;
  if (req.kind === "grid" && method === "fft") {
    layout = gridLayout(req, a, b, {
      left: !(Number.isFinite(lo) && a < lo),
      right: !(Number.isFinite(hi) && b > hi),
    });
    if (layout.N > MAX_FFT) {
      layout = null;
      method = "gil-pelaez";
      tooFine = true;
    } else {
      a = layout.x0;
      b = layout.x0 + layout.N * req.dx;
    }
  }
  const h = layout ? (2 * Math.PI) / (b - a) : exactGridStep((2 * Math.PI) / (b - a));
  if (!layout) b = a + (2 * Math.PI) / h;
  return { a, b, T: b - a, h, layout, method, tooFine };
}

/** the widened window after a failed one: each open side out by a quarter of the width (null: no side open) */
export function widened(g: { a: number; b: number; T: number }, support: readonly [number, number]): { a: number; b: number } | null {
  const [lo, hi] = support;
  const leftOpen = !(Number.isFinite(lo) && g.a < lo);
  const rightOpen = !(Number.isFinite(hi) && g.b > hi);
  if (!leftOpen && !rightOpen) return null;
  const grow = g.T / 4;
  return { a: leftOpen ? g.a - grow : g.a, b: rightOpen ? g.b + grow : g.b };
}

/** what one evaluated window says: its ends and width, its edge probes and its aliasing against their targets */
export interface WindowProbe {
  a: number;
  b: number;
  T: number;
  /** the probes' distances from the edges (ascending) */
  ds: number[];
  /** F_h at a + ds[i] (left side) and S_h at b - ds[i] (right side), computed by the window's sums */
  left: ArrayLike<number>;
  right: ArrayLike<number>;
  /** |F_h(a)|: the mass at the edges (both sides' images) */
  edge: number;
  aliasCore: number;
  aliasPdf: number;
  sumErrCdf: number;
  aliasTarget: number;
  wantPdf: boolean;
}

/**
 * The iteration to evaluate next after the failed iteration `iter`: the first whose predicted aliasing (cdf, and pdf where
 * wanted) meets the loop's stopping test, else the last; iter + 1 where the probes show no decay. `req`, `method` and
 * `support` replay the windows the loop would reach (windowGeometry, widened).
 */
export function nextEvaluated(p: WindowProbe, iter: number, req: Request, method: "fft" | "gil-pelaez", support: readonly [number, number]): number {
  const last = ITERATIONS - 1;
  if (iter + 1 >= last) return iter + 1;
  const [lo, hi] = support;
  const leftOpen = !(Number.isFinite(lo) && p.a < lo);
  const rightOpen = !(Number.isFinite(hi) && p.b > hi);
  const edge = Math.max(p.edge, Number.MIN_VALUE);
  const far = p.ds.length - 1;
  const d = p.ds[far];
  let rate = Infinity;
  if (rightOpen) rate = Math.min(rate, Math.log(p.right[far] / edge) / d);
  if (leftOpen) rate = Math.min(rate, Math.log(p.left[far] / edge) / d);
  if (!(rate > 0 && rate < Infinity)) return iter + 1;
  let w = widened(p, support);
  for (let j = iter + 1; j <= last && w; j++) {
    const g = windowGeometry(req, w.a, w.b, method, support);
    method = g.method;
    // the least move of an end open at the evaluated window
    let move = Infinity;
    if (rightOpen) move = Math.min(move, g.b - p.b);
    if (leftOpen) move = Math.min(move, p.a - g.a);
    const factor = Math.exp(-rate * Math.max(move, 0));
    const core = p.aliasCore * factor;
    const cdfOk = core <= Math.max(p.aliasTarget, p.sumErrCdf);
    const aliasCdf = core + 2 * p.sumErrCdf;
    const floor = (4 * (p.sumErrCdf + aliasCdf)) / (g.T / 5) + (2 * aliasCdf) / g.T;
    const pdfOk = !p.wantPdf || p.aliasPdf * factor <= Math.max(p.aliasTarget, 1.01 * floor);
    if (cdfOk && pdfOk) return j;
    w = widened(g, support);
  }
  return last;
}
