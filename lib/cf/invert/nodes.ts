import { cabs } from "../complex";
import { evalPart, type ContinuousPart } from "./part";
import { noiseFloor, valuesFloor } from "./noise-floor";
import type { CompiledModel } from "../types";
import { checkDeadline } from "../deadline";
import { RESYNC } from "./pointwise";
import { majorantEnvelope } from "./envelope-bound";
import { sumMajorants, type LogMajorant } from "../majorant";
import { exactGrid } from "../arg-rounding";
import { nodeMoves } from "./grid-rounding";

/**
 * Envelope of |phi_part(t)| sampled on a geometric probe (8 points per octave) and its tail integrals, used to
 * choose the frequency cut-off and to bound the truncation error of the inversion sums:
 * trunc_pdf(T) = (1/pi) int_T^inf E(t) dt, trunc_cdf(T) = (1/pi) int_T^inf E(t)/t dt,
 * where E is the running maximum of the samples from the right (a non-increasing envelope).
 */
export interface Envelope {
  t: Float64Array;
  env: Float64Array;
  tailPdf: Float64Array;
  tailCdf: Float64Array;
  /** power-law decay exponent measured over the last probed octave (Infinity when |phi| hit 0) */
  decay: number;
  /** decay exponent over the last octave where |phi| is still far above rounding noise (for the kernel power) */
  decayClean: number;
  /** true where the envelope comes from a derived majorant (./envelope-bound.ts), absent where it is sampled */
  derived?: true;
}

const PER_OCTAVE = 8;
const STEP = Math.pow(2, 1 / PER_OCTAVE);

/** Geometric probe frequencies PER_OCTAVE per octave from 1e-3 / scale over 54 octaves. */
export function probeFrequencies(scale: number): Float64Array {
  // the last scale's frequencies again (every probe of a model asks for them; never written to by their users)
  if (lastProbe.scale === scale) return lastProbe.t;
  const t0 = 1e-3 / scale;
  const n = 54 * PER_OCTAVE + 1;
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = t0 * Math.pow(STEP, i);
  lastProbe.scale = scale;
  lastProbe.t = t;
  return t;
}
const lastProbe = { scale: NaN, t: new Float64Array(0) as Float64Array };

/**
 * The model's log-CF on a probe (t0 STEP^i, i < n), computed up to `done` and kept per compiled model: the same model is
 * probed again and again (each endpoint-kernel fit, the tail-law split, quantiles after a density), and for numerical
 * CFs each probe costs a quadrature per frequency. The values are those the model computes; nothing else is reused.
 */
const PROBES = new WeakMap<CompiledModel, { t0: number; n: number; re: Float64Array; im: Float64Array; done: number }[]>();
function probeLogCf(model: CompiledModel, t0: number, n: number) {
  let list = PROBES.get(model);
  if (!list) PROBES.set(model, (list = []));
  let own = list.find((p) => p.t0 === t0 && p.n === n);
  if (!own) {
    own = { t0, n, re: new Float64Array(n), im: new Float64Array(n), done: 0 };
    // a handful of scales per model at most; the oldest goes first
    if (list.length >= 4) list.shift();
    list.push(own);
  }
  return own;
}

