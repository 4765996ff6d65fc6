import { nextPowerOfTwo } from "../fftplan";
import type { Atom } from "../types";
import { sumOnGrid } from "./fft";
import type { Envelope, Nodes } from "./nodes";
import { kernelAt, tailLawAt, type ContinuousPart } from "./part";
import { RESYNC, sumPointwise } from "./pointwise";
import type { LawShape } from "./range";
import type { ErrorEstimate } from "./types";
import { gridRounding } from "../arg-rounding";
import { partLipschitz } from "./grid-rounding";

/** Shared pieces of the continuous-part inversion (light and power-tailed paths, ladders). */
export type Request =
  | { kind: "points"; x: Float64Array }
  | { kind: "grid"; from: number; dx: number; count: number };

export interface PartOptions {
  method: "fft" | "gil-pelaez";
  tolerance: number;
  wantPdf: boolean;
  range?: { from: number; to: number };
  maxFrequency?: number;
  /** the light path stops (TermsOverCap) before building more nodes than this */
  maxTerms?: number;
}

/** Everything a later caller (quantiles, expected shortfall) needs to evaluate more points cheaply. */
export interface PartSolution {
  part: ContinuousPart;
  nodes: Nodes;
  window: { a: number; b: number };
  shape: LawShape;
  /** per-point error bounds that hold anywhere inside the window (light tails) */
  error: ErrorEstimate;
  levels: number;
  notes: string[];
  envelope: Envelope;
  /** 2 (|F_h(a)| + kernel mass outside): the aliasing bound before adding the sums' own error */
  aliasCore: number;
  /** truncation plus rounding bound of one cdf value */
  sumErrCdf: number;
  /** the node values' errors in it (roundingOf's valuesCdf: the CF values', the atoms' and kernels' subtraction, the nodes') */
  valuesCdf?: number;
  /** valuesCdf's parts apart from the CF values' own, node by node (roundingOf's valuesSplit) */
  valuesSplit?: ValuesSplit;
}

/**
 * The parts of roundingOf's valuesCdf other than the CF values' relative errors, node by node where their form allows: node
 * k's error is at most A + G' t_k (its cdf term (A + G' t_k) / (pi (k + 1/2)), G = G' h / pi the same per node: the atoms'
 * subtraction, the declared absolute error, the nodes' own rounding), plus `rest` charged as a whole (kernels; the nodes'
 * rounding where only its total is known: G is then NaN)
 */
export interface ValuesSplit {
  A: number;
  /** G less the nodes' rounding (gridNode adds it, formed only where asked: it takes the part's Lipschitz constant) */
  B: number;
  /** whether the sums went through the FFT (the nodes' move is then twice) */
  fft: boolean;
  rest: number;
}

export interface PartOutput {
  pdf: Float64Array | null;
  cdf: Float64Array;
  sf: Float64Array;
  error: ErrorEstimate;
  gridSize: number;
  terms: number;
  h: number;
  maxFrequency: number;
  window: { a: number; b: number };
  captured: number;
  levels: number;
  notes: string[];
  method: "fft" | "gil-pelaez";
  solution: PartSolution | null;
  /** 1 where the value was answered by the tail bounds instead of the solution's sums (points far beyond the bulk) */
  beyond?: Uint8Array;
}

export const EPS = Number.EPSILON;
export const MAX_TERMS = 1 << 22;
export const MAX_FFT = 1 << 22;
export const MAX_POINTWISE_WORK = 4e8;
export const MAX_LEVELS = 9;

/** What the inversion sums leave out at x: the kernels (closed form, exact) and the subtracted tail law (with its bounds). */
export function kernelTotals(part: ContinuousPart, x: number): { pdf: number; cdf: number; sf: number; errCdf: number; errPdf: number } {
  let pdf = 0;
  let cdf = 0;
  let sf = 0;
  for (const k of part.kernels) {
    const v = kernelAt(k, x);
    pdf += v.pdf;
    cdf += v.cdf;
    sf += v.sf;
  }
  let errCdf = 0;
  let errPdf = 0;
  if (part.tail) {
    const g = tailLawAt(part.tail, x);
    pdf += g.pdf;
    cdf += g.cdf;
    sf += g.sf;
    errCdf = g.errCdf;
    errPdf = g.errPdf;
  }
  return { pdf, cdf, sf, errCdf, errPdf };
}

