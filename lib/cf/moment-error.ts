/**
 * Running error bounds for the moment path (Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed., sec. 3.3,
 * running error analysis): every quantity is carried as an estimate {v, e} with |true - v| <= e. Each operation adds
 * the propagated error of its inputs (first-order terms plus the second-order cross term, so the bound is not only
 * first order) and its own rounding error. The rounding error of +, -, x, / and sqrt is computed exactly by the
 * error-free transformations TwoSum and Dekker's TwoProduct (Higham sec. 4.3 and eq. (4.12); Ogita, Rump & Oishi
 * 2005, SIAM J. Sci. Comput. 26), so an exactly representable result (integer arithmetic, powers of two) carries 0;
 * where those transformations could overflow or underflow the standard model |delta| <= u (Higham eq. (2.4)) with an
 * underflow term is used. Library functions (Math.exp, log, log1p, expm1, pow) are taken as accurate to 2 ulp: V8
 * computes them with fdlibm ports whose documented error is below 1 ulp. The bounds themselves are rounded up.
 */

/** a value and an absolute bound on its error */
export interface Est {
  v: number;
  e: number;
}

/** unit roundoff 2^-53 */
const U = 2 ** -53;
/** smallest subnormal: the absolute error a product or quotient may take on underflow */
const ETA = 2 ** -1074;
/** library functions: 2 ulp, an ulp being at most 2^-52 |v| */
const LIB = 2 ** -51;
/** inflation that makes a bound computed in floating point (a few operations) an upper bound */
const UP = 1 + 16 * U;

const up = (x: number) => (x === 0 ? 0 : x * UP + ETA);

export const exact = (v: number): Est => ({ v, e: 0 });
/** a value whose error is bounded by e (rounded up) */
export const est = (v: number, e: number): Est => ({ v, e: Number.isNaN(v) ? Infinity : e });

/** the value is finite and so is its bound */
export const finite = (a: Est) => Number.isFinite(a.v) && Number.isFinite(a.e);

const bad = (v: number): Est => ({ v, e: Infinity });

/** TwoSum (Knuth): s + err = a + b exactly when no overflow. */
export function twoSumErr(a: number, b: number, s: number): number {
  const bb = s - a;
  return a - (s - bb) + (b - bb);
}

const SPLIT = 134217729; // 2^27 + 1
const BIG = 2 ** 995;
const SMALL = 2 ** -900;

/** Dekker's TwoProduct: p + err = a b exactly when neither splitting overflows nor the product underflows. */
export function twoProdErr(a: number, b: number, p: number): number | null {
  const aa = Math.abs(a);
  const ab = Math.abs(b);
  if (aa > BIG || ab > BIG || (p !== 0 && Math.abs(p) < SMALL) || (p === 0 && a !== 0 && b !== 0)) return null;
  let c = SPLIT * a;
  const ah = c - (c - a);
  const al = a - ah;
  c = SPLIT * b;
  const bh = c - (c - b);
  const bl = b - bh;
  return ah * bh - p + ah * bl + al * bh + al * bl;
}

/** rounding error of fl(a b): exact when available, else the standard model */
function prodRound(a: number, b: number, p: number): number {
  const r = twoProdErr(a, b, p);
  return r === null ? U * Math.abs(p) + ETA : Math.abs(r);
}

export function add(a: Est, b: Est): Est {
  const v = a.v + b.v;
  if (!Number.isFinite(v)) return bad(v);
  return { v, e: up(a.e + b.e + Math.abs(twoSumErr(a.v, b.v, v))) };
}

export const neg = (a: Est): Est => ({ v: -a.v, e: a.e });
export const sub = (a: Est, b: Est): Est => add(a, neg(b));

export function mul(a: Est, b: Est): Est {
  const v = a.v * b.v;
  if (!Number.isFinite(v)) return bad(v);
  const prop = Math.abs(a.v) * b.e + Math.abs(b.v) * a.e + a.e * b.e;
  return { v, e: up(prop + prodRound(a.v, b.v, v)) };
}

