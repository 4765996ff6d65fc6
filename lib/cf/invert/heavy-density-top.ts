// The power-tail density and cdf answering from one period alone, where a derived bound answers (./heavy.ts heavyPath):
// that bound's least entry of the Richardson table's last row is always the raw last level's (./heavy-ladder.ts
// HeavyLadder.top), so the lower levels served only the estimate. The period is chosen before its nodes from the bound's
// parts (the residual's aliasing, the kernels', the truncation), its sums then checked with the rounding and the images'.
import type { DirectLaw } from "../direct/types";
import { checkDeadline } from "../deadline";
import { subtractImages } from "./image-blocks";
import type { ImageScratch } from "./images";
import { kernelAliasing } from "./kernel-images";
import { residualAliasing, type ResidualLaw } from "./heavy-residual";
import { pairAliasing, type PairLaw } from "./heavy-residual2";
import { buildNodes, truncationAt, type Envelope } from "./nodes";
import type { ContinuousPart } from "./part";
import { sumPointwise } from "./pointwise";
import {
  MAX_LEVELS,
  MAX_POINTWISE_WORK,
  addKernels,
  chooseTerms,
  evaluate,
  levelLayout,
  roundingOf,
  ymaxOf,
  type Layout,
  type PartOptions,
  type PartOutput,
  type Request,
} from "./shared";

export interface DensityTopInputs {
  part: ContinuousPart;
  env: Envelope;
  req: Request;
  opt: PartOptions;
  layout0: Layout | null;
  T0: number;
  a0: number;
  anchor: "left" | "right" | "center";
  centerX: number;
  method: "fft" | "gil-pelaez";
  tmax: number;
  laws: DirectLaw[];
  resid: ResidualLaw | null;
  pair: PairLaw | null;
  pts: ArrayLike<number>;
  xLo: number;
  xHi: number;
  imgScratch: ImageScratch;
  alpha: number;
  notes: string[];
}

/**
 * The least level from the third (at most the sixth, one past the ladder's derived levels: a derived bound one doubling
 * later answers where the ladder would stop on its estimate; pareto + pareto + triangular(0, 0.5, 1), 1000 points: the
 * pair's bound 1.1e-8 at the fifth, 5.5e-10 at the sixth) whose derived bound before its nodes (aliasing left,
 * kernels' images, twice the truncation) is within 0.9 of the tolerance, for the cdf and (asked) the density, while the
 * levels left may bring it there (at the last doubling's rate); its sums less
 * the images, answered where the level's whole bound (with its rounding and the images' bounds, the raw level's derived
 * bound of heavyPath) is within the tolerance. Null where no level qualifies or its whole bound misses: the ladder runs.
 */
