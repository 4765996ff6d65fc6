import { directPoint, type DirectLaw, type DirectPoint } from "../direct/types";

/**
 * The aliasing of the mid-point Gil-Pelaez sums (./pointwise.ts) that one term G of a sum contributes, from G's own
 * law. With period T the sums invert the law periodised with alternating signs:
 *   F_h(x) = F(x) + sum_{m >= 1} (-1)^{m+1} [S(x + mT) - F(x - mT)],   f_h(x) = sum_m (-1)^m f(x + mT),
 * and both are linear in the law, so the images of G can be taken out of the sums of the whole sum X = G + rest
 * exactly where G has a direct law. What is left aliases like X - G, whose tails are lighter (see TailTerm), and the
 * CF of X (not X minus G, whose CF may fall off like 1/t, e.g. a pareto) is what is summed.
 *
 * The alternating series have terms that are smooth and monotone in m far out (power tails): they are summed by the
 * acceleration of Cohen, Rodriguez Villegas & Zagier (2000), Experimental Mathematics 9(1), Algorithm 1, which converges
 * like 5.8^-n for moments of a positive measure (e.g. (m + c)^-alpha). Error estimate: the difference between n = N and
 * n = N - 6 terms, plus the direct law's own bounds (every weight of the algorithm is at most 1 in size).
 */

const N = 22;
const N_LO = 16;

function cvz(a: Float64Array, n: number): number {
  let d = Math.pow(3 + Math.sqrt(8), n);
  d = (d + 1 / d) / 2;
  let b = -1;
  let c = -d;
  let s = 0;
  for (let k = 0; k < n; k++) {
    c = b - c;
    s += c * a[k];
    b = ((k + n) * (k - n) * b) / ((k + 0.5) * (k + 1));
  }
  return s / d;
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
  pt: DirectPoint;
  /** imageLadder's per-offset values (six per offset) and which offsets are filled */
  by?: Float64Array;
  seen?: Uint8Array;
}

export function imageScratch(): ImageScratch {
  return { a: new Float64Array(N), b: new Float64Array(N), pt: directPoint() };
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
  if (!s.by || s.by.length < 6 * (top + 1)) s.by = new Float64Array(6 * (top + 1));
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
      const o = 6 * n;
      if (!seen[n]) {
        law.at(x + n * T0, pt);
        by[o] = pt.sf;
        by[o + 1] = pt.pdf;
        by[o + 2] = pt.sfErr;
        by[o + 3] = pt.pdfErr;
        law.at(x - n * T0, pt);
        by[o] -= pt.cdf;
        by[o + 1] += pt.pdf;
        by[o + 4] = pt.cdfErr;
        by[o + 5] = pt.pdfErr;
        seen[n] = 1;
      }
      eC += by[o + 2];
      eP += by[o + 3];
      eC += by[o + 4];
      eP += by[o + 5];
      a[k] = by[o];
      b[k] = by[o + 1];
    }
    const c1 = cvz(a, N);
    const p1 = -cvz(b, N);
    const c0 = cvz(a, N_LO);
    const p0 = -cvz(b, N_LO);
    out.push({
      cdf: c1,
      pdf: p1,
      errCdf: Math.abs(c1 - c0) + eC + 4 * Number.EPSILON * Math.abs(a[0]),
      errPdf: Math.abs(p1 - p0) + eP + 4 * Number.EPSILON * Math.abs(b[0]),
    });
  }
  return out;
}

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
 * pi(c) = int_c^inf S(y) dy (side 1, c right of `center`) or int_-inf^c F(y) dy (side -1, c left of it) far in a tail
 * of power index `index`: with y = center + side d e^s (d = |c - center|) and r = (index - 1) s the integrand times e^r is
 * close to constant for a power tail, so a Gauss-Laguerre rule integrates it; the estimate is the difference between
 * the 16- and 10-node rules plus the law's own bounds. A law with its own stop-loss transform at c (DirectLaw.stopLoss)
 * answers from it.
 */
function stopLoss(law: DirectLaw, c: number, side: 1 | -1, index: number, center: number, pt: DirectPoint): { v: number; e: number } {
  const end = side === 1 ? law.support[1] : law.support[0];
  if (side * (c - end) >= 0) return { v: 0, e: 0 };
  const own = law.stopLoss?.(c, side);
  if (own) return own;
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
 * 2 sum_{k >= 1} (-1)^k [pi_G(q + kT) + pi^-_G(q - kT)], summed by the same acceleration as above.
 */
export function shortfallImages(
  law: DirectLaw,
  tails: { left: number; right: number },
  q: number,
  T: number,
  s: ImageScratch,
): { value: number; error: number } {
  const { a, pt } = s;
  let e = 0;
  for (let k = 0; k < N; k++) {
    const m = k + 1;
    const up = stopLoss(law, q + m * T, 1, tails.right, law.center, pt);
    const dn = stopLoss(law, q - m * T, -1, tails.left, law.center, pt);
    a[k] = up.v + dn.v;
    e += up.e + dn.e;
  }
  const v1 = -2 * cvz(a, N);
  const v0 = -2 * cvz(a, N_LO);
  return { value: v1, error: Math.abs(v1 - v0) + 2 * e + 8 * Number.EPSILON * Math.abs(a[0]) };
}
