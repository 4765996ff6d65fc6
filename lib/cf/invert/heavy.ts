import type { DirectLaw } from "../direct/types";

/** a term's law whose images are taken out of the pointwise sums (./images.ts) */
export interface ImageLaw {
  direct: DirectLaw;
  tails: { left: number; right: number };
}
import { buildNodes, cutoffFor, probeEnvelope, truncationAt, type Envelope, type Nodes } from "./nodes";
import { withTailLaw, type ContinuousPart } from "./part";
import { sumPointwise } from "./pointwise";
import { kernelAliasing } from "./kernel-images";
import { imageScratch } from "./images";
import { subtractImages } from "./image-blocks";
import { bestDerivedEntry, lastRowWeights, residualAliasing, residualLaw, type ResidualLaw } from "./heavy-residual";
import { pairAliasing, pairLaw, type PairLaw } from "./heavy-residual2";
import { densityTop } from "./heavy-density-top";
import type { TailTerm } from "../types";
import type { LawShape } from "./range";
import { RICHARDSON_ESTIMATE_NOTE, richardsonAmplification, richardsonExponents, richardsonExponentsMulti, richardsonRowArrays } from "./richardson";
import {
  MAX_LEVELS,
  MAX_POINTWISE_WORK,
  addKernels,
  chooseTerms,
  evaluate,
  gridLayout,
  levelLayout,
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
import type { ErrorEstimate } from "./types";
import { checkDeadline } from "../deadline";

/**
 * Power tails: the aliasing error of the mid-point rule has an expansion in powers of the period T
 * (images at distance mT of tails ~ y^{-alpha}, expanded in 1/T), so the sums are repeated with T doubled and
 * combined by Richardson extrapolation with exponents {j alpha + i : j >= 1, i >= 0} in increasing order
 * (tails ~ sum_j c_j y^{-j alpha}, Bergstrom's series for stable laws; the images at x + mT expanded in x/T
 * add the integer steps), shifted by 1 for the density. Where the heaviest term's CF or images are taken out and the rest
 * has a variance, or the two heaviest terms' images (imagePlan), each level's aliasing has a derived bound
 * (./heavy-residual.ts, ./heavy-residual2.ts, with the endpoint kernels' images, ./kernel-images.ts), and the entry of the table's last row with the least bound through its weights in the levels is
 * answered when that bound is at most the estimate or the tolerance. Otherwise the error estimate is twice the last change
 * of the extrapolated value (an estimate, not derived: the answer says so, RICHARDSON_ESTIMATE_NOTE), plus the truncation
 * and rounding bounds times the extrapolation's amplification.
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
  const alpha0 = Math.max(shape.alpha, 0.1);
  // where the heaviest term's CF was not taken out (it would move the cut-off) but its law is in closed form, or has
  // power-law majorants (a stable or Student t law, its images then from a few nodes: ./image-blocks.ts), its images come
  // out of every level's sums from that law (./images.ts), as the quantiles' ladder does, and the next heaviest term's too
  // where that lightens what is left further (TailTerm.images): what is left aliases like the rest, with its exponents
  const imgScratch = imageScratch();
  let imC = 0;
  let imP = 0;
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
  // a derived bound on the aliasing left (./heavy-residual.ts) where the heaviest term's CF is taken out (and the endpoint
  // kernels' images, ./kernel-images.ts): each level's own bound, and the last row's entry with the least one
  // (two terms' images: the pair's bound, ./heavy-residual2.ts)
  const pts = requestPoints(req);
  let xLo = Infinity;
  let xHi = -Infinity;
  for (let i = 0; i < pts.length; i++) {
    xLo = Math.min(xLo, pts[i]);
    xHi = Math.max(xHi, pts[i]);
  }
  // where the heaviest term's CF was not taken out (it would move the cut-off) but its law is in closed form, or has
  // power-law majorants (a stable or Student t law, its images then from a few nodes: ./image-blocks.ts), its images come
  // out of every level's sums from that law (./images.ts), as the quantiles' ladder does, and the next heaviest term's too
  // where that leaves less (TailTerm.images): what is left aliases like the rest, with its exponents
  const plan = part.tail || part.atoms.length ? null : imagePlan(part.model.tailTerm, alpha0, pairUsable, xLo <= xHi ? xLo : centerX, xLo <= xHi ? xHi : centerX, T0 * 16);
  const laws = plan ? plan.laws.map((g) => g.direct) : [];
  const alpha = plan ? Math.max(plan.remainderAlpha, alpha0) : alpha0;
  const bases = plan ? plan.indices : shape.tailBases;
  const expC = exponentsFor(bases, alpha, 0, MAX_LEVELS);
  const expP = exponentsFor(bases, alpha, 1, MAX_LEVELS);
  const resid = part.tail ? residualLaw(part.tail) : (plan?.resid ?? null);
  const pair = plan?.pair ?? null;
  // where a derived bound answers within the tolerance, from one period alone (./heavy-density-top.ts)
  const top = densityTop({ part, env, req, opt, layout0, T0, a0, anchor, centerX, method, tmax, laws, resid, pair, pts, xLo, xHi, imgScratch, alpha: shape.alpha, notes });
  if (top) return top;
  const imgC = new Float64Array(laws.length ? n : 0);
  const imgP = new Float64Array(laws.length ? n : 0);
  const rawC: number[] = [];
  const rawP: number[] = [];
  let derived: { cdf: Float64Array; sf: Float64Array; pdf: Float64Array | null; errC: number; errP: number } | null = null;
  for (let lev = 0; lev < MAX_LEVELS; lev++) {
    checkDeadline("refine");
    const { T, a, layout, m } = levelLayout(lev, T0, a0, anchor, centerX, layout0, req, method);
    const h = (2 * Math.PI) / T;
    const K = chooseTerms(tmax, h, m, n);
    if (lev > 0 && K * n > MAX_POINTWISE_WORK * 4 && m === "gil-pelaez") break;
    const nodes = buildNodes(part, h, K, env);
    lastNodes = nodes;
    const pdf = opt.wantPdf && !pdfDone ? new Float64Array(n) : null;
    const cdf = new Float64Array(n);
    const sf = new Float64Array(n);
    evaluate(part, nodes, req, layout, pdf !== null, pdf, cdf, sf);
    // the level's own image bounds (largest over the points) and their running maximum for the estimate's amplification
    const { errCdf: lC, errPdf: lP } = subtractImages(laws, pts, xLo, xHi, T0 * 2 ** lev, tol, imgScratch, imgC, imgP, cdf, sf, pdf);
    if (laws.length) {
      imC = Math.max(imC, lC);
      imP = Math.max(imP, lP);
    }
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
    const sumC = amp * (2 * trunc.cdf + round.cdf + imC);
    const sumP = amp * (2 * trunc.pdf + round.pdf + imP);
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
    if ((resid || pair) && xLo <= xHi) {
      const T = T0 * 2 ** lev;
      const aliasing = (kind: "cdf" | "pdf") => (resid ? residualAliasing(resid, xLo, xHi, T, kind) : pairAliasing(pair!, xLo, xHi, T, kind));
      const ki = part.kernels.length ? kernelAliasing(part.kernels, xLo, xHi, T) : { cdf: 0, pdf: 0 };
      rawC.push(aliasing("cdf") + ki.cdf + 2 * trunc.cdf + round.cdf + lC);
      rawP.push(aliasing("pdf") + ki.pdf + 2 * trunc.pdf + round.pdf + lP);
      const dc = bestDerivedEntry(lastRowWeights(expC, lev + 1), rawC);
      // the density only while it is summed (pdfDone: its best level is kept, with its estimate)
      const dp = pdf ? bestDerivedEntry(lastRowWeights(expP, lev + 1), rawP) : { j: 0, err: Infinity };
      if (!derived || dc.err < derived.errC) derived = { cdf: rowC[dc.j], sf: rowS[dc.j], pdf: pdf ? rowP[dp.j] : null, errC: dc.err, errP: dp.err };
    }
    // levels go on for the derived bound until it reaches the tolerance (at most the fifth level), from the third only
    // while it is within 64 times it (it falls by 2^(alpha + 2) >= 8 or so per level): each level doubles the nodes
    const dWorst = derived ? Math.max(derived.errC, opt.wantPdf ? derived.errP : 0) : Infinity;
    const wantD = (resid !== null || pair !== null) && lev < 4 && dWorst > tol && (lev < 2 || dWorst <= 64 * tol);
    if (wantD) continue;
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
  if (laws.length) notes.push(laws.length === 1 ? "the heaviest-tailed term's images are taken out of the sums from its direct law" : "the two heaviest-tailed terms' images are taken out of the sums from their direct laws");
  notes.push(`power tails (index ${shape.alpha}): period doubled ${result!.levels - 1} times with Richardson extrapolation`);
  // the derived bound where it is at most the estimate or the tolerance (cdf, and pdf where asked): no note then
  if (derived && derived.errC <= Math.max(result!.error.cdf, tol) && (!opt.wantPdf || (derived.pdf && derived.errP <= Math.max(result!.error.pdf, tol)))) {
    result!.cdf = Float64Array.from(derived.cdf);
    result!.sf = Float64Array.from(derived.sf);
    result!.error.cdf = derived.errC;
    result!.error.aliasing = derived.errC;
    if (opt.wantPdf && derived.pdf) {
      result!.pdf = Float64Array.from(derived.pdf);
      result!.error.pdf = derived.errP;
    }
  } else notes.push(RICHARDSON_ESTIMATE_NOTE);
  if (part.kernels.length || part.tail) {
    const added = addKernels(part, requestPoints(req), result!.pdf, result!.cdf, result!.sf);
    result!.error.cdf += added.errCdf;
    if (opt.wantPdf) result!.error.pdf += added.errPdf;
  }
  const ends = new Float64Array([result!.window.a, result!.window.b]);
  const c2 = new Float64Array(2);
  const s2 = new Float64Array(2);
  // mass inside the last window, from its own (non-extrapolated) sums: informative, not part of the error budget
  sumPointwise(lastNodes!, part.center, ends, null, c2, s2);
  result!.captured = Math.min(1, Math.max(0, s2[0] - s2[1]));
  return result!;
}

/** a law whose images the grid/point route takes out: in closed form, or with power-law majorants (./image-blocks.ts) */
export const pairUsable = (d: DirectLaw): boolean => d.method === "closed-form" || d.powerTail !== undefined;

/**
 * Which terms' images come out of the sums from their direct laws (usable ones), with the law behind the derived bound on
 * what they leave: the heaviest term's alone (./heavy-residual.ts), or with the next heaviest (TailTerm.images, the pair's
 * bound ./heavy-residual2.ts) where that leaves lighter tails, or equally light ones with a smaller bound at the period
 * Tref for the points [x0, x1] (the one-term bound's rest may hold a power-tailed term with only a second moment, whose
 * Markov tail falls like T^-2 where the pair's majorants fall faster).
 */
export function imagePlan(
  G: TailTerm | undefined,
  alpha0: number,
  usable: (d: DirectLaw) => boolean,
  x0: number,
  x1: number,
  Tref: number,
): { laws: ImageLaw[]; remainderAlpha: number; indices: number[]; resid: ResidualLaw | null; pair: PairLaw | null } | null {
  if (!G) return null;
  const one = usable(G.direct) && G.remainderAlpha > alpha0 + 0.05 ? { laws: [{ direct: G.direct, tails: G.tails }], remainderAlpha: G.remainderAlpha, indices: G.indices } : null;
  const im = G.images;
  const two = im && im.remainderAlpha >= G.remainderAlpha && im.remainderAlpha > alpha0 + 0.05 && im.laws.every((g) => usable(g.direct)) ? im : null;
  if (!two) return one ? { ...one, resid: residualLaw(G), pair: null } : null;
  const pair = two.laws.length === 2 ? pairLaw(G) : null;
  if (!one || two.remainderAlpha > one.remainderAlpha) return { ...two, resid: null, pair };
  const resid = residualLaw(G);
  const bPair = pair ? pairAliasing(pair, x0, x1, Tref, "cdf") : Infinity;
  const bOne = resid ? residualAliasing(resid, x0, x1, Tref, "cdf") : Infinity;
  return bPair < bOne ? { ...two, resid: null, pair } : { ...one, resid, pair: null };
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

export { evalLadder, growLadder, heavyLadder, type HeavyLadder, type LadderValue } from "./heavy-ladder";
