/**
 * The regularised incomplete gamma functions P(a, z) and Q(a, z) = 1 - P (a > 0, z >= 0) each with a derived bound on
 * its absolute error (relative to the value on the side computed directly). Two routes, each a sum of positive terms
 * or a continued fraction with positive elements, so that only rounding and a bounded remainder stand between the
 * computed and the true value:
 *  - z <= max(a, 3/2): P = e^L S, S = sum_n z^n / ((a+1)...(a+n)) (DLMF 8.7.1 with 8.2.7's prefactor), the rest after
 *    term t_N at most t_N r/(1 - r), r = z/(a+N+1) < 1 (the term ratios fall); Q = 1 - P, or for a < 1 (where Q is
 *    the small side) by upperSmallShape below;
 *  - else Q = e^L (a/z) (sum_{k<n} t_k + t_n G), t_k = (a-1)...(a-k)/z^k, n = ceil(a) - 1, f = a - n in (0, 1] and
 *    G = z^(1-f) e^z Gamma(f, z) in (0, 1]: DLMF 8.8.2 applied n times (every term positive). G by the continued
 *    fraction 1/(1 + d_1/(1 + d_2/(1 + ...))), d_{2k-1} = (k - f)/z, d_{2k} = k/z (DLMF 8.9.2), whose elements are
 *    positive: the value lies between consecutive approximants (the tail is a positive number, the approximants put 0
 *    and infinity in its place, and the map from tail to value is monotone). When z > a the sum may stop at k < n:
 *    the rest is at most t_k (1/(1 - r) + 1), r = (a-1-k)/z (its terms fall by at most r, and t_n G <= t_n <= t_k).
 *    P = 1 - Q.
 * The prefactor L = a log z - z - log Gamma(a+1): for a < 10 directly, with lgammaErr's bound on log Gamma
 * (./special.ts), or for a < 1 lgamma1p below; for a >= 10 as a (log1p(t) - t) - log(2 pi a)/2 - mu(a), t = (z - a)/a, mu Stirling's remainder
 * (A&S 6.1.40, truncation below the first omitted term: DLMF 5.11(ii)), which avoids the cancellation of a log a.
 * Rounding: u = 2^-53 per operation, Math.log/log1p/exp within one ulp (2u relative), the errors of each step carried
 * to first order with a 1% margin.
 */
import { lgamma, lgammaErr, STIRLING } from "./special";

const U = Number.EPSILON / 2;
/**
 * a result in the subnormal range (or underflowed to 0) carries an absolute rounding of up to 2^-1074 per operation;
 * above 2^-1020 no step of it was subnormal (e^L alone is at least e^-700 where it is formed)
 */
const tiny = (v: number) => (v < 2 ** -1020 ? 8 * Number.MIN_VALUE : 0);
// Stirling's remainder mu(a) = sum_k B_2k / (2k (2k-1) a^(2k-1)), k = 1..8 (./special.ts's coefficients), and the size
// of the first omitted term's coefficient (B_18 / (18 * 17) = 43867/244188, with room for its rounding)
const MU = STIRLING.slice(0, 8);
const MU_NEXT = Math.abs(STIRLING[8]) * (1 + 4 * U);

export interface IncGamma {
  p: number;
  q: number;
  /** bounds on the absolute errors of p and q */
  pErr: number;
  qErr: number;
}

/** the pieces of the prefactor that depend on a alone, computed once per shape */
export interface IncGammaShape {
  a: number;
  /** a < 10: log Gamma(a+1) and its error; else mu(a) + log(2 pi a)/2 and its error */
  c: number;
  ec: number;
  large: boolean;
}

