// One product of exact gamma transforms in powers of z = r + s, for the kernel rest of a sum (./damped-kernel-rest.ts).

const EPS = Number.EPSILON;

/**
 * coef prod_i (rho_i / (rho_i + s))^{k_i} with z = r + s and d_i = r - rho_i (rho_i + s = z - d_i):
 *   = coef C z^{-E} prod_i (1 - d_i / z)^{-k_i} = coef C sum_n b_n z^{-(E + n)},  C = prod rho_i^{k_i}, E = sum k_i,
 * for |z| > max |d_i|, |b_n| <= B_n, the coefficients of F(x) = prod_i (1 - |d_i| x)^{-k_i} (a majorant series: each
 * factor's coefficients (k)_n / n! d^n are at most (k)_n / n! |d|^n). The terms n <= N are kept one by one (v_n =
 * coef C b_n, each within err_n), the rest bounded by AC |z|^{-E} T(1/|z|), T(x) = F(x) - sum_{n <= N} B_n x^n (Cauchy's
 * majorant, e.g. Henrici, Applied and Computational Complex Analysis vol. 1, sec. 2.3); N < 0 keeps none (T = F).
 */
export interface GammaMonomial {
  /** E as computed and dE, its distance from the exact sum of the shapes at most (every power of |z| widened by it) */
  E: number;
  dE: number;
  /** |coef| C rounded up (its rounding and coefRel allowed for) */
  AC: number;
  /** v_n = coef C b_n, n <= N, and bounds on their errors */
  v: Float64Array;
  err: Float64Array;
  /** max |d_i| (the series holds for |z| > it) */
  dMax: number;
  /** T(x) and T'(x) with their rounding allowed for */
  tails(x: number): { T: number; T1: number };
}

/**
 * `fs` the factors (shape, rate), `coef` the monomial's weight (relative error at most coefRel), r the kernels' rate, N
 * the last order kept one by one
 */
export function gammaMonomial(fs: readonly { shape: number; rate: number }[], coef: number, coefRel: number, r: number, N: number): GammaMonomial {
  const E = fs.reduce((s, g) => s + g.shape, 0);
  const logC = fs.reduce((s, g) => s + g.shape * Math.log(g.rate), 0);
  const acRel = (8 + 4 * fs.length + 4 * Math.abs(logC)) * EPS + coefRel;
  const AC = Math.abs(coef) * Math.exp(logC) * (1 + acRel);
  const d = fs.map((g) => Math.abs(r - g.rate) * (1 + 2 * EPS));
  const dMax = fs.length ? Math.max(...d) : 0;
  const L = Math.max(N + 1, 1);
  // b_n and B_n by multiplying the factors' binomial series (Bp: as computed; each within (4 n + 8) eps a factor of the
  // exact one: the factor's product and the convolution's sums)
  const b = new Float64Array(L);
  const Bp = new Float64Array(L);
  b[0] = 1;
  Bp[0] = 1;
  for (const g of fs) {
    const f = new Float64Array(L);
    const F = new Float64Array(L);
    let c = 1;
    let C = 1;
    const dg = r - g.rate;
    for (let n = 0; n < L; n++) {
      if (n > 0) {
        c *= ((g.shape + n - 1) / n) * dg;
        C *= ((g.shape + n - 1) / n) * Math.abs(dg);
      }
      f[n] = c;
      F[n] = C;
    }
    const nb = new Float64Array(L);
    const nB = new Float64Array(L);
    for (let n = 0; n < L; n++)
      for (let m = 0; m <= n; m++) {
        nb[n] += b[m] * f[n - m];
        nB[n] += Bp[m] * F[n - m];
      }
    b.set(nb);
    Bp.set(nB);
  }
  const gB = (4 * L + 8) * Math.max(fs.length, 1) * EPS;
  const sgn = coef < 0 ? -1 : 1;
  const v = new Float64Array(Math.max(N + 1, 0));
  const err = new Float64Array(v.length);
  for (let n = 0; n < v.length; n++) {
    v[n] = sgn * AC * b[n];
    err[n] = AC * Bp[n] * (1 + gB) * (gB + 2 * acRel + 32 * (n + 2) * EPS);
  }
  const dE = 4 * Math.max(fs.length, 1) * EPS * E;
  const tails = (x: number) => {
    let Lg = 0;
    let D = 0;
    for (let i = 0; i < fs.length; i++) {
      Lg -= fs[i].shape * Math.log1p(-d[i] * x);
      D += (fs[i].shape * d[i]) / (1 - d[i] * x);
    }
    const F = Math.exp(Lg) * (1 + (16 + 4 * fs.length + 2 * Lg) * EPS);
    const F1 = F * D * (1 + 4 * fs.length * EPS);
    let p = 0;
    let p1 = 0;
    let xn = 1;
    for (let n = 0; n <= N; n++) {
      p += Bp[n] * xn;
      if (n > 0) p1 += n * Bp[n] * (xn / x);
      xn *= x;
    }
    // p within gB of sum B_n x^n <= F, the sums and powers a few eps more
    const slack = gB + (16 + 4 * Math.max(N, 0)) * EPS;
    return { T: Math.max(F - p, 0) + slack * F, T1: Math.max(F1 - p1, 0) + slack * F1 };
  };
  return { E, dE, AC, v, err, dMax, tails };
}