/** a times an exact double */
export const scale = (a: Est, c: number): Est => mul(a, exact(c));

export function div(a: Est, b: Est): Est {
  const v = a.v / b.v;
  const den = Math.abs(b.v) - b.e;
  if (!Number.isFinite(v) || !(den > 0)) return bad(v);
  // |a/b - v|: the remainder a - v b is exact up to one rounding (Sterbenz), divided by |b|
  let loc: number;
  const pe = twoProdErr(v, b.v, v * b.v);
  if (pe === null) loc = U * Math.abs(v) + ETA;
  else {
    const r = a.v - v * b.v - pe;
    loc = r === 0 ? 0 : (Math.abs(r) * (1 + 4 * U)) / Math.abs(b.v) + ETA;
  }
  const q = Math.abs(v) + loc;
  const prop = (a.e + q * b.e) / den;
  return { v, e: up(prop + loc) };
}

export function sqrt(a: Est): Est {
  const v = Math.sqrt(a.v);
  if (!Number.isFinite(v) || a.v < 0) return bad(v);
  let loc = 0;
  if (v > 0) {
    const pe = twoProdErr(v, v, v * v);
    const r = pe === null ? null : a.v - v * v - pe;
    loc = r === null ? U * v + ETA : r === 0 ? 0 : (Math.abs(r) * (1 + 4 * U)) / (v * (2 - U)) + ETA;
  }
  let prop = 0;
  if (a.e > 0) prop = a.v > a.e ? a.e / (Math.sqrt(a.v - a.e) + v) : Math.sqrt(a.e);
  return { v, e: up(prop + loc) };
}

/** integer power by binary powering (exact where every partial product is) */
export function powInt(a: Est, k: number): Est {
  let r = exact(1);
  let b = a;
  let n = k;
  while (n > 0) {
    if (n & 1) r = r.e === 0 && r.v === 1 ? b : mul(r, b);
    n >>= 1;
    if (n > 0) b = mul(b, b);
  }
  return r;
}

export function exp(a: Est): Est {
  const v = Math.exp(a.v);
  if (!Number.isFinite(v)) return bad(v);
  const prop = v * (1 + LIB) * Math.expm1(a.e) * (1 + LIB);
  return { v, e: up(prop + LIB * v + ETA) };
}

export function expm1(a: Est): Est {
  const v = Math.expm1(a.v);
  if (!Number.isFinite(v)) return bad(v);
  // |e^x - e^y| <= e^{max} |x - y| ... = e^{y} expm1(e) for x in [y - e, y + e]
  const prop = Math.exp(a.v) * (1 + LIB) * Math.expm1(a.e) * (1 + LIB);
  return { v, e: up(prop + LIB * Math.abs(v) + ETA) };
}

export function log(a: Est): Est {
  const v = Math.log(a.v);
  if (!Number.isFinite(v) || !(a.v > a.e)) return bad(v);
  const prop = -Math.log1p(-a.e / a.v) * (1 + LIB) * UP;
  return { v, e: up(prop + LIB * Math.abs(v)) };
}

export function log1p(a: Est): Est {
  const v = Math.log1p(a.v);
  if (!Number.isFinite(v) || !(1 + a.v > a.e * UP)) return bad(v);
  const prop = -Math.log1p(-a.e / (1 + a.v)) * (1 + LIB) * UP;
  return { v, e: up(prop + LIB * Math.abs(v)) };
}

/** x^y for x > 0 and an exact real y, as exp(y log x) (the value is Math.pow's, its error bounded through log and exp) */
export function pow(a: Est, y: number): Est {
  if (Number.isInteger(y) && y >= 0 && y <= 1024) return powInt(a, y);
  const l = log(a);
  const r = exp(mul(l, exact(y)));
  const v = Math.pow(a.v, y);
  return { v, e: up(r.e + Math.abs(r.v - v)) };
}

export function sum(xs: Est[]): Est {
  let s = exact(0);
  for (const x of xs) s = add(s, x);
  return s;
}

