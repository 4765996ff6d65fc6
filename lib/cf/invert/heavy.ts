import type { Atom, CompiledModel } from "../types";
import type { DirectLaw } from "../direct/types";

/** a term's law whose images are taken out of the pointwise sums (./images.ts) */
export interface ImageLaw {
  direct: DirectLaw;
  tails: { left: number; right: number };
}
import { imageLadder, imageScratch, type ImageScratch, type ImageSums } from "./images";
import { buildNodes, cutoffFor, probeEnvelope, truncationAt, type Envelope, type Nodes } from "./nodes";
import { makePart, withTailLaw, type ContinuousPart } from "./part";
import { sumPointwise } from "./pointwise";
import { lawShape, type LawShape } from "./range";
import { RICHARDSON_ESTIMATE_NOTE, richardsonAmplification, richardsonLastStep, richardsonExponents, richardsonExponentsMulti, richardsonRow, richardsonRowArrays } from "./richardson";
import {
  MAX_FFT,
  MAX_LEVELS,
  MAX_POINTWISE_WORK,
  MAX_TERMS,
  addKernels,
  chooseTerms,
  evaluate,
  gridLayout,
  kernelTotals,
  maxDiff,
  nPoints,
  requestPoints,
  roundingOf,
  ymaxOf,
  type Layout,
  type PartOptions,
  type PartOutput,
  type Request,
} from "./shared";
import { maybeKernels } from "./continuous";
import type { ErrorEstimate } from "./types";
import { checkDeadline } from "../deadline";

/**
 * Power tails: the aliasing error of the mid-point rule has an expansion in powers of the period T
 * (images at distance mT of tails ~ y^{-alpha}, expanded in 1/T), so the sums are repeated with T doubled and
 * combined by Richardson extrapolation with exponents {j alpha + i : j >= 1, i >= 0} in increasing order
 * (tails ~ sum_j c_j y^{-j alpha}, Bergstrom's series for stable laws; the images at x + mT expanded in x/T
 * add the integer steps), shifted by 1 for the density. The error estimate is twice the last change of the
 * extrapolated value (an estimate, not derived: the answer says so, RICHARDSON_ESTIMATE_NOTE), plus the truncation and
 * rounding bounds times the extrapolation's amplification.
 */
