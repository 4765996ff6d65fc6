// Derived bounds on a sum's damped transform less its gamma kernels, seeing the kernels cancel the gamma terms' leading powers.
import type { GammaKernel } from "./damped-kernels";

const EPS = Number.EPSILON;
/** exponents within this of E + n are the kernel matching that power (as the series' own merge, ./damped-kernels.ts) */
const SAME = 1e-9;
/** the binomial series in 1/z is used where max |d_i| / |z| is at most this (its tail then falls geometrically) */
const RADIUS = 0.5;
/** the series' terms past the kernels' order bounded one by one (see N) */
const EXTRA = 2;
/** the power a near kernel's exponent residual gives up past the last probe (see decay) */
const NEAR_EPS = 1 / 32;

/** the pieces of a child's bounds the remainder needs (a DampedMajorant of ./damped-majorant.ts) */
export interface ChildBounds {
  atom: number;
  rest(beta: number, t: number): number;
  slope(beta: number, t: number): number;
  /** an exact gamma(shape, rate) term from its lower end: its transform is (rate / (rate + s))^shape */
  gamma?: { shape: number; rate: number };
}

/** bounds on |psi - atom - kernels| and its derivative at every frequency from t on, and a power past t0 */
export interface KernelRest {
  kernels: readonly GammaKernel[];
  /** the bounds on |psi - atom - kernels| (rest) and on its derivative (slope) from t on; Infinity where not derived */
  at(beta: number, t: number): { rest: number; slope: number };
  decay(beta: number, t0: number): { R: number; q: number };
}

const up = (v: number, k = 8) => v * (1 + k * EPS);

/**
 * An independent sum of exact gamma terms G_i = (rho_i / (rho_i + s))^{k_i} (s = beta - i t) and other terms a_j + R_j
 * (atom a_j at their lower end, |R_j| and |R_j'| bounded through the operators), its transform past lo
 * psi = G P, G = prod G_i, P = prod_j (a_j + R_j), less its gamma kernels K (one rate r, all at lo: the endpoint
 * expansion's terms up to its order, ./kernel-carry.ts). With A = prod a_j:
 *   psi - K = G (P - A) + (A G - K),
 * |P - A| bounded as the operators do (sum_j (prod_{l < j} a_l) |R_j| prod_{l > j} (a_l + |R_l|), no cancellation).
 * With z = r + s and d_i = r - rho_i, rho_i + s = z - d_i, so A G = A C z^{-E} prod_i (1 - d_i / z)^{-k_i}, C = prod rho_i^{k_i},
 * E = sum k_i, and the binomial series gives A C sum_n b_n z^{-(E + n)} for |z| > max |d_i|, |b_n| <= B_n, the coefficients
 * of F(x) = prod_i (1 - |d_i| x)^{-k_i} (a majorant series: each factor's coefficients (k)_n / n! d^n are at most (k)_n / n! |d|^n).
 * A kernel w (r / z)^e is w r^e z^{-e}: those of exponent E + n, n <= N (N the largest with E + n <= the kernels' order),
 * cancel A C b_n z^{-(E + n)} up to their difference c_n, and what is left is
 *   |A G - K| <= sum_{n <= N} |c_n| |z|^{-(E + n)} + A C |z|^{-E} T(1/|z|) + sum_{other kernels} |w| (r / |z|)^e,
 * T(x) = F(x) - sum_{n <= N} B_n x^n (Cauchy's majorant, e.g. Henrici, Applied and Computational Complex Analysis vol. 1,
 * sec. 2.3), every term non-increasing in t (|z| = |r + beta - i t| grows with t). The derivative in t is -i d/dz:
 * |c_n| (E + n) |z|^{-(E + n + 1)}, A C |z|^{-E} (E x T(x) + x^2 T'(x)) (x = 1/|z|) and |w| e r^e |z|^{-e - 1}; and
 * |(G (P - A))'| <= |G| sum_i k_i / |rho_i + s| |P - A| + |G| |(P - A)'|. Where |z| is too small for the series the
 * caller's bounds stay (the operators' size plus the kernels' own sizes). Undefined where the sum has no gamma term, its
 * kernels are not of one rate at lo, or a value is not finite.
 */
