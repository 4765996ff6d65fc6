import type { CompiledModel, LatticeTable } from "../types";
import { getFftPlan, nextPowerOfTwo } from "../fftplan";
import { MAX_LATTICE } from "../limits";
import { CfError } from "../errors";
import { bulkWindow, lawShape } from "./range";
import { markovTail, momentBounds } from "./moment-tails";
import { twoProdErr, twoSumErr } from "../moment-error";
import { cfRelError, cfUlps } from "./part";
import { roundOf } from "../table-rounding";

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
    // an exact table without a derived rounding bound is left for the CF route below (its bounds are derived); a
    // discretised one cannot be (its model's CF is the continuous law's): its bounds are then infinite
    const round = t ? tableRounding(t) : null;
    if (t && (round || t.cdfError !== undefined)) {
      // A table built by discretising a continuous severity carries its own cdf error bound (cdfError); a cell's
      // mass is a difference of two cdf values, so it may be off by twice that.
      const disc = t.cdfError ?? 0;
      const r = round ?? { pmf: Infinity, cdf: Infinity };
      const err = t.tailMass + r.pmf;
      return {
        table: t,
        errorPmf: err + 2 * disc,
        errorCdf: t.tailMass + r.cdf + disc,
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
    const { p, pmf: round, cdf: roundCdf } = latticeByFft(model, origin, step, k0, N);
    const leftOpen = !(Number.isFinite(lo) && origin + k0 * step <= lo);
    const rightOpen = !(Number.isFinite(hi) && origin + (k0 + N - 1) * step >= hi);
    const outside = aliasBound(model, origin, step, leftOpen ? k0 - 1 : null, rightOpen ? k0 + N : null);
    // tailMass: the mass outside the window (the density route reports 1 - tailMass as captured; risk adds it to S).
    // pmf: the aliasing of a point is at most that mass; cdf and sf: their aliased sums and the mass left out both are
    // (and risk's S, which adds tailMass, is off by at most twice it)
    out = {
      table: { origin: origin + k0 * step, step, p, tailMass: outside },
      errorPmf: outside + round,
      // the cumulative sums (latticeCumulative, compensated) add at most 2 u (1 + O(N u)) of the sum of |p|: 4 u of it
      errorCdf: 2 * outside + roundCdf + 2 * Number.EPSILON * sumAbs(p),
      method: "lattice-fft",
      gridSize: N,
      notes,
    };
    // past the tolerance, a small table grows on until the rounding dominates its bound (one more doubling divides a
    // light tail's moment bound by many orders)
    if ((2 * outside <= tol && (outside <= round || N >= TIGHT_LATTICE)) || N >= MAX_LATTICE) break;
    // the N new points go to the open sides, halved when both are
    if (leftOpen) k0 -= rightOpen ? N / 2 : N;
    N *= 2;
  }
  return out!;
}

/**
 * The pmf on the window x0 + q step, q < N (x0 = origin + k0 step), by one inverse DFT of the CF, with bounds on its
 * rounding derived for its steps from the CF values actually used (u = eps/2). Each input x_j = phi(t^_j) times the
 * phase errs by at most e_j:
 *  - t_j = 2 pi jj / (N step) within 4 u of itself (2 pi, the product, N step, the division); the CF taken there and
 *    turned by the reference point r's phase is off from phi(t_j) e^{-i t_j r} by at most |t_j - t^_j| E|X - r|
 *    (d/dt E e^{it(X - r)} = E[i (X - r) e^{it(X - r)}]), with E|X - r| <= sqrt(kappa_2 + (kappa_1 - r)^2) (Cauchy-
 *    Schwarz), or kappa_1 + |r| on [0, inf) without a variance; none without a mean (the bound is then Infinity);
 *  - the phase, about the reference r = origin + M step whose bound is the smallest of three (M = 0, k0, or the lattice
 *    point nearest the mean): r as computed is off the lattice point by d (the product's and the sum's rounding found
 *    exactly: Dekker's product and Knuth's sum, error-free transformations, Higham, Accuracy and Stability of Numerical
 *    Algorithms, 2nd ed., sec. 4.3; 0 for the origin), and the offset from r to x0 enters through e^{-i t_j (k0 - M)
 *    step} = e^{-2 pi i m / N}, m = jj (k0 - M) mod N an exact integer; the angle -t^_j r - 2 pi m / N (|2 pi m / N| <=
 *    pi) errs by u |t_j r| (the product), |t_j| d, 2 pi u (2 pi and the product by m; / N is exact) and u (|t_j r| + pi)
 *    (the sum), only by u |t_j r| + |t_j| d when m = 0 (M = k0); cos and sin within an ulp each, and the complex product
 *    2 sqrt(2) u (Higham sec. 3.6): 6 u beside the angle's error, all times |phi^_j|; plus the CF's own declared error
 *    and the rounding of its value from the log-CF (cfRelError, ./part.ts: the model's units of rounding relative to
 *    1 + |L|, exp, cos and sin of L); at t_0 = 0 the exact input is phi(0) = 1, so its error is the computed input's
 *    distance from 1 (found exactly), where smaller.
 * The transform: Higham sec. 24.1, Thm 24.2 (radix 2, twiddles off by at most mu), ||y^ - y||_2 <= log2(N) eta ||y||_2 /
 * (1 - log2(N) eta), eta = mu + gamma_4 (sqrt(2) + mu); fft.js (radix 4, each stage the work of two radix-2 levels,
 * twiddles from Math.cos/sin of 2 pi k/N, mu <= (2 pi + 2) u) gives eta <= 16 u; per output, the levels' errors are at
 * most eta times the absolute sum of the inputs they combine, which partition the inputs.
 * pmf (each point): (1/N) (sum_j e_j + L sum_j |x_j|), L = log2(N) eta / (1 - log2(N) eta). cdf and sf (a run of up to
 * N points): ||.||_1 <= sqrt(N) ||.||_2 and ||F d||_2 = sqrt(N) ||d||_2 give sqrt(sum_j e_j^2) + L sqrt(sum_j |x_j|^2);
 * for the inputs' part also, summing the run first, (1/N) sum_j e_j |sum_q w^{jq}| with the Dirichlet kernel's
 * |sin(pi j m / N) / sin(pi j / N)| <= N / (2 |jj|) (sin(pi y) >= 2y on [0, 1/2]), m <= N at j = 0:
 * e_0 + sum_{j != 0} e_j / (2 |jj|), the smaller of the two taken.
 * Both carry (1 + 2 N u) for the rounding of these sums of positive terms.
 */
