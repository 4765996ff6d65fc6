/**
 * log(e^x K_nu(x)) for real nu and x > 0 with a derived bound on its absolute error (a relative bound on K), for the
 * direct variance-gamma and NIG laws (lib/cf/direct/vg-nig.ts). Three routes, each with its own bound:
 *  - half-integer nu: K_{m+1/2}(x) = sqrt(pi/(2x)) e^{-x} sum_k (m+k)!/(k!(m-k)!) (2x)^{-k} (DLMF 10.49.12), positive
 *    terms: only rounding;
 *  - x >= 24: the asymptotic series (DLMF 10.40.2), remainder below the first omitted term once l >= nu - 1/2
 *    (DLMF 10.40(ii), real nu, x > 0), plus rounding;
 *  - else the trapezoidal rule on K_nu(x) = int_0^inf exp(-x cosh u) cosh(nu u) du (DLMF 10.32.9), whose error on the
 *    full line is at most 2M/(e^{2 pi a/h} - 1) for an integrand analytic in |Im u| < a with int |f(u + ib)| du <= M
 *    (Trefethen & Weideman 2014, SIAM Review 56, Thm 5.1). Here |exp(-x cosh(u + ib))| = exp(-x cos b cosh u) and
 *    |cosh(nu (u + ib))| <= cosh(nu u), so M = 2 K_nu(x cos a); and K_nu(x cos a) / K_nu(x) <= e^{(1 - cos a) x}
 *    (cos a)^{-max(nu, 1/2)} by besselKLogSlope below. The sum stops past the peak where the rest is bounded by a
 *    geometric series; rounding by a running error bound (Higham 2002, sec. 4.2).
 */
const U = Number.EPSILON / 2;

export interface Bounded {
  /** the value */
  v: number;
  /** a bound on its absolute error */
  e: number;
}

/**
 * A bound on -d log K_nu(z)/dz for z' >= z: 1 + max(|nu|, 1/2)/z. Proof: -K'/K = E[cosh u] under the weight
 * e^{-z cosh u} cosh(nu u) (differentiate DLMF 10.32.9), which is nondecreasing in nu >= 0 (its nu-derivative is the
 * covariance of cosh u and u tanh(nu u), both increasing in u); at nu = 1/2 it is 1 + 1/(2z) (DLMF 10.39.2); for
 * nu >= 1/2, -K'/K = nu/z + K_{nu-1}/K_nu (DLMF 10.29.2) with K_{|nu-1|} <= K_nu (the integrand grows with the order).
 * It is also at least 1 (cosh u >= 1).
 */
export function besselKLogSlope(nu: number, z: number): number {
  return 1 + Math.max(Math.abs(nu), 0.5) / z;
}

export function logBesselKScaledBounded(nu: number, x: number): Bounded {
  nu = Math.abs(nu);
  if (!(x > 0) || !Number.isFinite(x) || !Number.isFinite(nu)) return { v: NaN, e: Infinity };
  const m = nu - 0.5;
  if (Number.isInteger(m) && m <= 60) return logBesselKHalfBounded(m, x);
  if (x >= 24) {
    const r = large(nu, x);
    if (r) return r;
  }
  return trapezoid(nu, x);
}

/** Half-integer order nu = m + 1/2: the positive finite sum (DLMF 10.49.12) in scaled form, with its rounding bound. */
export function logBesselKHalfBounded(m: number, x: number): Bounded {
  // c_k = (m+k)!/(k!(m-k)!) by c_{k+1} = c_k (m+k+1)(m-k)/(k+1): 3 roundings a step
  const y = 1 / (2 * x);
  let s = 0;
  let lead = 0;
  const c: number[] = [1];
  for (let k = 0; k < m; k++) c.push((c[k] * (m + k + 1) * (m - k)) / (k + 1));
  if (y <= 1) {
    for (let k = m; k >= 0; k--) s = s * y + c[k];
  } else {
    const iy = 1 / y;
    for (let k = 0; k <= m; k++) s = s * iy + c[k];
    lead = m * Math.log(y);
  }
  const l0 = 0.5 * Math.log(Math.PI / (2 * x));
  const ls = Math.log(s);
  const v = l0 + lead + ls;
  // coefficients 3m u, Horner on positive terms 2(m+1) u plus m u from y (or 1/y), all relative to s
  const rs = (5 * m + 3) * U * 1.01;
  const e = rs + 3 * U + U * (Math.abs(l0) + Math.abs(ls) + 2 * Math.abs(lead) + 2 * Math.abs(v)) + m * 2 * U * (1 + Math.abs(Math.log(y)));
  return { v, e: 1.01 * e };
}

