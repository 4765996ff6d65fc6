import type { Atom, CompiledModel } from "../types";
import { imageLadder, imageScratch, type ImageScratch, type ImageSums } from "./images";
import { buildNodes, cutoffFor, probeEnvelope, truncationAt, type Envelope, type Nodes } from "./nodes";
import { makePart, type ContinuousPart } from "./part";
import { sumPointwise } from "./pointwise";
import { lawShape } from "./range";
import { richardsonAmplification, richardsonLastStep, richardsonRow } from "./richardson";
import { MAX_LEVELS, MAX_TERMS, kernelTotals, roundingOf } from "./shared";
import { maybeKernels } from "./continuous";
import { exponentsFor, imagePlan, maybeTailLaw, type ImageLaw } from "./heavy";
import { kernelAliasing } from "./kernel-images";
import { pairAliasing, pairLaw, type PairLaw } from "./heavy-residual2";
import { bestDerivedEntry, lastRowWeights, residualAliasing, residualLaw, type ResidualLaw } from "./heavy-residual";

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
  /** the law behind a derived bound on the aliasing left (./heavy-residual.ts), where the route allows one */
  resid: ResidualLaw | null;
  pair: PairLaw | null;
  /** each level's own truncation + rounding bound (cdf, pdf) */
  trL: number[];
  trPL: number[];
  tol: number;
  /** residualBucket's bounds by level and bucket (the density's on first use), with the bucket's span and period */
  residCache?: Map<string, { cdf: number; pdf: number | undefined; a: number; b: number; T: number; kPdf: number }>;
  /** set once a value's cdf bound was the Richardson estimate (RICHARDSON_ESTIMATE_NOTE), not a derived one */
  estimated: boolean;
  /**
   * The top level alone (setTop), where a derived bound answers: that bound's least entry of the last row is always the
   * raw last level's (bestDerivedEntry: the weight of R_{b,j} on level b is prod (1 + 1/(2^p - 1)) >= 1 for j > 0), so
   * its values are the top level's sums less the images, the lower levels serving only the estimate. Those are built
   * (fullLadder) only where a value has no derived bound; null where the ladder is built level by level (growLadder).
   */
  top: TopLevel | null;
}

export interface TopLevel {
  l: number;
  nodes: Nodes;
  /** the level's truncation + rounding bound (cdf, pdf), as growLadder's trL, trPL */
  tr: number;
  trP: number;
  /** whether the density's values carry their derived bound (else an infinite one: the quantiles read the density only
   *  for their steps, their bounds from the cdf's) */
  pdfBound: boolean;
}

export interface LadderValue {
  pdf: number;
  cdf: number;
  sf: number;
  errCdf: number;
  errPdf: number;
  /** the derived cdf bound (Infinity where none): the value's errCdf is this one wherever it is finite */
  derivedCdf: number;
}


/**
 * Build the ladder for a power-tailed continuous part (see heavyPath for the expansion behind it). With `pairOnTie` the two
 * heaviest terms' images are taken out also where they leave tails as heavy as the heaviest term's alone, when the pair's
 * bound is the smaller sixteen periods out (imagePlan): the quantiles alone then reach a derived bound, at the price of
 * more levels (an expected shortfall on the same ladder would pay for them with every level's two laws' images).
 */
export function heavyLadder(model: CompiledModel, atoms: Atom[], T0: number, levels: number, tol: number, pairOnTie = false, topOnly = false): HeavyLadder {
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
  const tie = pairOnTie && G && !atoms.length ? imagePlan(G, Math.max(shape.alpha, 0.1), () => true, shape.center, shape.center, 16 * T0) : null;
  const plan = tie?.pair
    ? tie
    : !G || atoms.length
      ? null
      : G.images && G.images.remainderAlpha > Math.max(G.remainderAlpha, a0)
        ? G.images
        : G.remainderAlpha > a0
          ? { laws: [{ direct: G.direct, tails: G.tails }], remainderAlpha: G.remainderAlpha, indices: G.indices }
          : null;
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
    // a derived bound needs a single term taken out (its images or its CF); the endpoint kernels' images are bounded
    // beside it (./kernel-images.ts)
    resid: images.length === 1 && G && images[0].direct === G.direct ? residualLaw(G) : !images.length && part.tail ? residualLaw(part.tail) : null,
    // two terms' images: the pair's bound (./heavy-residual2.ts), the cdf's alone
    pair: tie?.pair ? tie.pair : images.length === 2 && G && plan === G.images ? pairLaw(G) : null,
    trL: [],
    trPL: [],
    estimated: false,
    tol,
    top: null,
  };
  // with `topOnly` and a derived bound to answer, no level yet: the caller picks the top one (./heavy-top.ts)
  if (topOnly && (lad.resid || lad.pair)) return lad;
  // the remainder's faster decay needs fewer doublings to start with (more are added when the probes ask for them)
  const start = part.tail || images.length ? Math.min(levels, 3) : levels;
  for (let l = 0; l < start; l++) growLadder(lad);
  return lad;
}

