import { directPoint, type DirectLaw, type DirectPoint } from "./types";

/** Shared pieces of the closed-form and special-function direct laws (./families.ts, ./severities.ts, ./bounded.ts). */
export const EPS = Number.EPSILON;
export const ELEM = 32 * EPS;
export const SQRT2PI = Math.sqrt(2 * Math.PI);

/**
 * A bound on |d log erfcx(y')/dy'| for every y' >= yLo (clamped at 0): erfcx'/erfcx = 2y - 2/(sqrt(pi) erfcx(y)), and
 * 1/(y + sqrt(y^2 + 2)) < e^{y^2} int_y^inf e^{-t^2} dt <= 1/(y + sqrt(y^2 + 4/pi)) (A&S 7.1.13) put it in
 * (y - sqrt(y^2 + 2), y - sqrt(y^2 + 4/pi)], so its size is below 2/(y + sqrt(y^2 + 2)) (at most sqrt 2), which falls in y.
 */
export function logErfcxSlope(yLo: number): number {
  const y = Math.max(0, yLo);
  return 2 / (y + Math.sqrt(y * y + 2));
}
const NOTE = "evaluated from the family's closed form or special functions; no CF inversion";

export type Fill = (x: number, o: DirectPoint) => void;

export function law(method: DirectLaw["method"], support: [number, number], center: number, spread: number, fill: Fill, quantile?: (p: number) => number, extra?: string): DirectLaw {
  return {
    method,
    support,
    center,
    spread,
    notes: [extra ? `${NOTE}; ${extra}` : NOTE],
    at(x, o) {
      if (x < support[0] || x > support[1]) {
        const below = x < support[0];
        o.pdf = 0;
        o.pdfErr = 0;
        o.cdf = below ? 0 : 1;
        o.sf = below ? 1 : 0;
        o.cdfErr = 0;
        o.sfErr = 0;
        return;
      }
      fill(x, o);
      // extreme parameters (a shape of 1e12, say) can overflow an error term: a probability is never off by more
      // than 1, and a density bound that cannot be computed is the largest finite number (never NaN, never below)
      if (!(o.cdfErr <= 1)) o.cdfErr = 1;
      if (!(o.sfErr <= 1)) o.sfErr = 1;
      if (!(o.pdfErr <= Number.MAX_VALUE)) o.pdfErr = Number.isFinite(o.pdf) ? Number.MAX_VALUE : 0;
    },
    ...(quantile ? { quantile } : {}),
  };
}

/** The law with its mode (DirectLaw.mode), for a family whose mode has a closed form (Johnson, Kotz & Balakrishnan). */
export function withMode(mode: number, l: DirectLaw): DirectLaw {
  return Number.isFinite(mode) ? { ...l, mode } : l;
}

/** withMode for a mode that is a parameter of the family, exact as given (DirectLaw.modeExact) */
export function withExactMode(mode: number, l: DirectLaw): DirectLaw {
  return Number.isFinite(mode) ? { ...l, mode, modeExact: true } : l;
}

/** The law marked unimodal (DirectLaw.unimodal), for a family known to be unimodal without a closed-form mode. */
export function unimodal(l: DirectLaw): DirectLaw {
  return { ...l, unimodal: true };
}

/**
 * The law with its mode and its upper stop-loss transform int_c^inf S = e(c) S(c), e(c) = E[X - c | X > c] the family's
 * closed-form mean excess, formed within 4u relative (each at most a sum, a product and a quotient of exact-ish inputs;
 * alpha - 1 and 1 - xi round by half an ulp of themselves); below the support's lower end lo, (lo - c) + e(lo). The
 * lower transform is left to the quadrature (null). Where e(c) is not a finite positive number (no mean): null.
 */
export function withExcess(l: DirectLaw, mode: number, excess: (c: number) => number): DirectLaw {
  const pt = directPoint();
  const lo = l.support[0];
  return {
    ...l,
    mode,
    stopLoss(c: number, side: 1 | -1) {
      if (side !== 1) return null;
      const x = c < lo ? lo : c;
      l.at(x, pt);
      const e = excess(x);
      if (!(e >= 0 && Number.isFinite(e))) return null;
      const v = e * pt.sf;
      const ev = e * pt.sfErr + 8 * EPS * v;
      if (c >= lo) return { v, e: ev };
      const d = lo - c;
      return { v: d + v, e: ev + 2 * EPS * (d + v) };
    },
  };
}

/**
 * relative error r on each value, plus pdf times the rounding dx of the argument. An infinite pdf (a power
 * singularity at the support's end, met exactly there, dx = 0) is the exact limit: its own error and its effect on
 * the cdf are 0 (Infinity * 0 would make every bound of the answer NaN); so is a pdf of 0 there.
 */
export function bounds(o: DirectPoint, r: number, rPdf: number, dx: number) {
  const finite = Number.isFinite(o.pdf);
  const moved = finite && dx > 0 ? o.pdf * dx : 0;
  o.cdfErr = r * o.cdf + moved;
  o.sfErr = r * o.sf + moved;
  // a pdf of exactly 0 (the limit at a support end, where rPdf may hold log 0) is exact too
  o.pdfErr = finite && o.pdf !== 0 ? rPdf * o.pdf : 0;
}

/**
 * The law marked with its own completely monotone upper tail (DirectLaw.monotoneSplit): S on [lo, inf) is a power of
 * an affine function of y, c (y - y0)^-a or (1 + (y - lo)/s)^-a, or an exponential (pareto, lomax, generalised pareto
 * with xi >= 0), so the split is the one term S itself, with the density and the stop-loss transform; left of lo the law
 * has no mass (zero is completely monotone).
 */
export function withMonotoneTail(l: DirectLaw): DirectLaw {
  const pt = directPoint();
  const lo = l.support[0];
  return {
    ...l,
    monotoneSplit(y: number, side: 1 | -1, _step: number, stopLoss: boolean) {
      if (side === -1) return y < lo ? { tail: 0, pdf: 0, stopLoss: 0, restTail: 0, restPdf: 0, restStopLoss: 0 } : null;
      if (!(y >= lo)) return null;
      if (stopLoss) {
        const sl = l.stopLoss?.(y, 1);
        return { tail: Infinity, pdf: Infinity, stopLoss: sl ? sl.v + sl.e : Infinity, restTail: 0, restPdf: 0, restStopLoss: 0 };
      }
      l.at(y, pt);
      return { tail: pt.sf + pt.sfErr, pdf: pt.pdf + pt.pdfErr, stopLoss: Infinity, restTail: 0, restPdf: 0, restStopLoss: 0 };
    },
  };
}