function latticeByFft(model: CompiledModel, origin: number, step: number, k0: number, N: number): { p: Float64Array; pmf: number; cdf: number } {
  const u = Number.EPSILON / 2;
  const t = new Float64Array(N);
  for (let j = 0; j < N; j++) {
    const jj = j <= N / 2 ? j : j - N;
    t[j] = (2 * Math.PI * jj) / (N * step);
  }
  const re = new Float64Array(N);
  const im = new Float64Array(N);
  // phi from the log-CF as the compiled model's cf forms it, with the relative error of each value: the model's units
  // of rounding relative to 1 + |L| and exp, cos, sin of L (cfRelError, ./part.ts), plus what special functions add
  model.logCf(t, re, im);
  const ulps = cfUlps(model);
  const extra = model.logCfExtraError;
  const valRel = new Float64Array(N);
  for (let j = 0; j < N; j++) {
    const lr = re[j];
    const li = im[j];
    valRel[j] = cfRelError(ulps, lr, li, t[j], 0) + (extra ? extra(Math.abs(t[j])) : 0);
    const m = Math.exp(lr);
    if (m === 0) {
      re[j] = 0;
      im[j] = 0;
    } else {
      re[j] = m * Math.cos(li);
      im[j] = m * Math.sin(li);
    }
  }
  // the route of the phase: the one whose bound is smaller over these CF values
  const [k1, k2] = model.cumulants(2);
  const spread = (r: number) => {
    if (k1 !== null && Number.isFinite(k1) && k2 !== null && Number.isFinite(k2)) return Math.sqrt(Math.max(k2, 0) + (k1 - r) ** 2) * (1 + 4 * u);
    if (k1 !== null && Number.isFinite(k1) && model.support[0] >= 0) return (k1 + Math.abs(r)) * (1 + 2 * u);
    return Infinity;
  };
  let sumT = 0;
  let sumM = 0;
  let sumMT = 0;
  const mag = new Float64Array(N);
  const cfRel = model.cfRelError ?? 0;
  const cfAbs = model.cfAbsError ?? 0;
  for (let j = 0; j < N; j++) {
    mag[j] = Math.hypot(re[j], im[j]) * (1 + 2 * u);
    sumT += Math.abs(t[j]);
    sumM += mag[j];
    sumMT += mag[j] * Math.abs(t[j]);
  }
  // reference points r = origin + M step: the origin, the window's first point, the lattice point nearest the mean
  const dt = 4 * u * (1 + 8 * u);
  const near = k1 !== null && Number.isFinite(k1) ? Math.round((k1 - origin) / step) : 0;
  // (k0 - M) mod N must be exact: every M within the safe integers of k0
  const routes = [0, k0, Number.isSafeInteger(near - k0) && Number.isSafeInteger(near) ? near : 0].map((M) => {
    const { x: r, off } = M === 0 ? { x: origin, off: 0 } : latticePoint(origin, M, step);
    const exact = M === k0;
    return { M, r, e: dt * spread(r), a: (exact ? 1 : 2) * u * Math.abs(r) * (1 + 2 * u) + off, b: (exact ? 6 : 3 * Math.PI + 6) * u };
  });
  const cost = (v: (typeof routes)[number]) => v.e * sumT + v.a * sumMT + v.b * sumM;
  const v = routes.reduce((best, r) => (cost(r) < cost(best) ? r : best));
  const plan = getFftPlan(N);
  const inp = plan.a;
  // e^{-i t_j x0} = e^{-i t_j r} e^{-2 pi i m / N}, m = jj (k0 - M) mod N in exact integers (each factor below N)
  const kr = (((k0 - v.M) % N) + N) % N;
  let sumE = 0;
  let sumE2 = 0;
  let sumD = 0;
  let sumX = 0;
  let sumX2 = 0;
  for (let j = 0; j < N; j++) {
    const jj = j <= N / 2 ? j : j - N;
    let m = (((jj + N) % N) * kr) % N;
    if (m > N / 2) m -= N;
    const a = m === 0 ? -t[j] * v.r : -t[j] * v.r - (2 * Math.PI * m) / N;
    const c = Math.cos(a);
    const s = Math.sin(a);
    inp[2 * j] = re[j] * c - im[j] * s;
    inp[2 * j + 1] = re[j] * s + im[j] * c;
    const tj = Math.abs(t[j]);
    const e0 = v.e * tj + mag[j] * (v.a * tj + v.b + cfRel + valRel[j]) + cfAbs;
    // at t = 0 the exact input is phi(0) = 1: its error is what was computed there (inp - 1 exact in [1/2, 2], Sterbenz)
    const e = j === 0 && inp[0] >= 0.5 && inp[0] <= 2 ? Math.min(e0, (Math.abs(inp[0] - 1) + Math.abs(inp[1])) * (1 + Number.EPSILON)) : e0;
    const x = mag[j] * (1 + 6 * u);
    sumE += e;
    sumE2 += e * e;
    sumD += jj === 0 ? e : e / (2 * Math.abs(jj));
    sumX += x;
    sumX2 += x * x;
  }
  plan.forward(inp, plan.b);
  const p = new Float64Array(N);
  for (let q = 0; q < N; q++) p[q] = plan.b[2 * q] / N;
  const levels = Math.log2(N);
  const L = (levels * 16 * u) / (1 - levels * 16 * u);
  const sums = 1 + 2 * N * u;
  return { p, pmf: ((sumE + L * sumX) / N) * sums, cdf: (Math.min(Math.sqrt(sumE2), sumD) + L * Math.sqrt(sumX2)) * sums * (1 + 2 * u) };
}

