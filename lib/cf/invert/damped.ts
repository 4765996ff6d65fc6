import type { Atom, CompiledModel } from "../types";
import type { GammaKernel } from "../damped-kernels";
import type { SeverityKernel } from "../severity-kernel";
import { kernelsMass } from "../damped-kernels";
import { truncationFrom } from "./nodes";
import { dampedPlan, exactStep, psiOf, sumAllowance, type ByParts, type DampedPlan, type Exactness } from "./damped-transform";
import { DAMPED_SAMPLED_NOTE } from "./damped-psi";
import { densityBeyondWindow, imageLimit, imageMoments, imageTail } from "./damped-images";
import { scratch, type ScratchSlot } from "../damped-scratch";
import { slopeNumerator } from "./damped-slope";
import { addGridNoise } from "./grid-rounding";
import { cabs } from "../complex";

export { dampedPlan, type DampedPlan } from "./damped-transform";
export { dampedAt, dampedGrid, gridPeriod, type DampedPoint } from "./damped-eval";

/**
 * Damped inversion of an aggregate law bounded below (support [lo, inf)), after Abate & Whitt (1992) and
 * Grubel & Hermesmeier (1999): with beta > 0 the functions
 *   g_f(x) = e^{-beta (x - lo)} f_c(x),  g_F(x) = e^{-beta (x - lo)} F_c(x),  g_I(x) = e^{-beta (x - lo)} int_lo^x F_c
 * (f_c, F_c: density and cdf of the continuous part, atoms taken out exactly) have the Fourier transforms
 *   psi_c(t),  psi_c(t) / (beta - i t),  psi_c(t) / (beta - i t)^2,   psi_c(t) = E[e^{(i t - beta)(X - lo)}] - atoms,
 * and are inverted by the mid-point sums (h/pi) sum_k Re(e^{-i t_k (x - lo)} c_k), t_k = (k + 1/2) h, h = 2 pi / T.
 * Poisson summation gives the images sum_{m >= 1} (-1)^m g(x + m T) (none from the left: the support starts at lo),
 * so after undamping the aliasing error of F_c is at most M_c q / (1 - q), q = e^{-beta T}, whatever the tail:
 * heavy and subexponential tails need no long period. The price is the factor e^{beta (x - lo)} on the sums' own
 * truncation and rounding errors; beta (R - lo) = U keeps it at e^U over the range asked for.
 * A continuous part whose density has a jump or a power singularity at an endpoint (pareto, weibull severities)
 * has a slowly decaying transform; the model's gamma kernels (model.dampedKernels: the endpoint expansion's leading
 * terms) are subtracted from psi_c and their cdf, density and integrated cdf added back in closed form.
 */

/** the most frequency terms a solution takes (the quantile search's last resort before the undamped route) */
export const MAX_K = 1 << 22;
/** budget when kernels or the one-claim term are taken out: what is left decays fast, so a long range is worth its terms */
export const KERNEL_BUDGET = 1 << 21;
/** default budget of frequency terms before the undamped routes are preferred */
export const DAMPED_BUDGET = 1 << 19;
const EPS = Number.EPSILON;
const EMPTY = new Float64Array(0);