export function probeEnvelope(part: ContinuousPart, scale: number): Envelope {
  const nf = noiseFloor(part);
  const t0 = 1e-3 / scale;
  const octaves = 54; // up to ~1.8e13 / scale
  const n = octaves * PER_OCTAVE + 1;
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = t0 * Math.pow(STEP, i);
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  // in blocks of two octaves, upward; once a whole block underflows to 0 the rest is 0 too (|phi| of
  // exp(-c t^a) type decays monotonically below 1e-300) and is not evaluated
  const B = 2 * PER_OCTAVE;
  const own = probeLogCf(part.model, t0, n);
  let evaluated = 0;
  for (let i0 = 0; i0 < n; i0 += B) {
    const i1 = Math.min(n, i0 + B);
    if (own.done < i1) {
      part.model.logCf(t.subarray(own.done, i1), own.re.subarray(own.done, i1), own.im.subarray(own.done, i1));
      own.done = i1;
    }
    evalPart(part, t.subarray(i0, i1), re.subarray(i0, i1), im.subarray(i0, i1), undefined, { re: own.re.subarray(i0, i1), im: own.im.subarray(i0, i1) });
    evaluated = i1;
    let m = 0;
    for (let i = i0; i < i1; i++) m = Math.max(m, Math.abs(re[i]) + Math.abs(im[i]));
    if (m === 0 && i0 > 0 && part.atoms.length === 0 && part.kernels.length === 0) break;
  }
  const mag = new Float64Array(n);
  for (let i = 0; i < n; i++) mag[i] = cabs(re[i], im[i]);
  // with kernels subtracted the samples are the envelope (no majorant below): values count as noise only up to their own
  // computed error at each probe (valuesFloor), rather than the heuristic floor's growth with the atoms' distance
  const sampled = envelopeOf(t, mag, part.kernels.length > 0 && part.atoms.length > 0 ? valuesFloor(part, own.re, own.im, own.done) : nf);
  // samples bound |phi| between probes only where it is monotone; the model's derived majorant (../majorant.ts) bounds
  // it everywhere, and is used when it applies to the inverted part: no kernels subtracted; with the sum's heaviest term
  // subtracted, the two majorants added; atoms only where the model derives a majorant of its continuous part with
  // exactly those atoms taken out (../layer-majorant.ts)
  const maj = part.tail ? tailPartMajorant(part) : part.atoms.length === 0 ? part.model.logAbsMajorant : sameAtoms(part.atoms, part.model.continuousMajorant?.atoms) ? part.model.continuousMajorant!.maj : undefined;
  if (!maj || part.kernels.length > 0) return sampled;
  const bound = majorantEnvelope(part, maj, t, mag, own.re, own.im, evaluated, sampled, nf);
  // a majorant without a derived decay past the probes (a mixture with a component bounded by 1) gives no finite
  // tail: the sampled envelope is kept there (not derived between probes; see majorant.ts)
  if (!Number.isFinite(bound.tailCdf[0])) return sampled;
  return bound;
}

/** |phi - phi_G| <= M + M_G for a part with the sum's heaviest term taken out (no atoms then), where both are derived */
function tailPartMajorant(part: ContinuousPart): LogMajorant | undefined {
  const m = part.model.logAbsMajorant;
  const g = part.tail?.logAbsMajorant;
  return m && g && part.atoms.length === 0 ? sumMajorants([m, g]) : undefined;
}

/** the same atoms (positions and masses, in any order) */
function sameAtoms(a: { x: number; p: number }[], b: { x: number; p: number }[] | undefined): boolean {
  if (!b || a.length !== b.length) return false;
  return a.every((u) => b.some((v) => v.x === u.x && v.p === u.p));
}