/** Stirling's remainder mu(x) for x >= 10 and a bound on its error */
function stirlingRest(x: number): { v: number; e: number } {
  const ix = 1 / x;
  const i2 = ix * ix;
  let s = 0;
  for (let k = MU.length - 1; k >= 0; k--) s = s * i2 + MU[k];
  const v = s * ix;
  // 16 operations on a sum dominated by its first term (the rest below 3% of it at x >= 10), the coefficients' own
  // rounding; the omitted terms below the first of them
  return { v, e: 20 * U * v + MU_NEXT * Math.pow(ix, 17) };
}

const LOG16M1 = Math.log(16) - 1;

/**
 * log Gamma(1 + a) for 0 < a < 1 with an error proportional to a (lgamma's shift to 16 leaves an absolute error near
 * 1e-14, which would be the whole of a small Q): log Gamma(16 + a) - log Gamma(16) - sum_{k=1..15} log1p(a/k)
 * (A&S 6.1.15), the first difference by Stirling's series (A&S 6.1.40) as (15.5 + a) log1p(a/16) + a (log 16 - 1) +
 * mu(16 + a) - mu(16).
 */
function lgamma1p(a: number): { v: number; e: number } {
  const t1 = (15.5 + a) * Math.log1p(a / 16);
  const t2 = a * LOG16M1;
  const m1 = stirlingRest(16 + a);
  const m0 = stirlingRest(16);
  const t3 = m1.v - m0.v;
  let t4 = 0;
  let e4 = 0;
  for (let k = 1; k <= 15; k++) {
    const l = Math.log1p(a / k);
    t4 += l;
    e4 += 3 * U * l + U * t4;
  }
  const s1 = t1 + t2;
  const s2 = s1 + t3;
  const v = s2 - t4;
  // t1: 15.5 + a, log1p and the product 4u; t2: the constant within 6u relative and the product; t3: both remainders
  // and the difference (16 + a rounded moves mu by below u); the sums u each
  const e = 1.01 * (4 * U * Math.abs(t1) + 7 * U * Math.abs(t2) + m1.e + m0.e + U * (Math.abs(t3) + 16 * U) + e4 + U * (Math.abs(s1) + Math.abs(s2) + Math.abs(v)));
  return { v, e };
}

export function incGammaShape(a: number): IncGammaShape {
  if (a < 1) {
    const l = lgamma1p(a);
    return { a, c: l.v, ec: l.e, large: false };
  }
  if (a < 10) {
    // fl(a + 1) = (a + 1)(1 + d), |d| <= u: log Gamma moves by at most |psi| (a + 1) u, |psi(x)| <= max(log x, 0.6) for x >= 1
    const a1 = a + 1;
    return { a, c: lgamma(a1), ec: lgammaErr(a1) + Math.max(Math.log(a1), 0.6) * a1 * U * 1.01, large: false };
  }
  const { v: mu, e: emu } = stirlingRest(a);
  const l2 = Math.log(2 * Math.PI * a);
  const h = 0.5 * l2;
  // 2 pi a within 2u relative (the constant and the product), its log within 2u |l2| + 2u
  const c = mu + h;
  return { a, c, ec: emu + 1.01 * (U * (2 * Math.abs(l2) + 2) + U * c), large: true };
}

/** log1p(t) - t for |t| <= 1/2 by its series (Horner), with a running rounding bound (Higham 2002, alg. 5.1) */
function log1pmxSmall(t: number): { v: number; e: number } {
  const at = Math.abs(t);
  if (at === 0) return { v: 0, e: 0 };
  // terms k = 2..K; the rest after K at most |t|^(K+1) / ((K+1)(1 - |t|)), below 2^-60 t^2/2 once |t|^(K-1) <= 2^-61
  const K = Math.max(4, Math.min(64, 2 + Math.ceil(-61 * Math.LN2 / Math.log(at))));
  let p = (K % 2 ? 1 : -1) / K;
  let run = Math.abs(p) / 2;
  for (let k = K - 1; k >= 2; k--) {
    p = p * t + (k % 2 ? 1 : -1) / k;
    run = run * at + Math.abs(p);
  }
  const t2 = t * t;
  const v = p * t2;
  // Horner's rounding u (2 run - |p|), each coefficient 1/k within u/k (sum <= u t^2/(2(1 - |t|)) once times t^2),
  // t^2 and the product 2u, and the truncation
  const tail = Math.pow(at, K + 1) / ((K + 1) * (1 - at));
  const e = (U * (2 * run - Math.abs(p)) * t2 + (U * t2) / (2 * (1 - at)) + 2 * U * Math.abs(v)) * 1.01 + tail;
  return { v, e };
}