export function sumKernelRest(cs: readonly ChildBounds[], kernels: readonly GammaKernel[] | undefined, lo: number): KernelRest | undefined {
  if (!kernels || kernels.length === 0) return undefined;
  const gs = cs.filter((c) => c.gamma).map((c) => c.gamma!);
  const os = cs.filter((c) => !c.gamma);
  if (gs.length === 0) return undefined;
  const r = kernels[0].rate;
  if (!kernels.every((k) => k.rate === r && k.at === lo) || !(r > 0) || !Number.isFinite(r)) return undefined;
  const E = gs.reduce((s, g) => s + g.shape, 0);
  const A = os.reduce((s, c) => s * c.atom, 1);
  const logC = gs.reduce((s, g) => s + g.shape * Math.log(g.rate), 0);
  // A C: the product of the atoms (one rounding each), exp of the log-sum (its terms and sum rounded, exp within an ulp)
  const acRel = (8 + 2 * os.length + 4 * gs.length + 4 * Math.abs(logC)) * EPS;
  const AC = A * Math.exp(logC) * (1 + acRel);
  const d = gs.map((g) => Math.abs(r - g.rate) * (1 + 2 * EPS));
  const dMax = Math.max(...d);
  const order = Math.max(...kernels.map((k) => k.shape));
  // EXTRA orders past the kernels' own: their c_n = A C b_n (no kernel there) are bounded by their size, not by the majorant
  // series' B_n, which sees no cancellation (at the kernels' rate the shape-weighted mean of the rho_i, b_1 = sum k_i d_i = 0)
  const N = Math.floor(order - E + SAME) + EXTRA;
  // b_n and B_n, n <= N, by multiplying the factors' binomial series (B_n below raised by the rounding of both: every
  // partial product is at most its majorant's, each step a few roundings)
  const b = new Float64Array(Math.max(N + 1, 1));
  const B = new Float64Array(Math.max(N + 1, 1));
  // Bp: the same coefficients as computed (not rounded up), for the tail T = F - sum Bp x^n with its rounding allowed for
  const Bp = new Float64Array(Math.max(N + 1, 1));
  b[0] = 1;
  B[0] = 1;
  Bp[0] = 1;
  for (const g of gs) {
    const f = new Float64Array(b.length);
    const F = new Float64Array(b.length);
    let c = 1;
    let C = 1;
    const dg = r - g.rate;
    for (let n = 0; n < b.length; n++) {
      if (n > 0) {
        c *= ((g.shape + n - 1) / n) * dg;
        C *= ((g.shape + n - 1) / n) * Math.abs(dg);
      }
      f[n] = c;
      F[n] = C;
    }
    const nb = new Float64Array(b.length);
    const nB = new Float64Array(b.length);
    for (let n = 0; n < b.length; n++)
      for (let m = 0; m <= n; m++) {
        nb[n] += b[m] * f[n - m];
        nB[n] += Bp[m] * F[n - m];
      }
    b.set(nb);
    Bp.set(nB);
  }
  // each B_n as computed within (4 n + 8) eps a factor of the exact one (the factor's product and the convolution's sums)
  const gB = (4 * N + 8) * gs.length * EPS;
  for (let n = 0; n < B.length; n++) B[n] = Bp[n] * (1 + gB + 4 * EPS);
  // E as computed is within dE of the exact sum of the shapes; every power of |z| below is widened by that (x^{-dE})
  const dE = 4 * gs.length * EPS * E;
  // c_n = A C b_n - sum of the kernels' w r^e at E + n (their computation's rounding allowed for), the other kernels apart;
  // a kernel whose exponent e is off E + n by at most `off` (the shapes' sums rounded) leaves w r^e (z^{-e} - z^{-(E + n)}),
  // |.| <= |w r^e| |z|^{-e} (e^{off (|ln |z|| + pi / 2)} - 1) (|arg z| < pi / 2: Re z = r + beta > 0)
  const c = new Float64Array(b.length);
  const cAbs = new Float64Array(b.length);
  for (let n = 0; n <= N; n++) {
    c[n] = AC * b[n];
    cAbs[n] = AC * B[n] * (gB + 2 * acRel + 32 * (n + 2) * EPS);
  }
  const others: GammaKernel[] = [];
  const near: { wr: number; e: number; off: number }[] = [];
  for (const k of kernels) {
    const n = Math.round(k.shape - E);
    const wr = k.w * Math.pow(r, k.shape);
    if (n >= 0 && n <= N && Math.abs(k.shape - E - n) <= SAME) {
      c[n] -= wr;
      cAbs[n] += Math.abs(wr) * 16 * EPS;
      const off = Math.abs(k.shape - E - n) + dE + 4 * EPS * k.shape;
      near.push({ wr: Math.abs(wr) * (1 + 16 * EPS), e: k.shape, off });
    } else others.push(k);
  }
  for (let n = 0; n <= N; n++) cAbs[n] = up(cAbs[n] + Math.abs(c[n]), 4);
  if (![AC, ...cAbs, ...B, ...near.map((v) => v.wr)].every(Number.isFinite)) return undefined;
  // T(x) and T'(x) from F in closed form less the first N + 1 terms: the difference's rounding is a few eps of F (and F'),
  // allowed for in full (it dwarfs T only where |z| is far past where the cut-offs fall)
  const tails = (x: number) => {
    let L = 0;
    let D = 0;
    for (let i = 0; i < gs.length; i++) {
      L -= gs[i].shape * Math.log1p(-d[i] * x);
      D += (gs[i].shape * d[i]) / (1 - d[i] * x);
    }
    const F = Math.exp(L) * (1 + (16 + 4 * gs.length + 2 * L) * EPS);
    const F1 = F * D * (1 + 4 * gs.length * EPS);
    let p = 0;
    let p1 = 0;
    let xn = 1;
    for (let n = 0; n <= N; n++) {
      p += Bp[n] * xn;
      if (n > 0) p1 += n * Bp[n] * (xn / x);
      xn *= x;
    }
    // p within gB of sum B_n x^n <= F, the sums and powers a few eps more
    const slack = gB + (16 + 4 * N) * EPS;
    return { T: Math.max(F - p, 0) + slack * F, T1: Math.max(F1 - p1, 0) + slack * F1 };
  };
  // |P - A| and |(P - A)'| for the other terms
  const restO = (beta: number, t: number, withSlope = true) => {
    const n = os.length;
    const rs = os.map((o) => o.rest(beta, t));
    let rest = 0;
    let slope = 0;
    for (let i = 0; i < n; i++) {
      let p = rs[i];
      for (let j = 0; j < i; j++) p *= os[j].atom;
      for (let j = i + 1; j < n; j++) p *= os[j].atom + rs[j];
      rest += p;
      if (withSlope) {
        let q = os[i].slope(beta, t);
        for (let j = 0; j < n; j++) if (j !== i) q *= os[j].atom + rs[j];
        slope += q;
      }
    }
    const g = 1 + 4 * (n + 1) * EPS;
    return { rest: rest * g, slope: slope * g };
  };
  // |G| and sum k_i / |rho_i + s|
  const gamma = (beta: number, t: number) => {
    let lg = 0;
    let kr = 0;
    for (const g of gs) {
      const m = Math.hypot(g.rate + beta, t);
      lg += g.shape * Math.log(g.rate / m);
      kr += g.shape / m;
    }
    return { G: Math.exp(lg) * (1 + (8 + 4 * gs.length + 2 * Math.abs(lg)) * EPS), kr: up(kr, 4 * gs.length) };
  };
  const bound = (beta: number, t: number) => {
    const zAbs = Math.hypot(r + beta, t) * (1 - 2 * EPS);
    const x = 1 / zAbs;
    if (!(dMax * x <= RADIUS)) return { rest: Infinity, slope: Infinity };
    const { G, kr } = gamma(beta, t);
    const o = restO(beta, t);
    const { T, T1 } = tails(x);
    const lnz = Math.abs(Math.log(x)) + 1e-15;
    const zE = Math.pow(x, E) * Math.exp(dE * lnz) * (1 + (4 + 2 * E) * EPS);
    const Eu = E + dE;
    let rest = G * o.rest + AC * zE * T;
    let slope = G * (kr * o.rest + o.slope) + AC * zE * (Eu * x * T + x * x * T1);
    let zn = zE;
    for (let n = 0; n <= N; n++) {
      rest += cAbs[n] * zn;
      slope += cAbs[n] * (Eu + n) * zn * x;
      zn *= x;
    }
    for (const v of near) {
      // the derivative: w r^e z^{-e-1} ((E + n) (z^delta - 1) - delta), delta = e - (E + n)
      const zr = v.wr * Math.pow(x, v.e) * (1 + (4 + 2 * v.e) * EPS);
      const m = Math.expm1(v.off * (lnz + Math.PI / 2)) * (1 + 4 * EPS);
      rest += zr * m;
      slope += zr * x * ((v.e + v.off) * m + v.off);
    }
    for (const k of others) {
      const v = Math.abs(k.w) * Math.pow(r * x, k.shape) * (1 + 16 * EPS);
      rest += v;
      slope += v * k.shape * x;
    }
    return { rest: up(rest, 16 + 2 * N + 2 * others.length), slope: up(slope, 16 + 2 * N + 2 * others.length) };
  };
  return {
    kernels,
    at: bound,
    // every term above is at most its value with t for |z| (|z| >= t) and non-increasing, each a power E or more of 1/t
    // times a non-increasing factor: past t0 at most its value at t0 (with t0 for |z|) times (t0 / t)^E
    decay: (beta, t0) => {
      const x = 1 / t0;
      // t^{-E} for the exact E within t^{-(E - dE)} needs t >= 1
      if (!(dMax * x <= RADIUS) || !(t0 > 1)) return { R: Infinity, q: 0 };
      const { G } = gamma(beta, t0);
      const Gt = gs.reduce((s, g) => s * Math.pow(g.rate * x, g.shape), 1) * (1 + (8 + 8 * gs.length) * EPS);
      const o = restO(beta, t0, false);
      const { T } = tails(x);
      const lnz = Math.abs(Math.log(x)) + 1e-15;
      const zE = Math.pow(x, E) * Math.exp(dE * lnz) * (1 + (4 + 2 * E) * EPS);
      let R = Math.max(G, Gt) * o.rest + AC * zE * T;
      let zn = zE;
      for (let n = 0; n <= N; n++) {
        R += cAbs[n] * zn;
        zn *= x;
      }
      // |z^{-delta} - 1| <= e^y - 1 <= y e^y, y = off (ln |z| + pi / 2), with ln |z| <= ln t0 + c0 + ln u (u = t / t0 >= 1,
      // |z| <= t + r + beta, c0 = ln(1 + (r + beta) / t0)) and ln u <= u^NEAR_EPS / NEAR_EPS: at most
      // e^{Y0} (Y0 + off / NEAR_EPS) u^{off + NEAR_EPS}, Y0 = off (ln t0 + c0 + pi / 2), so a power off + NEAR_EPS less than e
      const c0 = Math.log1p((r + beta) / t0);
      for (const v of near) {
        const Y0 = v.off * (Math.log(t0) + c0 + Math.PI / 2);
        R += v.wr * Math.pow(x, v.e) * Math.exp(Y0) * (Y0 + v.off / NEAR_EPS) * (1 + (16 + 4 * v.e) * EPS);
      }
      for (const k of others) R += Math.abs(k.w) * Math.pow(r * x, k.shape) * (1 + 16 * EPS);
      const q = Math.min(E - dE, ...near.map((v) => v.e - v.off - NEAR_EPS), ...others.map((k) => k.shape));
      return { R: up(R, 16 + 2 * N + 2 * others.length), q };
    },
  };
}
