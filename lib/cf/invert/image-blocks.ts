import type { PowerSide, PowerTail, PowerTerms } from "../direct/power-tail";
import type { DirectLaw } from "../direct/types";
import { imageLadder, type ImageScratch } from "./images";

/**
 * A term G's images (./images.ts) at many points x in [xLo, xHi] from a few nodes c_k = xLo + k w, k = 0..B, when the
 * period T is long beside the span: the images' shares I_C(x) (cdf) and I_P(x) (pdf) are smooth there, with I_C' = I_P
 * (d/dx of sum_m (-1)^(m+1) [S(x + mT) - F(x - mT)] is sum_m (-1)^m [f(x + mT) + f(x - mT)]) and
 * |I_P''| <= S_2, S_2 = sum_{m >= 1} sup |f''| over the images of [xLo, xHi] (G's power-law majorants,
 * ../direct/power-tail.ts; each side's terms fall in m: the first plus the integral of the rest over the spacing T).
 * With A the accelerated values at the nodes and e their bounds, on the cell [c0, c1] holding x (common practice: the
 * linear interpolant's error (s - c0)(c1 - s)/2 |I_P''| at most):
 *   pdf: linear interpolation L of A_P between c0 and c1, within max e_P + (w^2/8) S_2;
 *   cdf: A_C(c) + int_c^x L, c the cell's end nearer x (I_C' = I_P), within e_C(c) + |x - c| max e_P + (w^3/24) S_2
 *   (int_0^{w/2} s (w - s)/2 ds = w^3/24).
 * B is the least count that brings the interpolation parts within `target`; null where the majorants do not reach the images
 * (an image of the span inside a side's window, or across a support's end) or where the nodes would not be fewer than
 * the points (the pointwise images serve then).
 */
export function blockImages(
  law: DirectLaw,
  pts: ArrayLike<number>,
  xLo: number,
  xHi: number,
  T: number,
  target: number,
  s: ImageScratch,
  outCdf: Float64Array,
  outPdf: Float64Array,
): { errCdf: number; errPdf: number } | null {
  const tail = law.powerTail;
  if (!tail || !(xHi >= xLo) || !(target > 0)) return null;
  const S2 = imageMajorant(tail, 2, xLo, xHi, T);
  if (!Number.isFinite(S2)) return null;
  const W = xHi - xLo;
  // w^2/8 S_2 <= target and w^3/24 S_2 <= target
  const s2 = Math.max(S2, 1e-300);
  const B = W > 0 ? Math.max(1, Math.ceil(W / Math.min(Math.sqrt((8 * target) / s2), Math.cbrt((24 * target) / s2)))) : 0;
  if (!(B + 1 < pts.length)) return null;
  const w = B > 0 ? W / B : 0;
  const vc = new Float64Array(B + 1);
  const vp = new Float64Array(B + 1);
  const ec = new Float64Array(B + 1);
  const ep = new Float64Array(B + 1);
  for (let k = 0; k <= B; k++) {
    const im = imageLadder(law, k === B ? xHi : xLo + k * w, T, 1, s)[0];
    vc[k] = im.cdf;
    vp[k] = im.pdf;
    ec[k] = im.errCdf;
    ep[k] = im.errPdf;
  }
  const U = Number.EPSILON;
  const tC = ((w * w * w) / 24) * S2;
  const tP = ((w * w) / 8) * S2;
  let errCdf = 0;
  let errPdf = 0;
  for (let i = 0; i < pts.length; i++) {
    const x = pts[i];
    // the node's position and x - c within a few ulps of the span: the slope times that
    const u = B > 0 ? Math.min(B, Math.max(0, (x - xLo) / w)) : 0;
    const k0 = Math.min(B - 1, Math.floor(u));
    const dx = 8 * U * (Math.abs(xLo) + Math.abs(xHi) + W);
    let vP: number;
    let eP: number;
    if (B > 0) {
      const th = Math.min(1, Math.max(0, u - k0));
      // the cdf from the cell's nearer end: int_c^x L = w [p0 s + (p1 - p0) s^2 / 2] between th_c and th (th_c = 0 or 1)
      const near = th <= 0.5 ? k0 : k0 + 1;
      const tc = near - k0;
      const p0 = vp[k0];
      const dp = vp[k0 + 1] - p0;
      const F = (t: number) => w * t * (p0 + (dp * t) / 2);
      const I = F(th) - F(tc);
      outCdf[i] = vc[near] + I;
      // the node's and x's places each off by dx (the slope |I_P| <= max |A_P| + max e_P + (w^2/8) S_2 on the cell, times
      // dx each), the integral's and the sum's rounding (a few ulps of their terms' sizes)
      const ePm = Math.max(ep[k0], ep[k0 + 1]);
      const slope = Math.max(Math.abs(p0), Math.abs(vp[k0 + 1])) + ePm + tP;
      const eC =
        ec[near] + Math.abs(th - tc) * w * ePm + tC + 2 * dx * slope + 16 * U * (Math.abs(vc[near]) + w * (Math.abs(p0) + Math.abs(dp)) + Math.abs(I));
      errCdf = Math.max(errCdf, eC);
      vP = (1 - th) * vp[k0] + th * vp[k0 + 1];
      // the weights' rounding, and th off by dx / w (x's place among the nodes): the nodes' difference times that
      eP = Math.max(ep[k0], ep[k0 + 1]) + tP + 8 * U * (Math.abs(vp[k0]) + Math.abs(vp[k0 + 1])) + (dx / w) * Math.abs(vp[k0 + 1] - vp[k0]);
    } else {
      outCdf[i] = vc[0];
      errCdf = Math.max(errCdf, ec[0]);
      vP = vp[0];
      eP = ep[0];
    }
    outPdf[i] = vP;
    errPdf = Math.max(errPdf, eP);
  }
  return { errCdf: errCdf * (1 + 1e-12), errPdf: errPdf * (1 + 1e-12) };
}

