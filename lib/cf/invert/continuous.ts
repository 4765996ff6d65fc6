import type { Atom, CompiledModel } from "../types";
import { nextPowerOfTwo } from "../fftplan";
import { fitEndpointKernels } from "./endpoint";
import { sumOnGrid } from "./fft";
import { buildNodes, cutoffFor, probeEnvelope, truncationAt, type Envelope, type Nodes } from "./nodes";
import { kernelAt, makePart, withKernels, type ContinuousPart, type EndpointKernels } from "./part";
import { sumPointwise } from "./pointwise";
import { heavyWindow, lawShape, lightWindow, type LawShape } from "./range";
import { gammaPdf } from "./incgamma";
import type { ErrorEstimate } from "./types";

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

const EPS = Number.EPSILON;
/** assumed relative error of the model's CF values (closed forms and sums through the log-CF) */
const CF_REL = 1e-14;
const MAX_TERMS = 1 << 22;
const MAX_FFT = 1 << 22;
const MAX_POINTWISE_WORK = 4e8;
const MAX_LEVELS = 9;

/** Apply the continuous-part inversion to the request; the law's atoms have already been taken out. */
export function invertContinuous(model: CompiledModel, atoms: Atom[], req: Request, opt: PartOptions): PartOutput {
  const shape = lawShape(model);
  const notes: string[] = [];
  let xmin = Infinity;
  let xmax = -Infinity;
  if (req.kind === "points") {
    for (let i = 0; i < req.x.length; i++) {
      if (req.x[i] < xmin) xmin = req.x[i];
      if (req.x[i] > xmax) xmax = req.x[i];
    }
  } else if (req.count > 0) {
    xmin = req.from;
    xmax = req.from + (req.count - 1) * req.dx;
  }
  const tol = opt.tolerance;
  const aliasTarget = tol / 4;
  const truncTarget = tol / 16;
  // points far beyond a light-tailed bulk (more than two bulk widths out) are answered from the tail bounds
  // instead of stretching the window (and the node count) to reach them
  if (!shape.heavy && !opt.range && req.kind === "points" && req.x.length > 0) {
    const bulk = lightWindow(shape, aliasTarget / 8, shape.center, shape.center);
    const W = bulk.b - bulk.a;
    const lo = bulk.a - 2 * W;
    const hi = bulk.b + 2 * W;
    const near: number[] = [];
    for (let i = 0; i < req.x.length; i++) if (req.x[i] >= lo && req.x[i] <= hi) near.push(i);
    if (near.length < req.x.length) {
      const sub = invertContinuous(model, atoms, { kind: "points", x: Float64Array.from(near, (i) => req.x[i]) }, opt);
      const n = req.x.length;
      const pdf = opt.wantPdf ? new Float64Array(n) : null;
      const cdf = new Float64Array(n);
      const sf = new Float64Array(n);
      let j = 0;
      for (let i = 0; i < n; i++) {
        if (j < near.length && near[j] === i) {
          if (pdf) pdf[i] = sub.pdf![j];
          cdf[i] = sub.cdf[j];
          sf[i] = sub.sf[j];
          j++;
        } else {
          // beyond the window: |F| <= F(a) and |f| <= F(a + d)/d (left), likewise right, all inside the error bounds
          const right = req.x[i] > hi;
          cdf[i] = right ? 1 : 0;
          sf[i] = right ? 0 : 1;
        }
      }
      sub.notes.push(`${n - near.length} point(s) far beyond the bulk answered by the tail bounds (cdf 0 or 1, density 0)`);
      return { ...sub, pdf, cdf, sf };
    }
  }
  let part = makePart(model, atoms, shape.center);
  const win = opt.range
    ? { a: opt.range.from, b: opt.range.to }
    : shape.heavy
      ? heavyWindow(shape, xmin, xmax)
      : lightWindow(shape, aliasTarget / 8, Number.isFinite(xmin) ? xmin : shape.center, Number.isFinite(xmax) ? xmax : shape.center);
  let env = probeEnvelope(part, shape.spread);
  ({ part, env } = maybeKernels(part, env, shape, win, truncTarget, opt.wantPdf, notes));
  let tmax = opt.maxFrequency ?? cutoffFor(env, opt.wantPdf ? truncTarget : Infinity, truncTarget);
  if (!Number.isFinite(tmax)) tmax = env.t[env.t.length - 1];

  const method = opt.method;
  if (!shape.heavy || opt.range) {
    return lightPath(part, env, shape, req, opt, win, tmax, aliasTarget, notes, method);
  }
  return heavyPath(part, env, shape, req, opt, win, tmax, notes, method);
}

