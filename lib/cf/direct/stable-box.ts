import type { Box, PanelSide } from "./stable-panel-store";
import type { StableSide } from "./stable-kernel";
import { cotm, logSinc } from "./stable-trig";

const HALF_PI = Math.PI / 2;
const EPS = Number.EPSILON;

/**
 * A second-order (centred) enclosure of log V over a rectangle [x1, x2] x [-Y, Y] of u, intersected with a first
 * enclosure (the factor-by-factor rectangle bounds of ./stable-far.ts and ./stable-kernel.ts). With m the rectangle's
 * centre on the real line and delta = u - m, Taylor's theorem with the integral remainder along the segment [m, u]
 * (inside the convex rectangle) gives
 *   log V(u) = log V(m) + (log V)'(m) delta + R,  |R| <= M2 |delta|^2 / 2,  M2 >= sup |(log V)''| over the rectangle,
 * and log V(m), (log V)'(m) are real, so Re log V lies within log V(m) +- (|(log V)'(m)| (x2 - x1)/2 + |R|) and
 * |Im log V| <= |(log V)'(m)| Y + |R|. Where the rectangle is small against its distance from the ends this is close
 * to the true range (the product-of-ranges bound on P cot u is not: it pairs the extremes of its factors), so the
 * panels next to the kernel need not be cut as finely.
 */

/** log V (not less wRef, as the boxes of ./stable-panel-store.ts) and its derivative at a real point with bounds on their rounding */
interface Centre {
  lv: number;
  d: number;
  elv: number;
  ed: number;
}

function intersect(a: Box | null, b: Box | null, out: Box): boolean {
  if (!a && !b) return false;
  if (!a || !b) {
    const c = (a ?? b)!;
    out.rLo = c.rLo;
    out.rHi = c.rHi;
    out.iMax = c.iMax;
    return true;
  }
  out.rLo = Math.max(a.rLo, b.rLo);
  out.rHi = Math.min(a.rHi, b.rHi);
  out.iMax = Math.min(a.iMax, b.iMax);
  return true;
}

function centred(c: Centre, hx: number, Y: number, M2: number, out: Box): boolean {
  if (!Number.isFinite(M2) || !Number.isFinite(c.lv) || !Number.isFinite(c.d)) return false;
  const R = ((M2 * (hx * hx + Y * Y)) / 2) * (1 + 16 * EPS);
  const ad = Math.abs(c.d) + c.ed;
  const spread = ad * hx * (1 + 4 * EPS) + R + c.elv;
  out.rLo = c.lv - spread - 4 * EPS * Math.abs(c.lv);
  out.rHi = c.lv + spread + 4 * EPS * Math.abs(c.lv);
  out.iMax = (ad * Y + R) * (1 + 8 * EPS);
  return true;
}

/**
 * alpha = 1: log V = log(2/pi) + log P - log sin u + s P cot(u) / beta, P = P0 - s beta u (s = -1, P0 = (pi/2)(1 - beta)
 * from the low end; s = 1, P0 = (pi/2)(1 + beta) from the high end), so
 *   (log V)' = -s beta / P - 2 cot u - s P csc^2(u) / beta,
 *   (log V)'' = -beta^2 / P^2 + 3 csc^2 u + (2 s / beta) P csc^2(u) cot u,
 * and over the rectangle (x in (0, pi), Re P >= P_lo > 0): |1/P| <= 1/P_lo, |P| <= hypot(P_hi, beta Y),
 * |csc u|^2 = 1/(sin^2 x + sinh^2 y) <= 1/s_lo^2, |cos u| <= cosh Y (Abramowitz & Stegun 4.3.55, 4.3.56).
 */
