import type { CompiledModel, LatticeTable } from "../types";
import { getFftPlan, nextPowerOfTwo } from "../fftplan";
import { MAX_LATTICE } from "../limits";
import { CfError } from "../errors";
import { bulkWindow, lawShape } from "./range";
import { markovTail, momentBounds } from "./moment-tails";

const EPS = Number.EPSILON;
/** a table grows past the tolerance, until its rounding dominates the aliasing bound, only while below this size */
const TIGHT_LATTICE = 1 << 14;

export interface LatticeSolution {
  table: LatticeTable;
  /** upper bound on |pmf error| at every lattice point and on cdf/sf errors */
  errorPmf: number;
  errorCdf: number;
  /** lattice-table: tabulated from the model (recursion / convolution); discretised: a table approximating a
   *  continuous severity (opt-in); lattice-fft: inverse DFT of the CF */
  method: "lattice-table" | "discretised" | "lattice-fft";
  gridSize: number;
  notes: string[];
}

/**
 * pmf of a lattice law origin + k step. Exact tabulation from the model when it offers one; otherwise the
 * inverse DFT of the CF on t_j = 2 pi j / (N step): p_hat_k = (1/N) sum_j phi(t_j) e^{-i t_j x_k}
 * = sum_m p_{k + mN} (aliasing, e.g. Brigham, The FFT and its Applications, ch. 6): every point outside the window lands
 * on exactly one table point, so the mass outside it, bounded from the law's moments (aliasBound), bounds each pmf
 * value's aliasing and their sum. The window grows while that bound is above the tolerance, and (while the table is
 * small) while it is above the rounding's.
 */
export function solveLattice(model: CompiledModel, origin: number, step: number, tol: number): LatticeSolution {
  const notes: string[] = [];
  if (model.latticeTable) {
    const t = model.latticeTable(MAX_LATTICE);
    if (t) {
      // A table built by discretising a continuous severity carries its own cdf error bound (cdfError); a cell's
      // mass is a difference of two cdf values, so it may be off by twice that.
      const disc = t.cdfError ?? 0;
      const err = t.tailMass + 4 * Number.EPSILON * Math.sqrt(t.p.length);
      return {
        table: t,
        errorPmf: err + 2 * disc,
        errorCdf: err + disc + 8 * Number.EPSILON * Math.sqrt(t.p.length),
        method: t.cdfError !== undefined ? "discretised" : "lattice-table",
        gridSize: t.p.length,
        notes,
      };
    }
  }
  if (model.discretisedLattice) {
    throw new CfError("limit_exceeded", "", `the discretised law could not be tabulated within ${MAX_LATTICE} lattice points; choose a larger span or leave out method discretise`);
  }
  const shape = lawShape(model);
  const { from: left, to: right } = bulkWindow(shape, tol / 64, 64);
  const [lo, hi] = model.support;
  let k0 = Math.floor((left - origin) / step + 1e-9) - 2;
  let N = nextPowerOfTwo(Math.ceil((right - left) / step) + 5);
  let out: LatticeSolution | null = null;
  for (let iter = 0; iter < 6; iter++) {
    if (N > MAX_LATTICE) N = MAX_LATTICE;
    const p = latticeByFft(model, origin, step, k0, N);
    const leftOpen = !(Number.isFinite(lo) && origin + k0 * step <= lo);
    const rightOpen = !(Number.isFinite(hi) && origin + (k0 + N - 1) * step >= hi);
    const outside = aliasBound(model, origin, step, leftOpen ? k0 - 1 : null, rightOpen ? k0 + N : null);
    const round = latticeRounding(model, origin, step, N);
    // tailMass: the mass outside the window (the density route reports 1 - tailMass as captured; risk adds it to S).
    // pmf: the aliasing of a point is at most that mass; cdf and sf: their aliased sums and the mass left out both are
    out = {
      table: { origin: origin + k0 * step, step, p, tailMass: outside },
      errorPmf: 2 * outside + round,
      errorCdf: 2 * outside + round * Math.sqrt(N),
      method: "lattice-fft",
      gridSize: N,
      notes,
    };
    // past the tolerance, a small table grows on until the rounding dominates its bound (one more doubling divides a
    // light tail's moment bound by many orders)
    if ((2 * outside <= tol && (2 * outside <= round || N >= TIGHT_LATTICE)) || N >= MAX_LATTICE) break;
    // the N new points go to the open sides, halved when both are
    if (leftOpen) k0 -= rightOpen ? N / 2 : N;
    N *= 2;
  }
  return out!;
}

