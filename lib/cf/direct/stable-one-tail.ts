import type { SeriesValue } from "./stable-series";

/**
 * Tail series of the standard S1 stable law with alpha = 1 at z > 0 for skewness b in [-1, 1) (b = beta on the side of
 * beta, -beta on the other), with a remainder bound derived here.
 *
 * With phi(t) = exp(-t (1 + i B log t)) for t > 0, B = 2b/pi (Nolan 2020, Univariate Stable Distributions, def. 1.7),
 * f(z) = (1/pi) Re int_0^inf e^{-izt} phi(t) dt. The integrand is analytic in the quarter plane Re t > 0, Im t < 0 and
 * small at infinity there, so the path may run down the imaginary axis from 0 to -i and then along Im t = -1:
 *   on t = -ir, r in [0, 1]:  e^{-izt} = e^{-zr}, log t = log r - i pi/2, -t (1 + i B log t) = i c r - B r log r, c = 1 + b,
 *     so this part is (1/pi) int_0^1 e^{-zr} Re(-i e^{w(r)}) dr = (1/pi) int_0^1 e^{-zr} Im e^{w(r)} dr, w = r (ic - B log r)
 *     (at b = 0 it is (1/pi) int_0^inf e^{-zr} sin r dr = 1/(pi (1 + z^2)), the Cauchy density);
 *   on t = u - i, u >= 0:  |e^{-izt}| = e^{-z}, and Re t (1 + i B log t) = u (1 - B arg t) + B log|t| >= u - |B| - |B| log(1 + u)
 *     (u atan(1/u) <= 1), so |phi| <= e^{|B|} e^{-u} (1 + u)^{|B|} and the part is at most (2/pi) e^{|B|} e^{-z}.
 * The sf follows by integrating over (z, inf) under the integral (absolutely convergent on both pieces): e^{-zr} / r on
 * the first, and on the second |e^{-izt} / (it)| <= e^{-z} with |t| >= 1, the same bound.
 * Series: e^w = sum_{n<N} w^n/n! + R_N with |R_N| <= |w|^N / N! max(1, e^{Re w}) (Taylor's remainder in integral form),
 * Re w = -B r log r <= |B|/e on [0, 1]. The terms, integrated over (0, inf):
 *   int_0^inf e^{-zr} r^n (log r)^j dr = z^{-n-1} sum_i C(j, i) (-log z)^{j-i} Gamma^(i)(n + 1)
 * (x = zr), less their parts over (1, inf), each at most int_1^inf e^{-zr} r^m dr <= e^{-z} / (z - m), m = n + j < z
 * (log r <= r - 1, so r^m e^{-zr} <= e^{-z} e^{-(z - m)(r - 1)}). With |log r| <= log z + |log x|, the remainder's integral is at most
 *   e^{|B|/e} / N! z^{-N-1} sum_i C(N, i) (c + |B| log z)^{N-i} |B|^i M(N, i),  M(N, i) = int_0^inf e^{-x} x^N |log x|^i dx,
 * M(N, i) = Gamma^(i)(N + 1) for even i and at most the mean of its two even neighbours for odd i (|y|^i <= (y^(i-1) +
 * y^(i+1))/2); for the sf r^N becomes r^(N-1). Gamma^(i)(1) comes from psi(1) = -gamma and psi^(m)(1) =
 * (-1)^(m+1) m! zeta(m + 1) (Abramowitz & Stegun 6.3.2, 6.4.2) by (Gamma^(i)) = sum_m C(i-1, m) Gamma^(i-1-m) psi^(m),
 * and Gamma^(i)(s + 1) = s Gamma^(i)(s) + i Gamma^(i-1)(s) from Gamma(s + 1) = s Gamma(s).
 */

const NMAX = 24;
const U = Number.EPSILON / 2;
/** Euler-Mascheroni constant (Abramowitz & Stegun 6.1.3) */
const EULER_GAMMA = 0.5772156649015329;

