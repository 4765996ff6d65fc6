import type { CompiledModel } from "../types";

/** Location, spread and shape of a law as far as they exist, for choosing inversion windows. */
export interface LawShape {
  center: number;
  /** standard deviation when it exists, else the model's robust scale */
  spread: number;
  skew: number;
  exKurt: number;
  /** true when a tail is a power law (cumulants of low order may not exist) */
  heavy: boolean;
  /** smallest finite tail index (Infinity when both tails are light) */
  alpha: number;
  /** all power terms the tails may hold, where known (Richardson exponents from them instead of alpha alone) */
  tailBases?: number[];
  support: readonly [number, number];
}

export function lawShape(m: CompiledModel): LawShape {
  const alpha = Math.min(m.tails.left, m.tails.right);
  const k = safeCumulants(m);
  const heavy = Number.isFinite(alpha) || k[1] === null || !(k[1]! > 0);
  if (!heavy) {
    const mu = k[0]!;
    const sd = Math.sqrt(k[1]!);
    const skew = k[2] !== null ? k[2]! / sd ** 3 : 0;
    const exKurt = k[3] !== null ? k[3]! / sd ** 4 : 0;
    return { center: mu, spread: sd, skew, exKurt, heavy, alpha, support: m.support };
  }
  const scale = m.scale > 0 && Number.isFinite(m.scale) ? m.scale : 1;
  return { center: m.location, spread: scale, skew: 0, exKurt: 0, heavy, alpha, support: m.support, tailBases: m.powerIndices };
}

function safeCumulants(m: CompiledModel): (number | null)[] {
  try {
    const k = m.cumulants(4);
    return [0, 1, 2, 3].map((i) => (typeof k[i] === "number" && Number.isFinite(k[i]!) ? k[i] : null));
  } catch {
    return [null, null, null, null];
  }
}

/**
 * Half-widths (left, right) beyond which the tail mass is expected below eps for a light-tailed law:
 * a normal-tail width z = sqrt(2 ln(1/eps)) stretched by a Cornish-Fisher style skewness and kurtosis term
 * (common practice); the inversion checks the result a posteriori and widens when it was too short.
 */
export function bulkHalfWidths(s: LawShape, eps: number): { left: number; right: number } {
  const z = Math.sqrt(2 * Math.log(1 / Math.max(eps, 1e-300)));
  const kurt = Math.max(s.exKurt, 0) * z ** 3 / 24;
  const side = (sign: number) => {
    const w = z + Math.max(sign * s.skew, 0) * (z * z) / 6 + kurt;
    return s.spread * Math.min(Math.max(w, z), 16 * z);
  };
  return { left: side(-1), right: side(1) };
}

/**
 * The bulk of a law clipped to its support: tail mass about `eps` on each side for light tails, location +-
 * `heavyWidth` scales for power tails.
 */
export function bulkWindow(s: LawShape, eps: number, heavyWidth: number): { from: number; to: number } {
  let from: number;
  let to: number;
  if (!s.heavy) {
    const hw = bulkHalfWidths(s, eps);
    from = s.center - hw.left;
    to = s.center + hw.right;
  } else {
    from = s.center - heavyWidth * s.spread;
    to = s.center + heavyWidth * s.spread;
  }
  const [lo, hi] = s.support;
  if (Number.isFinite(lo)) from = Math.max(from, lo);
  if (Number.isFinite(hi)) to = Math.min(to, hi);
  return { from, to };
}

/** Window [a, b) for a light-tailed law: the bulk at tail mass eps, the requested points, clamped to the support. */
export function lightWindow(
  s: LawShape,
  eps: number,
  xmin: number,
  xmax: number,
): { a: number; b: number } {
  const hw = bulkHalfWidths(s, eps);
  let a = s.center - hw.left;
  let b = s.center + hw.right;
  const [lo, hi] = s.support;
  const pad = 0.02 * (b - a);
  if (Number.isFinite(lo) && a < lo) a = lo - pad;
  if (Number.isFinite(hi) && b > hi) b = hi + pad;
  if (xmin < a) a = xmin - 1e-3 * (b - xmin);
  if (xmax >= b) b = xmax + 1e-3 * (xmax - a) + Number.EPSILON * Math.abs(xmax);
  return { a, b };
}

/**
 * First window for a heavy-tailed law (power tails, Richardson in the period later doubles it):
 * centred on the location, 64 scales wide at least, covering the points, anchored at a finite support end.
 */
export function heavyWindow(s: LawShape, xmin: number, xmax: number): { a: number; b: number } {
  const [lo, hi] = s.support;
  let half = 32 * s.spread;
  if (Number.isFinite(xmin)) half = Math.max(half, 1.25 * Math.max(Math.abs(xmin - s.center), Math.abs(xmax - s.center)));
  let a = s.center - half;
  let b = s.center + half;
  if (Number.isFinite(lo) && a < lo) {
    a = lo - 0.01 * half;
    b = a + 2 * half;
  } else if (Number.isFinite(hi) && b > hi) {
    b = hi + 0.01 * half;
    a = b - 2 * half;
  }
  return { a, b };
}