/** the nodes of level l: K = tmax / h (at least 8, at most MAX_TERMS) */
export function levelNodes(lad: HeavyLadder, l: number): Nodes {
  const h = (2 * Math.PI) / (lad.T0 * 2 ** l);
  const K = Math.min(Math.max(8, Math.ceil(lad.tmax / h)), MAX_TERMS);
  return buildNodes(lad.part, h, K);
}

/** level l's own truncation + rounding bound (cdf, pdf): phases up to |x - center| = T0 (evalLadder adds what farther points need) */
function levelBound(lad: HeavyLadder, nd: Nodes): { cdf: number; pdf: number } {
  const tr = truncationAt(lad.env, nd.K * nd.h);
  const rd = roundingOf(lad.part, nd, lad.T0);
  return { cdf: 2 * tr.cdf + rd.cdf, pdf: 2 * tr.pdf + rd.pdf };
}

/** Answer from level l alone (see HeavyLadder.top); the levels built so far are dropped. */
export function setTop(lad: HeavyLadder, l: number, pdfBound = false): void {
  const nodes = levelNodes(lad, l);
  const b = levelBound(lad, nodes);
  lad.levels = [];
  lad.top = { l, nodes, tr: b.cdf, trP: b.pdf, pdfBound };
  lad.memo?.clear();
  lad.estimated = false;
}

/** The levels below the top one, for the estimate (the top level's nodes kept as the last). */
function fullLadder(lad: HeavyLadder): void {
  const top = lad.top!;
  while (lad.levels.length < top.l) growLadder(lad);
  if (lad.levels.length === top.l) growLadder(lad, top.nodes);
}