/**
 * zeta(s), s >= 2, by Euler-Maclaurin summation with 30 terms and the Bernoulli corrections up to B12 (Abramowitz &
 * Stegun 23.2.3 with 23.1.30): the first omitted term, B14/14! (s)_13 30^{-s-13}, is below 1e-21.
 */
function zeta(s: number): number {
  const N = 30;
  let sum = 0;
  for (let n = N - 1; n >= 1; n--) sum += Math.pow(n, -s);
  sum += Math.pow(N, 1 - s) / (s - 1) + 0.5 * Math.pow(N, -s);
  const B = [1 / 6, -1 / 30, 1 / 42, -1 / 30, 5 / 66, -691 / 2730];
  let rising = s; // (s)_(2k-1)
  let fact = 2; // (2k)!
  for (let k = 1; k <= B.length; k++) {
    sum += (B[k - 1] / fact) * rising * Math.pow(N, -s - 2 * k + 1);
    rising *= (s + 2 * k - 1) * (s + 2 * k);
    fact *= (2 * k + 1) * (2 * k + 2);
  }
  return sum;
}

/** G[n][i] = Gamma^(i)(n + 1), H[n][i] its majorant by the same recurrences in absolute values */
let table: { G: Float64Array[]; H: Float64Array[] } | null = null;
function gammaDerivs(): { G: Float64Array[]; H: Float64Array[] } {
  if (table) return table;
  const I = NMAX + 2;
  const psi = new Float64Array(I);
  psi[0] = -EULER_GAMMA;
  let mf = 1;
  for (let m = 1; m < I; m++) {
    mf *= m;
    psi[m] = (m % 2 ? 1 : -1) * mf * zeta(m + 1);
  }
  const binom = (a: number, b: number) => {
    let r = 1;
    for (let k = 1; k <= b; k++) r = (r * (a - b + k)) / k;
    return r;
  };
  const g0 = new Float64Array(I);
  const h0 = new Float64Array(I);
  g0[0] = 1;
  h0[0] = 1;
  for (let i = 1; i < I; i++) {
    let s = 0;
    let t = 0;
    for (let m = 0; m < i; m++) {
      const c = binom(i - 1, m);
      s += c * g0[i - 1 - m] * psi[m];
      t += c * h0[i - 1 - m] * Math.abs(psi[m]);
    }
    g0[i] = s;
    h0[i] = t;
  }
  const G = [g0];
  const H = [h0];
  for (let n = 1; n <= NMAX + 1; n++) {
    const g = new Float64Array(I);
    const h = new Float64Array(I);
    for (let i = 0; i < I; i++) {
      g[i] = n * G[n - 1][i] + (i ? i * G[n - 1][i - 1] : 0);
      h[i] = n * H[n - 1][i] + (i ? i * H[n - 1][i - 1] : 0);
    }
    G.push(g);
    H.push(h);
  }
  table = { G, H };
  return table;
}

/**
 * Rounding of the table, by induction over the recurrences: each step adds at most 2 roundings relative to the
 * majorant, psi^(m)(1) and zeta carry a few more; G[n][i] is within GERR (n + i + 4) u H[n][i] of Gamma^(i)(n + 1)
 */
const GERR = 8;

interface Law {
  c: number;
  B: number;
  /** per n: the coefficients of log(z)^k of the pdf's and sf's n-th terms, their majorants and rounding bounds */
  pf: Float64Array[];
  ps: Float64Array[];
  qf: Float64Array[];
  qs: Float64Array[];
  ef: Float64Array[];
  es: Float64Array[];
  /** M(N, i) bounds for the remainder (pdf: M(N, i), sf: M(N - 1, i)), per N */
  mf: Float64Array[];
  ms: Float64Array[];
}

const laws = new Map<number, Law>();