/** Add kernelTotals at every point; returns the largest bounds of what was added (0 for kernels alone). */
export function addKernels(
  part: ContinuousPart,
  xs: ArrayLike<number>,
  pdf: Float64Array | null,
  cdf: Float64Array,
  sf: Float64Array,
): { errCdf: number; errPdf: number } {
  let errCdf = 0;
  let errPdf = 0;
  if (part.kernels.length === 0 && !part.tail) return { errCdf, errPdf };
  for (let i = 0; i < xs.length; i++) {
    const v = kernelTotals(part, xs[i]);
    if (pdf) pdf[i] += v.pdf;
    cdf[i] += v.cdf;
    sf[i] += v.sf;
    errCdf = Math.max(errCdf, v.errCdf);
    errPdf = Math.max(errPdf, v.errPdf);
  }
  return { errCdf, errPdf };
}

export function kernelAbs(part: ContinuousPart): number {
  let s = 0;
  for (const k of part.kernels) for (const b of k.b) s += Math.abs(b);
  return s;
}

/**
 * Rounding bounds of the mid-point sums (pointwise.ts, and fft.ts when fftN > 0) for cdf and pdf, derived term by term
 * (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.; u = eps / 2 rounded up to eps):
 * - the CF values: their relative errors e_k (part.ts cfRelError) and the model's declared relative error on |phi(t_k)|
 *   summed into nodes.cfErrCdf / cfErrPdf, and the model's declared absolute error and the atom subtraction's rounding
 *   at every node;
 * - the phases: the node angle t_k y is computed from y = x - c and h y with 3 roundings, an absolute phase error of
 *   3 u t_k |y|; between exact phases (every RESYNC nodes) each rotation by (cos h y, sin h y) adds at most 5 u
 *   (2 u in the rotation factor, 2 sqrt(2) u in the complex product), 5 u (k mod RESYNC) at node k (nodes.driftCdf,
 *   driftPdf); the term's product and the division by k + 1/2 add 4 u;
 * - the summation: blocks of RESYNC terms, then the blocks, recursively: gamma_{RESYNC - 1 + ceil(K / RESYNC)} times
 *   the sum of |terms| (sec. 4.2, eq. 4.4); on the FFT path each bin gathers ceil(K / N) nodes, and the radix-2
 *   FFT's error is at most sqrt(N) log2(N) eta |c|_2 per value with eta = mu + gamma_4 (sqrt 2 + mu) <= 8 u for twiddles
 *   from cos and sin (Theorem 24.2), |c|_2 <= sqrt(ceil(K / N)) times the nodes' 2-norm (l2Cdf, l2Pdf);
 * - the final scaling by 1/pi and M/2 - s: 2 u of the result;
 * - the nodes themselves: the part is evaluated at fl((k + 1/2) h), its phases taken at (k + 1/2) h (../arg-rounding.ts
 *   gridRounding, with the part's Lipschitz constant and the model's own argument slope; left out where not derived).
 * ymax bounds |x - center| over the points (default: the period 2 pi / h, which holds the window).
 */