function large(nu: number, x: number): Bounded | null {
  const mu = 4 * nu * nu;
  let term = 1;
  let sum = 1;
  let abs = 1;
  let err = 0;
  for (let k = 1; k <= 80; k++) {
    const next = (term * (mu - (2 * k - 1) ** 2)) / (8 * k * x);
    if (k - 1 >= nu - 0.5 && Math.abs(next) <= 2 ** -56 * Math.abs(sum)) {
      // remainder <= |next| (DLMF 10.40(ii)); each term carries 5k roundings of its recurrence, the sum k more
      const rel = (Math.abs(next) + err + k * U * abs) / Math.abs(sum);
      if (!(rel < 0.01)) return null;
      const l0 = 0.5 * Math.log(Math.PI / (2 * x));
      const ls = Math.log(sum);
      const v = l0 + ls;
      return { v, e: 1.01 * (rel / (1 - rel)) + U * (3 + 2 * Math.abs(l0) + Math.abs(ls) + 2 * Math.abs(v)) };
    }
    if (Math.abs(next) > Math.abs(term) && k - 1 >= nu - 0.5) return null;
    term = next;
    sum += term;
    abs += Math.abs(term);
    err += 5 * k * U * Math.abs(term);
  }
  return null;
}

/** log cosh v for v >= 0 (no overflow) */
function logcosh(v: number): number {
  return v + Math.log1p(Math.exp(-2 * v)) - Math.LN2;
}

const A_CANDIDATES = [0.3, 0.6, 0.9, 1.2, 1.4, 1.52];
const TARGET = 2 ** -58;

/**
 * The trapezoidal step for K_nu(x) = int_0^inf exp(-x cosh u) cosh(nu u) du (nu >= 0) from the strip bound
 * 2 K(x cos a)/K(x) / (e^{2 pi a/h} - 1) <= TARGET (the module note), with the widest strip of A_CANDIDATES that pays off;
 * disc is that bound at the step taken, relative to K_nu(x). The log-ratio (1 - cos a) x - max(nu, 1/2) log cos a grows
 * with x, so the step and disc of x hold for every x' <= x as well (the Student t's batch, ./continuous.ts).
 */
export function besselTrapezoidStep(nu: number, x: number): { h: number; disc: number } {
  const nm = Math.max(nu, 0.5);
  let h = 0;
  let logRatio = 0;
  let aBest = 0;
  for (const a of A_CANDIDATES) {
    const c = Math.cos(a);
    const lr = (1 - c) * x - nm * Math.log(c);
    const hh = (2 * Math.PI * a) / (Math.LN2 + lr + Math.log1p(1 / TARGET));
    if (hh > h) {
      h = hh;
      logRatio = lr;
      aBest = a;
    }
  }
  return { h, disc: (2 * Math.exp(logRatio)) / Math.expm1((2 * Math.PI * aBest) / h) };
}

function trapezoid(nu: number, x: number): Bounded {
  const { h, disc } = besselTrapezoidStep(nu, x);
  // peak of g(u) = -x (cosh u - 1) + log cosh(nu u): 0 when nu^2 <= x (g' <= (nu^2 - x) u), else by bisection
  let peak = 0;
  if (nu * nu > x) {
    let lo = 0;
    let hi = Math.max(1, Math.asinh(nu / x) + 1);
    for (let i = 0; i < 40; i++) {
      const mid = 0.5 * (lo + hi);
      if (-x * Math.sinh(mid) + nu * Math.tanh(nu * mid) > 0) lo = mid;
      else hi = mid;
    }
    peak = 0.5 * (lo + hi);
  }
  const shPeak = Math.sinh(0.5 * peak);
  const G = -2 * x * shPeak * shPeak + logcosh(nu * peak);
  // K e^x = h (f(0)/2 + sum_{j>=1} f(jh)) on the nodes jh of the full line (the integrand is even)
  let s = 0;
  let run = 0; // running rounding bound of the sum
  let terr = 0; // the terms' own errors
  let tail = Infinity;
  for (let j = 0; j < 100000; j++) {
    const u = j * h;
    const sh = Math.sinh(0.5 * u);
    const xc = 2 * x * sh * sh;
    const lc = logcosh(nu * u);
    const gv = lc - xc;
    const t = Math.exp(gv - G) * (j === 0 ? 0.5 : 1);
    // g's error: x (cosh u - 1) within 6u relative, log cosh within 4u (nu u + 1), the node's rounding u |u| times |g'|,
    // the subtraction of G and exp
    const dgv = 6 * U * xc + 4 * U * (nu * u + 1) + U * u * (x * Math.sinh(u) + nu) + 2 * U * (Math.abs(gv) + Math.abs(G)) + U;
    terr += t * dgv * 1.01;
    s += t;
    run += U * s;
    if (u > peak && t > 0) {
      // beyond u: g' <= -x sinh u + nu = -r, so the rest is below t e^{-rh}/(1 - e^{-rh})
      const r = x * Math.sinh(u) - nu;
      if (r > 0) {
        const q = Math.exp(-r * h);
        tail = (t * 1.01 * q) / (1 - q);
        if (tail <= TARGET * s) break;
      }
    } else if (t === 0 && u > peak) {
      tail = 0;
      break;
    }
  }
  const ls = Math.log(s * h);
  const v = G + ls;
  const rel = disc + (tail + terr + run) / s + 2 * U;
  return { v, e: 1.01 * (rel / (1 - rel)) + U * (2 * Math.abs(ls) + 2 * Math.abs(v) + Math.abs(G)) };
}