/**
 * sum_{m >= 1} of sup |f^(j)| over the images [xLo + mT, xHi + mT] and [xLo - mT, xHi - mT] from the majorants, their
 * distances taken inward by a few ulps; Infinity where a side's first image is not inside its majorants' reach.
 */
export function imageMajorant(tail: PowerTail, j: 1 | 2, xLo: number, xHi: number, T: number): number {
  const slack = (y: number, o: number) => 8 * Number.EPSILON * (Math.abs(y) + Math.abs(o) + T);
  const side = (sd: PowerSide, y: number, dir: 1 | -1): number => {
    if ("end" in sd) {
      // the images of the span lie wholly past the support's end, where f = 0: none there
      const z = dir * (y - sd.end) - slack(y, sd.end);
      return z > 0 ? 0 : Infinity;
    }
    const z1 = dir * (y - sd.origin) - slack(y, sd.origin);
    if (!(z1 >= sd.from) || !(z1 > 0)) return Infinity;
    return seriesBound(sd.d[j], z1, T);
  };
  // the nearest images: xLo + T on the right (its tail side), xHi - T on the left
  return (side(tail.right, xLo + T, 1) + side(tail.left, xHi - T, -1)) * (1 + 8 * Number.EPSILON);
}

/** sum_{m >= 0} M(z1 + m T) <= M(z1) + (1/T) int_{z1}^inf M for M = sum a z^-p falling in z (p > 1) */
function seriesBound(t: PowerTerms, z1: number, T: number): number {
  let s = 0;
  for (let i = 0; i < t.a.length; i++) {
    if (!(t.p[i] > 1)) return Infinity;
    s += t.a[i] * Math.pow(z1, -t.p[i]) + (t.a[i] * Math.pow(z1, 1 - t.p[i])) / ((t.p[i] - 1) * T);
  }
  return s * (1 + 8 * (t.a.length + 2) * Number.EPSILON);
}

/**
 * Each law's images at x + m T (m != 0) taken out of the period's sums at the points (cdf and sf, and pdf where asked):
 * from blocks where blockImages applies (their bound tol / 4096 per block), else point by point from the image ladder.
 * Returns the bounds left on what was taken out, the largest over the points, summed over the laws.
 */
export function subtractImages(
  laws: readonly DirectLaw[],
  pts: ArrayLike<number>,
  xLo: number,
  xHi: number,
  T: number,
  tol: number,
  scratch: ImageScratch,
  imgC: Float64Array,
  imgP: Float64Array,
  cdf: Float64Array,
  sf: Float64Array,
  pdf: Float64Array | null,
): { errCdf: number; errPdf: number } {
  const n = cdf.length;
  let lC = 0;
  let lP = 0;
  for (const law of laws) {
    const blk = xLo < xHi ? blockImages(law, pts, xLo, xHi, T, tol / 4096, scratch, imgC, imgP) : null;
    if (blk) {
      for (let i = 0; i < n; i++) {
        cdf[i] -= imgC[i];
        sf[i] += imgC[i];
        if (pdf) pdf[i] -= imgP[i];
      }
      lC += blk.errCdf;
      lP += blk.errPdf;
    } else {
      let eC = 0;
      let eP = 0;
      for (let i = 0; i < n; i++) {
        const im = imageLadder(law, pts[i], T, 1, scratch)[0];
        cdf[i] -= im.cdf;
        sf[i] += im.cdf;
        if (pdf) pdf[i] -= im.pdf;
        eC = Math.max(eC, im.errCdf);
        eP = Math.max(eP, im.errPdf);
      }
      lC += eC;
      lP += eP;
    }
  }
  return { errCdf: lC, errPdf: lP };
}