/**
 * Try gamma kernels at the support ends (and at the model's location, where laws such as the Laplace have a
 * kink) when |phi| decays slowly; keep the fit that lowers the frequency cut-off the most.
 */
export function maybeKernels(
  part: ContinuousPart,
  env: Envelope,
  shape: LawShape,
  win: { a: number; b: number },
  truncTarget: number,
  wantPdf: boolean,
  notes: string[],
): { part: ContinuousPart; env: Envelope } {
  const [lo, hi] = shape.support;
  const ends: { at: number; side: 1 | -1 }[] = [];
  if (Number.isFinite(lo)) ends.push({ at: lo, side: 1 });
  if (Number.isFinite(hi)) ends.push({ at: hi, side: -1 });
  const loc = part.model.location;
  const candidates: { at: number; side: 1 | -1 }[][] = [];
  if (ends.length) candidates.push(ends);
  if (Number.isFinite(loc) && loc > lo && loc < hi) candidates.push([...ends, { at: loc, side: 1 }]);
  if (candidates.length === 0) return { part, env };
  const c0 = cutoffFor(env, wantPdf ? truncTarget : Infinity, truncTarget);
  // only worth it when the cut-off is far out (slowly decaying CF)
  if (c0 * shape.spread < 1000) return { part, env };
  // kernel tails must be negligible at the window edge on their open side: e^{-60} (60)^J/J! < 1e-19
  let span = win.b - win.a;
  for (const e of [...ends, ...(Number.isFinite(loc) && loc > lo && loc < hi ? [{ at: loc, side: 1 as const }] : [])]) {
    span = Math.min(span, e.side === 1 ? win.b - e.at : e.at - win.a);
  }
  const rate = 60 / Math.max(span, 1e-300);
  let best: { part: ContinuousPart; env: Envelope; cut: number; ks: EndpointKernels[] } | null = null;
  // leading exponent: 1 (jumps and kinks of the density) unless |phi| decays like a non-integer power t^{-k}
  // (density ~ (x - e)^{k-1} at the end, e.g. gamma shapes), measured on the last probed octave
  const d = env.decayClean;
  const power = Number.isFinite(d) && d > 0.05 && Math.abs(d - Math.round(d)) > 0.02 ? Math.round(d * 1000) / 1000 : 1;
  search: for (const pts of candidates) {
    // fewer terms when the expansion is not in steps of 1 (e.g. Weibull: x^{k-1}, x^{2k-1}, ...)
    for (const J of [4, 2, 1]) {
      for (const tBig of [300 / shape.spread, 3000 / shape.spread]) {
        const fit = fitEndpointKernels(part, pts, J, tBig, rate, power);
        if (!fit) continue;
        const p2 = withKernels(part, fit.kernels);
        const e2 = probeEnvelope(p2, shape.spread);
        const c2 = cutoffFor(e2, wantPdf ? truncTarget : Infinity, truncTarget);
        if (c2 < (best ? best.cut : c0) * 0.5) best = { part: p2, env: e2, cut: c2, ks: fit.kernels };
        if (best && best.cut * shape.spread < 300) break search;
      }
    }
    // the interior candidate (location) only when the support ends alone did not help
    if (best) break;
  }
  if (!best) return { part, env };
  notes.push(
    `density behaviour at ${best.ks.map((k) => k.at).join(", ")} handled by subtracting ${best.ks[0].b.length} gamma kernel(s) from shape ${best.ks[0].power} each (inverted in closed form)`,
  );
  return { part: best.part, env: best.env };
}