export function roundingOf(part: ContinuousPart, nodes: Nodes, ymax = (2 * Math.PI) / nodes.h, fftN = 0): { cdf: number; pdf: number; valuesCdf: number; valuesSplit: ValuesSplit } {
  const U = EPS;
  const K = nodes.K;
  const blocks = Math.ceil(K / RESYNC);
  const perTerm = U * (4 + (Math.min(RESYNC, K) - 1 + blocks) + 2);
  // the recurrence's drift, 5 u per rotation since the last exact phase, at each node's own position in its block
  const driftCdf = 5 * U * (nodes.driftCdf ?? (RESYNC - 1) * nodes.absCdf);
  const driftPdf = 5 * U * (nodes.driftPdf ?? (RESYNC - 1) * nodes.absPdf);
  const phase = 3 * U * ymax;
  let fftCdf = 0;
  let fftPdf = 0;
  if (fftN > 1) {
    const fold = Math.ceil(K / fftN);
    const lg = Math.log2(fftN);
    const eta = 8 * U;
    const c = Math.sqrt(fftN) * lg * eta * Math.sqrt(fold) / (1 - lg * eta);
    fftCdf = c * (nodes.l2Cdf ?? nodes.absCdf) + U * fold * nodes.absCdf;
    fftPdf = c * (nodes.l2Pdf ?? nodes.absPdf) + U * fold * nodes.absPdf;
  }
  // nodes built without the per-node sums (none today) fall back to the CF's rounding at 64 units
  const cfCdf = nodes.cfErrCdf ?? 64 * U * nodes.absCdf;
  const cfPdf = nodes.cfErrPdf ?? 64 * U * nodes.absPdf;
  const moment = nodes.absPdfMoment ?? K * nodes.absPdf;
  // per node the atom subtraction (../invert/part.ts evalPart: r -= p_j cos(t x_j), likewise sin, then / w) leaves at
  // most [sum_j p_j (u t |x_j| + 3 u) + n u (1 + pa) + u (1 + pa)] / w in each part (fl(t x_j) off by u t |x_j|, cos and
  // the product 3 u, each of the n subtractions u of a partial sum <= 1 + pa): within eps (atomA + atomB t) per node,
  // atomA = 2 (n + 4) (1 + pa) / w and atomB = 2 sum_j p_j |x_j| / w (twice the one-part bound: both parts, second-order
  // slack); the phase part weighs each atom by its own mass, not every atom by the farthest one's distance
  let pa = 0;
  let px = 0;
  for (const a of part.atoms) {
    pa += a.p;
    px += a.p * Math.abs(a.x);
  }
  const n = part.atoms.length;
  const atomA = n > 0 ? (2 * EPS * (n + 4) * (1 + pa)) / part.weight : 0;
  const atomB = n > 0 ? (2 * EPS * px) / part.weight : 0;
  const T = nodes.K * nodes.h;
  const kAbs = kernelAbs(part);
  // kernel values fall like lambda / t: summed over the nodes, h sum |G_1(t_k)| ~ lambda asinh(T / lambda)
  let kPdf = 0;
  for (const k of part.kernels) kPdf = Math.max(kPdf, k.rate * Math.asinh((nodes.K * nodes.h) / k.rate));
  // a CF with a declared absolute error (numerical CFs) adds that error at every node: (1/pi) sum 1/(k + 1/2) <= (2 + ln K)/pi
  // (less the declared relative error where the nodes charged it per node on |phi(t_k)|)
  const cfAbs = Math.max(part.cfAbsError - (nodes.cfRelTaken ?? 0), 0) / part.weight;
  const harmonic = (2 + Math.log(K)) / Math.PI;
  const grid = gridTerm(part, nodes, fftN > 1);
  // the node values' own errors (the CF's, the atoms' subtraction, the kernels', the nodes' rounding), apart from the
  // sums' arithmetic: an integral of the cdf weighs these by its own kernel (./shortfall.ts nodeValueErrors)
  const valuesCdf =
    grid.cdf + cfCdf +
    // (h/pi) sum_k (atomA + atomB t_k + cfAbs) / t_k = (atomA + cfAbs) (1/pi) sum 1/(k + 1/2) + atomB K h / pi
    (atomA + cfAbs) * harmonic + (atomB * T) / Math.PI + 8 * EPS * (1 + kAbs) * (Math.log(nodes.K + 1) + 1);
  const kern = 8 * EPS * (1 + kAbs) * (Math.log(nodes.K + 1) + 1);
  return {
    valuesCdf,
    valuesSplit: { A: atomA + cfAbs, B: (atomB * nodes.h) / Math.PI, fft: fftN > 1, rest: kern },
    cdf: valuesCdf + perTerm * nodes.absCdf + driftCdf + phase * nodes.absPdf + fftCdf + 2 * U * (nodes.mass + nodes.absCdf),
    pdf:
      grid.pdf + perTerm * nodes.absPdf + driftPdf + phase * nodes.h * moment + cfPdf + fftPdf + 2 * U * nodes.absPdf +
      // (h/pi) sum_k (atomA + atomB t_k + cfAbs) <= ((atomA + cfAbs) T + atomB T^2 / 2) / pi (sum_k h t_k = T^2 / 2)
      ((atomA + cfAbs) * T + (atomB * T * T) / 2) / Math.PI + (8 * EPS * kAbs * kPdf) / Math.PI + 8 * EPS,
  };
}

