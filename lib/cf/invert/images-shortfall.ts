import type { DirectLaw, DirectPoint } from "../direct/types";
import { alternatingBracket, CVZ, cvz, farEnd, N, type ImageScratch } from "./images";

/**
 * G's images in the mid-point sum for E|X - q| (./shortfall.ts), as ./images.ts does for the pointwise sums: the
 * stop-loss transforms pi(q + mT) and pi^-(q - mT) summed by the same acceleration, with a derived truncation bound
 * (the law's completely monotone split integrated outward, or the brackets: pi is non-increasing and convex in the
 * distance for every law, pi'' = f >= 0). Each transform comes from the law's own (DirectLaw.stopLoss) or, failing
 * that, from a Gauss-Laguerre rule whose error is only estimated (inside the ES route's Richardson extrapolation, whose
 * answer says its bound is partly estimated: RICHARDSON_ESTIMATE_NOTE).
 */

/** Gauss-Laguerre rule (weight e^-r on [0, inf)) of n nodes by Newton on L_n from the usual starting guesses (Press et
 *  al., Numerical Recipes, 3rd ed., sec. 4.6, gaulag). */
function laguerreRule(n: number): { r: Float64Array; w: Float64Array } {
  const r = new Float64Array(n);
  const w = new Float64Array(n);
  let z = 0;
  for (let i = 0; i < n; i++) {
    if (i === 0) z = 3 / (1 + 2.4 * n);
    else if (i === 1) z += 15 / (1 + 2.5 * n);
    else z += ((1 + 2.55 * (i - 1)) / (1.9 * (i - 1))) * (z - r[i - 2]);
    let pp = 0;
    let p2 = 0;
    for (let it = 0; it < 100; it++) {
      let p1 = 1;
      p2 = 0;
      for (let j = 0; j < n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j + 1 - z) * p2 - j * p3) / (j + 1);
      }
      pp = (n * p1 - n * p2) / z;
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) <= 1e-15 * z) break;
    }
    r[i] = z;
    w[i] = -1 / (pp * n * p2);
  }
  return { r, w };
}

const LAG_HI = laguerreRule(16);
const LAG_LO = laguerreRule(10);

/**
 * pi(c) = int_c^inf S(y) dy (side 1) or int_-inf^c F(y) dy (side -1) from the law's own stop-loss transform, or on the
 * left of a law with a lower end lo from the upper one: int_lo^c F = (c - lo) - pi(lo) + pi(c) (derived). Else, far in
 * a tail of power index `index`: with y = center + side d e^s (d = |c - center|) and r = (index - 1) s the integrand
 * times e^r is close to constant for a power tail, so a Gauss-Laguerre rule integrates it; its error is estimated as the
 * difference between the 16- and 10-node rules plus the law's own bounds (an estimate).
 */
function stopLoss(law: DirectLaw, c: number, side: 1 | -1, index: number, center: number, pt: DirectPoint): { v: number; e: number } {
  const end = side === 1 ? law.support[1] : law.support[0];
  if (side * (c - end) >= 0) return { v: 0, e: 0 };
  const own = law.stopLoss?.(c, side);
  if (own) return own;
  if (side === -1 && Number.isFinite(end)) {
    const atLo = law.stopLoss?.(end, 1);
    const atC = law.stopLoss?.(c, 1);
    if (atLo && atC) {
      const d = c - end;
      const v = Math.max(d - atLo.v + atC.v, 0);
      return { v, e: atLo.e + atC.e + 4 * Number.EPSILON * (d + atLo.v + atC.v) };
    }
  }
  const d = Math.abs(c - center);
  const beta = Number.isFinite(index) ? Math.max(index - 1, 0.05) : 1;
  const rule = (R: { r: Float64Array; w: Float64Array }) => {
    let v = 0;
    let e = 0;
    for (let i = 0; i < R.r.length; i++) {
      const g = Math.exp(R.r[i] / beta);
      law.at(center + side * d * g, pt);
      const tail = side === 1 ? pt.sf : pt.cdf;
      const te = side === 1 ? pt.sfErr : pt.cdfErr;
      const f = g * Math.exp(R.r[i]);
      v += R.w[i] * tail * f;
      e += R.w[i] * te * f;
    }
    return { v: (d / beta) * v, e: (d / beta) * e };
  };
  const hi = rule(LAG_HI);
  const lo = rule(LAG_LO);
  return { v: hi.v, e: Math.abs(hi.v - lo.v) + hi.e + 4 * Number.EPSILON * Math.abs(hi.v) };
}

/**
 * G's share of the mid-point sum for E|X - q| (./shortfall.ts), which equals E[tri_T(X - q)] with the triangle wave of
 * period 2T: tri_T(u) - |u| = 2 sum_{k >= 1} (-1)^k [(u - kT)^+ + (-u - kT)^+], so G's images add
 * 2 sum_{k >= 1} (-1)^k [pi_G(q + kT) + pi^-_G(q - kT)].
 */
export function shortfallImages(
  law: DirectLaw,
  tails: { left: number; right: number },
  q: number,
  T: number,
  s: ImageScratch,
): { value: number; error: number } {
  const { a, pt } = s;
  const [tU, tD] = s.t;
  const [eU, eD] = s.et;
  let e = 0;
  for (let k = 0; k < N; k++) {
    const m = k + 1;
    const up = stopLoss(law, q + m * T, 1, tails.right, law.center, pt);
    const dn = stopLoss(law, q - m * T, -1, tails.left, law.center, pt);
    tU[k] = up.v;
    tD[k] = dn.v;
    eU[k] = up.e;
    eD[k] = dn.e;
    a[k] = up.v + dn.v;
    e += Math.abs(CVZ.w[k]) * (up.e + dn.e);
  }
  // per side: the split's stop-loss size at the first image over d_n, or the convex bracket
  let trunc = 0;
  for (const [side, t, et] of [[1, tU, eU], [-1, tD, eD]] as const) {
    const split = law.monotoneSplit?.(q + side * T, side, T, true);
    const viaSplit = split ? split.stopLoss * CVZ.invD + 2 * split.restStopLoss : Infinity;
    trunc += viaSplit < Infinity ? viaSplit : farEnd(cvz(t).v, alternatingBracket(t, et, true));
  }
  const r = cvz(a);
  return { value: -2 * r.v, error: 2 * (e + trunc + 2 * r.round) * (1 + 4 * Number.EPSILON) };
}