/** Envelope from sampled magnitudes |phi(t_i)| on the geometric probe (PER_OCTAVE per octave), values below nf(t_i, i) as 0. */
export function envelopeOf(t: Float64Array, mag: Float64Array, nf: (t: number, i: number) => number): Envelope {
  const n = t.length;
  const env = new Float64Array(n);
  let run = 0;
  for (let i = n - 1; i >= 0; i--) {
    const a = mag[i];
    const floor = nf(t[i], i);
    const v = Number.isFinite(a) ? (a > floor ? a : 0) : Infinity;
    if (v > run) run = v;
    env[i] = run;
  }
  const last = env[n - 1];
  const prev = env[n - 1 - PER_OCTAVE];
  let decay = Infinity;
  if (last > 1e-300) decay = prev > 0 ? Math.log2(prev / last) : 0;
  const tailPdf = new Float64Array(n);
  const tailCdf = new Float64Array(n);
  let sp = 0;
  let sc = 0;
  if (last > 1e-300) {
    sp = decay > 1.05 ? (last * t[n - 1]) / (decay - 1) : Infinity;
    sc = decay > 0.05 ? last / decay : Infinity;
  }
  const lastFloor = nf(t[n - 1], n - 1);
  tailPdf[n - 1] = (sp + lastFloor * t[n - 1]) / Math.PI;
  tailCdf[n - 1] = (sc + lastFloor) / Math.PI;
  const lnStep = Math.log(STEP);
  for (let i = n - 2; i >= 0; i--) {
    sp += env[i] * (t[i + 1] - t[i]);
    sc += env[i] * lnStep;
    // allowance for sub-floor values over the next octave
    const floor = nf(t[i], i);
    tailPdf[i] = (sp + floor * t[i]) / Math.PI;
    tailCdf[i] = (sc + floor) / Math.PI;
  }
  // measured over six octaves so that oscillating |phi| (e.g. sin t / t) does not bias it
  let decayClean = decay;
  const span = 6 * PER_OCTAVE;
  for (let i = n - 1; i >= span; i--) {
    if (env[i] > Math.max(1e-10 * env[0], 1e6 * nf(t[i], i), 1e-290)) {
      decayClean = env[i - span] > 0 ? Math.log2(env[i - span] / env[i]) / 6 : 0;
      break;
    }
  }
  return { t, env, tailPdf, tailCdf, decay, decayClean };
}

/** Smallest probed frequency beyond which the truncation bounds fall below the targets (Infinity if none). */
export function cutoffFor(e: Envelope, targetPdf: number, targetCdf: number): number {
  const { t, tailCdf, tailPdf } = e;
  for (let i = 0; i < t.length; i++) {
    if (tailCdf[i] <= targetCdf && tailPdf[i] <= targetPdf) return t[i];
  }
  // unattainable (rounding floor of atom subtraction): the cut-off with the smallest bound, if it is finite
  let best = -1;
  let bestV = Infinity;
  for (let i = 0; i < e.t.length; i++) {
    const v = Math.max(e.tailCdf[i] / targetCdf, Number.isFinite(targetPdf) ? e.tailPdf[i] / targetPdf : 0);
    if (v < bestV) {
      bestV = v;
      best = i;
    }
  }
  if (!(best >= 0 && Number.isFinite(bestV))) return Infinity;
  // the first probe within a factor 2 of that smallest bound (the floor often keeps falling slowly)
  for (let i = 0; i <= best; i++) {
    const v = Math.max(e.tailCdf[i] / targetCdf, Number.isFinite(targetPdf) ? e.tailPdf[i] / targetPdf : 0);
    if (v <= 2 * bestV) return e.t[i];
  }
  return e.t[best];
}

/** the last probe index i with t[i + 1] > T (0 when T is below t[1]): t is increasing, so by bisection */
function probeLeftOf(t: Float64Array, T: number): number {
  // invariant: t[a] <= T or a = 0; b = n - 1 or t[b] > T
  let a = 0;
  let b = t.length - 1;
  if (Number.isNaN(T)) return 0;
  if (!(t[b] > T)) return b;
  while (b - a > 1) {
    const m = (a + b) >> 1;
    if (t[m] <= T) a = m;
    else b = m;
  }
  return a;
}

/** Truncation bounds at an arbitrary cut-off T (envelope tail, interpolated to the probe on the left: an over-estimate). */
export function truncationAt(e: Envelope, T: number): { pdf: number; cdf: number } {
  const i = probeLeftOf(e.t, T);
  return { pdf: e.tailPdf[i], cdf: e.tailCdf[i] };
}

/**
 * Truncation bounds (1/pi) int_T^inf E(t)/t dt and (1/pi) int_T^inf E(t) dt of the envelope's step function (E = env[i]
 * on [t_i, t_{i+1}), which the tails sum): the left probe's tail less the part of its step below T, env[i] log(T / t_i)
 * (env[i] (T - t_i) for the density), so exact for that function rather than the left probe's over-estimate. Below the
 * first probe, the first probe's tails.
 */