export function heavyPath(
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
  const expC = exponentsFor(shape.tailBases, alpha, 0, MAX_LEVELS);
  const expP = exponentsFor(shape.tailBases, alpha, 1, MAX_LEVELS);
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
  let result: PartOutput | null = null;
  let pdfErr = Infinity;
  let cdfErr = Infinity;
  let prevBest: { pdf: Float64Array | null; cdf: Float64Array; sf: Float64Array } | null = null;
  let lastNodes: Nodes | null = null;
  // the density from the level where its own bound was least: its floor (the sums' bound times the amplification) grows
  // with the levels, so the level the cdf needs may hold a worse density than an earlier one
  let bestPdf: { pdf: Float64Array; err: number } | null = null;
  // once the density's floor alone reaches its best error (the test below that ends the levels), the levels the cdf still
  // needs are summed without the density: their density would not be kept
  let pdfDone = false;
  for (let lev = 0; lev < MAX_LEVELS; lev++) {
    checkDeadline("refine");
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
    const pdf = opt.wantPdf && !pdfDone ? new Float64Array(n) : null;
    const cdf = new Float64Array(n);
    const sf = new Float64Array(n);
    evaluate(part, nodes, req, layout, pdf !== null, pdf, cdf, sf);
    const rowC = richardsonRowArrays(cdf, tabs.cdf[lev - 1], expC);
    const rowS = richardsonRowArrays(sf, tabs.sf[lev - 1], expC);
    const rowP = pdf ? richardsonRowArrays(pdf, tabs.pdf[lev - 1], expP) : [];
    tabs.cdf.push(rowC);
    tabs.sf.push(rowS);
    tabs.pdf.push(rowP);
    const amp = richardsonAmplification(expC, lev + 1);
    const best = { pdf: pdf ? rowP[lev] : null, cdf: rowC[lev], sf: rowS[lev] };
    const trunc = truncationAt(env, K * h);
    // the answer is for the request's points alone (no solution is kept for later points): their phases' size
    const round = roundingOf(part, nodes, ymaxOf(req, part.center, part.center, part.center), layout ? layout.N : 0);
    if (prevBest) {
      cdfErr = 2 * Math.max(maxDiff(best.cdf, prevBest.cdf), maxDiff(best.sf, prevBest.sf), maxDiff(best.cdf, rowC[lev - 1]));
      pdfErr = best.pdf && prevBest.pdf ? 2 * Math.max(maxDiff(best.pdf, prevBest.pdf), maxDiff(best.pdf, rowP[lev - 1])) : NaN;
    }
    const sumC = amp * (2 * trunc.cdf + round.cdf);
    const sumP = amp * (2 * trunc.pdf + round.pdf);
    const error: ErrorEstimate = {
      aliasing: opt.wantPdf && !pdfDone ? Math.max(cdfErr, pdfErr) : cdfErr,
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
    if (result.pdf && error.pdf < (bestPdf?.err ?? Infinity)) bestPdf = { pdf: result.pdf, err: error.pdf };
    const pdfErrBest = bestPdf?.err ?? Infinity;
    if (lev >= 2 && error.cdf <= tol && (!opt.wantPdf || pdfErrBest <= tol)) break;
    // the sums' own bound (truncation and rounding, which another doubling keeps), amplified by one more extrapolation
    // level, already exceeds what is reached: a further level could not lower the error, only double the work
    const ampNext = richardsonAmplification(expC, lev + 2);
    const floorC = ampNext * (2 * trunc.cdf + round.cdf);
    const floorP = ampNext * (2 * trunc.pdf + round.pdf);
    if (lev >= 2 && (error.cdf <= tol || floorC >= error.cdf) && (!opt.wantPdf || pdfErrBest <= tol || floorP >= pdfErrBest)) break;
    if (lev >= 2 && opt.wantPdf && bestPdf && floorP >= bestPdf.err) pdfDone = true;
  }
  if (bestPdf && (!result!.pdf || bestPdf.err < result!.error.pdf)) {
    result!.pdf = bestPdf.pdf;
    result!.error.pdf = bestPdf.err;
  }
  notes.push(`power tails (index ${shape.alpha}): period doubled ${result!.levels - 1} times with Richardson extrapolation`);
  notes.push(RICHARDSON_ESTIMATE_NOTE);
  if (part.kernels.length || part.tail) {
    const added = addKernels(part, requestPoints(req), result!.pdf, result!.cdf, result!.sf);
    result!.error.cdf += added.errCdf;
    if (opt.wantPdf) result!.error.pdf += added.errPdf;
  }
  const pts = new Float64Array([result!.window.a, result!.window.b]);
  const c2 = new Float64Array(2);
  const s2 = new Float64Array(2);
  // mass inside the last window, from its own (non-extrapolated) sums: informative, not part of the error budget
  sumPointwise(lastNodes!, part.center, pts, null, c2, s2);
  result!.captured = Math.min(1, Math.max(0, s2[0] - s2[1]));
  return result!;
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
  /** power-tail index and power terms of what is inverted (for other Richardson tables on the same nodes) */
  alpha: number;
  bases?: number[];
  /** the power-tailed terms whose images are taken out of every level's sums from their direct laws (./images.ts) */
  images: ImageLaw[];
  imageScratch: ImageScratch;
  /** evalLadder's answers at the current levels, by x (cleared when a level is added) */
  memo?: Map<number, LadderValue>;
}

export interface LadderValue {
  pdf: number;
  cdf: number;
  sf: number;
  errCdf: number;
  errPdf: number;
}

/** Richardson exponents from every power term the tails may hold when known, else from the smallest index alone. */
export function exponentsFor(bases: number[] | undefined, alpha: number, shift: number, count: number): number[] {
  return bases && bases.length ? richardsonExponentsMulti(bases, shift, count) : richardsonExponents(alpha, shift, count);
}

/**
 * Subtract the sum's heaviest-tailed term (see TailTerm) when what is left is clearly lighter and the frequency cut-off
 * does not move out much (the term's own CF must decay about as fast as the sum's); the power-tail index of what is
 * inverted is then the remainder's, and Richardson takes its exponents from the remainder's power terms.
 */
export function maybeTailLaw(
  part: ContinuousPart,
  env: Envelope,
  shape: LawShape,
  tol: number,
): { part: ContinuousPart; env: Envelope; alpha: number; bases?: number[] } {
  const alpha = Math.max(shape.alpha, 0.1);
  const p2 = withTailLaw(part);
  if (p2 === part || !p2.tail) return { part, env, alpha, bases: shape.tailBases };
  // worth it only when what is left is lighter (the Richardson exponents then come from the remainder's power terms)
  if (!(p2.tail.remainderAlpha > alpha + 0.05)) return { part, env, alpha, bases: shape.tailBases };
  const e2 = probeEnvelope(p2, shape.spread);
  const c1 = cutoffFor(env, tol / 16, tol / 16);
  const c2 = cutoffFor(e2, tol / 16, tol / 16);
  // up to 4 times the cut-off: the remainder needs two or three fewer period doublings (each doubling the node count)
  // (and a finite one: where neither envelope reaches the target, the whole law's is kept)
  if (!(c2 <= 4 * c1) || !Number.isFinite(c2)) return { part, env, alpha, bases: shape.tailBases };
  return { part: p2, env: e2, alpha: Math.max(p2.tail.remainderAlpha, alpha), bases: p2.tail.indices };
}

/** Build the ladder for a power-tailed continuous part (see heavyPath for the expansion behind it). */
export function heavyLadder(model: CompiledModel, atoms: Atom[], T0: number, levels: number, tol: number): HeavyLadder {
  const shape = lawShape(model);
  let part = makePart(model, atoms, shape.center);
  let env = probeEnvelope(part, shape.spread);
  let alpha: number;
  let bases: number[] | undefined;
  // the heaviest-tailed term's images come out of the sums from its direct law, so its CF (which may fall off like
  // 1/t) is never subtracted and the cut-off stays the whole sum's; failing that, its CF is subtracted (maybeTailLaw)
  // (and the next heaviest term's too when it has a direct law: TailTerm.images)
  const G = model.tailTerm;
  const a0 = Math.max(shape.alpha, 0.1) + 0.05;
  const plan = !G || atoms.length ? null : G.images && G.images.remainderAlpha > Math.max(G.remainderAlpha, a0) ? G.images : G.remainderAlpha > a0 ? { laws: [{ direct: G.direct, tails: G.tails }], remainderAlpha: G.remainderAlpha, indices: G.indices } : null;
  const images: ImageLaw[] = plan ? plan.laws : [];
  if (plan) {
    alpha = Math.max(plan.remainderAlpha, shape.alpha);
    bases = plan.indices;
  } else ({ part, env, alpha, bases } = maybeTailLaw(part, env, shape, tol));
  ({ part, env } = maybeKernels(part, env, shape, { a: shape.center - T0 / 2, b: shape.center + T0 / 2 }, tol / 16, true, []));
  let tmax = cutoffFor(env, tol / 16, tol / 16);
  if (!Number.isFinite(tmax)) tmax = env.t[env.t.length - 1];
  const lad: HeavyLadder = {
    part,
    levels: [],
    expC: exponentsFor(bases, alpha, 0, MAX_LEVELS),
    expP: exponentsFor(bases, alpha, 1, MAX_LEVELS),
    sumErrCdf: 0,
    sumErrPdf: 0,
    T0,
    tmax,
    env,
    amp: 1,
    trC: 0,
    trP: 0,
    alpha,
    bases,
    images,
    imageScratch: imageScratch(),
  };
  // the remainder's faster decay needs fewer doublings to start with (more are added when the probes ask for them)
  const start = part.tail || images.length ? Math.min(levels, 3) : levels;
  for (let l = 0; l < start; l++) growLadder(lad);
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
  lad.memo?.clear();
  lad.amp = richardsonAmplification(lad.expC, l + 1);
  const tr = truncationAt(lad.env, K * h);
  // phases up to |x - center| = T0 here; evalLadder adds what farther points need
  const rd = roundingOf(lad.part, nd, lad.T0);
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
): LadderValue {
  // the root finders and the brackets come back to the same points: the same levels give the same answer
  const memo = (lad.memo ??= new Map());
  const seen = memo.get(x);
  if (seen) return seen;
  if (memo.size >= 4096) memo.clear();
  const value = ladderAt(lad, x, scratch);
  memo.set(x, value);
  return value;
}

function ladderAt(lad: HeavyLadder, x: number, scratch: { pdf: Float64Array; cdf: Float64Array; sf: Float64Array; one: Float64Array }): LadderValue {
  const L = lad.levels.length;
  const P: number[][] = [];
  const C: number[][] = [];
  const S: number[][] = [];
  scratch.one[0] = x;
  let imC = 0;
  let imP = 0;
  const ims: ImageSums[][] = lad.images.map((law) => imageLadder(law.direct, x, lad.T0, L, lad.imageScratch));
  for (let l = 0; l < L; l++) {
    sumPointwise(lad.levels[l], lad.part.center, scratch.one, scratch.pdf, scratch.cdf, scratch.sf);
    let pdf = scratch.pdf[0];
    let cdf = scratch.cdf[0];
    let sf = scratch.sf[0];
    let eC = 0;
    let eP = 0;
    for (let g = 0; g < ims.length; g++) {
      const im = ims[g][l];
      pdf -= im.pdf;
      cdf -= im.cdf;
      sf += im.cdf;
      eC += im.errCdf;
      eP += im.errPdf;
    }
    imC = Math.max(imC, eC);
    imP = Math.max(imP, eP);
    P.push(richardsonRow(pdf, P[l - 1], lad.expP));
    C.push(richardsonRow(cdf, C[l - 1], lad.expC));
    S.push(richardsonRow(sf, S[l - 1], lad.expC));
  }
  const b = L - 1;
  // the levels' rounding (growLadder) holds for |x - center| up to the first period T0; beyond it the phase rounding
  // 3 u t_k |x - center| grows with the distance (shared.ts roundingOf)
  let farPhase = 0;
  const over = Math.abs(x - lad.part.center) - lad.T0;
  if (over > 0) for (let l = 0; l < L; l++) farPhase = Math.max(farPhase, 3 * Number.EPSILON * over * lad.levels[l].absPdf);
  // the last elimination step's correction (an order above the error of R_LL), not the change from the previous diagonal
  // entry (two orders above): the quantile bounds built on it were 1 000 - 10 000 times the actual error
  const d = richardsonLastStep;
  const k = kernelTotals(lad.part, x);
  // the images' bounds enter every level's value: amplified like the sums' own
  return {
    pdf: P[b][b] + k.pdf,
    cdf: C[b][b] + k.cdf,
    sf: S[b][b] + k.sf,
    errCdf: Math.max(d(C), d(S)) + lad.sumErrCdf + lad.amp * (imC + farPhase) + k.errCdf,
    errPdf: d(P) + lad.sumErrPdf + richardsonAmplification(lad.expP, L) * imP + k.errPdf,
  };
}