/** L = a log z - z - log Gamma(a+1) and a bound on its absolute error */
function prefactor(s: IncGammaShape, z: number): { L: number; eL: number } {
  const a = s.a;
  if (!s.large) {
    const lz = Math.log(z);
    const alz = a * lz;
    const d = alz - z;
    const L = d - s.c;
    // log z within 2u |lz|, the product u, the two subtractions u each on their results
    const eL = 1.01 * (U * (3 * Math.abs(alz) + Math.abs(d) + Math.abs(L))) + s.ec;
    return { L, eL };
  }
  // t = (z - a)/a within 2u relative; log1p(t) - t moves by |t/(1+t)| dt
  const t = (z - a) / a;
  const at = Math.abs(t);
  let v: number;
  let ev: number;
  if (at <= 0.5) {
    const r = log1pmxSmall(t);
    v = r.v;
    ev = r.e + (2.02 * U * t * t) / (1 - at);
  } else {
    // log(z/a) - t: z/a within u, its log within 2u |log| + u, the subtraction u
    const lr = Math.log(z / a);
    v = lr - t;
    ev = 1.01 * (U * (1 + 2 * Math.abs(lr) + Math.abs(v) + 2 * at));
  }
  const av = a * v;
  const L = av - s.c;
  const eL = 1.01 * (a * ev + U * Math.abs(av) + U * Math.abs(L)) + s.ec;
  return { L, eL };
}

/** e^L m for m >= 0 (m within rm relative, L within eL): the value and its relative bound */
function scaled(L: number, eL: number, m: number, rm: number): { v: number; r: number } {
  let v: number;
  let r: number;
  if (L > -700) {
    v = Math.exp(L) * m;
    r = Math.expm1(eL) + 3 * U;
  } else {
    // far out e^L alone may underflow while the product does not
    const lm = Math.log(m);
    v = Math.exp(L + lm);
    r = Math.expm1(eL + U * (2 * Math.abs(lm) + Math.abs(L + lm))) + 2 * U;
  }
  return { v, r: 1.01 * (r + rm) };
}

/** P by its power series (positive terms), Q = 1 - P */
function lowerSeries(s: IncGammaShape, z: number, out: IncGamma) {
  const a = s.a;
  const { L, eL } = prefactor(s, z);
  let t = 1;
  let sum = 1;
  let terr = 0; // the terms' own rounding: t_n within 3n u (a + n, the quotient, the product)
  let run = 0; // the running sums' rounding
  let n = 0;
  for (;;) {
    n++;
    t *= z / (a + n);
    sum += t;
    terr += 3 * n * U * t;
    run += U * sum;
    const r = z / (a + n + 1);
    if (r < 1 && t * r <= 2 ** -60 * sum * (1 - r)) break;
    if (n > 1e7) break; // not reached for a <= 1e9 (the terms fall like e^{-n^2/(2a)} past n = z - a)
  }
  const rest = (1.01 * t * (z / (a + n + 1))) / (1 - z / (a + n + 1));
  const rs = (1.01 * (terr + run) + rest) / sum;
  const { v, r } = scaled(L, eL, sum, rs);
  out.p = v;
  out.pErr = v * r + tiny(v);
  out.q = 1 - v;
  out.qErr = out.pErr + U * out.q;
}

