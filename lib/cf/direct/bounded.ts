import erfc from "@stdlib/math-base-special-erfc";
import betaincinv from "@stdlib/math-base-special-betaincinv";
import normalQuantile from "@stdlib/stats-base-dists-normal-quantile";
import { incBetaBounded, incBetaShape } from "../families/incbeta-bounded";
import type { DirectLaw } from "./types";
import { bounds, ELEM, EPS, law, SQRT2PI, withMode } from "./law";

/**
 * Direct laws of the bounded and truncated families: beta on [a, b] (and PERT, a beta), triangular, truncated normal.
 * Error bounds as in ./families.ts: the incomplete beta's derived bounds (../families/incbeta-bounded.ts), ELEM for
 * erfc and elementary forms, plus the density times the rounding of the argument.
 */

const BETA_SHAPE_MAX = 1e4;
const U = EPS / 2;
/** the incomplete beta's budget of terms for the rare point past its default (about 2 ms) */
const LONG = 1e6;

/**
 * Beta(alpha, beta) on [a, b]: F(x) = I_z(alpha, beta), z = (x - a)/(b - a) (JKB vol. 2, ch. 25, eq. 25.2). The
 * complement y = (b - x)/(b - a) is formed directly too and the series runs in z below the mean, in y above it
 * (S = I_y(beta, alpha), A&S 26.5.2), which keeps relative accuracy next to b. Quantile searches start from stdlib's
 * inverse incomplete beta, in z below the median and in y above it (./answer.ts brackets them with the bounded cdf).
 */
/**
 * The beta law's mode on [a, b]: a + (b - a)(alpha - 1)/(alpha + beta - 2) for both shapes >= 1 (the midpoint for the
 * uniform), a for a falling density (alpha < 1 <= beta), b for a rising one; none for a U-shaped law (JKB vol. 2, ch. 25)
 */
function betaMode(alpha: number, beta: number, a: number, b: number): number {
  if (alpha >= 1 && beta >= 1) return alpha + beta > 2 ? a + ((b - a) * (alpha - 1)) / (alpha + beta - 2) : (a + b) / 2;
  if (alpha < 1 && beta >= 1) return a;
  if (alpha >= 1 && beta < 1) return b;
  return NaN;
}

export function betaDirect(alpha: number, beta: number, a: number, b: number, name = "beta"): DirectLaw | null {
  // the incomplete beta's series grow with the shapes (near their square root at the mean); above, the CF route answers
  if (!(Math.max(alpha, beta) <= BETA_SHAPE_MAX)) return null;
  const w = b - a;
  const bs = incBetaShape(alpha, beta);
  const logB = bs.lB;
  const s = alpha + beta;
  const mean = a + (w * alpha) / s;
  const end = (shape: number, other: number) => (shape < 1 ? Infinity : shape === 1 ? other / w : 0); // f at the end: other / w = 1/(w B(1, other))
  return withMode(betaMode(alpha, beta, a, b), law(
    "special-function",
    [a, b],
    mean,
    w * Math.sqrt((alpha * beta) / (s * s * (s + 1))),
    (x, o) => {
      // x, a and b are doubles: x - a, b - x and w = b - a are each within one rounding, so z and y are each within
      // 3 roundings relative (not absolute: next to an end the argument keeps its relative accuracy, as the law does)
      const z = (x - a) / w;
      const y = (b - x) / w;
      const rz = 3.01 * EPS;
      if (z <= 0 || y <= 0) {
        const lower = z <= 0;
        o.cdf = lower ? 0 : 1;
        o.sf = lower ? 1 : 0;
        o.pdf = lower ? end(alpha, beta) : end(beta, alpha);
        o.cdfErr = o.sfErr = o.pdfErr = 0;
        return;
      }
      const lz = Math.log(z);
      const ly = Math.log(y);
      const t1 = (alpha - 1) * lz;
      const t2 = (beta - 1) * ly;
      const s12 = t1 + t2;
      const lp = s12 - logB;
      o.pdf = Math.exp(lp) / w;
      // log f: each shape minus 1, log and product 4u, the two sums u, log B's derived bound; exp and / w 3u; and it
      // moves by (alpha - 1) dz/z + (beta - 1) dy/y from the arguments' rounding
      const eLp = bs.eLB + U * (4 * Math.abs(t1) + 4 * Math.abs(t2) + Math.abs(s12) + Math.abs(lp));
      const rPdf = 1.01 * (Math.expm1(eLp) + 3 * U) + (Math.abs(alpha - 1) + Math.abs(beta - 1)) * 1.01 * rz;
      // F moves by f times the shift of the argument it was computed from, rz (x - a) or rz (b - x); over so short a
      // shift f changes by a factor below 1.01
      // the rare point past the default budget with a larger one (not met on a grid of shapes 0.05..1e4); past that,
      // only what is known: a probability in [0, 1]
      const r = incBetaBounded(bs, z, y, rz) ?? incBetaBounded(bs, z, y, rz, LONG);
      if (!r) {
        o.cdf = o.sf = o.cdfErr = o.sfErr = 0.5;
        o.pdfErr = rPdf * o.pdf;
        return;
      }
      o.cdf = r.v;
      o.sf = r.c;
      bounds(o, 0, rPdf, 1.01 * rz * (r.fromY ? y : z) * w);
      o.cdfErr += r.e;
      o.sfErr += r.ce;
    },
    (p) => (p <= 0.5 ? a + w * betaincinv(p, alpha, beta, false) : b - w * betaincinv(1 - p, beta, alpha, false)),
    `${name} cdf by the regularised incomplete beta function (positive series with derived bounds)`,
  ));
}