export interface DampedSolution {
  lo: number;
  beta: number;
  T: number;
  h: number;
  K: number;
  atoms: Atom[];
  /** mass of the continuous part */
  Mc: number;
  /** coefficient sets: density (empty when set up without wantPdf), cdf and integrated cdf (empty without wantInt) */
  pRe: Float64Array;
  pIm: Float64Array;
  cRe: Float64Array;
  cIm: Float64Array;
  iRe: Float64Array;
  iIm: Float64Array;
  /** truncation part of the bounds below (before undamping) */
  truncCdf: number;
  truncPdf: number;
  /** bounds on the damped sums' truncation plus rounding error (before undamping) */
  sumPdf: number;
  sumCdf: number;
  sumInt: number;
  /**
   * the cdf sum's truncation by summation by parts: at y = x - lo it is at most truncTau / |sin(h y / 2)| (./damped-slope.ts),
   * used where below truncCdf (Infinity where the plan has no slope envelope); sumCdf - truncCdf is then roundCdf
   */
  truncTau: number;
  roundCdf: number;
  /** the density sum's counterpart: at y at most truncTauPdf / |sin(h y / 2)| (Infinity without one); roundPdf = sumPdf - truncPdf */
  truncTauPdf: number;
  roundPdf: number;
  /** aliasing bounds after undamping: cdf (uniform), density, integrated cdf (its factor of (x - lo + T/(1 - q))) */
  /** the cdf's images taken out in closed form: added to every cdf value (0 when they are only bounded) */
  cdfShift: number;
  aliasCdf: number;
  aliasPdf: number;
  aliasIntCoef: number;
  /**
   * images of the integrated cdf taken out in closed form (null when the law has no second moment): for z far out,
   * int_lo^z (F_c - K_F) = A (z - lo) - B + r(z) with A = M_c - sum w, B = E[(X - lo); continuous part] - sum w E[Y_k],
   * so sum_m (-1)^m q^m (A (y + m T) - B) is subtracted exactly and only sum_m q^m |r(y + m T)| <= rest(y) is left
   */
  intImages: { A: number; B: number; second: number } | null;
  /** where the cdf's images are shifted out: a bound on |G(lo + z) - A| non-increasing in z (./damped-images.ts), which
   *  gives the remainder at a point, q / (1 - q) B(x - lo + T), in place of the uniform aliasCdf; null without one */
  imageTail: ((z: number) => number) | null;
  q: number;
  maxFrequency: number;
  /** the frequency cut-off was capped: the truncation term is what it is, not the target */
  capped: boolean;
  /** exact nodes t_k = (k + 1/2) h, and which rounding allowance the sums' bounds carry (see Exactness) */
  pointwise: Exactness;
  /** the allowance per unit of sum |c_k| in sumCdf etc., and (h/pi) sum |c_k|, (h/pi) sum |psi_k| it multiplies */
  rel: number;
  scaleC: number;
  scaleP: number;
  /** gamma kernels taken out of psi_c (added back in closed form) */
  kernels: readonly GammaKernel[];
  /** the one-claim term taken out of psi_c (added back in closed form) */
  severity: SeverityKernel | null;
  /** the two-claim term taken out of psi_c (added back by quadrature), or null */
  pair: SeverityKernel["pair"] | null;
  /**
   * the two-claim term's per-panel quadrature target on the unweighted law: tol / (1000 P(N = 2)), within [1e-16, 1e-3]
   * (some 6 to 25 panels, so the rule's part of the weighted term is a few hundredths of tol where every panel reaches it);
   * the term's stated bound is what the answer carries
   */
  pairTol: number;
  notes: string[];
}

export interface DampedOptions {
  tolerance: number;
  wantPdf: boolean;
  /** the period to use exactly (FFT grids fix it through N dx); default: requiredPeriod */
  period?: number;
  /** give up (null) when more frequency terms than this are needed */
  budget?: number;
  /** a plan made for this range already (grids: to fix the period first) */
  plan?: DampedPlan;
  /** how many points the solution will be evaluated at (weighs the two-claim term's cost; default 256) */
  points?: number;
  /**
   * the solution is evaluated by dampedAt only (no FFT): exact nodes and the derived rounding allowance SUM_REL, which
   * lets the plan take a larger damping (fewer terms). Ignored when the period is fixed by a grid.
   */
  pointwise?: Exactness;
  /**
   * the truncated sums may be bounded by parts (./damped-slope.ts; see ByParts, default false): true for the quantile
   * search's pointwise cdf, "range" where every answered point of [lo, R] carries its own bound (grids, points)
   */
  byParts?: ByParts;
  /** byParts "range": the smallest y = x - lo of the points answered (none nearer lo), default 0 */
  yLow?: number;
  /** the integrated cdf's coefficients are wanted (expected shortfall); without them sumInt is Infinity (default true) */
  wantInt?: boolean;
  /**
   * the solution is used only until the caller's next dampedSetup (or its return): its coefficient arrays are reused
   * buffers (../damped-scratch.ts), which the next transient setup overwrites (default false)
   */
  transient?: boolean;
}

