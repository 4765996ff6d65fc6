import type { Atom, CompiledModel } from "../types";
import { fitEndpointKernels, jumpKernels } from "./endpoint";
import { buildNodes, cutoffFor, probeEnvelope, truncationAt, type Envelope } from "./nodes";
import { makePart, withKernels, type ContinuousPart, type EndpointKernels } from "./part";
import { nodeRoundingNotes } from "./grid-rounding";
import { sumPointwise } from "./pointwise";
import { heavyWindow, lawShape, lightWindow, type LawShape } from "./range";
import { gammaPdf } from "./incgamma";
import type { ErrorEstimate } from "./types";
import { heavyPath, imagePlan, maybeTailLaw, pairUsable } from "./heavy";
import {
  addKernels,
  chooseTerms,
  evaluate,
  kernelOutside,
  kernelTotals,
  nPoints,
  requestPoints,
  roundingOf,
  ymaxOf,
  type PartOptions,
  type PartOutput,
  type Request,
} from "./shared";
import { checkDeadline } from "../deadline";
import { ITERATIONS, nextEvaluated, widened, windowGeometry } from "./window-skip";

export type { PartOptions, PartOutput, PartSolution, Request } from "./shared";
export { evalLadder, growLadder, heavyLadder, type HeavyLadder } from "./heavy-ladder";

/** Thrown by the light path before it builds more nodes than PartOptions.maxTerms allows. */
export class TermsOverCap extends Error {
  constructor(readonly terms: number) {
    super(`the inversion would need ${terms} nodes`);
    this.name = "TermsOverCap";
  }
}

/**
 * invertContinuous at the smallest of tol, 100 tol, 10^4 tol, ... whose nodes number at most `maxTerms`, relaxing
 * only while the tolerance is below `upTo` (the last one is kept whatever it needs). A tolerance whose nodes would be
 * too many stops before they are built (the light path counts them first), so each relaxation step costs an envelope
 * probe instead of up to 2^22 CF values.
 */