export function truncationFrom(e: Envelope, T: number): { pdf: number; cdf: number } {
  if (!(T > e.t[0])) return { pdf: e.tailPdf[0], cdf: e.tailCdf[0] };
  const i = probeLeftOf(e.t, T);
  // past the last probe the tail is the fitted power law's, not a step: kept whole
  if (i + 1 >= e.t.length) return { pdf: e.tailPdf[i], cdf: e.tailCdf[i] };
  const v = e.env[i];
  // the subtracted part is at most the step's own share of the tail, so the result stays at least the tails at t_{i+1}
  const cdf = e.tailCdf[i] - (v * Math.log(T / e.t[i])) / Math.PI;
  const pdf = e.tailPdf[i] - (v * (T - e.t[i])) / Math.PI;
  return { pdf: Math.max(pdf, e.tailPdf[i + 1]), cdf: Math.max(cdf, e.tailCdf[i + 1]) };
}

/** Frequency nodes t_k = (k + 1/2) h, k < K, with phi_part and the sums needed by the error terms. */
export interface Nodes {
  h: number;
  K: number;
  re: Float64Array;
  im: Float64Array;
  /** phi_k / (k + 1/2), the Gil-Pelaez weights */
  wre: Float64Array;
  wim: Float64Array;
  /** (1/pi) sum |phi_k| / (k+1/2) and (h/pi) sum |phi_k|: scale of the cdf and pdf sums, for rounding bounds */
  absCdf: number;
  absPdf: number;
  mass: number;
  /**
   * (1/pi) sum d_k / (k+1/2) and (h/pi) sum d_k, d_k = (e_k + cfRelTaken) |phi(t_k)| / w the part's error from the
   * model's CF value at node k (e_k its relative error as computed from the log, part.ts cfRelError)
   */
  cfErrCdf?: number;
  cfErrPdf?: number;
  /** the d_k themselves, node by node (an integral of the cdf weighs them by its own kernel: ./shortfall.ts) */
  cfErrAt?: Float64Array;
  /** the model's declared relative CF error, charged per node in cfErrCdf / cfErrPdf (roundingOf leaves it out of the uniform part) */
  cfRelTaken?: number;
  /** (h/pi) sum (k+1/2) |phi_k| (the phase rounding of the density sum grows with t_k) */
  absPdfMoment?: number;
  /** (1/pi) sum j_k |phi_k| / (k+1/2) and (h/pi) sum j_k |phi_k|, j_k = k mod RESYNC the rotations since the last exact
   *  phase (the recurrence's drift grows with j_k) */
  driftCdf?: number;
  driftPdf?: number;
  /** (1/pi) sqrt(sum |phi_k|^2 / (k+1/2)^2) and (h/pi) sqrt(sum |phi_k|^2): the 2-norms the FFT's rounding scales with */
  l2Cdf?: number;
  l2Pdf?: number;
  /** every node (k + 1/2) h is exact in floating point (../arg-rounding.ts exactGrid) */
  exact?: boolean;
  /**
   * the rounded nodes' move of the part, summed as the cdf and pdf sums weigh it ((1/pi) sum m_k / (k + 1/2), (h/pi) sum
   * m_k), m_k = min(j u t_k L, 2 env(t_k (1 - 2u))) for a node off by j u t_k (j = 1 point by point, 2 on the FFT):
   * ./grid-rounding.ts; absent where not formed (no envelope given, or L not derived)
   */
  grid?: { cdf1: number; pdf1: number; cdf2: number; pdf2: number };
}

const NODE_BLOCK = 1 << 16;