/** Whether the damped inversion applies: a compound-type law bounded below with its damped transform. */
export function dampable(model: CompiledModel): boolean {
  return !!model.dampedLogCf && Number.isFinite(model.support[0]) && (model.kind.type === "continuous" || model.kind.type === "mixed");
}

/** Frequencies, coefficients and error bounds for the range [lo, R]. */
export function dampedSetup(model: CompiledModel, atoms: Atom[], R: number, o: DampedOptions): DampedSolution | null {
  const lo = model.support[0];
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  const Mc = Math.max(1 - pa, 0);
  const tol = o.tolerance;
  const pointwise: Exactness = o.period === undefined ? (o.pointwise ?? false) : false;
  const plan = o.plan ?? dampedPlan(model, atoms, R, tol, o.wantPdf, o.points, pointwise, o.budget ?? MAX_K, undefined, undefined, o.byParts ?? false, o.byParts === "range" ? o.yLow : undefined, o.wantInt ?? true);
  const beta = plan.beta;
  // pointwise: the step rounded down to an exact one (the period grows by at most 2^-28 relative)
  const h = pointwise ? exactStep((2 * Math.PI) / plan.T) : (2 * Math.PI) / (o.period ?? plan.T);
  const T = pointwise ? (2 * Math.PI) / h : (o.period ?? plan.T);
  const notes: string[] = [];
  const psi = psiOf(model, atoms, beta, plan.pairOut);
  const pair = plan.pairOut ? (model.dampedSeverity?.pair ?? null) : null;
  const env = plan.env;
  const tmax = plan.tmax;
  let K = Math.max(16, Math.ceil(tmax / h));
  let capped = false;
  // a slowly decaying transform (a density with a jump or a pole, e.g. at the support's start): the undamped
  // routes handle those with endpoint kernels; the caller falls back to them
  if (K > (o.budget ?? MAX_K)) return null;
  if (K > MAX_K) {
    K = MAX_K;
    capped = true;
    notes.push(`frequency cut-off capped at ${(K * h).toPrecision(4)} (${K} terms): the truncation bound is reported as reached, not the target`);
  }
  // the nodes, the noise and (without the density) psi itself are temporaries in reused buffers (./damped-scratch.ts)
  const t = scratch("nodes", K);
  for (let k = 0; k < K; k++) t[k] = (k + 0.5) * h;
  // a transient solution's coefficients are reused buffers too (its caller drops it before the next setup)
  const keep = (slot: ScratchSlot, n: number) => (o.transient ? scratch(slot, n) : new Float64Array(n));
  const pRe = o.wantPdf ? keep("solPRe", K) : scratch("psiRe", K);
  const pIm = o.wantPdf ? keep("solPIm", K) : scratch("psiIm", K);
  const nz = scratch("noise", K);
  psi(t, pRe, pIm, nz);
  addGridNoise(model, atoms, beta, plan.pairOut ?? false, pointwise ? null : t, t, nz, env, pRe, pIm);
  const cRe = keep("solCRe", K);
  const cIm = keep("solCIm", K);
  const wantInt = o.wantInt ?? true;
  const iRe = wantInt ? keep("solIRe", K) : EMPTY;
  const iIm = wantInt ? keep("solIIm", K) : EMPTY;
  const { absP, absC, absI, nP, nC, nI } = coefficients(beta, K, t, pRe, pIm, nz, cRe, cIm, wantInt ? iRe : null, wantInt ? iIm : null);
  // the terms k >= K: |c_k| <= E(t_k) / t_k with E(t)/t non-increasing, so (h/pi) sum_{k >= K} E(t_k)/t_k is at most
  // (1/pi) int_{(K - 1/2) h}^inf E/t (each term below the integral over its node's cell), the envelope's tail interpolated
  // to that cut-off (likewise E for the density, and E/t^2 <= E/(t (K - 1/2) h) for the integral); it was twice the tail
  // at the probe left of K h
  const tK = (K - 0.5) * h;
  const trunc = truncationFrom(env, tK);
  // per node: relative rounding of the CF and the accumulation, plus the absolute noise (atoms, numerical CF)
  const rel = sumAllowance(model, K, pointwise, true);
  const roundPdf = (h / Math.PI) * (rel * absP + nP);
  const sumPdf = trunc.pdf + roundPdf;
  const roundCdf = (h / Math.PI) * (rel * absC + nC);
  const sumCdf = trunc.cdf + roundCdf;
  // the summation-by-parts numerators: the bound holds for the truncated series at every y, however its first K terms are
  // summed (the plan keeps a slope envelope only where it chose the cut-off by it)
  const truncTau = plan.slope ? slopeNumerator(plan.slope, h, tK) : Infinity;
  const truncTauPdf = plan.slopePdf ? slopeNumerator(plan.slopePdf, h, tK) : Infinity;
  const sumInt = wantInt ? trunc.cdf / tK + (h / Math.PI) * (rel * absI + nI) : Infinity;
  const q = Math.exp(-beta * T);
  const geo = q / (1 - q);
  const ks = model.dampedKernels ?? [];
  const fTail = densityBeyondWindow(model, atoms, T, pair);
  const Mr = Mc + kernelsMass(ks) + (model.dampedSeverity?.w ?? 0) + (pair?.w ?? 0);
  // the images of the cdf and of its integral taken out in closed form (their limits A, B and the second moment)
  const intImages = imageMoments(model, atoms, plan.pairOut);
  let aliasCdf = Mr * geo;
  let cdfShift = 0;
  if (intImages) {
    // sum_{m >= 1} (-1)^m q^m G(y + m T) with G -> A far out: -A q / (1 + q) in closed form; what is left is at most
    // sum q^m |G(y + m T) - A| <= q / (1 - q) second / T^2 (Markov's inequality on Y^2 for the tail masses)
    cdfShift = (intImages.A * q) / (1 + q);
    const rest = geo * (intImages.second / (T * T)) + 4 * EPS * Math.abs(cdfShift);
    if (rest < aliasCdf) aliasCdf = rest;
    else cdfShift = 0;
  } else {
    // no second moment: the same shift with the limit alone, what is left at most q / (1 - q) B(T) (./damped-images.ts)
    const lim = imageLimit(model, atoms, plan.pairOut);
    const B = Number.isFinite(lim) ? imageTail(model, atoms, lo, ks, model.dampedSeverity ?? null, pair, T) : null;
    if (B) {
      const shift = (lim * q) / (1 + q);
      const rest = geo * B(T) + 4 * EPS * Math.abs(shift);
      if (rest < aliasCdf) {
        aliasCdf = rest;
        cdfShift = shift;
      }
    }
  }
  notes.push(
    `damped inversion (exponential damping beta = ${beta.toPrecision(4)} before the transform, Abate & Whitt 1992; ` +
      `Grubel & Hermesmeier 1999): period ${T.toPrecision(4)} from ${lo}, ${K} frequency terms, atoms separated exactly`,
  );
  notes.push(
    env.derived
      ? "frequency truncation bounded from derived bounds on the transform's size and slope (the claim law's transform in closed form or bounded through its density's derivatives), not from samples alone"
      : DAMPED_SAMPLED_NOTE,
  );
  if (model.dampedSeverity && model.dampedSeverity.w > 0)
    notes.push(
      `the one-claim term (P(N = 1) = ${model.dampedSeverity.w.toPrecision(4)} times the ${model.dampedSeverity.name} severity) taken out of ` +
        `the transform before the inversion and added back in closed form, so the remainder decays like the severity's transform squared`,
    );
  if (pair)
    notes.push(
      `the two-claim term (P(N = 2) = ${pair.w.toPrecision(4)} times the law of two claims) taken out as well and added back by ` +
        `Gauss-Legendre panels with a Bernstein-ellipse error bound, so the remainder decays like the transform cubed`,
    );
  if (truncTau < trunc.cdf)
    notes.push(
      `the truncated ${truncTauPdf < trunc.pdf ? "cdf and density" : "cdf"} sums bounded by summation by parts at each point (the steps of the remainder's coefficients, from the ` +
        `severity transform's slope bound, over |sin(h y / 2)|), where below the envelope's bound`,
    );
  if (ks.length)
    notes.push(
      `${ks.length} gamma kernels matching the endpoint expansion of the transform (Watson's lemma) taken out before the ` +
        `inversion and added back in closed form (regularised incomplete gamma), so the remainder decays fast`,
    );
  return {
    lo,
    beta,
    T,
    h,
    K,
    atoms,
    Mc,
    pRe: o.wantPdf ? pRe : EMPTY,
    pIm: o.wantPdf ? pIm : EMPTY,
    cRe,
    cIm,
    iRe,
    iIm,
    truncCdf: trunc.cdf,
    truncPdf: trunc.pdf,
    sumPdf,
    sumCdf,
    sumInt,
    truncTau,
    roundCdf,
    truncTauPdf,
    roundPdf,
    aliasCdf,
    cdfShift,
    aliasPdf: fTail * geo,
    aliasIntCoef: Mr * geo,
    intImages,
    imageTail: cdfShift !== 0 ? imageTail(model, atoms, lo, ks, model.dampedSeverity ?? null, pair, T) : null,
    kernels: ks,
    severity: model.dampedSeverity ?? null,
    pair,
    pairTol: Math.min(Math.max(tol / (1000 * (pair ? pair.w : 1)), 1e-16), 1e-3),
    q,
    maxFrequency: K * h,
    capped,
    pointwise,
    rel,
    scaleC: (h / Math.PI) * absC,
    scaleP: (h / Math.PI) * absP,
    notes,
  };
}

