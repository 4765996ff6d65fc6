import { modeRange } from "../direct/shortfall-mode";
import { directPoint, type DirectLaw, type DirectPoint } from "../direct/types";

/**
 * The aliasing of the mid-point Gil-Pelaez sums (./pointwise.ts) that one term G of a sum contributes, from G's own
 * law. With period T the sums invert the law periodised with alternating signs:
 *   F_h(x) = F(x) + sum_{m >= 1} (-1)^{m+1} [S(x + mT) - F(x - mT)],   f_h(x) = sum_m (-1)^m f(x + mT),
 * and both are linear in the law, so the images of G can be taken out of the sums of the whole sum X = G + rest
 * exactly where G has a direct law. What is left aliases like X - G, whose tails are lighter (see TailTerm), and the
 * CF of X (not X minus G, whose CF may fall off like 1/t, e.g. a pareto) is what is summed.
 *
 * Each side's alternating series (S(x + mT), F(x - mT), the densities) is summed by the acceleration of Cohen,
 * Rodriguez Villegas & Zagier (2000), Experimental Mathematics 9(1), Algorithm 1, with n = N terms. Its error, derived:
 *  - where the law splits its tail into completely monotone parts (DirectLaw.monotoneSplit), the terms from the first
 *    image outward are a signed moment sequence int t^k dmu(t) on [0, 1] (Bernstein's theorem), and the theorem of that
 *    paper (Proposition 1: S - S_n = int P_n(t)/(1 + t) dmu / d_n, |P_n| <= 1 on [0, 1]) bounds it by the split's
 *    size at the first image over d_n = T_n(3) (about 5.8^n); a remainder R beside the split (a stable law's tail
 *    series) adds at most twice sum_m |R| at the images (once in the series, once in the weighted sum);
 *  - else by the alternating series test: the tail terms are non-increasing in m for every law, so the partial sums
 *    bracket the limit; beyond the mode (DirectLaw.mode, or the interval ../direct/shortfall.ts derives for a unimodal
 *    law) S and F are convex in the distance, and the rest after n - 2 terms lies between half the next term and that
 *    plus half the next difference; the densities are non-increasing there (no mode known: no bound). The error is the
 *    accelerated value's distance to the far end of the bracket.
 * Plus the law's own bounds (every weight is at most 1 in size), the rounding of the weights and of the sums, and the
 * rounding of the image points (the tails move by the density times it).
 */

export const N = 22;

/**
 * The weights c_k / d_n of Algorithm 1 (n = N; the sum is sum_k w_k a_k, signs included), from the integers
 * d_n = T_n(3) and c_k = b_k - c_{k-1}, c_{-1} = -d_n, b_k = (-1)^{k+1} n/(n + k) C(n + k, 2k) 4^k computed exactly;
 * each weight is within 3.01 u of its size (two conversions and a quotient).
 */
function cvzWeights(n: number): { w: Float64Array; invD: number } {
  let t0 = 1n;
  let t1 = 3n;
  for (let k = 1; k < n; k++) [t0, t1] = [t1, 6n * t1 - t0];
  const d = t1;
  const w = new Float64Array(n);
  let b = -1n;
  let c = -d;
  for (let k = 0; k < n; k++) {
    c = b - c;
    w[k] = Number(c) / Number(d);
    b = (2n * BigInt(k + n) * BigInt(k - n) * b) / BigInt((2 * k + 1) * (k + 1));
  }
  // 1/d_n rounded up
  return { w, invD: (1 / Number(d)) * (1 + 4 * Number.EPSILON) };
}

export const CVZ = cvzWeights(N);

/** sum_k w_k a_k and the bound on its rounding: the weights' 3.01 u and the sum's (N + 1) u of sum |a_k| (|w_k| <= 1) */
export function cvz(a: Float64Array): { v: number; round: number } {
  const { w } = CVZ;
  let s = 0;
  let abs = 0;
  for (let k = 0; k < N; k++) {
    s += w[k] * a[k];
    abs += Math.abs(a[k]);
  }
  return { v: s, round: (N + 6) * Number.EPSILON * abs };
}

/**
 * [lo, hi] holding sum_{m >= 1} (-1)^{m+1} t_m from t_1..t_N (t[k] = t_{k+1}, each within e[k], all non-negative):
 * with `convex` (t non-increasing and convex from t_{N-1} on) the rest after N - 2 terms is (-1)^N r, r in
 * [t_{N-1}/2, t_{N-1} - t_N/2]; else (t non-increasing from t_N on) the rest after N - 1 terms is (-1)^(N-1) r, r in
 * [0, t_N] (Knopp, Theory and Application of Infinite Series, sec. 82: the alternating series test; the convex case
 * averages two such rests: r + r' = t_{M+1} and 0 <= r - r' <= t_{M+1} - t_{M+2}).
 */
export function alternatingBracket(t: Float64Array, e: Float64Array, convex: boolean): [number, number] {
  const M = convex ? N - 2 : N - 1;
  let p = 0;
  let abs = 0;
  let err = 0;
  for (let k = 0; k < M; k++) {
    p += k % 2 === 0 ? t[k] : -t[k];
    abs += Math.abs(t[k]);
    err += e[k];
  }
  const rLo = convex ? t[N - 2] / 2 : 0;
  const rHi = convex ? t[N - 2] - t[N - 1] / 2 : t[N - 1];
  err += convex ? e[N - 2] + e[N - 1] : e[N - 1];
  const sg = M % 2 === 0 ? 1 : -1;
  const slack = err + 2 * (N + 2) * Number.EPSILON * (abs + Math.abs(t[N - 2]) + Math.abs(t[N - 1]));
  return [p + Math.min(sg * rLo, sg * rHi) - slack, p + Math.max(sg * rLo, sg * rHi) + slack];
}

