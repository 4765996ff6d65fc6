/** Special functions and combinatorial tables used by the family modules (pure, double precision). */
import { logBesselKHalfBounded } from "./bessel-bounded";

/** Bernoulli numbers B_0..B_n as exact fractions (Akiyama-Tanigawa algorithm, B_1 = +1/2), returned as doubles. */
export function bernoulliNumbers(n: number): number[] {
  const out: number[] = [];
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
      // a[j-1] = j * (a[j-1] - a[j])
      let nn = num[j - 1] * den[j] - num[j] * den[j - 1];
      let dd = den[j - 1] * den[j];
      nn *= BigInt(j);
      const g = gcd(nn, dd) || 1n;
      num[j - 1] = nn / g;
      den[j - 1] = dd / g;
    }
    out.push(Number(num[0]) / Number(den[0]));
  }
  return out;
}

const B = bernoulliNumbers(30);
// Stirling series coefficients B_{2k} / (2k (2k-1)), k = 1..10 (Abramowitz & Stegun 6.1.40), each within 2u relative
export const STIRLING = Array.from({ length: 10 }, (_, i) => B[2 * i + 2] / ((2 * i + 2) * (2 * i + 1)));
const HALF_LOG_2PI = 0.9189385332046728;

/** log Gamma(x) for x > 0: Stirling series (A&S 6.1.40) after shifting x up to >= 16 (A&S 6.1.15). */
export function lgamma(x: number): number {
  if (!(x > 0)) return x === 0 ? Infinity : NaN;
  if (x === Infinity) return Infinity;
  let shift = 0;
  let prod = 1;
  while (x < 16) {
    prod *= x;
    x += 1;
    if (prod > 1e280) {
      shift += Math.log(prod);
      prod = 1;
    }
  }
  shift += Math.log(prod);
  const z = 1 / x;
  const z2 = z * z;
  let s = 0;
  for (let k = STIRLING.length - 1; k >= 0; k--) s = s * z2 + STIRLING[k];
  return (x - 0.5) * Math.log(x) - x + HALF_LOG_2PI + s * z - shift;
}

/**
 * A bound on the absolute error of lgamma(x) as computed above (x > 0), by running error analysis of the same steps
 * (u = 2^-53; Math.log taken within one ulp): the rounding of each x + 1 of the shift is found exactly (TwoSum) and
 * moves the result by at most d/dx of the terms it enters (psi(y) < log y at the end, 1/x_i in the product); each
 * product, the logarithms and the Stirling sum add their roundings; the series' truncation is below its first omitted
 * term B_22 / (22 * 21 y^21) (real y > 0: DLMF 5.11.10 with the remainder bounded by the first neglected term).
 */
export function lgammaErr(x: number): number {
  if (!(x > 0) || x === Infinity) return NaN;
  const u = Number.EPSILON / 2;
  let dx = 0; // accumulated |computed x_i - (x + i)|
  let fromShift = 0; // sum of dx_i / x_i over the product's factors
  let n = 0;
  let shift = 0;
  let shiftAbs = 0;
  let prod = 1;
  while (x < 16) {
    prod *= x;
    fromShift += dx / x;
    const t = x + 1;
    const z = t - x;
    dx += Math.abs(x - (t - z) + (1 - z));
    x = t;
    n++;
    if (prod > 1e280) {
      shift += Math.log(prod);
      shiftAbs += Math.abs(Math.log(prod));
      prod = 1;
    }
  }
  const lp = Math.log(prod);
  shift += lp;
  shiftAbs += Math.abs(lp);
  const lx = Math.log(x);
  const head = (x - 0.5) * lx;
  const T = head - x + HALF_LOG_2PI;
  const trunc = Math.abs(B[22]) / (22 * 21 * Math.pow(x, 21));
  // products (n roundings in the product's log), logs (2u relative), Stirling's four operations, the final subtraction
  const round = u * (n + 2 * shiftAbs + 3 * Math.abs(head) + 2 * x + 2 * Math.abs(T) + 2 + Math.abs(T - shift) + 2 * Math.abs(shift));
  return (1 + 4 * u) * (round + lx * dx + fromShift + trunc) + 1e-300;
}

/** Gamma(x) for x > 0 (exact product for small integers). */
export function gamma(x: number): number {
  if (Number.isInteger(x) && x > 0 && x <= 171) {
    let f = 1;
    for (let k = 2; k < x; k++) f *= k;
    return f;
  }
  return Math.exp(lgamma(x));
}

/** n! as a double (exact up to 22!). */
export function factorial(n: number): number {
  let f = 1;
  for (let k = 2; k <= n; k++) f *= k;
  return f;
}