export function densityTop(x: DensityTopInputs): PartOutput | null {
  const { part, env, req, opt, layout0, T0, tmax, laws, resid, pair, pts, xLo, xHi } = x;
  if (!(resid || pair) || !(xLo <= xHi)) return null;
  const tol = opt.tolerance;
  const n = pts.length;
  const aliasing = (T: number, kind: "cdf" | "pdf") => (resid ? residualAliasing(resid, xLo, xHi, T, kind) : pairAliasing(pair!, xLo, xHi, T, kind));
  let pick: { lev: number; T: number; h: number; K: number; layout: Layout | null; m: "fft" | "gil-pelaez"; preC: number; preP: number } | null = null;
  let prev = NaN;
  for (let lev = 2; lev < Math.min(6, MAX_LEVELS) && !pick; lev++) {
    checkDeadline("refine");
    const { T, layout, m } = levelLayout(lev, T0, x.a0, x.anchor, x.centerX, layout0, req, x.method);
    const h = (2 * Math.PI) / T;
    const K = chooseTerms(tmax, h, m, n);
    if (K * n > MAX_POINTWISE_WORK * 4 && m === "gil-pelaez") return null;
    const trunc = truncationAt(env, K * h);
    const ki = part.kernels.length ? kernelAliasing(part.kernels, xLo, xHi, T) : { cdf: 0, pdf: 0 };
    const preC = aliasing(T, "cdf") + ki.cdf + 2 * trunc.cdf;
    const preP = opt.wantPdf ? aliasing(T, "pdf") + ki.pdf + 2 * trunc.pdf : 0;
    // within the tolerance less a tenth for the rounding and the images' bounds (else the next level), while the levels
    // left may bring it there: within 1e3 times it at the first, then at the rate of the last doubling (as the quantiles'
    // top, ./heavy-top.ts; the pair's bound falls some 20 times a doubling, so 64 times the tolerance at the third level
    // sent pareto + pareto + triangular to the ladder's estimate)
    const pre = Math.max(preC, preP);
    const rate = prev > 0 && Number.isFinite(prev) ? Math.min(1, pre / prev) : NaN;
    if (preC <= 0.9 * tol && preP <= 0.9 * tol) pick = { lev, T, h, K, layout, m, preC, preP };
    else if (!(Number.isFinite(rate) ? pre * rate ** (5 - lev) <= tol : pre <= 1e3 * tol)) return null;
    prev = pre;
  }
  if (!pick) return null;
  const { lev, T, h, K, layout, m } = pick;
  const nodes = buildNodes(part, h, K, env);
  const pdf = opt.wantPdf ? new Float64Array(n) : null;
  const cdf = new Float64Array(n);
  const sf = new Float64Array(n);
  evaluate(part, nodes, req, layout, pdf !== null, pdf, cdf, sf);
  // the images at x + m T (as the ladder's level lev): their values out of the sums, their bounds (largest over the points) in
  const { errCdf: lC, errPdf: lP } = subtractImages(laws, pts, xLo, xHi, T, tol, x.imgScratch, new Float64Array(n), new Float64Array(n), cdf, sf, pdf);
  const trunc = truncationAt(env, K * h);
  const round = roundingOf(part, nodes, ymaxOf(req, part.center, part.center, part.center), layout ? layout.N : 0);
  // the raw level's derived bound, as heavyPath's (bestDerivedEntry's entry j = 0: the weight 1 on the last level)
  const errC = (pick.preC + round.cdf + lC) * (1 + 1e-12);
  const errP = opt.wantPdf ? (pick.preP + round.pdf + lP) * (1 + 1e-12) : NaN;
  if (!(errC <= tol) || (opt.wantPdf && !(errP <= tol))) return null;
  const notes = x.notes;
  if (laws.length) notes.push(laws.length === 1 ? "the heaviest-tailed term's images are taken out of the sums from its direct law" : "the two heaviest-tailed terms' images are taken out of the sums from their direct laws");
  notes.push(`power tails (index ${x.alpha}): period T = ${T0.toPrecision(4)} doubled ${lev} times, the last period's sums with the derived bound of the images left`);
  const a = x.anchor === "left" ? x.a0 : x.anchor === "right" ? x.a0 + T0 - T : x.centerX - T / 2;
  const result: PartOutput = {
    pdf,
    cdf,
    sf,
    error: {
      aliasing: errC,
      truncation: 2 * (opt.wantPdf ? Math.max(trunc.cdf, trunc.pdf) : trunc.cdf),
      rounding: opt.wantPdf ? Math.max(round.cdf, round.pdf) : round.cdf,
      cdf: errC,
      pdf: errP,
    },
    gridSize: layout ? layout.N : K,
    terms: K,
    h,
    maxFrequency: K * h,
    window: { a, b: a + T },
    captured: NaN,
    levels: 1,
    notes,
    method: m,
    solution: null,
  };
  if (part.kernels.length || part.tail) {
    const added = addKernels(part, pts, result.pdf, result.cdf, result.sf);
    result.error.cdf += added.errCdf;
    if (opt.wantPdf) result.error.pdf += added.errPdf;
  }
  // mass inside the window, from its own sums: informative, not part of the error budget
  const ends = new Float64Array([a, a + T]);
  const c2 = new Float64Array(2);
  const s2 = new Float64Array(2);
  sumPointwise(nodes, part.center, ends, null, c2, s2);
  result.captured = Math.min(1, Math.max(0, s2[0] - s2[1]));
  return result;
}