export function invertWithinTerms(
  model: CompiledModel,
  atoms: Atom[],
  req: Request,
  opt: PartOptions,
  maxTerms: number,
  upTo: number,
): PartOutput {
  let tol = opt.tolerance;
  for (;;) {
    const capped = tol < upTo;
    try {
      const out = invertContinuous(model, atoms, req, { ...opt, tolerance: tol, ...(capped ? { maxTerms } : {}) });
      if (!capped || out.solution!.nodes.K <= maxTerms) return out;
    } catch (e) {
      if (!(e instanceof TermsOverCap)) throw e;
    }
    tol *= 100;
  }
}

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
      // the far points' values do not come from the solution's sums: marked, so that they keep the uniform bounds
      const beyond = new Uint8Array(n).fill(1);
      for (const i of near) beyond[i] = 0;
      return { ...sub, pdf, cdf, sf, beyond };
    }
  }
  let part = makePart(model, atoms, shape.center);
  const win = opt.range
    ? { a: opt.range.from, b: opt.range.to }
    : shape.heavy
      ? heavyWindow(shape, xmin, xmax)
      : lightWindow(shape, aliasTarget / 8, Number.isFinite(xmin) ? xmin : shape.center, Number.isFinite(xmax) ? xmax : shape.center);
  let env = probeEnvelope(part, shape.spread);
  let alpha = shape.alpha;
  let bases: number[] | undefined;
  // two terms' images taken out with the pair's bound (./heavy.ts imagePlan) leave less than the heaviest term's CF
  // subtracted, whose bound needs a variance of all the rest: the sums keep the whole CF then
  const pairFirst =
    shape.heavy && !opt.range && !atoms.length && Number.isFinite(xmin) && imagePlan(model.tailTerm, Math.max(shape.alpha, 0.1), pairUsable, xmin, xmax, 16 * (win.b - win.a))?.pair;
  if (shape.heavy && !opt.range && !pairFirst) {
    ({ part, env, alpha, bases } = maybeTailLaw(part, env, shape, tol));
    if (part.tail) notes.push(`the heaviest-tailed term, shifted by the other terms' mean, is evaluated directly and only the rest is inverted (its tails have index ${alpha.toPrecision(3)})`);
  }
  ({ part, env } = maybeKernels(part, env, shape, win, truncTarget, opt.wantPdf, notes));
  notes.push(...nodeRoundingNotes(part));
  // an envelope falling only like 1/t (a derived one for a density with jumps, where no kernels took them out) bounds no
  // pdf truncation at any cut-off: the cdf's target alone sets it (the pdf's bound is then infinite, as stated)
  const pdfTarget = opt.wantPdf && Number.isFinite(env.tailPdf[0]) ? truncTarget : Infinity;
  let tmax = opt.maxFrequency ?? cutoffFor(env, pdfTarget, truncTarget);
  if (!Number.isFinite(tmax)) tmax = env.t[env.t.length - 1];

  const method = opt.method;
  if (!shape.heavy || opt.range) {
    return lightPath(part, env, shape, req, opt, win, tmax, aliasTarget, notes, method);
  }
  return heavyPath(part, env, { ...shape, alpha, tailBases: bases }, req, opt, win, tmax, notes, method);
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
  // known jumps of the density (compounds of layered claims): exact kernels instead of a fit at the ends
  // (a jump at the support's lower end alone is left to the endpoint fit below, which also matches higher orders)
  if (part.model.densityJumps?.some((j) => j.at > shape.support[0])) {
    const ks = jumpKernels(part, part.model.densityJumps, win.b, part.model.densityKinks, part.model.densityBends);
    if (ks.length === 0) return { part, env };
    const p2 = withKernels(part, ks);
    notes.push(
      `density jumps at ${ks.length} point(s) taken out as exponential kernels${part.model.densityKinks?.length ? `, the steps of its slope${part.model.densityBends?.length ? " and second derivative" : ""} as shape-2${part.model.densityBends?.length ? " and shape-3" : ""} kernels beside them` : ""} (inverted in closed form)`,
    );
    return { part: p2, env: probeEnvelope(p2, shape.spread) };
  }
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
  // where the model's expansion names the density's non-smooth points (model.transformSeries: interior ones too, such as
  // a uniform's upper end plus the paretos' starts, which the ends alone leave in), kernels at all of them from its first
  // power (pareto(2.3) + pareto(2) + uniform(0, 1), cdf cut-off at 1e-10 / 16: 5.8e3 -> 42, density's 1.7e4 -> 64)
  const sp = seriesPoints(part.model, shape.support);
  if (sp) {
    const r = 60 / Math.max(Math.min(...sp.pts.map((e) => win.b - e.at)), 1e-300);
    // kernels per point and fit scale (in scales), the most kernels first (at most 24 columns against the fit's 48 rows);
    // from the second fit on, one whose cut-off is within 300 scales ends the search (as the ends' fit below). The same
    // sum: J = 10 at 150 scales cuts the cdf at 32 and the density at 46 (J = 8 at 100: 42 and 64)
    const tries = [[10, 150], [12, 60], [8, 100], [6, 150], [4, 300]].filter(([J]) => J * sp.pts.length <= 24);
    for (let i = 0; i < tries.length && !(i >= 2 && best && best.cut * shape.spread < 300); i++) {
      const [J, scales] = tries[i];
      const fit = fitEndpointKernels(part, sp.pts, J, scales / shape.spread, r, sp.power);
      // kernels of total weight above 16 (alternating, from a fit of the series' divergent tail) raise the nodes' rounding
      // allowance, which grows with 1 + sum |b| (lomax + pareto + uniform at J = 12, weights to 85: cdf bound 1e-10 -> 3.7e-10)
      if (!fit || !(fit.kernels.reduce((a, k) => a + k.b.reduce((u, v) => u + Math.abs(v), 0), 0) <= 16)) continue;
      const p2 = withKernels(part, fit.kernels);
      const e2 = probeEnvelope(p2, shape.spread);
      const c2 = cutoffFor(e2, wantPdf ? truncTarget : Infinity, truncTarget);
      if (c2 < (best ? best.cut : c0 * 0.5)) best = { part: p2, env: e2, cut: c2, ks: fit.kernels };
    }
    if (best) candidates.length = 0;
  }
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
    `density behaviour at ${best.ks.map((k) => k.at).join(", ")} handled by subtracting ${best.ks[0].b.length} gamma kernel(s) from shape ${best.ks[0].power} each (inverted in closed form; the truncation bound of what they leave is read from its sampled transform, not derived between the samples)`,
  );
  return { part: best.part, env: best.env };
}

