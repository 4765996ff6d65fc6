import { nextPowerOfTwo } from "../fftplan";
import type { Atom } from "../types";
import { sumOnGrid } from "./fft";
import type { Envelope, Nodes } from "./nodes";
import { kernelAt, tailLawAt, type ContinuousPart } from "./part";
import { sumPointwise } from "./pointwise";
import type { LawShape } from "./range";
import type { ErrorEstimate } from "./types";

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
}

export const EPS = Number.EPSILON;
/** assumed relative error of the model's CF values (closed forms and sums through the log-CF) */
export const CF_REL = 1e-14;
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

/** Rounding bounds of the sums (CF relative error, accumulation, atom subtraction) for cdf and pdf. */
export function roundingOf(part: ContinuousPart, nodes: Nodes): { cdf: number; pdf: number } {
  const acc = CF_REL + 8 * EPS * Math.sqrt(nodes.K);
  let pa = 0;
  let xm = 0;
  for (const a of part.atoms) {
    pa += a.p;
    xm = Math.max(xm, Math.abs(a.x));
  }
  // per node the atom subtraction leaves ~ eps (1 + pa)/w (1 + t |x|) (phase rounding grows with t)
  const atomTerm = pa > 0 ? ((4 * EPS * (1 + pa)) / part.weight) * (1 + nodes.K * nodes.h * xm) : 0;
  const kAbs = kernelAbs(part);
  // kernel values fall like lambda / t: summed over the nodes, h sum |G_1(t_k)| ~ lambda asinh(T / lambda)
  let kPdf = 0;
  for (const k of part.kernels) kPdf = Math.max(kPdf, k.rate * Math.asinh((nodes.K * nodes.h) / k.rate));
  // a CF with a declared absolute error (numerical CFs) adds that error at every node
  const cfAbs = part.cfAbsError / part.weight;
  return {
    cdf: acc * nodes.absCdf + (atomTerm + cfAbs) * (Math.log(nodes.K + 1) + 1) + 8 * EPS * (1 + kAbs) * (Math.log(nodes.K + 1) + 1),
    pdf: acc * nodes.absPdf + ((atomTerm + cfAbs) * nodes.K * nodes.h) / Math.PI + (8 * EPS * kAbs * kPdf) / Math.PI + 8 * EPS,
  };
}

export interface Layout {
  N: number;
  x0: number;
  offset: number;
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