export function buildNodes(part: ContinuousPart, h: number, K: number, env?: Envelope): Nodes {
  checkDeadline("nodes");
  const re = new Float64Array(K);
  const im = new Float64Array(K);
  const wre = new Float64Array(K);
  const wim = new Float64Array(K);
  const errAt = new Float64Array(K);
  // the frequencies and the values' relative errors live one block at a time (K reaches millions)
  const B = Math.min(K, NODE_BLOCK);
  const tb = new Float64Array(B);
  const rel = new Float64Array(B);
  const mod = new Float64Array(B);
  // phi's relative errors act on phi, of modulus e^{Re L}, not on the part left after the atoms, kernels or tail term are
  // taken out: per node (e_k + the model's declared relative error) e^{Re L} / w, the declared one then left out of the
  // uniform absolute allowance (roundingOf)
  const w = part.weight;
  const dRel = part.model.cfRelError !== undefined && part.model.cfRelError >= 0 && Number.isFinite(part.model.cfRelError) ? part.model.cfRelError : 0;
  let ac = 0;
  let ap = 0;
  let ec = 0;
  let ep = 0;
  let am = 0;
  let q2c = 0;
  let q2p = 0;
  let dc = 0;
  let dp = 0;
  // the rounded nodes' moves (./grid-rounding.ts)
  const exact = exactGrid(h, K);
  const moves = env ? nodeMoves(part, env, B, exact) : null;
  // in blocks (as probeEnvelope does), with the deadline checked between them: K reaches millions for densities
  // with kinks, and one call over all nodes ran for many seconds past a deadline
  for (let i0 = 0; i0 < K; i0 += NODE_BLOCK) {
    if (i0 > 0) checkDeadline("nodes");
    const i1 = Math.min(K, i0 + NODE_BLOCK);
    const n = i1 - i0;
    for (let i = 0; i < n; i++) tb[i] = (i0 + i + 0.5) * h;
    evalPart(part, n === B ? tb : tb.subarray(0, n), re.subarray(i0, i1), im.subarray(i0, i1), n === B ? rel : rel.subarray(0, n), undefined, n === B ? mod : mod.subarray(0, n));
    moves?.block(tb, n, i0, re, im, rel);
    for (let k = i0; k < i1; k++) {
      const inv = 1 / (k + 0.5);
      wre[k] = re[k] * inv;
      wim[k] = im[k] * inv;
      const a = cabs(re[k], im[k]);
      const r = rel[k - i0];
      // (the recentring's rounding in e_k acts on the part itself: the larger of the two moduli takes it)
      const mk = mod[k - i0] / w;
      const e = r * Math.max(mk, a) + dRel * mk;
      errAt[k] = e;
      ac += a * inv;
      ap += a;
      ec += e * inv;
      ep += e;
      am += (k + 0.5) * a;
      q2c += a * inv * (a * inv);
      q2p += a * a;
      const j = k % RESYNC;
      dc += j * a * inv;
      dp += j * a;
    }
  }
  // the sums of non-negative terms above carry relative errors below K eps: 2 (1 + K eps) covers them
  const g = 1 + K * Number.EPSILON;
  return {
    h,
    K,
    re,
    im,
    wre,
    wim,
    absCdf: (ac * g) / Math.PI,
    absPdf: (ap * h * g) / Math.PI,
    mass: part.mass,
    cfErrCdf: (ec * g * (1 + 4 * Number.EPSILON)) / Math.PI,
    cfErrPdf: (ep * h * g * (1 + 4 * Number.EPSILON)) / Math.PI,
    cfRelTaken: dRel,
    cfErrAt: errAt,
    absPdfMoment: (am * h * g) / Math.PI,
    l2Cdf: (Math.sqrt(q2c * g) * g) / Math.PI,
    l2Pdf: (Math.sqrt(q2p * g) * h * g) / Math.PI,
    driftCdf: (dc * g) / Math.PI,
    driftPdf: (dp * h * g) / Math.PI,
    exact,
    ...(moves?.sums(h, g) ?? {}),
  };
}