/** |v - true| for a value v of a series whose limit lies in [lo, hi] */
export function farEnd(v: number, [lo, hi]: [number, number]): number {
  return Math.max(v - lo, hi - v, 0);
}

export interface ImageSums {
  /** the images' share of F_h(x) (and minus their share of S_h(x)) */
  cdf: number;
  /** the images' share of f_h(x) */
  pdf: number;
  errCdf: number;
  errPdf: number;
}

export interface ImageScratch {
  a: Float64Array;
  b: Float64Array;
  /** per side: tails, densities and their bounds at the N images of one level */
  t: Float64Array[];
  f: Float64Array[];
  et: Float64Array[];
  ef: Float64Array[];
  pt: DirectPoint;
  /** imageLadder's per-offset values (eight per offset) and which offsets are filled */
  by?: Float64Array;
  seen?: Uint8Array;
}

export function imageScratch(): ImageScratch {
  const four = () => [new Float64Array(N), new Float64Array(N)];
  return { a: new Float64Array(N), b: new Float64Array(N), t: four(), f: four(), et: four(), ef: four(), pt: directPoint() };
}

/**
 * The truncation bound of one side's accelerated sums (cdf part and pdf part) at period T: from the law's completely
 * monotone split at the first image y1 when it has one, else from the brackets (see the module notes).
 */
function sideBound(law: DirectLaw, side: 1 | -1, x: number, T: number, s: ImageScratch, i: number): { c: number; p: number } {
  const split = law.monotoneSplit?.(x + side * T, side, T, false);
  let c = split ? split.tail * CVZ.invD + 2 * split.restTail : Infinity;
  let p = split ? split.pdf * CVZ.invD + 2 * split.restPdf : Infinity;
  // the brackets only where the split gives no finite bound (the mode of a law without a closed-form one costs a search)
  if (c < Infinity && p < Infinity) return { c, p };
  const [mLo, mHi] = modeRange(law);
  // distance outward of the image m from the mode: convex (tails) or monotone (densities) from there on
  const beyond = (m: number) => (side === 1 ? x + m * T >= mHi : x - m * T <= mLo);
  if (!(c < Infinity)) c = farEnd(cvz(s.t[i]).v, alternatingBracket(s.t[i], s.et[i], beyond(N - 1)));
  if (!(p < Infinity) && beyond(N)) p = farEnd(cvz(s.f[i]).v, alternatingBracket(s.f[i], s.ef[i], false));
  return { c, p };
}

/**
 * G's images at x for the periods T0 2^l, l < levels (the period-doubling ladder of ./heavy.ts). The image at
 * x + m T0 2^l is the one at x + (m 2^l) T0 (the same floating-point offset: scaling by 2^l is exact), so each offset
 * is evaluated once for all levels: N + (levels - 1) N/2 law evaluations per side instead of levels N. Each level's
 * sums are those of the single-period form, term for term.
 */
export function imageLadder(law: DirectLaw, x: number, T0: number, levels: number, s: ImageScratch): ImageSums[] {
  const { a, b, pt } = s;
  const top = N << (levels - 1);
  if (!s.by || s.by.length < 8 * (top + 1)) s.by = new Float64Array(8 * (top + 1));
  if (!s.seen || s.seen.length < top + 1) s.seen = new Uint8Array(top + 1);
  const by = s.by;
  const seen = s.seen;
  seen.fill(0, 0, top + 1);
  const out: ImageSums[] = [];
  for (let l = 0; l < levels; l++) {
    let eC = 0;
    let eP = 0;
    for (let k = 0; k < N; k++) {
      const n = (k + 1) << l;
      const o = 8 * n;
      if (!seen[n]) {
        // the image points x +- n T0 and the sums' own period 2 pi / h are each within a few ulps of the exact ones:
        // the tails move by the density times that
        const dy = 4 * Number.EPSILON * (Math.abs(x) + 2 * Math.abs(n * T0));
        law.at(x + n * T0, pt);
        by[o] = pt.sf;
        by[o + 1] = pt.pdf;
        by[o + 2] = pt.sfErr + (pt.pdf + pt.pdfErr) * dy;
        by[o + 3] = pt.pdfErr;
        law.at(x - n * T0, pt);
        by[o + 4] = pt.cdf;
        by[o + 5] = pt.pdf;
        by[o + 6] = pt.cdfErr + (pt.pdf + pt.pdfErr) * dy;
        by[o + 7] = pt.pdfErr;
        seen[n] = 1;
      }
      for (let i = 0; i < 2; i++) {
        s.t[i][k] = by[o + 4 * i];
        s.f[i][k] = by[o + 4 * i + 1];
        s.et[i][k] = by[o + 4 * i + 2];
        s.ef[i][k] = by[o + 4 * i + 3];
      }
      const w = Math.abs(CVZ.w[k]);
      eC += w * (by[o + 2] + by[o + 6]);
      eP += w * (by[o + 3] + by[o + 7]);
      a[k] = by[o] - by[o + 4];
      b[k] = by[o + 1] + by[o + 5];
    }
    const T = T0 * 2 ** l;
    const up = sideBound(law, 1, x, T, s, 0);
    const dn = sideBound(law, -1, x, T, s, 1);
    const c1 = cvz(a);
    const p1 = cvz(b);
    // a_k's own rounding (the difference) counts with the sums'
    out.push({
      cdf: c1.v,
      pdf: -p1.v,
      errCdf: (eC + up.c + dn.c + 2 * c1.round) * (1 + 4 * Number.EPSILON),
      errPdf: (eP + up.p + dn.p + 2 * p1.round) * (1 + 4 * Number.EPSILON),
    });
  }
  return out;
}