/** Largest |x - center| over the request's points and the window [a, b] (the phases' size, for roundingOf). */
export function ymaxOf(req: Request, center: number, a: number, b: number): number {
  let m = Math.max(Math.abs(a - center), Math.abs(b - center));
  if (req.kind === "grid") return Math.max(m, Math.abs(req.from - center), Math.abs(req.from + (req.count - 1) * req.dx - center));
  for (let i = 0; i < req.x.length; i++) m = Math.max(m, Math.abs(req.x[i] - center));
  return m;
}

export interface Layout {
  N: number;
  x0: number;
  offset: number;
}

/**
 * The heavy route's level lev: the period T0 2^lev, its window's left end a (anchored at the left, at the right, or centred)
 * and, for a grid request on the FFT, the first level's layout doubled and shifted by whole grid steps to that window (the
 * Gil-Pelaez sums instead where the doubled transform would pass MAX_FFT).
 */
export function levelLayout(
  lev: number,
  T0: number,
  a0: number,
  anchor: "left" | "right" | "center",
  centerX: number,
  layout0: Layout | null,
  req: Request,
  method: "fft" | "gil-pelaez",
): { T: number; a: number; layout: Layout | null; m: "fft" | "gil-pelaez" } {
  const T = T0 * 2 ** lev;
  const a = anchor === "left" ? a0 : anchor === "right" ? a0 + T0 - T : centerX - T / 2;
  let layout: Layout | null = null;
  let m = method;
  if (layout0 && req.kind === "grid") {
    const N = layout0.N * 2 ** lev;
    const shift = Math.round((layout0.x0 - a) / req.dx);
    layout = { N, x0: layout0.x0 - shift * req.dx, offset: layout0.offset + shift };
    if (N > MAX_FFT) {
      m = "gil-pelaez";
      layout = null;
    }
  }
  return { T, a, layout, m };
}

/** FFT layout holding [a, b) and the grid; the slack of rounding N up to a power of two goes to the open sides. */
export function gridLayout(
  req: { from: number; dx: number; count: number },
  a: number,
  b: number,
  open: { left: boolean; right: boolean } = { left: true, right: true },
): Layout {
  let offset = Math.max(0, Math.ceil((req.from - a) / req.dx - 1e-9));
  const after = Math.max(0, Math.ceil((b - (req.from + (req.count - 1) * req.dx)) / req.dx));
  const N = nextPowerOfTwo(offset + req.count + after);
  const slack = N - (offset + req.count + after);
  if (open.left) offset += open.right ? Math.floor(slack / 2) : slack;
  const x0 = req.from - offset * req.dx;
  return { N, x0, offset };
}

export function evaluate(
  part: ContinuousPart,
  nodes: Nodes,
  req: Request,
  layout: Layout | null,
  wantPdf: boolean,
  pdf: Float64Array | null,
  cdf: Float64Array,
  sf: Float64Array,
): void {
  if (req.kind === "grid" && layout) {
    sumOnGrid(nodes, part.center, layout.x0, layout.N, layout.offset, req.count, wantPdf ? pdf : null, cdf, sf);
  } else {
    const xs = req.kind === "points" ? req.x : gridPoints(req);
    sumPointwise(nodes, part.center, xs, wantPdf ? pdf : null, cdf, sf);
  }
}

export function gridPoints(req: { from: number; dx: number; count: number }): Float64Array {
  const xs = new Float64Array(req.count);
  for (let i = 0; i < req.count; i++) xs[i] = req.from + i * req.dx;
  return xs;
}

export function requestPoints(req: Request): ArrayLike<number> {
  return req.kind === "points" ? req.x : gridPoints(req);
}

export function nPoints(req: Request): number {
  return req.kind === "points" ? req.x.length : req.count;
}