/**
 * The cdf's and the integrated cdf's coefficients c_k = psi_k / (beta - i t_k), i_k = c_k / (beta - i t_k) (i only where
 * asked), and the sums of |psi_k|, |c_k|, |i_k| and of the noise likewise weighted. A function of its own, so the loop is
 * optimised with its own type feedback (inside dampedSetup, code past it not yet run sent it back to the interpreter).
 */
function coefficients(
  beta: number,
  K: number,
  t: Float64Array,
  pRe: Float64Array,
  pIm: Float64Array,
  nz: Float64Array,
  cRe: Float64Array,
  cIm: Float64Array,
  iRe: Float64Array | null,
  iIm: Float64Array | null,
): { absP: number; absC: number; absI: number; nP: number; nC: number; nI: number } {
  let absP = 0;
  let absC = 0;
  let absI = 0;
  let nP = 0;
  let nC = 0;
  let nI = 0;
  for (let k = 0; k < K; k++) {
    // 1 / (beta - i t) = (beta + i t) / (beta^2 + t^2)
    const d = beta * beta + t[k] * t[k];
    const ur = beta / d;
    const ui = t[k] / d;
    const cr = pRe[k] * ur - pIm[k] * ui;
    const ci = pRe[k] * ui + pIm[k] * ur;
    cRe[k] = cr;
    cIm[k] = ci;
    if (iRe && iIm) {
      iRe[k] = cr * ur - ci * ui;
      iIm[k] = cr * ui + ci * ur;
    }
    // |psi_k| by the square root (a few ulps; the allowances carry far more), scaled only where the squares could underflow
    const a = cabs(pRe[k], pIm[k]) * (1 + 4 * EPS);
    const sd = Math.sqrt(d);
    absP += a;
    absC += a / sd;
    absI += a / d;
    nP += nz[k];
    nC += nz[k] / sd;
    nI += nz[k] / d;
  }
  return { absP, absC, absI, nP, nC, nI };
}