function kernelTotals(part: ContinuousPart, x: number): { pdf: number; cdf: number; sf: number } {
  let pdf = 0;
  let cdf = 0;
  let sf = 0;
  for (const k of part.kernels) {
    const v = kernelAt(k, x);
    pdf += v.pdf;
    cdf += v.cdf;
    sf += v.sf;
  }
  return { pdf, cdf, sf };
}

function addKernels(part: ContinuousPart, xs: ArrayLike<number>, pdf: Float64Array | null, cdf: Float64Array, sf: Float64Array) {
  if (part.kernels.length === 0) return;
  for (let i = 0; i < xs.length; i++) {
    const v = kernelTotals(part, xs[i]);
    if (pdf) pdf[i] += v.pdf;
    cdf[i] += v.cdf;
    sf[i] += v.sf;
  }
}

function kernelAbs(part: ContinuousPart): number {
  let s = 0;
  for (const k of part.kernels) for (const b of k.b) s += Math.abs(b);
  return s;
}

/** Rounding bounds of the sums (CF relative error, accumulation, atom subtraction) for cdf and pdf. */
function roundingOf(part: ContinuousPart, nodes: Nodes): { cdf: number; pdf: number } {
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

interface Layout {
  N: number;
  x0: number;
  offset: number;
}

/** FFT layout holding [a, b) and the grid; the slack of rounding N up to a power of two goes to the open sides. */
function gridLayout(
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

function evaluate(
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

function gridPoints(req: { from: number; dx: number; count: number }): Float64Array {
  const xs = new Float64Array(req.count);
  for (let i = 0; i < req.count; i++) xs[i] = req.from + i * req.dx;
  return xs;
}

function requestPoints(req: Request): ArrayLike<number> {
  return req.kind === "points" ? req.x : gridPoints(req);
}

function nPoints(req: Request): number {
  return req.kind === "points" ? req.x.length : req.count;
}

function chooseTerms(tmax: number, h: number, method: "fft" | "gil-pelaez", n: number): number {
  let K = Math.max(8, Math.ceil(tmax / h));
  K = Math.min(K, MAX_TERMS);
  if (method === "gil-pelaez") K = Math.min(K, Math.max(1024, Math.floor(MAX_POINTWISE_WORK / Math.max(n, 1))));
  return K;
}

/**
 * Light tails: one window [a, b) holding the bulk and the points. For x in the window the mid-point rule's
 * aliasing error lies in [-F(a), S(b)] (alternating images), and F_h(a) = F(a) + S(b) - ... is computed,
 * so 2 |F_h(a)| bounds it. The density's images are bounded through monotone tails:
 * f(y) <= F(a + d)/d left of a and f(y) <= S(b - d)/d right of b (minimised over a few d).
 * If the bound exceeds its target the window is widened and the sums redone.
 */
function lightPath(
  part0: ContinuousPart,
  env: Envelope,
  shape: LawShape,
  req: Request,
  opt: PartOptions,
  win0: { a: number; b: number },
  tmax: number,
  aliasTarget: number,
  notes: string[],
  method: "fft" | "gil-pelaez",
): PartOutput {
  const part = part0;
  let { a, b } = win0;
  const n = nPoints(req);
  const pdf = opt.wantPdf ? new Float64Array(n) : null;
  const cdf = new Float64Array(n);
  const sf = new Float64Array(n);
  const [lo, hi] = shape.support;
  let last: PartOutput | null = null;
  for (let iter = 0; iter < 5; iter++) {
    let layout: Layout | null = null;
    if (req.kind === "grid" && method === "fft") {
      layout = gridLayout(req, a, b, {
        left: !(Number.isFinite(lo) && a < lo),
        right: !(Number.isFinite(hi) && b > hi),
      });
      if (layout.N > MAX_FFT) {
        layout = null;
        method = "gil-pelaez";
        notes.push("grid too fine for the window: evaluated point by point");
      } else {
        a = layout.x0;
        b = layout.x0 + layout.N * req.dx;
      }
    }
    const T = b - a;
    const h = (2 * Math.PI) / T;
    const K = chooseTerms(tmax, h, method, n);
    const nodes = buildNodes(part, h, K);
    evaluate(part, nodes, req, layout, opt.wantPdf, pdf, cdf, sf);
    // edge probes for the aliasing bounds
    const ds = [T / 128, T / 64, T / 32, T / 16, T / 8, T / 5];
    const ex = new Float64Array(1 + 2 * ds.length);
    ex[0] = a;
    for (let i = 0; i < ds.length; i++) {
      ex[1 + i] = a + ds[i];
      ex[1 + ds.length + i] = b - ds[i];
    }
    const ec = new Float64Array(ex.length);
    const es = new Float64Array(ex.length);
    sumPointwise(nodes, part.center, ex, null, ec, es);
    const trunc = truncationAt(env, K * h);
    const round = roundingOf(part, nodes);
    const kTail = kernelOutside(part, a, b);
    const sumErrCdf = 2 * trunc.cdf + round.cdf;
    const aliasCore = 2 * (Math.abs(ec[0]) + kTail);
    // F(a) <= |F_h(a)| + (its own error), hence the sum error inside the aliasing term as well
    const aliasCdf = aliasCore + 2 * sumErrCdf;
    let minL = Infinity;
    let minR = Infinity;
    for (let i = 0; i < ds.length; i++) {
      const kl = kernelTotals(part, ex[1 + i]);
      const kr = kernelTotals(part, ex[1 + ds.length + i]);
      const fl = Math.max(ec[1 + i] + kl.cdf, 0) + sumErrCdf + aliasCdf;
      const fr = Math.max(es[1 + ds.length + i] + kr.sf, 0) + sumErrCdf + aliasCdf;
      minL = Math.min(minL, fl / ds[i]);
      minR = Math.min(minR, fr / ds[i]);
    }
    // no images on a side where the support ends inside the window
    if (Number.isFinite(lo) && lo >= a) minL = 0;
    if (Number.isFinite(hi) && hi < b) minR = 0;
    // the kernels' own densities beyond the window alias too (decreasing there)
    let kPdfOut = 0;
    for (const k of part.kernels) {
      for (const edge of [a, b]) {
        const y = k.side * (edge - k.at);
        if (y <= 0) continue;
        for (let q = 0; q < k.b.length; q++) kPdfOut += Math.abs(k.b[q]) * gammaPdf(k.power + q, k.rate, y);
      }
    }
    const aliasPdf = 2 * (minL + minR + kPdfOut) + (2 * aliasCdf) / T;
    const error: ErrorEstimate = {
      aliasing: opt.wantPdf ? Math.max(aliasCdf, aliasPdf) : aliasCdf,
      truncation: opt.wantPdf ? 2 * Math.max(trunc.pdf, trunc.cdf) : 2 * trunc.cdf,
      rounding: opt.wantPdf ? Math.max(round.cdf, round.pdf) : round.cdf,
      cdf: aliasCdf + sumErrCdf,
      pdf: opt.wantPdf ? aliasPdf + 2 * trunc.pdf + round.pdf : NaN,
    };
    last = {
      pdf,
      cdf,
      sf,
      error,
      gridSize: layout ? layout.N : K,
      terms: K,
      h,
      maxFrequency: K * h,
      window: { a, b },
      captured: 1 - Math.abs(ec[0]),
      levels: 1,
      notes,
      method,
      solution: { part, nodes, window: { a, b }, shape, error, levels: 1, notes, envelope: env, aliasCore, sumErrCdf },
    };
    // stop when the aliasing bound meets its target or is dominated by the sums' own error floor
    const pdfFloor = (4 * (sumErrCdf + aliasCdf)) / ds[ds.length - 1] + (2 * aliasCdf) / T;
    const ok =
      aliasCore <= Math.max(aliasTarget, sumErrCdf) && (!opt.wantPdf || aliasPdf <= Math.max(aliasTarget, 1.01 * pdfFloor));
    if (ok || opt.range) break;
    // widen: open sides grow by a quarter of the width each
    const grow = T / 4;
    const leftOpen = !(Number.isFinite(lo) && a < lo);
    const rightOpen = !(Number.isFinite(hi) && b > hi);
    if (leftOpen) a -= grow;
    if (rightOpen) b += grow;
    if (!leftOpen && !rightOpen) break;
  }
  if (part.kernels.length) addKernels(part, requestPoints(req), pdf, cdf, sf);
  return last!;
}

/** Mass of the kernels outside [a, b) (their exact tails). */
function kernelOutside(part: ContinuousPart, a: number, b: number): number {
  let s = 0;
  for (const k of part.kernels) {
    const va = kernelAt(k, a);
    const vb = kernelAt(k, b);
    s += Math.abs(va.cdf) + Math.abs(vb.sf);
  }
  return s;
}

/**
 * Power tails: the aliasing error of the mid-point rule has an expansion in powers of the period T
 * (images at distance mT of tails ~ y^{-alpha}, expanded in 1/T), so the sums are repeated with T doubled and
 * combined by Richardson extrapolation with exponents {j alpha + i : j >= 1, i >= 0} in increasing order
 * (tails ~ sum_j c_j y^{-j alpha}, Bergstrom's series for stable laws; the images at x + mT expanded in x/T
 * add the integer steps), shifted by 1 for the density. The error estimate is twice the last change of the
 * extrapolated value, plus the truncation and rounding bounds times the extrapolation's amplification.
 */
function heavyPath(
  part: ContinuousPart,
  env: Envelope,
  shape: LawShape,
  req: Request,
  opt: PartOptions,
  win0: { a: number; b: number },
  tmax: number,
  notes: string[],
  method: "fft" | "gil-pelaez",
): PartOutput {
  const n = nPoints(req);
  const alpha = Math.max(shape.alpha, 0.1);
  const expC = richardsonExponents(alpha, 0);
  const expP = richardsonExponents(alpha, 1);
  const [lo, hi] = shape.support;
  const anchor: "left" | "right" | "center" = Number.isFinite(lo) ? "left" : Number.isFinite(hi) ? "right" : "center";
  const tol = opt.tolerance;
  // Richardson tables per quantity: rows[level][column] of Float64Array(n)
  const tabs: { pdf: Float64Array[][]; cdf: Float64Array[][]; sf: Float64Array[][] } = { pdf: [], cdf: [], sf: [] };
  let layout0: Layout | null = null;
  let T0 = win0.b - win0.a;
  let a0 = win0.a;
  if (req.kind === "grid" && method === "fft") {
    layout0 = gridLayout(req, win0.a, win0.b);
    T0 = layout0.N * req.dx;
    a0 = layout0.x0;
  }
  const centerX = a0 + T0 / 2;
  let amp = 1;
  let result: PartOutput | null = null;
  let pdfErr = Infinity;
  let cdfErr = Infinity;
  let prevBest: { pdf: Float64Array | null; cdf: Float64Array; sf: Float64Array } | null = null;
  let lastNodes: Nodes | null = null;
  for (let lev = 0; lev < MAX_LEVELS; lev++) {
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
    const h = (2 * Math.PI) / T;
    const K = chooseTerms(tmax, h, m, n);
    if (lev > 0 && K * n > MAX_POINTWISE_WORK * 4 && m === "gil-pelaez") break;
    const nodes = buildNodes(part, h, K);
    lastNodes = nodes;
    const pdf = opt.wantPdf ? new Float64Array(n) : null;
    const cdf = new Float64Array(n);
    const sf = new Float64Array(n);
    evaluate(part, nodes, req, layout, opt.wantPdf, pdf, cdf, sf);
    const rowP: Float64Array[] = pdf ? [pdf] : [];
    const rowC: Float64Array[] = [cdf];
    const rowS: Float64Array[] = [sf];
    for (let j = 1; j <= lev; j++) {
      const pC = expC[j - 1];
      const pP = expP[j - 1];
      rowC.push(richardson(rowC[j - 1], tabs.cdf[lev - 1][j - 1], pC));
      rowS.push(richardson(rowS[j - 1], tabs.sf[lev - 1][j - 1], pC));
      if (pdf) rowP.push(richardson(rowP[j - 1], tabs.pdf[lev - 1][j - 1], pP));
    }
    tabs.cdf.push(rowC);
    tabs.sf.push(rowS);
    tabs.pdf.push(rowP);
    if (lev > 0) amp *= (2 ** expC[lev - 1] + 1) / (2 ** expC[lev - 1] - 1);
    const best = { pdf: pdf ? rowP[lev] : null, cdf: rowC[lev], sf: rowS[lev] };
    const trunc = truncationAt(env, K * h);
    const round = roundingOf(part, nodes);
    if (prevBest) {
      cdfErr = 2 * Math.max(maxDiff(best.cdf, prevBest.cdf), maxDiff(best.sf, prevBest.sf), maxDiff(best.cdf, rowC[lev - 1]));
      pdfErr = best.pdf && prevBest.pdf ? 2 * Math.max(maxDiff(best.pdf, prevBest.pdf), maxDiff(best.pdf, rowP[lev - 1])) : NaN;
    }
    const sumC = amp * (2 * trunc.cdf + round.cdf);
    const sumP = amp * (2 * trunc.pdf + round.pdf);
    const error: ErrorEstimate = {
      aliasing: opt.wantPdf ? Math.max(cdfErr, pdfErr) : cdfErr,
      truncation: amp * 2 * (opt.wantPdf ? Math.max(trunc.cdf, trunc.pdf) : trunc.cdf),
      rounding: amp * (opt.wantPdf ? Math.max(round.cdf, round.pdf) : round.cdf),
      cdf: cdfErr + sumC,
      pdf: opt.wantPdf ? pdfErr + sumP : NaN,
    };
    result = {
      pdf: best.pdf ? Float64Array.from(best.pdf) : null,
      cdf: Float64Array.from(best.cdf),
      sf: Float64Array.from(best.sf),
      error,
      gridSize: layout ? layout.N : K,
      terms: K,
      h,
      maxFrequency: K * h,
      window: { a, b: a + T },
      captured: NaN,
      levels: lev + 1,
      notes,
      method: m,
      solution: null,
    };
    prevBest = best;
    if (lev >= 2 && error.cdf <= tol && (!opt.wantPdf || error.pdf <= tol)) break;
  }
  notes.push(`power tails (index ${shape.alpha}): period doubled ${result!.levels - 1} times with Richardson extrapolation`);
  if (part.kernels.length) addKernels(part, requestPoints(req), result!.pdf, result!.cdf, result!.sf);
  const pts = new Float64Array([result!.window.a, result!.window.b]);
  const c2 = new Float64Array(2);
  const s2 = new Float64Array(2);
  // mass inside the last window, from its own (non-extrapolated) sums: informative, not part of the error budget
  sumPointwise(lastNodes!, part.center, pts, null, c2, s2);
  result!.captured = Math.min(1, Math.max(0, s2[0] - s2[1]));
  return result!;
}

function richardsonExponents(alpha: number, shift: number): number[] {
  const set = new Set<number>();
  for (let j = 1; j <= 12; j++) for (let i = 0; i <= 12; i++) set.add(Math.round((j * alpha + i + shift) * 1e9) / 1e9);
  return [...set].sort((u, v) => u - v).slice(0, MAX_LEVELS);
}

function richardson(fine: Float64Array, coarse: Float64Array, p: number): Float64Array {
  const r = 2 ** p;
  const out = new Float64Array(fine.length);
  for (let i = 0; i < fine.length; i++) out[i] = fine[i] + (fine[i] - coarse[i]) / (r - 1);
  return out;
}

function maxDiff(u: Float64Array, v: Float64Array): number {
  let m = 0;
  for (let i = 0; i < u.length; i++) {
    const d = Math.abs(u[i] - v[i]);
    if (d > m || Number.isNaN(d)) m = Number.isNaN(d) ? Infinity : d;
  }
  return m;
}

/** Frequency nodes for a fixed ladder of periods T0 2^l, reusable for any number of pointwise evaluations. */
export interface HeavyLadder {
  part: ContinuousPart;
  levels: Nodes[];
  expC: number[];
  expP: number[];
  /** truncation + rounding bound of the extrapolated cdf and pdf */
  sumErrCdf: number;
  sumErrPdf: number;
  T0: number;
  tmax: number;
  env: Envelope;
  amp: number;
  trC: number;
  trP: number;
}

/** Build the ladder for a power-tailed continuous part (see heavyPath for the expansion behind it). */
export function heavyLadder(model: CompiledModel, atoms: Atom[], T0: number, levels: number, tol: number): HeavyLadder {
  const shape = lawShape(model);
  let part = makePart(model, atoms, shape.center);
  let env = probeEnvelope(part, shape.spread);
  ({ part, env } = maybeKernels(part, env, shape, { a: shape.center - T0 / 2, b: shape.center + T0 / 2 }, tol / 16, true, []));
  let tmax = cutoffFor(env, tol / 16, tol / 16);
  if (!Number.isFinite(tmax)) tmax = env.t[env.t.length - 1];
  const alpha = Math.max(shape.alpha, 0.1);
  const lad: HeavyLadder = {
    part,
    levels: [],
    expC: richardsonExponents(alpha, 0),
    expP: richardsonExponents(alpha, 1),
    sumErrCdf: 0,
    sumErrPdf: 0,
    T0,
    tmax,
    env,
    amp: 1,
    trC: 0,
    trP: 0,
  };
  for (let l = 0; l < levels; l++) growLadder(lad);
  return lad;
}

/** One more period doubling (the nodes of the earlier levels are kept). */
export function growLadder(lad: HeavyLadder): boolean {
  const l = lad.levels.length;
  if (l >= lad.expC.length) return false;
  const h = (2 * Math.PI) / (lad.T0 * 2 ** l);
  const K = Math.min(Math.max(8, Math.ceil(lad.tmax / h)), MAX_TERMS);
  const nd = buildNodes(lad.part, h, K);
  lad.levels.push(nd);
  if (l > 0) lad.amp *= (2 ** lad.expC[l - 1] + 1) / (2 ** lad.expC[l - 1] - 1);
  const tr = truncationAt(lad.env, K * h);
  const rd = roundingOf(lad.part, nd);
  lad.trC = Math.max(lad.trC, 2 * tr.cdf + rd.cdf);
  lad.trP = Math.max(lad.trP, 2 * tr.pdf + rd.pdf);
  lad.sumErrCdf = lad.amp * lad.trC;
  lad.sumErrPdf = lad.amp * lad.trP;
  return true;
}

/**
 * The extrapolated continuous-part values at x (endpoint kernels added in closed form) and the
 * error estimate 2 max(|R_LL - R_{L-1,L-1}|, |R_LL - R_{L,L-1}|) plus the sums' own bound.
 */
export function evalLadder(
  lad: HeavyLadder,
  x: number,
  scratch: { pdf: Float64Array; cdf: Float64Array; sf: Float64Array; one: Float64Array },
): { pdf: number; cdf: number; sf: number; errCdf: number; errPdf: number } {
  const L = lad.levels.length;
  const P: number[][] = [];
  const C: number[][] = [];
  const S: number[][] = [];
  scratch.one[0] = x;
  for (let l = 0; l < L; l++) {
    sumPointwise(lad.levels[l], lad.part.center, scratch.one, scratch.pdf, scratch.cdf, scratch.sf);
    const rp = [scratch.pdf[0]];
    const rc = [scratch.cdf[0]];
    const rs = [scratch.sf[0]];
    for (let j = 1; j <= l; j++) {
      rp.push(rp[j - 1] + (rp[j - 1] - P[l - 1][j - 1]) / (2 ** lad.expP[j - 1] - 1));
      rc.push(rc[j - 1] + (rc[j - 1] - C[l - 1][j - 1]) / (2 ** lad.expC[j - 1] - 1));
      rs.push(rs[j - 1] + (rs[j - 1] - S[l - 1][j - 1]) / (2 ** lad.expC[j - 1] - 1));
    }
    P.push(rp);
    C.push(rc);
    S.push(rs);
  }
  const b = L - 1;
  const d = (T: number[][]) => (b < 1 ? Infinity : 2 * Math.max(Math.abs(T[b][b] - T[b - 1][b - 1]), Math.abs(T[b][b] - T[b][b - 1])));
  const k = kernelTotals(lad.part, x);
  return {
    pdf: P[b][b] + k.pdf,
    cdf: C[b][b] + k.cdf,
    sf: S[b][b] + k.sf,
    errCdf: Math.max(d(C), d(S)) + lad.sumErrCdf,
    errPdf: d(P) + lad.sumErrPdf,
  };
}