export function oneTightBox(beta: number, first: NonNullable<PanelSide["box"]>): NonNullable<PanelSide["box"]> {
  const lg = Math.log(2 / Math.PI);
  const a: Box = { rLo: 0, rHi: 0, iMax: 0 };
  const b: Box = { rLo: 0, rHi: 0, iMax: 0 };
  const c: Centre = { lv: 0, d: 0, elv: 0, ed: 0 };
  return (from, x1, x2, Y, out) => {
    const okA = first(from, x1, x2, Y, a);
    let okB = false;
    if (x1 > 0 && x2 < Math.PI && Y >= 0) {
      const s = from === 0 ? -1 : 1;
      const P0 = from === 0 ? HALF_PI * (1 - beta) : HALF_PI * (1 + beta);
      const pa = P0 - s * beta * x1;
      const pb = P0 - s * beta * x2;
      const pLo = Math.min(pa, pb) * (1 - 4 * EPS);
      const pHi = Math.max(pa, pb) * (1 + 4 * EPS);
      const sLo = Math.min(Math.sin(x1), Math.sin(x2)) * (1 - 4 * EPS);
      if (pLo > 0 && sLo > 0) {
        const cy = Math.cosh(Y);
        const M2 = (beta * beta) / (pLo * pLo) + 3 / (sLo * sLo) + ((2 / beta) * Math.hypot(pHi, beta * Y) * cy) / (sLo * sLo * sLo);
        const m = 0.5 * (x1 + x2);
        const P = P0 - s * beta * m;
        const sn = Math.sin(m);
        const ct = Math.cos(m) / sn;
        // log(P / sin m): for beta = 1 at the low end P = m exactly
        const lr = Math.log(P) - Math.log(sn);
        const T = (s * P * ct) / beta;
        c.lv = lg + lr + T;
        const t1 = beta / P;
        const t3 = P / (beta * sn * sn);
        c.d = -s * t1 - 2 * ct - s * t3;
        // P's own rounding (relative 3 eps of P0 + beta m over P) moves log P, T and the terms of the derivative
        const relP = (3 * EPS * (P0 + beta * m)) / P;
        c.elv = relP * (1 + Math.abs(T)) + 8 * EPS * (Math.abs(lg) + Math.abs(Math.log(P)) + Math.abs(Math.log(sn)) + Math.abs(T) + 1);
        c.ed = relP * (t1 + t3) + 8 * EPS * (t1 + 2 * Math.abs(ct) + t3);
        // the computed centre is within 2 eps m of the middle
        okB = centred(c, 0.5 * (x2 - x1) + 2 * EPS * m, Y, M2, b);
      }
    }
    if (beta === 1 && from === 0) {
      // the finite low end of beta = 1: log V - (log(2/pi) - 1) = -ls(u) - (u cot u - 1), ls(u) = log(sin u / u)
      // = sum_k log(1 - u^2/(k pi)^2) and u cot u - 1 = sum_k 2 u^2 / (u^2 - (k pi)^2) (A&S 4.3.89, 4.3.70), so for
      // |u| <= r < pi: |log V - (log(2/pi) - 1)| <= -ls(r) + (1 - r cot r), whatever the rectangle's distance from the end
      const r = Math.hypot(Math.max(-x1, x2), Y);
      if (r < 3) {
        const B = (-logSinc(r) - r * cotm(r)) * (1 + 1e-12) + 4 * EPS * Math.abs(lg - 1);
        const ok = okA || okB;
        const c = okA && okB ? (intersect(a, b, a), a) : okA ? a : b;
        out.rLo = Math.max(ok ? c.rLo : -Infinity, lg - 1 - B);
        out.rHi = Math.min(ok ? c.rHi : Infinity, lg - 1 + B);
        out.iMax = Math.min(ok ? c.iMax : Infinity, B);
        return true;
      }
    }
    return intersect(okA ? a : null, okB ? b : null, out);
  };
}

/** min of sin over [a, b] inside (0, pi) */
const sinMin = (a: number, b: number) => Math.min(Math.sin(a), Math.sin(b));

/**
 * alpha != 1: log V = K + sum_i c_i log sin(phi_i), phi_i = p_i + q_i u, with the factors of ./stable-kernel.ts
 * (c_1 = 1/(alpha - 1), q_1 = 1; c_2 = -alpha/(alpha - 1), q_2 = alpha; c_3 = 1, q_3 = +-(alpha - 1)), so
 *   (log V)' = sum_i c_i q_i cot(phi_i),  (log V)'' = -sum_i c_i q_i^2 csc^2(phi_i).
 * Next to alpha = 1 the first two terms of (log V)'' cancel (both ~ csc^2 u / (alpha - 1)); written as
 *   c_1 [alpha^3 csc^2(phi_2) - csc^2(phi_1)] = c_1 [(alpha^3 - 1) csc^2(phi_2) + (csc^2(phi_2) - csc^2(phi_1))]
 * with |csc^2(phi_2) - csc^2(phi_1)| <= |phi_2 - phi_1| sup |2 csc^2 cot| over the segment between them (the mean
 * value theorem along it), each is bounded without the factor 1/(alpha - 1) of the cancellation. Over the rectangle
 * |csc phi|^2 <= 1/sin^2(Re phi) and |cot phi| <= cosh(Im phi)/sin(Re phi) (A&S 4.3.55, 4.3.56); the smaller of
 * this and the plain sum of |c_i| q_i^2 / sin^2 serves.
 */