/** PERT(a, m, b, lambda): beta on [a, b] with alpha = 1 + lambda (m - a)/(b - a), beta = 1 + lambda (b - m)/(b - a) (Vose 2008, ch. 9). */
export function pertDirect(a: number, m: number, b: number, lambda: number): DirectLaw | null {
  return betaDirect(1 + (lambda * (m - a)) / (b - a), 1 + (lambda * (b - m)) / (b - a), a, b, "PERT (a beta)");
}

/**
 * Triangular(a, c, b) (JKB vol. 2, ch. 26, sec. 9): F = (x - a)^2 / ((b - a)(c - a)) up to c, S = (b - x)^2 /
 * ((b - a)(b - c)) from c. The complements are written as sums of nonnegative terms, e.g. for x >= c
 * F = ((b - c)(c - a) + (x - c)(2b - c - x)) / ((b - a)(b - c)), so that nothing cancels.
 */
export function triangularDirect(a: number, c: number, b: number): DirectLaw {
  const w = b - a;
  const left = c - a;
  const right = b - c;
  const scale = Math.max(Math.abs(a), Math.abs(b), Math.abs(c));
  return withMode(c, law(
    "closed-form",
    [a, b],
    (a + b + c) / 3,
    w / Math.sqrt(24),
    (x, o) => {
      if (x < c || (x === c && right === 0)) {
        const u = x - a;
        o.pdf = (2 * u) / (w * left);
        o.cdf = (u * u) / (w * left);
        o.sf = (left * right + (c - x) * (x + c - 2 * a)) / (w * left);
      } else {
        const v = b - x;
        o.pdf = right === 0 ? 2 / w : (2 * v) / (w * right);
        o.sf = right === 0 ? 0 : (v * v) / (w * right);
        o.cdf = right === 0 ? 1 : (right * left + (x - c) * (2 * b - c - x)) / (w * right);
      }
      // every difference of inputs is within 2 EPS (|x| + scale); each value then within 8 EPS relative
      bounds(o, ELEM, ELEM, 4 * EPS * (Math.abs(x) + scale));
      // the rounding of x also moves the density along its slope, at most 2 / (w min(c - a, b - c)) over the nonzero sides
      o.pdfErr += (8 * EPS * (Math.abs(x) + scale)) / (w * Math.min(left || Infinity, right || Infinity));
    },
    (p) => (p * w <= left ? a + Math.sqrt(p * w * left) : b - Math.sqrt((1 - p) * w * right)),
    "triangular cdf in closed form",
  ));
}

/** Standard normal lower tail Phi(t) = erfc(-t/sqrt 2)/2 (A&S 7.1.2, 26.2.29). */
const Phi = (t: number) => (t === -Infinity ? 0 : t === Infinity ? 1 : 0.5 * erfc(-t / Math.SQRT2));