/**
 * Rounding of latticeByFft's pmf per lattice point, derived for its steps (u = eps/2; every |phi_j| <= 1, so
 * (1/N) sum |phi_j| <= 1 and each step's relative error per term is one per unit of the pmf):
 *  - t_j = 2 pi jj / (N step) within 4 u of itself (2 pi, the product, N step, the division); the CF taken there is off
 *    from phi(t_j) e^{-i t_j o} (o the lattice's origin) by at most |t_j - t^_j| E|X - o| (d/dt E e^{it(X - o)} =
 *    E[i (X - o) e^{it(X - o)}]), with E|X - o| <= sqrt(kappa_2 + (kappa_1 - o)^2) (Cauchy-Schwarz), or kappa_1 + |o| on
 *    [0, inf) without a variance; none without a mean (the bound is then Infinity);
 *  - the window's first point x0 = o + k0 step enters through e^{-i t_j k0 step} = e^{-2 pi i m / N}, m = jj k0 mod N an
 *    exact integer, so the phase -t^_j o - 2 pi m / N (|2 pi m / N| <= pi) errs by u |t_j o| (the product), 2 pi u (2 pi
 *    and the product by m; the division by N is exact) and u (|t_j o| + pi) (the sum); cos and sin within an ulp each
 *    (2 u) and the complex product 2 sqrt(2) u (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec.
 *    3.6): with |t_j| <= pi/step, u ((pi/step)(4 E|X - o| + 2 |o|) + 15) per term, plus the CF's own declared error;
 *  - the transform: Higham sec. 24.1, Thm 24.2 (radix 2, twiddles off by at most mu), ||y^ - y||_2 <= log2(N) eta
 *    ||y||_2 / (1 - log2(N) eta), eta = mu + gamma_4 (sqrt(2) + mu); fft.js (radix 4, each stage the work of two radix-2
 *    levels, twiddles from Math.cos/sin of 2 pi k/N, mu <= (2 pi + 2) u) gives eta <= 16 u; per output, the levels'
 *    errors are at most eta times the absolute sum of the inputs they combine, which partition the inputs: log2(N) eta
 *    per unit of (1/N) sum |x_j| <= 1.
 * This is the pmf's bound per point; the cdf's (a sum of up to N of them) takes sqrt(N) times it: ||e||_1 over a run of
 * points <= sqrt(N) ||e||_2, and both parts have ||e||_2 at most the same per-term bound (||F d||_2 = sqrt(N) ||d||_2).
 */
export function latticeRounding(model: CompiledModel, origin: number, step: number, N: number): number {
  const u = Number.EPSILON / 2;
  const [k1, k2] = model.cumulants(2);
  let spread = Infinity;
  if (k1 !== null && Number.isFinite(k1) && k2 !== null && Number.isFinite(k2)) spread = Math.sqrt(Math.max(k2, 0) + (k1 - origin) ** 2) * (1 + 4 * u);
  else if (k1 !== null && Number.isFinite(k1) && model.support[0] >= 0) spread = (k1 + Math.abs(origin)) * (1 + 2 * u);
  const perTerm = u * ((Math.PI / step) * (4 * spread + 2 * Math.abs(origin)) * (1 + 4 * u) + 15) + (model.cfRelError ?? 0) + (model.cfAbsError ?? 0);
  const eta = 16 * u;
  const levels = Math.log2(N);
  return (perTerm + (levels * eta) / (1 - levels * eta)) * (1 + 1e-10);
}