/** a constant known to within half an ulp (a literal rounded to nearest) */
export function constant(v: number): Est {
  return { v, e: up(Math.abs(v) * U) };
}

/** pi as a double, within half an ulp */
export const PI = constant(Math.PI);

// ---- special functions

/** Bernoulli numbers B_0..B_40 as exact numerator/denominator (Akiyama-Tanigawa), for the Stirling coefficients. */
function bernoulliExact(n: number): [bigint, bigint][] {
  const out: [bigint, bigint][] = [];
  const num: bigint[] = [];
  const den: bigint[] = [];
  const gcd = (a: bigint, b: bigint): bigint => {
    a = a < 0n ? -a : a;
    b = b < 0n ? -b : b;
    while (b) [a, b] = [b, a % b];
    return a;
  };
  for (let m = 0; m <= n; m++) {
    num[m] = 1n;
    den[m] = BigInt(m + 1);
    for (let j = m; j >= 1; j--) {
      let nn = num[j - 1] * den[j] - num[j] * den[j - 1];
      const dd = den[j - 1] * den[j];
      nn *= BigInt(j);
      const g = gcd(nn, dd) || 1n;
      num[j - 1] = nn / g;
      den[j - 1] = dd / g;
    }
    out.push([num[0], den[0]]);
  }
  return out;
}

const BE = bernoulliExact(42);
/** B_k as a double with its conversion error (as families/special.ts bernoulliNumbers, B_1 = +1/2) */
export const bernoulliE = (k: number): Est => fraction(BE[k][0], BE[k][1]);
/** a fraction as a double: each bigint converts with one rounding, the quotient with one more */
function fraction(n: bigint, d: bigint): Est {
  return div(est(Number(n), Math.abs(Number(n)) * U), est(Number(d), Math.abs(Number(d)) * U));
}
/** B_{2k} / (2k (2k-1)), k = 1..10 (Abramowitz & Stegun 6.1.40) */
const STIRLING_E = Array.from({ length: 10 }, (_, i) => fraction(BE[2 * i + 2][0], BE[2 * i + 2][1] * BigInt((2 * i + 2) * (2 * i + 1))));
/** |B_22| / (22 * 21): the first term the series leaves out bounds the remainder for x > 0 (A&S 6.1.42) */
const STIRLING_NEXT = Math.abs(Number(BE[22][0]) / Number(BE[22][1])) / (22 * 21) * 1.001;
const HALF_LOG_2PI = constant(0.9189385332046728);

/**
 * log Gamma(x), x > 0 exact, with its bound: the same steps as lgamma in families/special.ts (shift to x >= 16 by
 * A&S 6.1.15, then the Stirling series A&S 6.1.40) carried through in running-error arithmetic, plus the truncation
 * remainder, which for real x > 0 is below the first omitted term (A&S 6.1.42).
 */
export function lgammaE(xin: number | Est): Est {
  const x1 = typeof xin === "number" ? exact(xin) : xin;
  const x0 = x1.v;
  if (!(x0 > 0) || !Number.isFinite(x0) || !(x0 > x1.e)) return bad(NaN);
  let x = exact(x0);
  let shift = exact(0);
  let prod = exact(1);
  while (x.v < 16) {
    prod = mul(prod, x);
    x = add(x, exact(1));
    if (prod.v > 1e280) {
      shift = add(shift, log(prod));
      prod = exact(1);
    }
  }
  shift = add(shift, log(prod));
  const z = div(exact(1), x);
  const z2 = mul(z, z);
  let s = exact(0);
  for (let k = STIRLING_E.length - 1; k >= 0; k--) s = add(mul(s, z2), STIRLING_E[k]);
  const main = add(sub(mul(sub(x, exact(0.5)), log(x)), x), HALF_LOG_2PI);
  const r = sub(add(main, mul(s, z)), shift);
  // an inexact argument: |lgamma(y) - lgamma(x0)| <= max |psi| e, log y - 1/y < psi(y) < log y for y > 0
  let prop = 0;
  if (x1.e > 0) {
    const lo = x0 - x1.e;
    const hi = x0 + x1.e;
    prop = (Math.max(Math.abs(Math.log(lo)), Math.abs(Math.log(hi))) + 1 / lo) * x1.e * 1.001;
  }
  return { v: r.v, e: up(r.e + prop + STIRLING_NEXT / x.v ** 21) };
}