/**
 * The points of the model's transform series (Node.transformSeries: E e^{-sX} ~ sum_blocks e^{-s at} sum_e c_e s^{-e}, exact
 * for uniform and triangular terms, Watson's lemma for paretos, multiplied through sums) as kernel points on [at, inf), with
 * the series' least power; only for laws unbounded above (every block a start or an interior point, the kernels' tails
 * spent inside the window), without atoms (power 0), and where more than the lower end is listed (else the ends' fit).
 */
function seriesPoints(model: CompiledModel, support: readonly [number, number]): { pts: { at: number; side: 1 }[]; power: number } | null {
  const ser = model.transformSeries;
  if (!ser || Number.isFinite(support[1]) || ser.length < 2 || ser.length > 6) return null;
  let power = Infinity;
  for (const b of ser) for (const [e, c] of b.series) if (c !== 0) power = Math.min(power, e);
  if (!(power > 0.5) || !Number.isFinite(power) || !ser.every((b) => Number.isFinite(b.at))) return null;
  return { pts: ser.map((b) => ({ at: b.at, side: 1 as const })), power };
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
  // the windows before `next` are only widened, not evaluated (./window-skip.ts: predicted to miss the aliasing target);
  // the last of the ITERATIONS is always evaluated
  let next = 0;
  for (let iter = 0; iter < ITERATIONS; iter++) {
    checkDeadline("refine");
    const g = windowGeometry(req, a, b, method, shape.support);
    if (g.tooFine) notes.push("grid too fine for the window: evaluated point by point");
    const { layout, h, T } = g;
    method = g.method;
    a = g.a;
    b = g.b;
    const K = chooseTerms(tmax, h, method, n);
    // the window only widens (h falls), so the count only grows from here
    if (opt.maxTerms !== undefined && K > opt.maxTerms) throw new TermsOverCap(K);
    if (iter < next) {
      // widened as a failed window is (below)
      const w = widened(g, shape.support);
      if (w) ({ a, b } = w);
      continue;
    }
    const nodes = buildNodes(part, h, K, env);
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
    const round = roundingOf(part, nodes, ymaxOf(req, part.center, a, b), layout ? layout.N : 0);
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
      solution: { part, nodes, window: { a, b }, shape, error, levels: 1, notes, envelope: env, aliasCore, sumErrCdf, valuesCdf: round.valuesCdf, valuesSplit: round.valuesSplit },
    };
    // stop when the aliasing bound meets its target or is dominated by the sums' own error floor
    const pdfFloor = (4 * (sumErrCdf + aliasCdf)) / ds[ds.length - 1] + (2 * aliasCdf) / T;
    const ok =
      aliasCore <= Math.max(aliasTarget, sumErrCdf) && (!opt.wantPdf || aliasPdf <= Math.max(aliasTarget, 1.01 * pdfFloor));
    if (ok || opt.range) break;
    // widen: open sides grow by a quarter of the width each
    const w = widened(g, shape.support);
    if (!w) break;
    const probe = { a, b, T, ds, left: ec.subarray(1, 1 + ds.length), right: es.subarray(1 + ds.length), edge: Math.abs(ec[0]) };
    next = nextEvaluated({ ...probe, aliasCore, aliasPdf, sumErrCdf, aliasTarget, wantPdf: opt.wantPdf }, iter, req, method, shape.support);
    ({ a, b } = w);
  }
  if (part.kernels.length) addKernels(part, requestPoints(req), pdf, cdf, sf);
  return last!;
}