/**
 * x = fl(origin + fl(k step)) and a bound on |x - (origin + k step)|: the product's and the sum's rounding errors found
 * exactly (Dekker's TwoProduct and Knuth's TwoSum, ../moment-error.ts; Higham, Accuracy and Stability of Numerical
 * Algorithms, 2nd ed., sec. 4.3), their sum taken with one more rounding; Infinity where TwoProduct does not apply
 * (a splitting overflows or the product underflows).
 */
function latticePoint(origin: number, k: number, step: number): { x: number; off: number } {
  const p = k * step;
  const x = origin + p;
  const ep = twoProdErr(k, step, p);
  if (ep === null) return { x, off: Infinity };
  const off = (Math.abs(ep) + Math.abs(twoSumErr(origin, p, x))) * (1 + Number.EPSILON);
  return { x, off: Number.isFinite(off) ? off : Infinity };
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

function sumAbs(p: Float64Array): number {
  let s = 0;
  for (let i = 0; i < p.length; i++) s += Math.abs(p[i]);
  return s * (1 + p.length * Number.EPSILON);
}

/**
 * The rounding of a tabulated pmf and of its cumulative sums, where the table carries a derived bound (../table-rounding.ts
 * roundOf: a recursion's per-point bounds, Panjer's running bound, or bounds carried through convolutions, powers and
 * mixtures): every entry within its `pmf` and every cdf or sf value within its `l1` plus the compensated sums' 2u + O(n
 * u^2) of sum p (latticeCumulative; Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 4.3), taken as
 * 2 eps. null for a table without one (the caller does not use it as an exact table).
 */
function tableRounding(t: LatticeTable): { pmf: number; cdf: number } | null {
  const n = t.p.length;
  const r = roundOf(t);
  if (!r) return null;
  let sum = 0;
  for (let k = 0; k < n; k++) sum += Math.max(t.p[k], 0);
  // (the sum of non-negative terms within n u of itself)
  return { pmf: r.pmf, cdf: r.l1 + 2 * Number.EPSILON * sum * (1 + n * Number.EPSILON) };
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