/**
 * Q for a < 1 and z <= 3/2 without the cancellation of 1 - P: with L0 = a log z - log Gamma(a+1) (L = L0 - z),
 * P = e^L0 (1 - R), R = e^-z sum_n (z^n/n!) c_n, c_n = 1 - n!/((a+1)...(a+n)) in [0, 1) (DLMF 8.7.1 against the
 * exponential series), so Q = -expm1(L0) + e^L0 R; c_n = c_{n-1} + pi_{n-1} a/(a+n), pi_n = pi_{n-1} n/(a+n) = 1 - c_n
 * (positive steps). Both parts are positive when L0 <= 0, which holds for z <= e^-gamma (log Gamma(1+a) >= -gamma a by
 * convexity); above, the cancellation is at most -expm1(L0) / Q, which the bound carries. The rest after term N is at
 * most term_N r/(1 - r), r = z/(N+1), as c_n < 1.
 */
function upperSmallShape(s: IncGammaShape, z: number, out: IncGamma) {
  const a = s.a;
  const lz = Math.log(z);
  const alz = a * lz;
  const L0 = alz - s.c;
  const eL0 = 1.01 * U * (3 * Math.abs(alz) + Math.abs(L0)) + s.ec;
  let term = 1; // z^n/n!, within 2n u
  let pi = 1; // n!/((a+1)...(a+n)), within 3n u
  let c = 0; // 1 - pi, within ec (relative, running)
  let ec = 0;
  let sum = 0;
  let err = 0;
  let n = 0;
  for (;;) {
    n++;
    const inc = (pi * a) / (a + n); // pi_{n-1} a/(a+n): pi's error plus 3u
    const c1 = c + inc;
    ec = (c * ec + inc * (3 * (n - 1) * U + 3 * U)) / c1 + U;
    c = c1;
    pi *= n / (a + n);
    term *= z / n;
    const w = term * c;
    sum += w;
    err += w * (ec + 2 * n * U + U) + U * sum;
    const r = z / (n + 1);
    if (r < 1 && term * r <= 2 ** -60 * sum * (1 - r)) break;
  }
  const rest = (1.01 * term * (z / (n + 1))) / (1 - z / (n + 1));
  const ez = Math.exp(-z);
  const R = ez * sum;
  // e^-z within 2u, the product u
  const eR = R * (3 * U) + ez * (1.01 * err + rest);
  const E = -Math.expm1(L0);
  const e0 = Math.exp(L0);
  const T = e0 * R;
  out.q = E + T;
  // -expm1 moves by e^L0 eL0 and rounds 2u; e^L0 within expm1(eL0) + 2u; the product and the sum u
  out.qErr = 1.01 * (e0 * Math.expm1(eL0) + 2 * U * Math.abs(E) + T * (Math.expm1(eL0) + 3 * U) + e0 * eR + U * out.q);
}

/**
 * G = 1/(1 + d_1/(1 + d_2/(1 + ...))) with d_{2k-1} = (k - f)/z, d_{2k} = k/z, f in (0, 1], z > 0, by the forward
 * recurrences A_m = A_{m-1} + d A_{m-2} (all terms positive, each with a running relative rounding bound).
 */