/**
 * int_0^h phi(A + u) du for a short strip, q = h (|A| + 1) <= 0.1, where the difference Phi(A + h) - Phi(A) would cancel:
 * phi(A) sum_k c_k h^(k+1)/(k+1) with g(u) = phi(A + u)/phi(A) = exp(-A u - u^2/2) = sum c_k u^k, c_0 = 1, c_1 = -A,
 * c_(k+1) = -(A c_k + c_(k-1))/(k+1) (the Hermite recurrence, A&S 22.7.14). Cauchy's estimate on |u| = 1/(|A| + 1), where
 * |g| <= e^1.5, gives |c_k| <= e^1.5 (|A| + 1)^k: the terms after K are below e^1.5 h q^K/(1 - q).
 */
function strip(A: number, h: number): { v: number; e: number } {
  const q = h * (Math.abs(A) + 1);
  let c0 = 1;
  let c1 = -A;
  let sum = h;
  let abs = h;
  let hk = h;
  let k = 1;
  for (; k < 60; k++) {
    hk *= h;
    const t = (c1 * hk) / (k + 1);
    sum += t;
    abs += Math.abs(t);
    const c2 = -(A * c1 + c0) / (k + 1);
    c0 = c1;
    c1 = c2;
    if (4.49 * h * Math.pow(q, k + 1) / (1 - q) <= 1e-17 * Math.abs(sum)) break;
  }
  const phiA = Math.exp(-0.5 * A * A) / SQRT2PI;
  const v = phiA * sum;
  const e = phiA * (4.49 * h * Math.pow(q, k + 1) / (1 - q) + 4 * (k + 2) * EPS * abs) + v * (4 * EPS * (1 + A * A));
  return { v, e };
}

/**
 * N(mu, sigma^2) conditioned on [lower, upper] (JKB vol. 1, ch. 13, sec. 10.1): F(x) = (Phi(z) - Phi(alpha)) / Z,
 * Z = Phi(beta) - Phi(alpha), z = (x - mu)/sigma. A law in the upper tail (alpha > 0) works with upper tails
 * Q(t) = Phi(-t), so that nothing is subtracted from 1. Each Phi is within ELEM relative; a difference of two carries
 * ELEM times their sum, which is the bound (it is relative where the difference is not small against its terms).
 * Quantiles: z = Phi^{-1}(Phi(alpha) + p Z) by stdlib's normal quantile, then polished and bounded by the search.
 */