/** Gamma(x), x > 0 exact: exact product for integers (as families/special.ts gamma), else exp(lgamma). */
export function gammaE(x: number): Est {
  if (Number.isInteger(x) && x > 0 && x <= 171) {
    let f = exact(1);
    for (let k = 2; k < x; k++) f = mul(f, exact(k));
    return f;
  }
  return exp(lgammaE(x));
}

/** n! */
export function factorialE(n: number): Est {
  let f = exact(1);
  for (let k = 2; k <= n; k++) f = mul(f, exact(k));
  return f;
}

/** Horner evaluation of sum_i c_i x^i (Higham sec. 5.1 gives the same running bound in the standard model) */
export function horner(coefs: Est[], x: Est): Est {
  let v = exact(0);
  for (let i = coefs.length - 1; i >= 0; i--) v = add(mul(v, x), coefs[i]);
  return v;
}

// ---- moment conversions (the same recursions as node.ts, in running-error arithmetic)

export type EstList = (Est | null)[];

/** m_n = sum_{k=1}^n C(n-1,k-1) kappa_k m_{n-k} */
export function cumulantsToRawE(kappa: EstList): EstList {
  const n = kappa.length;
  const m: EstList = [exact(1)];
  for (let j = 1; j <= n; j++) {
    let s = exact(0);
    let ok = true;
    let c = exact(1);
    for (let k = 1; k <= j; k++) {
      const kk = kappa[k - 1];
      const mm = m[j - k];
      if (kk === null || mm === null) {
        ok = false;
        break;
      }
      s = add(s, mul(mul(c, kk), mm));
      c = div(mul(c, exact(j - k)), exact(k));
    }
    m.push(ok ? s : null);
  }
  return m.slice(1);
}

/** inverse of the recursion above */
export function rawToCumulantsE(raw: EstList): EstList {
  const n = raw.length;
  const mm: EstList = [exact(1), ...raw];
  const kappa: EstList = [];
  for (let j = 1; j <= n; j++) {
    let s = mm[j];
    if (s === null) {
      kappa.push(null);
      continue;
    }
    let c = exact(1);
    let ok = true;
    for (let k = 1; k < j; k++) {
      const kk = kappa[k - 1];
      const mv = mm[j - k];
      if (kk === null || mv === null) {
        ok = false;
        break;
      }
      s = sub(s, mul(mul(c, kk), mv));
      c = div(mul(c, exact(j - k)), exact(k));
    }
    kappa.push(ok ? s : null);
  }
  return kappa;
}

/** central moments: kappa_1 set to 0 exactly */
export function cumulantsToCentralE(kappa: EstList): EstList {
  const k0 = kappa.slice();
  if (k0.length > 0 && k0[0] !== null) k0[0] = exact(0);
  return cumulantsToRawE(k0);
}

/** Fill to length n from f, valid for orders below limit (strict), null beyond (as node.ts cumulantList). */
export function estList(n: number, limit: number, f: (k: number) => Est): EstList {
  const out: EstList = [];
  for (let k = 1; k <= n; k++) out.push(k < limit ? f(k) : null);
  return out;
}

/**
 * A reported value v and an estimate r of the same quantity computed beside it: |true - v| <= r.e + |v - r.v|
 * (triangle inequality), so the bound holds even where the two computations round differently.
 */
export function boundFor(v: number | null, r: Est | null | undefined): number | null {
  if (v === null || !r) return null;
  const e = r.e + Math.abs(v - r.v);
  return Number.isFinite(e) ? up(e) : Infinity;
}