function cfG(f: number, z: number): { v: number; e: number } {
  if (f === 1) return { v: 1, e: 0 }; // d_1 = 0
  let A2 = 1; // A_{m-2}
  let A1 = 0;
  let B2 = 0;
  let B1 = 1;
  let eA2 = 0;
  let eA1 = 0;
  let eB2 = 0;
  let eB1 = 0;
  // m = 1 (the leading 1/): A = 1, B = 1
  let A = A1 + A2;
  let B = B1;
  [A2, A1, eA2, eA1] = [A1, A, eA1, 0];
  [B2, B1, eB2, eB1] = [B1, B, eB1, 0];
  let prev = 1;
  let ePrev = 0;
  for (let m = 1; m < 100000; m++) {
    const k = (m + 1) >> 1;
    const d = (m % 2 ? k - f : k) / z;
    const pa = d * A2;
    const pb = d * B2;
    A = A1 + pa;
    B = B1 + pb;
    // relative: d within 2u, the product u, the sum u (weighted by the parts)
    const eA = (A1 * eA1 + pa * (eA2 + 3 * U)) / A + U;
    const eB = (B1 * eB1 + pb * (eB2 + 3 * U)) / B + U;
    [A2, A1, eA2, eA1] = [A1, A, eA1, eA];
    [B2, B1, eB2, eB1] = [B1, B, eB1, eB];
    if (B > 1e250) {
      // rescale by a power of 2 (exact)
      A2 *= 2 ** -800;
      A1 *= 2 ** -800;
      B2 *= 2 ** -800;
      B1 *= 2 ** -800;
    }
    const cur = A1 / B1;
    const eCur = (eA1 + eB1 + U) * 1.01;
    const gap = Math.abs(cur - prev);
    if (gap <= 2 ** -58 * cur) {
      // the value lies between the exact approximants m - 1 and m
      return { v: cur, e: gap + 2 * eCur * cur + ePrev * prev };
    }
    prev = cur;
    ePrev = eCur;
  }
  return { v: prev, e: Infinity };
}

/** Q by the positive terms of DLMF 8.8.2 and the continued fraction for the rest, P = 1 - Q (z > max(a, 3/2)) */
function upperTerms(s: IncGammaShape, z: number, out: IncGamma) {
  const a = s.a;
  const { L, eL } = prefactor(s, z);
  const n = Math.ceil(a) - 1;
  let t = 1;
  let sum = 0;
  let terr = 0;
  let run = 0;
  let rest = 0;
  let k = 0;
  for (; k < n; k++) {
    sum += t;
    terr += 3 * k * U * t;
    run += U * sum;
    // the next term and the bound on all that follows it
    t *= (a - (k + 1)) / z;
    const r = (a - (k + 2)) / z;
    const bound = 1.01 * t * (1 / (1 - Math.max(r, 0)) + 1);
    if (bound <= 2 ** -60 * sum) {
      rest = bound;
      break;
    }
  }
  if (k === n) {
    // every positive term is in; the last, t_n = (a-1)...(a-n)/z^n, times G(f, z)
    const g = cfG(a - n, z);
    const tg = t * g.v;
    sum += tg;
    terr += 3 * n * U * t * g.v + t * g.e + U * tg;
    run += U * sum;
  }
  const rs = (1.01 * (terr + run) + rest) / sum;
  // e^L (a/z) sum: a/z within u, the product u
  const { v, r } = scaled(L, eL, (a / z) * sum, rs + 2 * U);
  out.q = v;
  out.qErr = v * r + tiny(v);
  out.p = 1 - v;
  out.pErr = out.qErr + U * out.p;
}

/** P(a, z) and Q(a, z) with bounds on their absolute errors (a > 0 from incGammaShape, z >= 0). */
export function incGammaBounded(s: IncGammaShape, z: number, out: IncGamma = { p: NaN, q: NaN, pErr: NaN, qErr: NaN }): IncGamma {
  if (!(z > 0)) {
    const zero = z === 0;
    out.p = zero ? 0 : NaN;
    out.q = zero ? 1 : NaN;
    out.pErr = out.qErr = zero ? 0 : NaN;
  } else if (z === Infinity) {
    out.p = 1;
    out.q = 0;
    out.pErr = out.qErr = 0;
  } else if (z <= Math.max(s.a, 1.5)) {
    lowerSeries(s, z, out);
    if (s.a < 1) upperSmallShape(s, z, out);
  }
  else upperTerms(s, z, out);
  // a probability is never off by more than 1
  if (!(out.pErr <= 1)) out.pErr = 1;
  if (!(out.qErr <= 1)) out.qErr = 1;
  return out;
}