/** Binomial coefficient C(n, k) as a double (exact while it fits in 2^53). */
export function binom(n: number, k: number): number {
  if (k < 0 || k > n) return 0;
  k = Math.min(k, n - k);
  let c = 1;
  for (let j = 1; j <= k; j++) c = (c * (n - k + j)) / j;
  return Math.round(c);
}

/** Eulerian numbers A(m, k), k = 0..m-1 (A(0,0) = 1): A(m,k) = (k+1) A(m-1,k) + (m-k) A(m-1,k-1). */
export function eulerianRow(m: number): number[] {
  let row = [1];
  for (let j = 1; j <= m; j++) {
    const next = new Array<number>(j).fill(0);
    for (let k = 0; k < j; k++) next[k] = (k + 1) * (row[k] ?? 0) + (j - k) * (row[k - 1] ?? 0);
    row = next;
  }
  return row;
}

/**
 * log of the scaled modified Bessel function, log(e^x K_nu(x)), x > 0, any real nu.
 * Trapezoidal rule on K_nu(x) = int_0^inf exp(-x cosh u) cosh(nu u) du (Abramowitz & Stegun 9.6.24); the integrand
 * is entire and decays double-exponentially, so the rule converges geometrically (Trefethen & Weideman 2014,
 * SIAM Review 56, sec. 5). Step 0.1 gives relative error below 1e-15 (checked against half-integer closed forms).
 */
export function logBesselKScaled(nu: number, x: number): number {
  nu = Math.abs(nu);
  if (!(x > 0)) return x === 0 ? Infinity : NaN;
  if (x === Infinity) return -Infinity;
  const m = nu - 0.5;
  if (Number.isInteger(m) && m <= 60) return logBesselKHalf(m, x);
  if (x >= LARGE_X) {
    const v = logBesselKLarge(nu, x);
    if (v !== null) return v;
  }
  // integrand g(u) = -x (cosh u - 1) + log cosh(nu u); find its peak u* (g' = -x sinh u + nu tanh(nu u) = 0)
  let lo = 0;
  let hi = Math.max(1, Math.asinh(nu / x) + 1);
  const dg = (u: number) => -x * Math.sinh(u) + nu * Math.tanh(nu * u);
  let peak = 0;
  if (nu * nu > x) {
    // the peak only centres the grid and scales the sum, so a few digits suffice
    for (let i = 0; i < 40; i++) {
      const mid = 0.5 * (lo + hi);
      if (dg(mid) > 0) lo = mid;
      else hi = mid;
    }
    peak = 0.5 * (lo + hi);
  }
  const logcosh = (v: number) => {
    const a = Math.abs(v);
    return a + Math.log1p(Math.exp(-2 * a)) - Math.LN2;
  };
  const g = (u: number) => -x * (Math.cosh(u) - 1) + logcosh(nu * u);
  const gmax = g(peak);
  // width of the peak sets the step; the analyticity strip |Im u| < pi/2 bounds the error by ~exp(-pi^2 / h)
  const curv = x * Math.cosh(peak) - (nu * nu) / Math.cosh(nu * peak) ** 2;
  const width = 1 / Math.sqrt(Math.max(curv, 1e-300));
  const h = Math.min(0.1, width / 4);
  // full-line trapezoidal rule on the even integrand, nodes peak + j h (the rule converges geometrically for any
  // offset); int_{-inf}^{inf} = 2 K, so K = (h/2) sum
  let s = 0;
  for (let j = 0; j < 1e6; j++) {
    const v = Math.exp(g(peak + j * h) - gmax);
    s += v;
    if (v < 1e-18) break;
  }
  let uStop = peak;
  for (let j = -1; j > -1e6; j--) {
    uStop = peak + j * h;
    const v = Math.exp(g(uStop) - gmax);
    s += v;
    if (v < 1e-18) break;
  }
  // when the walk stopped before reaching u = 0 the mirror hump at -peak is separate and equal: count it
  if (uStop <= 0) s *= 0.5;
  return gmax + Math.log(s * h);
}

/** from this x on the asymptotic series is tried first (one rule costs some 70 exponentials there, the series a few terms) */
const LARGE_X = 64;