/** One more period doubling (the nodes of the earlier levels are kept). */
export function growLadder(lad: HeavyLadder, built?: Nodes): boolean {
  const l = lad.levels.length;
  if (l >= lad.expC.length) return false;
  if (lad.top && l > lad.top.l) return false;
  const nd = built ?? levelNodes(lad, l);
  const K = nd.K;
  const h = nd.h;
  lad.levels.push(nd);
  lad.memo?.clear();
  // the values at the earlier levels are not answers any more
  lad.estimated = false;
  lad.amp = richardsonAmplification(lad.expC, l + 1);
  const b = levelBound(lad, nd);
  lad.trL.push(b.cdf);
  lad.trPL.push(b.pdf);
  lad.trC = Math.max(lad.trC, b.cdf);
  lad.trP = Math.max(lad.trP, b.pdf);
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

type Scratch = { pdf: Float64Array; cdf: Float64Array; sf: Float64Array; one: Float64Array };

/**
 * The top level's answer (HeavyLadder.top): its sums less the images, with its own derived bound (the residual's, the
 * images', truncation and rounding, the far phases'), term for term the last row's least-bound entry of the full table;
 * null where the cdf's bound is not finite (the full table's estimate answers). A density without a derived bound of
 * its own (the pair's where its majorants do not reach, or none asked: TopLevel.pdfBound) comes with an infinite bound.
 */
function topAt(lad: HeavyLadder, top: TopLevel, x: number, scratch: Scratch): LadderValue | null {
  const { l, nodes } = top;
  scratch.one[0] = x;
  sumPointwise(nodes, lad.part.center, scratch.one, scratch.pdf, scratch.cdf, scratch.sf);
  let pdf = scratch.pdf[0];
  let cdf = scratch.cdf[0];
  let sf = scratch.sf[0];
  let eC = 0;
  let eP = 0;
  // the images at x + m T0 2^l: the same points and bounds as imageLadder's level l (scaling by 2^l is exact)
  for (const law of lad.images) {
    const im = imageLadder(law.direct, x, lad.T0 * 2 ** l, 1, lad.imageScratch)[0];
    pdf -= im.pdf;
    cdf -= im.cdf;
    sf += im.cdf;
    eC += im.errCdf;
    eP += im.errPdf;
  }
  const over = Math.abs(x - lad.part.center) - lad.T0;
  const far = over > 0 ? 3 * Number.EPSILON * over * nodes.absPdf : 0;
  const rb = residualBucket(lad, x, l, top.pdfBound);
  const k = kernelTotals(lad.part, x);
  const errCdf = (rb.cdf + eC + top.tr + far) * (1 + 1e-12) + k.errCdf;
  if (!Number.isFinite(errCdf)) return null;
  const errPdf = top.pdfBound ? (rb.pdf + eP + top.trP) * (1 + 1e-12) + k.errPdf : Infinity;
  return { pdf: pdf + k.pdf, cdf: cdf + k.cdf, sf: sf + k.sf, errCdf, errPdf: Number.isFinite(errPdf) ? errPdf : Infinity, derivedCdf: errCdf };
}

function ladderAt(lad: HeavyLadder, x: number, scratch: Scratch): LadderValue {
  if (lad.top) {
    const v = topAt(lad, lad.top, x, scratch);
    if (v) return v;
    fullLadder(lad);
  }
  const L = lad.levels.length;
  const P: number[][] = [];
  const C: number[][] = [];
  const S: number[][] = [];
  scratch.one[0] = x;
  let imC = 0;
  let imP = 0;
  const eCL: number[] = [];
  const ePL: number[] = [];
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
    eCL.push(eC);
    ePL.push(eP);
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
  const est = {
    pdf: P[b][b] + k.pdf,
    cdf: C[b][b] + k.cdf,
    sf: S[b][b] + k.sf,
    errCdf: Math.max(d(C), d(S)) + lad.sumErrCdf + lad.amp * (imC + farPhase) + k.errCdf,
    errPdf: d(P) + lad.sumErrPdf + richardsonAmplification(lad.expP, L) * imP + k.errPdf,
    derivedCdf: Infinity,
  };
  if (!lad.resid && !lad.pair) {
    lad.estimated = true;
    return est;
  }
  // each level's own bound: the residual aliasing at its period, its images', truncation and rounding (and the far
  // phases'); the last row's entry with the least bound through its weights in the levels (no asymptotic assumption)
  const rC: number[] = [];
  const rP: number[] = [];
  for (let l = 0; l < L; l++) {
    const T = lad.T0 * 2 ** l;
    const far = over > 0 ? 3 * Number.EPSILON * over * lad.levels[l].absPdf : 0;
    const rb = residualBucket(lad, x, l);
    rC.push(rb.cdf + eCL[l] + lad.trL[l] + far);
    rP.push(rb.pdf + ePL[l] + lad.trPL[l]);
  }
  const bc = bestDerivedEntry(lastRowWeights(lad.expC, L), rC);
  const bp = bestDerivedEntry(lastRowWeights(lad.expP, L), rP);
  const errCdf = bc.err + k.errCdf;
  // the derived bound wherever it is finite, even above the estimate or the tolerance (the answer's tolerance report then
  // says the tolerance was not met); the estimate only where none is derived
  if (!Number.isFinite(errCdf)) {
    lad.estimated = true;
    return { ...est, derivedCdf: errCdf };
  }
  // the density with its estimate where no bound of its own is derived (the pair's)
  const pdfD = Number.isFinite(bp.err);
  return { pdf: pdfD ? P[b][bp.j] + k.pdf : est.pdf, cdf: C[b][bc.j] + k.cdf, sf: S[b][bc.j] + k.sf, errCdf, errPdf: pdfD ? bp.err + k.errPdf : est.errPdf, derivedCdf: errCdf };
}

/**
 * The residual aliasing bound (and the kernels' images) at level l for every x in the bucket of width T0/256 holding x:
 * computed once per bucket and level (the root finders evaluate hundreds of nearby points), the distances to the images
 * changing by at most the bucket's width.
 */
export function residualBucket(lad: HeavyLadder, x: number, l: number, wantPdf = true): { cdf: number; pdf: number } {
  const w = lad.T0 / 256;
  const k = Math.floor(x / w);
  const key = `${l}:${k}`;
  const cache = (lad.residCache ??= new Map());
  let v = cache.get(key);
  if (!v) {
    const T = lad.T0 * 2 ** l;
    // the bucket's ends, widened by a few ulps (k w rounds)
    const lo = k * w - 4 * Number.EPSILON * (Math.abs(k * w) + w);
    const hi = (k + 1) * w + 4 * Number.EPSILON * (Math.abs((k + 1) * w) + w);
    const a = Math.min(lo, x);
    const b = Math.max(hi, x);
    const ki = lad.part.kernels.length ? kernelAliasing(lad.part.kernels, a, b, T) : { cdf: 0, pdf: 0 };
    v = { cdf: (lad.resid ? residualAliasing(lad.resid, a, b, T, "cdf") : pairAliasing(lad.pair!, a, b, T, "cdf")) + ki.cdf, pdf: undefined, a, b, T, kPdf: ki.pdf };
    if (cache.size > 8192) cache.clear();
    cache.set(key, v);
  }
  // the density's bound only when asked (the top level's choice reads the cdf's alone: ./heavy-top.ts)
  if (wantPdf && v.pdf === undefined) v.pdf = (lad.resid ? residualAliasing(lad.resid, v.a, v.b, v.T, "pdf") : pairAliasing(lad.pair!, v.a, v.b, v.T, "pdf")) + v.kPdf;
  return { cdf: v.cdf, pdf: v.pdf ?? NaN };
}