export function alphaTightBox(side: StableSide, first: NonNullable<PanelSide["box"]>): NonNullable<PanelSide["box"]> {
  const f = side.factors!;
  const alpha = side.alpha;
  const a3 = Math.abs(alpha * alpha * alpha - 1);
  const bA: Box = { rLo: 0, rHi: 0, iMax: 0 };
  const bB: Box = { rLo: 0, rHi: 0, iMax: 0 };
  const c: Centre = { lv: 0, d: 0, elv: 0, ed: 0 };
  const lo = [0, 0, 0];
  const hi = [0, 0, 0];
  return (from, x1, x2, Y, out) => {
    const okA = first(from, x1, x2, Y, bA);
    let okB = false;
    const fs = (from === 0) === f.lowIsLeft ? f.left : f.right;
    let inside = x1 > 0 && Y >= 0;
    for (let i = 0; i < 3 && inside; i++) {
      const [p, q] = fs[i];
      const e1 = p + q * x1;
      const e2 = p + q * x2;
      // the phases' rounding: a few eps of their size
      const r = 4 * EPS * (Math.abs(p) + Math.abs(q) * x2);
      lo[i] = Math.min(e1, e2) - r;
      hi[i] = Math.max(e1, e2) + r;
      inside = lo[i] > 0 && hi[i] < Math.PI;
    }
    if (inside) {
      const m = 0.5 * (x1 + x2);
      let lv = f.K;
      let d = 0;
      let mag = Math.abs(f.K);
      let ed = 0;
      let elv = 0;
      let plain = 0;
      const s = [0, 0, 0];
      for (let i = 0; i < 3; i++) {
        const [p, q, co] = fs[i];
        const ph = p + q * m;
        const sn = Math.sin(ph);
        const ct = Math.cos(ph) / sn;
        const l = co * Math.log(sn);
        lv += l;
        d += co * q * ct;
        // the phase's rounding (2 eps of |p| + |q m|) moves log sin by cot times it and cot by csc^2 times it
        const dph = 2 * EPS * (Math.abs(p) + Math.abs(q * m));
        mag += Math.abs(l);
        elv += Math.abs(co) * (Math.abs(ct) * dph + 2 * EPS);
        ed += Math.abs(co * q) * (4 * EPS * Math.abs(ct) + dph / (sn * sn));
        s[i] = sinMin(lo[i], hi[i]) * (1 - 4 * EPS);
        plain += (Math.abs(co) * q * q) / (s[i] * s[i]);
      }
      // the segment between phi_1 and phi_2 (same u): real parts in the hull of their ranges, |Im| <= max(1, alpha) Y
      const hLo = Math.min(lo[0], lo[1]);
      const hHi = Math.max(hi[0], hi[1]);
      let paired = Infinity;
      if (hLo > 0 && hHi < Math.PI) {
        const sh = sinMin(hLo, hHi) * (1 - 4 * EPS);
        const dphi = Math.abs(fs[1][0] - fs[0][0]) + Math.abs(alpha - 1) * Math.hypot(x2, Y);
        const q3 = fs[2][1];
        paired =
          Math.abs(fs[0][2]) * (a3 / (s[1] * s[1]) + (dphi * 2 * Math.cosh(Math.max(1, alpha) * Y)) / (sh * sh * sh)) + (q3 * q3) / (s[2] * s[2]);
      }
      c.lv = lv;
      c.d = d;
      c.elv = elv + 8 * EPS * mag;
      c.ed = ed + 8 * EPS * Math.abs(d);
      okB = centred(c, 0.5 * (x2 - x1) + 2 * EPS * m, Y, Math.min(plain, paired) * (1 + 16 * EPS), bB);
    }
    return intersect(okA ? bA : null, okB ? bB : null, out);
  };
}