export function chooseTerms(tmax: number, h: number, method: "fft" | "gil-pelaez", n: number): number {
  let K = Math.max(8, Math.ceil(tmax / h));
  K = Math.min(K, MAX_TERMS);
  if (method === "gil-pelaez") K = Math.min(K, Math.max(1024, Math.floor(MAX_POINTWISE_WORK / Math.max(n, 1))));
  return K;
}

/** Mass of the kernels outside [a, b) (their exact tails). */
export function kernelOutside(part: ContinuousPart, a: number, b: number): number {
  let s = 0;
  for (const k of part.kernels) {
    const va = kernelAt(k, a);
    const vb = kernelAt(k, b);
    s += Math.abs(va.cdf) + Math.abs(vb.sf);
  }
  return s;
}

export function maxDiff(u: Float64Array, v: Float64Array): number {
  let m = 0;
  for (let i = 0; i < u.length; i++) {
    const d = Math.abs(u[i] - v[i]);
    if (d > m || Number.isNaN(d)) m = Number.isNaN(d) ? Infinity : d;
  }
  return m;
}

/**
 * cdf, sf and density of the whole law (atoms plus w times the continuous part) at one point from a solution's
 * mid-point sums and its endpoint kernels: the evaluation behind the quantile search.
 */
export function solutionAt(sol: PartSolution, atoms: Atom[], w: number): (x: number) => { F: number; S: number; f: number } {
  const one = new Float64Array(1);
  const f1 = new Float64Array(1);
  const c1 = new Float64Array(1);
  const s1 = new Float64Array(1);
  return (x) => {
    one[0] = x;
    sumPointwise(sol.nodes, sol.part.center, one, f1, c1, s1);
    let f = f1[0];
    let F = c1[0];
    let S = s1[0];
    for (const k of sol.part.kernels) {
      const v = kernelAt(k, x);
      f += v.pdf;
      F += v.cdf;
      S += v.sf;
    }
    const m = atomMass(atoms, x);
    return { F: m.below + w * F, S: m.above + w * S, f: w * f };
  };
}

/** Atom mass at or below x, and above x. */
export function atomMass(atoms: Atom[], x: number): { below: number; above: number } {
  let below = 0;
  let above = 0;
  for (const a of atoms) {
    if (a.x <= x) below += a.p;
    else above += a.p;
  }
  return { below, above };
}

/**
 * gridTerm's share of one node in the cdf sum, (u L + S) t_k / (pi (k + 1/2)) = (u L + S) h / pi (../arg-rounding.ts
 * gridRounding with K = 1), with gridTerm's L and S; NaN where gridTerm takes the nodes' envelope-capped total and no
 * Lipschitz constant is derived (only the total is known then)
 */
export function gridNode(part: ContinuousPart, nodes: Nodes, fft: boolean): number {
  const S0 = (part.model.cfArgSlope ?? 0) / part.weight;
  const S = Number.isFinite(S0) ? S0 : 0;
  const L = nodes.exact ? 0 : (fft ? 2 : 1) * partLipschitz(part);
  if (!Number.isFinite(L) && nodes.grid) return NaN;
  return gridRounding(Number.isFinite(L) ? L : 0, S, nodes.h, 1).cdf;
}

/** roundingOf's term for the rounded nodes (each of the part's Lipschitz constant and the model's slope left out where not derived) */
function gridTerm(part: ContinuousPart, nodes: Nodes, fft: boolean): { cdf: number; pdf: number } {
  // exact nodes move nothing; the FFT's phases are those of (k + 1/2) 2 pi / (N dx), which h itself misses by its rounding:
  // the node is then off by up to 2 u t_k
  const S0 = (part.model.cfArgSlope ?? 0) / part.weight;
  const S = Number.isFinite(S0) ? S0 : 0;
  // node by node where buildNodes had the envelope (the nodes' and the model's own moves together, capped there)
  if (nodes.grid) return { cdf: fft ? nodes.grid.cdf2 : nodes.grid.cdf1, pdf: fft ? nodes.grid.pdf2 : nodes.grid.pdf1 };
  const L = nodes.exact ? 0 : (fft ? 2 : 1) * partLipschitz(part);
  return gridRounding(Number.isFinite(L) ? L : 0, S, nodes.h, nodes.K);
}