function lawOf(b: number): Law {
  let L = laws.get(b);
  if (L) return L;
  const { G, H } = gammaDerivs();
  const c = 1 + b;
  const B = (2 * b) / Math.PI;
  const binom = (a: number, k: number) => {
    let r = 1;
    for (let t = 1; t <= k; t++) r = (r * (a - k + t)) / t;
    return r;
  };
  const pf: Float64Array[] = [new Float64Array(0)];
  const ps: Float64Array[] = [new Float64Array(0)];
  const qf: Float64Array[] = [new Float64Array(0)];
  const qs: Float64Array[] = [new Float64Array(0)];
  const ef: Float64Array[] = [new Float64Array(0)];
  const es: Float64Array[] = [new Float64Array(0)];
  let nf = 1;
  for (let n = 1; n <= NMAX; n++) {
    nf *= n;
    // coef_j = C(n, j) c^(n-j) Im(i^(n-j)) (-B)^j / n!: Im(w^n) / n! = sum_j coef_j r^n (log r)^j
    const coef = new Float64Array(n + 1);
    for (let j = 0; j <= n; j++) {
      const m = (n - j) % 4;
      const s = m === 1 ? 1 : m === 3 ? -1 : 0;
      coef[j] = s === 0 ? 0 : (binom(n, j) * s * Math.pow(c, n - j) * Math.pow(-B, j)) / nf;
    }
    const a = [new Float64Array(n + 1), new Float64Array(n + 1)];
    const q = [new Float64Array(n + 1), new Float64Array(n + 1)];
    const e = [new Float64Array(n + 1), new Float64Array(n + 1)];
    for (let side = 0; side < 2; side++) {
      // pdf: r^n -> Gamma^(i)(n + 1); sf: r^(n-1) -> Gamma^(i)(n)
      const row = side === 0 ? n : n - 1;
      for (let k = 0; k <= n; k++) {
        let s = 0;
        let t = 0;
        let h = 0;
        for (let j = k; j <= n; j++) {
          if (coef[j] === 0) continue;
          const bk = binom(j, k);
          s += coef[j] * bk * G[row][j - k];
          t += Math.abs(coef[j] * bk * G[row][j - k]);
          h += Math.abs(coef[j]) * bk * H[row][j - k] * (GERR * (row + j - k + 4));
        }
        a[side][k] = k % 2 ? -s : s;
        q[side][k] = t;
        // coef's own rounding (powers, binomials, c and B: (4n + 8) u relative), the table's, the sum's (n + 1 terms)
        e[side][k] = ((4 * n + 8 + n + 2) * U * t + U * h) * (1 + 1e-10);
      }
    }
    pf.push(a[0]);
    ps.push(a[1]);
    qf.push(q[0]);
    qs.push(q[1]);
    ef.push(e[0]);
    es.push(e[1]);
  }
  // M(N, i) for N <= NMAX (pdf) and N - 1 (sf), i <= N
  const Mof = (N: number, i: number) => {
    const up = (k: number) => (G[N][k] + GERR * (N + k + 4) * U * H[N][k]) * (1 + 1e-10);
    return i % 2 === 0 ? up(i) : 0.5 * (up(i - 1) + up(i + 1));
  };
  const mf: Float64Array[] = [];
  const ms: Float64Array[] = [];
  for (let N = 0; N <= NMAX; N++) {
    const x = new Float64Array(N + 1);
    const y = new Float64Array(N + 1);
    for (let i = 0; i <= N; i++) {
      x[i] = Mof(N, i) * binom(N, i);
      y[i] = N ? Mof(N - 1, i) * binom(N, i) : 0;
    }
    mf.push(x);
    ms.push(y);
  }
  L = { c, B, pf, ps, qf, qs, ef, es, mf, ms };
  if (laws.size > 64) laws.clear();
  laws.set(b, L);
  return L;
}

/**
 * pdf and sf of the standard S1 stable law with alpha = 1 and skewness b (|b| < 1, or b = 1) at z > 0 with derived
 * bounds, or null where the series is not accurate to `rel` of both (or b = -1: the light side). dz: the uncertainty of
 * z, whose effect on the density is bounded by sup |f'| over [z - dz, z + dz] (the sf's is the caller's).
 */