function latticeByFft(model: CompiledModel, origin: number, step: number, k0: number, N: number): Float64Array {
  const t = new Float64Array(N);
  for (let j = 0; j < N; j++) {
    const jj = j <= N / 2 ? j : j - N;
    t[j] = (2 * Math.PI * jj) / (N * step);
  }
  const re = new Float64Array(N);
  const im = new Float64Array(N);
  model.cf(t, re, im);
  const plan = getFftPlan(N);
  const inp = plan.a;
  // e^{-i t_j x0} = e^{-i t_j origin} e^{-2 pi i m / N}, m = jj k0 mod N taken in exact integers (each factor below N)
  const kr = ((k0 % N) + N) % N;
  for (let j = 0; j < N; j++) {
    const jj = j <= N / 2 ? j : j - N;
    let m = (((jj + N) % N) * kr) % N;
    if (m > N / 2) m -= N;
    const a = -t[j] * origin - (2 * Math.PI * m) / N;
    const c = Math.cos(a);
    const s = Math.sin(a);
    inp[2 * j] = re[j] * c - im[j] * s;
    inp[2 * j + 1] = re[j] * s + im[j] * c;
  }
  plan.forward(inp, plan.b);
  const p = new Float64Array(N);
  for (let q = 0; q < N; q++) p[q] = plan.b[2 * q] / N;
  return p;
}

/**
 * P(X <= origin + kLeft step) + P(X >= origin + kRight step) (a side null when the window covers the support's end
 * there): Markov's inequality at its best even order on |X - c|, c the computed mean, at the nearer open edge
 * (P(X - c >= d_r) + P(c - X >= d_l) <= E|X - c|^n / min(d_l, d_r)^n), and with one side open and the other end of
 * the support finite also on the distance from that end (X - lo >= 0 or hi - X >= 0: every order), the smaller taken;
 * the moments' bounds come from the model's cumulants and their running-error bounds (./moment-tails.ts). Each
 * distance is shortened by the rounding of the edge (origin + k step, two roundings) and of the subtraction.
 * Infinity where the mean or the moments' bounds are missing, or an open edge does not lie past the mean.
 */
export function aliasBound(model: CompiledModel, origin: number, step: number, kLeft: number | null, kRight: number | null): number {
  if (kLeft === null && kRight === null) return 0;
  if (!model.cumulantErrors) return Infinity;
  const k1 = model.cumulants(1)[0];
  if (k1 === null || !Number.isFinite(k1)) return Infinity;
  const dist = (from: number, k: number, sign: number) => {
    const x = origin + k * step;
    const d = sign * (x - from);
    return d - 4 * EPS * (Math.abs(origin) + Math.abs(k * step) + Math.abs(from));
  };
  const dl = kLeft === null ? Infinity : dist(k1, kLeft, -1);
  const dr = kRight === null ? Infinity : dist(k1, kRight, 1);
  const d = Math.min(dl, dr);
  let best = Infinity;
  if (d > 0) {
    const central = momentBounds(model, k1, d);
    if (central) best = markovTail(central, d, true);
  }
  const [lo, hi] = model.support;
  if (kLeft === null && Number.isFinite(lo)) {
    const r = dist(lo, kRight!, 1);
    const mb = r > 0 ? momentBounds(model, lo, r) : null;
    if (mb) best = Math.min(best, markovTail(mb, r, false));
  }
  if (kRight === null && Number.isFinite(hi)) {
    const r = dist(hi, kLeft!, -1);
    const mb = r > 0 ? momentBounds(model, hi, r) : null;
    if (mb) best = Math.min(best, markovTail(mb, r, true));
  }
  return Number.isFinite(best) ? Math.min(best, 1) : Infinity;
}

/** cdf and sf at each lattice point, sf summed from the right so upper tails keep relative accuracy. */
export function latticeCumulative(p: Float64Array): { cdf: Float64Array; sf: Float64Array } {
  const n = p.length;
  const cdf = new Float64Array(n);
  const sf = new Float64Array(n);
  let s = 0;
  let c = 0;
  for (let i = 0; i < n; i++) {
    // Kahan summation
    const y = Math.max(p[i], 0) - c;
    const t = s + y;
    c = t - s - y;
    s = t;
    cdf[i] = s;
  }
  s = 0;
  c = 0;
  for (let i = n - 1; i >= 0; i--) {
    sf[i] = s;
    const y = Math.max(p[i], 0) - c;
    const t = s + y;
    c = t - s - y;
    s = t;
  }
  return { cdf, sf };
}