/**
 * log(e^x K_nu(x)) for large x from the asymptotic series K_nu(x) = sqrt(pi/(2x)) e^{-x} sum_k a_k(nu) / x^k,
 * a_k(nu) = prod_{j<=k} (4 nu^2 - (2j - 1)^2) / (k! 8^k) (A&S 9.7.2, DLMF 10.40.2). For real nu and x > 0 the remainder
 * after l terms is at most the first neglected term in absolute value once l >= nu - 1/2 (DLMF 10.40(ii)): the sum stops
 * at the first such term below 2^-56 of the partial sum (so the truncation is below a quarter unit of the result; the
 * terms' rounding, a few units each on terms that fall off, keeps the total within the rule's). Null when the terms
 * stop falling before that (large nu against x): the caller then takes the rule.
 */
function logBesselKLarge(nu: number, x: number): number | null {
  const mu = 4 * nu * nu;
  let term = 1;
  let sum = 1;
  for (let k = 1; k <= 60; k++) {
    const next = (term * (mu - (2 * k - 1) ** 2)) / (8 * k * x);
    if (k - 1 >= nu - 0.5 && Math.abs(next) <= TWO_M56 * Math.abs(sum)) return 0.5 * Math.log(Math.PI / (2 * x)) + Math.log(sum);
    if (Math.abs(next) > Math.abs(term) && k - 1 >= nu - 0.5) return null;
    term = next;
    sum += term;
  }
  return null;
}
const TWO_M56 = 2 ** -56;

/**
 * Half-integer order: K_{m+1/2}(x) = sqrt(pi/(2x)) e^{-x} sum_{k=0}^m (m+k)! / (k! (m-k)!) (2x)^{-k}
 * (A&S sec. 10.2, modified spherical Bessel functions); a sum of positive terms, evaluated in scaled form for small x.
 */
function logBesselKHalf(m: number, x: number): number {
  // the coefficients by their exact-ratio recurrence (./bessel-bounded.ts), not exp of log-factorial differences
  return logBesselKHalfBounded(m, x).v;
}

/** K_nu(x) for x > 0 (may under/overflow; use logBesselKScaled in products). */
export function besselK(nu: number, x: number): number {
  return Math.exp(logBesselKScaled(nu, x) - x);
}

const LN_SQRT_2PI = 0.9189385332046728;

/** stirlerr(n) = log Gamma(n+1) - (n + 1/2) log n + n - log sqrt(2 pi) (Loader 2000, "Fast and accurate computation of
 *  binomial probabilities"; Stirling series A&S 6.1.40 for n > 15). */
export function stirlerr(n: number): number {
  if (n <= 15) return lgamma(n + 1) - (n + 0.5) * Math.log(n) + n - LN_SQRT_2PI;
  const nn = n * n;
  // 1/12n - 1/360n^3 + 1/1260n^5 - 1/1680n^7 + 1/1188n^9
  return (1 / 12 - (1 / 360 - (1 / 1260 - (1 / 1680 - 1 / (1188 * nn)) / nn) / nn) / nn) / n;
}

/** bd0(x, m) = x log(x/m) + m - x, computed without cancellation near x = m (Loader 2000). */
export function bd0(x: number, m: number): number {
  if (Math.abs(x - m) < 0.1 * (x + m)) {
    const v = (x - m) / (x + m);
    let s = (x - m) * v;
    let ej = 2 * x * v;
    const v2 = v * v;
    for (let j = 1; j < 1000; j++) {
      ej *= v2;
      const s1 = s + ej / (2 * j + 1);
      if (s1 === s) return s1;
      s = s1;
    }
    return s;
  }
  return x * Math.log(x / m) + m - x;
}

/** Poisson pmf by the saddle-point form exp(-stirlerr(k) - bd0(k, lambda)) / sqrt(2 pi k) (Loader 2000). */
export function poissonPmf(k: number, lambda: number): number {
  if (k === 0) return Math.exp(-lambda);
  return Math.exp(-stirlerr(k) - bd0(k, lambda)) / Math.sqrt(2 * Math.PI * k);
}

/** Binomial pmf for real n >= k (Loader 2000 saddle-point form). */
export function binomialPmf(k: number, n: number, p: number): number {
  const q = 1 - p;
  if (k === 0) return Math.exp(n * Math.log1p(-p));
  if (k === n) return Math.exp(n * Math.log(p));
  const lc = stirlerr(n) - stirlerr(k) - stirlerr(n - k) - bd0(k, n * p) - bd0(n - k, n * q);
  return Math.exp(lc) * Math.sqrt(n / (2 * Math.PI * k * (n - k)));
}

/** Negative binomial pmf (failures before the r-th success), P = r/(r+k) binomialPmf(r; r+k, p) (Loader 2000). */
export function negativeBinomialPmf(k: number, r: number, p: number): number {
  if (k === 0) return Math.exp(r * Math.log(p));
  return (r / (r + k)) * binomialPmf(r, r + k, p);
}