export function stableOneTail(b: number, z: number, rel = 1e-12, dz = 0): SeriesValue | null {
  if (!(b > -1 && b <= 1) || !(z >= Z_MIN) || !Number.isFinite(z)) return null;
  const L = lawOf(b);
  const { c, B } = L;
  const absB = Math.abs(B);
  const lz = Math.log(z);
  const dlz = 2 * U * lz;
  const zi = 1 / z;
  const A = c + absB * lz;
  const ePre = Math.exp(absB / Math.E) * (1 + 1e-12);
  let f = 0;
  let s = 0;
  let ef = 0;
  let es = 0;
  let af = 0;
  let as = 0;
  let tailF = 0;
  let tailS = 0;
  let remF = Infinity;
  let remS = Infinity;
  let zs = 1; // z^-n, the sf's factor; the pdf's is z^-(n+1)
  let fact = 1; // n!, then (n + 1)! for the remainder
  // terms n < z/2 only (their parts over (1, inf) are bounded for n + j < z)
  const nTop = Math.min(NMAX - 1, Math.ceil(z / 2) - 2);
  for (let n = 1; n <= nTop; n++) {
    zs *= zi;
    const zp = zs * zi;
    const pf = L.pf[n];
    const ps = L.ps[n];
    let vf = 0;
    let vs = 0;
    for (let k = n; k >= 0; k--) {
      vf = vf * lz + pf[k];
      vs = vs * lz + ps[k];
    }
    // majorants (Q), the coefficients' rounding (E) and log z's rounding (D: k lz^(k-1) dlz per coefficient)
    let Qf = 0, Qs = 0, Ef = 0, Es = 0, Df = 0, Ds = 0;
    let lp = 1;
    for (let k = 0; k <= n; k++) {
      Qf += L.qf[n][k] * lp;
      Qs += L.qs[n][k] * lp;
      Ef += L.ef[n][k] * lp;
      Es += L.es[n][k] * lp;
      if (k) {
        Df += k * L.qf[n][k] * (lp / lz) * dlz;
        Ds += k * L.qs[n][k] * (lp / lz) * dlz;
      }
      lp *= lz;
    }
    const tf = zp * vf;
    const ts = zs * vs;
    f += tf;
    s += ts;
    af += Math.abs(tf);
    as += Math.abs(ts);
    // Horner's rounding (gamma_(2n+2) times the majorant, Higham 2002 eq. 5.3) and z^-n's (n + 1 products)
    ef += zp * ((3 * n + 5) * U * (Qf + Ef) * 1.01 + Ef + Df * 1.01);
    es += zs * ((3 * n + 4) * U * (Qs + Es) * 1.01 + Es + Ds * 1.01);
    // sum_j |coef_j| <= (c + |B|)^n / n!, and m = n + j <= 2n (pdf), n - 1 + j <= 2n - 1 (sf)
    const cn = Math.pow(c + absB, n) / fact;
    tailF += cn / (z - 2 * n);
    tailS += cn / (z - 2 * n + 1);
    // the remainder after terms 1..n (N = n + 1), once the terms have become small
    fact *= n + 1;
    if ((Math.abs(tf) <= 1e-17 * Math.abs(f) && Math.abs(ts) <= 1e-17 * Math.abs(s)) || n === nTop) {
      const N = n + 1;
      let sf = 0;
      let ss = 0;
      let pw = Math.pow(A, N);
      const r = A > 0 ? absB / A : 0;
      for (let i = 0; i <= N && pw > 0; i++) {
        // C(N, i) A^(N-i) |B|^i M
        sf += L.mf[N][i] * pw;
        ss += L.ms[N][i] * pw;
        pw *= r;
      }
      remF = (ePre / (Math.PI * fact)) * Math.pow(zi, N + 1) * sf * (1 + 1e-10);
      remS = (ePre / (Math.PI * fact)) * Math.pow(zi, N) * ss * (1 + 1e-10);
      if (remF <= 1e-17 * Math.abs(f / Math.PI) && remS <= 1e-17 * Math.abs(s / Math.PI)) break;
    }
  }
  // the path's second piece and the terms' parts over (1, inf)
  const piece = (2 / Math.PI) * Math.exp(absB - z) * (1 + 1e-12);
  const tails = (Math.exp(-z) * (1 + 1e-12)) / Math.PI;
  const pdf = f / Math.PI;
  const sf = s / Math.PI;
  // the sums' rounding (at most NMAX terms, Higham 2002 eq. 4.4) and the division by pi
  const roundF = ((NMAX + 2) * U * af + ef) / Math.PI + 2 * U * Math.abs(pdf);
  const roundS = ((NMAX + 2) * U * as + es) / Math.PI + 2 * U * Math.abs(sf);
  let pdfErr = remF + piece + tails * tailF + roundF;
  const sfErr = remS + piece + tails * tailS + roundS;
  if (dz > 0) {
    // f' = (1/pi) Re int (-it) e^{-ixt} phi dt: on the first piece at most (1/pi) int_0^1 e^{-xr} r |e^w - 1| dr with
    // |e^w - 1| <= r (c + |B| |log r|) e^{|B|/e}, i.e. (e^{|B|/e}/pi) x^-3 (2 (c + |B| log x) + |B| M(2, 1)), M(2, 1) <= 2.5;
    // on the second |t| <= 1 + u adds int e^{-u} (1 + u)^2 du = 5: (5/pi) e^{|B|} e^{-x}; x >= z - dz
    const x = z - dz;
    if (!(x >= Z_MIN / 2)) return null;
    const d1 = (ePre / (Math.PI * x * x * x)) * (2 * (c + absB * Math.log(x)) + 2.5 * absB);
    pdfErr += dz * (d1 + (5 / Math.PI) * Math.exp(absB - x)) * (1 + 1e-12);
  }
  if (!(pdf > 0 && sf > 0 && pdfErr <= rel * pdf && sfErr <= rel * sf)) return null;
  return { pdf, sf, pdfErr, sfErr };
}