export function truncatedNormalDirect(mu: number, sigma: number, lower?: number, upper?: number): DirectLaw {
  const lo = lower ?? -Infinity;
  const hi = upper ?? Infinity;
  const al = (lo - mu) / sigma;
  const be = (hi - mu) / sigma;
  const flip = al > 0; // the whole interval in the upper tail: mirror it (t -> -t) and swap cdf and sf
  // in the mirrored frame the interval is [A, B] with B <= 0 or A < 0 < B
  const A = flip ? -be : al;
  const B = flip ? -al : be;
  const PA = Phi(A);
  const QB = Phi(-B);
  // Z = Phi(B) - Phi(A): from the lower tail when B <= 0, else 1 - Phi(A) - Q(B) (both <= 1/2 there)
  // a short interval (the difference would cancel) by the strip's series
  const short = (hi - lo) / sigma * (Math.max(Math.abs(A), Math.abs(B)) + 1) <= 0.1;
  const zs = short ? strip(A, (hi - lo) / sigma) : null;
  const Z = zs ? zs.v : B <= 0 ? Phi(B) - PA : 1 - PA - QB;
  const eZ = zs ? zs.e + zs.v * 4 * EPS * (Math.abs(hi) + Math.abs(lo)) / (hi - lo) : ELEM * (B <= 0 ? Phi(B) + PA : 1 + PA + QB);
  const logZ = Math.log(Z);
  const center = Math.min(Math.max(mu, lo), hi);
  const spread = Math.min(sigma, Number.isFinite(hi - lo) ? (hi - lo) / 2 : Infinity, al > 0 ? sigma / al : Infinity, be < 0 ? sigma / -be : Infinity);
  const dAbs = (x: number) => (2 * EPS * (Math.abs(x) + Math.abs(mu))) / sigma;
  // the rounding of a finite end's standardised value (end - mu)/sigma
  const dEnd = (end: number) => dAbs(end) + EPS * Math.abs((end - mu) / sigma);
  return withMode(center, law(
    "special-function",
    [lo, hi],
    center,
    spread,
    (x, o) => {
      const z = (x - mu) / sigma;
      const dz = dAbs(x) + EPS * Math.abs(z);
      const t = flip ? -z : z;
      // lower part L = Phi(t) - Phi(A) and upper part U = Phi(B) - Phi(t) in the mirrored frame, each with its error
      let L: number;
      let eL: number;
      let U: number;
      let eU: number;
      if (t <= 0) {
        const pt = Phi(t);
        L = pt - PA;
        eL = ELEM * (pt + PA);
        U = Z - L;
        eU = eL + eZ;
        if (B <= 0) {
          U = Phi(B) - pt;
          eU = ELEM * (Phi(B) + pt);
        }
      } else {
        const qt = Phi(-t);
        U = qt - QB;
        eU = ELEM * (qt + QB);
        L = Z - U;
        eL = eU + eZ;
      }
      // next to a finite end the difference of two Phi values cancels: the strip's series instead
      const hLo = Number.isFinite(A) ? (flip ? hi - x : x - lo) / sigma : Infinity;
      const hUp = Number.isFinite(B) ? (flip ? x - lo : hi - x) / sigma : Infinity;
      // x and the end are doubles, so the strip's width (x - end)/sigma is within 2 roundings relative; over the strip
      // phi changes by at most e^{q + q^2/2} <= 1.12 (q <= 0.1), so the strip moves by at most 1.12 of its value times
      // that; the end's own rounding dA (in A = (end - mu)/sigma) moves it by |phi(A + h) - phi(A)| dA <= 1.12 L (|A| + h) dA
      let stripL = false;
      let stripU = false;
      if (hLo * (Math.abs(A) + 1) <= 0.1) {
        const r = strip(A, hLo);
        L = r.v;
        eL = r.e + 1.12 * r.v * (2.01 * EPS + (Math.abs(A) + hLo) * dEnd(flip ? hi : lo));
        stripL = true;
      }
      if (hUp * (Math.abs(B) + 1) <= 0.1) {
        const r = strip(-B, hUp);
        U = r.v;
        eU = r.e + 1.12 * r.v * (2.01 * EPS + (Math.abs(B) + hUp) * dEnd(flip ? lo : hi));
        stripU = true;
      }
      L = Math.max(L, 0);
      U = Math.max(U, 0);
      const lp = -0.5 * z * z - logZ;
      o.pdf = Math.exp(lp) / (sigma * SQRT2PI);
      const rZ = eZ / Z;
      const cdf = L / Z;
      const sf = U / Z;
      o.cdf = flip ? sf : cdf;
      o.sf = flip ? cdf : sf;
      // the rounding of z moves a part computed from Phi(t); a part from the strip has counted its own argument's
      const moved = o.pdf * dz * sigma;
      const eLo = eL / Z + cdf * rZ + 2 * EPS * cdf + (stripL ? 0 : moved);
      const eUp = eU / Z + sf * rZ + 2 * EPS * sf + (stripU ? 0 : moved);
      o.cdfErr = flip ? eUp : eLo;
      o.sfErr = flip ? eLo : eUp;
      o.pdfErr = o.pdf * (rZ + 4 * EPS * (1 + Math.abs(lp)) + Math.abs(z) * dz);
    },
    (p) => {
      // in the mirrored frame the level is p' = p (or 1 - p when mirrored): t = Phi^{-1}(Phi(A) + p' Z)
      const pm = flip ? 1 - p : p;
      const t = pm <= 0.5 ? normalQuantile(PA + pm * Z, 0, 1) : -normalQuantile(QB + (1 - pm) * Z, 0, 1);
      const x = mu + sigma * (flip ? -t : t);
      return Math.min(Math.max(x, lo), hi);
    },
    "truncated normal cdf by differences of erfc (stdlib)",
  ));
}