/** z from which the series is tried (below, its terms fall too slowly to reach a useful bound within NMAX terms) */
const Z_MIN = 30;

/**
 * The split of the standard alpha = 1 law's tail at z > 0 (skewness b in [-1, 1) on that side, as above; b = 0 is the
 * Cauchy law) into completely monotone parts (DirectLaw.monotoneSplit), from the same contour: the piece on the imaginary
 * axis is a Laplace transform, f = (1/pi) int_0^1 e^{-zr} g(r) dr with g = Im e^{w(r)} (and g / r for the sf), whose
 * positive and negative parts are completely monotone in z; |g| = e^{Re w} |sin(c r)| <= e^{|B|/e} c r, so their sizes
 * are at most (c/pi) e^{|B|/e} / z^2 (density) and / z (sf). The piece along Im t = -1 is the remainder, at most
 * (2/pi) e^{|B|} e^{-z'} at each z' (module notes), summed over z + m step: that over 1 - e^{-step}. For b = 0 (Cauchy)
 * the Laplace form holds on all of (0, inf) with no remainder: 1/(1 + z^2) = int_0^inf e^{-zr} sin r dr and
 * atan(1/z) = int_0^inf e^{-zr} sin(r)/r dr (the Laplace transforms of sin r and sin(r)/r; common practice), the same
 * size bounds. No stop-loss transform (the mean is infinite).
 */
export function oneTailSplit(b: number, z: number, step: number) {
  if (!(z > 0) || !(step > 0) || !(b >= -1 && b < 1)) return null;
  const B = Math.abs((2 * b) / Math.PI);
  const c = 1 + b;
  const k = ((c / Math.PI) * Math.exp(B / Math.E)) * (1 + 16 * U);
  const rest = b === 0 ? 0 : ((2 / Math.PI) * Math.exp(B - z) / -Math.expm1(-step)) * (1 + 16 * U);
  return { tail: k / z, pdf: k / (z * z), stopLoss: Infinity, restTail: rest, restPdf: rest, restStopLoss: 0 };
}
