import type { Atom, CompiledModel } from "../types";
import type { GammaKernel } from "../damped-kernels";
import type { SeverityKernel } from "../severity-kernel";
import { nextPowerOfTwo } from "../fftplan";
import { checkDeadline } from "../deadline";
import { sumOnGrid } from "./fft";
import { kernelsAt, kernelsDensityBeyond, kernelsMass, subtractKernels } from "../damped-kernels";
import { cutoffFor, envelopeOf, probeFrequencies, truncationAt, type Envelope, type Nodes } from "./nodes";

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

/** per-node noise of psi_c: rounding of the atom subtraction plus twice the CF's declared absolute error */
function noiseOf(model: CompiledModel, atoms: Atom[]): number {
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  const kw = kernelsMass(model.dampedKernels ?? []) + (model.dampedSeverity?.w ?? 0);
  // a relative CF error acts on the atoms' share of psi as an absolute one; the kernels' closed forms round too
  return 16 * EPS * (1 + pa + kw) + 2 * (model.cfAbsError ?? 0) + 2 * pa * (model.cfRelError ?? 0);
}
export const MAX_K = 1 << 21;
/** default budget of frequency terms before the undamped routes are preferred */
export const DAMPED_BUDGET = 1 << 19;
const EPS = Number.EPSILON;

export interface DampedSolution {
  lo: number;
  beta: number;
  T: number;
  h: number;
  K: number;
  atoms: Atom[];
  /** mass of the continuous part */
  Mc: number;
  /** coefficient sets: density, cdf and integrated cdf */
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
  /** aliasing bounds after undamping: cdf (uniform), density, integrated cdf (its factor of (x - lo + T/(1 - q))) */
  aliasCdf: number;
  aliasPdf: number;
  aliasIntCoef: number;
  /**
   * images of the integrated cdf taken out in closed form (null when the law has no second moment): for z far out,
   * int_lo^z (F_c - K_F) = A (z - lo) - B + r(z) with A = M_c - sum w, B = E[(X - lo); continuous part] - sum w E[Y_k],
   * so sum_m (-1)^m q^m (A (y + m T) - B) is subtracted exactly and only sum_m q^m |r(y + m T)| <= rest(y) is left
   */
  intImages: { A: number; B: number; second: number } | null;
  q: number;
  maxFrequency: number;
  /** the frequency cut-off was capped: the truncation term is what it is, not the target */
  capped: boolean;
  /** gamma kernels taken out of psi_c (added back in closed form) */
  kernels: readonly GammaKernel[];
  /** the one-claim term taken out of psi_c (added back in closed form) */
  severity: SeverityKernel | null;
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
}

/** Plan for the range [lo, R]: beta (R - lo) = U, e^{-beta T} <= tol / (8 M_c), and the envelope of |psi_c|. */
export interface DampedPlan {
  beta: number;
  T: number;
  U: number;
  env: Envelope;
  tmax: number;
  noise: number;
}

function psiOf(model: CompiledModel, atoms: Atom[], beta: number) {
  const lo = model.support[0];
  return (t: Float64Array, re: Float64Array, im: Float64Array) => {
    model.dampedLogCf!(beta, t, re, im);
    for (let k = 0; k < t.length; k++) {
      const m = Math.exp(re[k] + beta * lo);
      const ph = im[k] - t[k] * lo;
      let r = m * Math.cos(ph);
      let i = m * Math.sin(ph);
      for (const a of atoms) {
        const d = a.x - lo;
        const am = a.p * Math.exp(-beta * d);
        r -= am * Math.cos(t[k] * d);
        i -= am * Math.sin(t[k] * d);
      }
      re[k] = r;
      im[k] = i;
    }
    if (model.dampedKernels) subtractKernels(model.dampedKernels, lo, beta, t, re, im);
    if (model.dampedSeverity) subtractSeverity(model.dampedSeverity, beta, t, re, im);
  };
}

/** psi -= w E[e^{(i t - beta) X}] (the one-claim term; the compound's support starts at 0 like the severity's) */
function subtractSeverity(k: SeverityKernel, beta: number, t: Float64Array, re: Float64Array, im: Float64Array) {
  const r = new Float64Array(t.length);
  const i = new Float64Array(t.length);
  k.dampedLogCf(beta, t, r, i);
  for (let j = 0; j < t.length; j++) {
    const m = k.w * Math.exp(r[j]);
    re[j] -= m * Math.cos(i[j]);
    im[j] -= m * Math.sin(i[j]);
  }
}

/** the gamma kernels and the one-claim term at x: what the inverted remainder leaves out */
function takenOutAt(s: DampedSolution, x: number): { F: number; f: number; I: number; err: number; errf: number; errI: number } {
  const kv = s.kernels.length ? kernelsAt(s.kernels, x) : { F: 0, f: 0, I: 0, err: 0, errf: 0, errI: 0 };
  if (!s.severity) return kv;
  const v = s.severity.at(x);
  return { F: kv.F + v.F, f: kv.f + v.f, I: kv.I + v.I, err: kv.err + v.err, errf: kv.errf + v.errf, errI: kv.errI + v.errI };
}

function probe(model: CompiledModel, atoms: Atom[], beta: number, noise: number): Envelope {
  const tp = probeFrequencies(Math.max(model.scale, 1e-300));
  const pr = new Float64Array(tp.length);
  const pi = new Float64Array(tp.length);
  psiOf(model, atoms, beta)(tp, pr, pi);
  const mag = new Float64Array(tp.length);
  for (let i = 0; i < tp.length; i++) mag[i] = Math.hypot(pr[i], pi[i]);
  // values below the rounding of the atom subtraction and the CF's own error are not resolved
  return envelopeOf(tp, mag, () => noise);
}

/**
 * U trades the period (T = span A / U) against the frequency cut-off (the sums' target is tol / (8 e^U)) and the
 * rounding that e^U amplifies: the U in [2, 8] with the fewest terms whose rounding estimate stays below tol / 4.
 */
export function dampedPlan(model: CompiledModel, atoms: Atom[], R: number, tol: number, wantPdf: boolean): DampedPlan {
  const lo = model.support[0];
  const span = Math.max(R - lo, 1e-6 * Math.max(model.scale, Math.abs(lo), 1e-300));
  // the inverted function is the continuous part less the kernels: its size bounds the images
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 1e-300) + kernelsMass(model.dampedKernels ?? []) + (model.dampedSeverity?.w ?? 0);
  const A = Math.max(Math.log((8 * Mc) / tol), 2);
  const noise = noiseOf(model, atoms);
  const env0 = probe(model, atoms, 4 / span, noise);
  let best = { U: 4, K: Infinity, bad: Infinity };
  for (let U = 2; U <= 8; U += 0.5) {
    const beta = U / span;
    const T = Math.max((span * A) / U, span * 1.25);
    const target = tol / (8 * Math.exp(U));
    let tmax = cutoffFor(env0, wantPdf ? target : Infinity, target);
    if (!Number.isFinite(tmax)) tmax = env0.t[env0.t.length - 1];
    const K = Math.max(16, (tmax * T) / (2 * Math.PI));
    // scale of the cdf sum: (1/pi) int |psi_c| / |beta - i t| up to tmax
    let S = (Mc * env0.t[0]) / (Math.PI * beta);
    for (let i = 0; i + 1 < env0.t.length && env0.t[i] < tmax; i++) S += (env0.env[i] * (env0.t[i + 1] - env0.t[i])) / (Math.PI * Math.max(env0.t[i], beta));
    const round = Math.exp(U) * (1e-14 + 8 * EPS * Math.sqrt(K) + 2 * (model.cfRelError ?? 0)) * S;
    const bad = round / (tol / 4);
    if ((bad <= 1 && (best.bad > 1 || K < best.K)) || (bad > 1 && best.bad > 1 && bad < best.bad)) best = { U, K, bad };
  }
  const U = best.U;
  const beta = U / span;
  const env = probe(model, atoms, beta, noise);
  const target = tol / (8 * Math.exp(U));
  let tmax = cutoffFor(env, wantPdf ? target : Infinity, target);
  if (!Number.isFinite(tmax)) tmax = env.t[env.t.length - 1];
  return { beta, T: Math.max((span * A) / U, span * 1.25), U, env, tmax, noise };
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
  const plan = o.plan ?? dampedPlan(model, atoms, R, tol, o.wantPdf);
  const beta = plan.beta;
  const T = o.period ?? plan.T;
  const notes: string[] = [];
  const psi = psiOf(model, atoms, beta);
  const env = plan.env;
  const noise = plan.noise;
  const tmax = plan.tmax;
  const h = (2 * Math.PI) / T;
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
  const t = new Float64Array(K);
  for (let k = 0; k < K; k++) t[k] = (k + 0.5) * h;
  const pRe = new Float64Array(K);
  const pIm = new Float64Array(K);
  psi(t, pRe, pIm);
  const cRe = new Float64Array(K);
  const cIm = new Float64Array(K);
  const iRe = new Float64Array(K);
  const iIm = new Float64Array(K);
  let absP = 0;
  let absC = 0;
  let absI = 0;
  let wC = 0;
  let wI = 0;
  for (let k = 0; k < K; k++) {
    // 1 / (beta - i t) = (beta + i t) / (beta^2 + t^2)
    const d = beta * beta + t[k] * t[k];
    const ur = beta / d;
    const ui = t[k] / d;
    cRe[k] = pRe[k] * ur - pIm[k] * ui;
    cIm[k] = pRe[k] * ui + pIm[k] * ur;
    iRe[k] = cRe[k] * ur - cIm[k] * ui;
    iIm[k] = cRe[k] * ui + cIm[k] * ur;
    const a = Math.hypot(pRe[k], pIm[k]);
    absP += a;
    absC += a / Math.sqrt(d);
    absI += a / d;
    wC += 1 / Math.sqrt(d);
    wI += 1 / d;
  }
  const trunc = truncationAt(env, K * h);
  // per node: relative rounding of the CF and the accumulation, plus the absolute noise (atoms, numerical CF)
  const rel = 1e-14 + 8 * EPS * Math.sqrt(K) + 2 * (model.cfRelError ?? 0);
  const sumPdf = 2 * trunc.pdf + (h / Math.PI) * (rel * absP + noise * K);
  const sumCdf = 2 * trunc.cdf + (h / Math.PI) * (rel * absC + noise * wC);
  const sumInt = (2 * trunc.cdf) / (K * h) + (h / Math.PI) * (rel * absI + noise * wI);
  const q = Math.exp(-beta * T);
  const geo = q / (1 - q);
  const mean = model.cumulants(1)[0];
  // density beyond the window: f(y) <= S(lo + (y - lo)/2) / ((y - lo)/2) for a density non-increasing there,
  // with Markov's S(z) <= E[X - lo] / (z - lo) when the mean exists
  const ks = model.dampedKernels ?? [];
  const fTail =
    (mean !== null && Number.isFinite(mean) && model.momentIndex > 1 ? (4 * Math.max(mean - lo, 0)) / (T * T) : (2 * Mc) / T) +
    (ks.length ? kernelsDensityBeyond(ks, lo + T) : 0) +
    (model.dampedSeverity ? model.dampedSeverity.densityBeyond(lo + T) : 0);
  const Mr = Mc + kernelsMass(ks) + (model.dampedSeverity?.w ?? 0);
  // second moments about lo (continuous part and kernels) for the images of the integrated cdf
  let intImages: DampedSolution["intImages"] = null;
  const k2 = model.cumulants(2);
  // (not with a one-claim severity term taken out: its moments are not at hand here; the coarser bound stays)
  if (!model.dampedSeverity && model.momentIndex > 2 && k2[0] !== null && k2[1] !== null && Number.isFinite(k2[0]) && Number.isFinite(k2[1])) {
    const m1 = k2[0] - lo;
    let mc = m1;
    let second = k2[1] + m1 * m1;
    for (const a of atoms) {
      mc -= a.p * (a.x - lo);
      second -= a.p * (a.x - lo) ** 2;
    }
    let W = 0;
    let mK = 0;
    for (const k of ks) {
      const d = k.at - lo;
      W += k.w;
      mK += k.w * (d + k.shape / k.rate);
      second += Math.abs(k.w) * (d * d + (2 * d * k.shape) / k.rate + (k.shape * (k.shape + 1)) / (k.rate * k.rate));
    }
    if (Number.isFinite(mc) && Number.isFinite(second)) intImages = { A: Mc - W, B: mc - mK, second: Math.max(second, 0) };
  }
  notes.push(
    `damped inversion (exponential damping beta = ${beta.toPrecision(4)} before the transform, Abate & Whitt 1992; ` +
      `Grubel & Hermesmeier 1999): period ${T.toPrecision(4)} from ${lo}, ${K} frequency terms, atoms separated exactly`,
  );
  if (model.dampedSeverity)
    notes.push(
      `the one-claim term (P(N = 1) = ${model.dampedSeverity.w.toPrecision(4)} times the ${model.dampedSeverity.name} severity) taken out of ` +
        `the transform before the inversion and added back in closed form, so the remainder decays like the severity's transform squared`,
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
    pRe,
    pIm,
    cRe,
    cIm,
    iRe,
    iIm,
    truncCdf: 2 * trunc.cdf,
    truncPdf: 2 * trunc.pdf,
    sumPdf,
    sumCdf,
    sumInt,
    aliasCdf: Mr * geo,
    aliasPdf: fTail * geo,
    aliasIntCoef: Mr * geo,
    intImages,
    kernels: ks,
    severity: model.dampedSeverity ?? null,
    q,
    maxFrequency: K * h,
    capped,
    notes,
  };
}

/** Values and error bounds of the continuous part at x (cdf, density, integrated cdf). */
export interface DampedPoint {
  Fc: number;
  fc: number;
  Ic: number;
  errF: number;
  errf: number;
  errI: number;
}

/** The three mid-point sums at one point (phase advanced by a rotation, resynchronised every 64 terms). */
export function dampedAt(s: DampedSolution, x: number, wantPdf: boolean, wantInt: boolean): DampedPoint {
  const y = x - s.lo;
  if (y < 0) return { Fc: 0, fc: 0, Ic: 0, errF: 0, errf: 0, errI: 0 };
  const { h, K, pRe, pIm, cRe, cIm, iRe, iIm } = s;
  const th = h * y;
  const rc = Math.cos(th);
  const rs = -Math.sin(th);
  let aP = 0;
  let aC = 0;
  let aI = 0;
  let k = 0;
  checkDeadline("pointwise");
  while (k < K) {
    const a0 = (k + 0.5) * th;
    let zr = Math.cos(a0);
    let zi = -Math.sin(a0);
    const end = Math.min(K, k + 64);
    for (; k < end; k++) {
      aC += zr * cRe[k] - zi * cIm[k];
      if (wantPdf) aP += zr * pRe[k] - zi * pIm[k];
      if (wantInt) aI += zr * iRe[k] - zi * iIm[k];
      const nr = zr * rc - zi * rs;
      zi = zr * rs + zi * rc;
      zr = nr;
    }
  }
  const g = Math.exp(s.beta * y);
  const f = (g * h) / Math.PI;
  const kv = takenOutAt(s, x);
  // the phase recurrence drifts by ~ eps per step between resyncs: inside the rounding allowance of the setup;
  // clamping to the known range [0, Mc] only moves a value toward the truth
  const Fc = Math.min(Math.max(f * aC + kv.F, 0), s.Mc);
  const fc = Math.max(f * aP + kv.f, 0);
  // images of the integrated cdf: sum_{m >= 1} (-1)^m q^m (A (y + m T) - B) in closed form
  // (sum (-1)^m q^m = -q/(1+q), sum (-1)^m m q^m = -q/(1+q)^2); what is left is at most
  // q/(1-q) E[(Y - (y + T))^+] <= q/(1-q) E[Y^2] / (4 (y + T)) for Y >= 0 ((u - c)^+ <= u^2 / (4c), common practice)
  let images = 0;
  let aliasI = s.aliasIntCoef * (y + s.T / (1 - s.q));
  if (s.intImages) {
    const { A, B, second } = s.intImages;
    const r = s.q / (1 + s.q);
    images = -r * (A * y - B) - (A * s.T * r) / (1 + s.q);
    aliasI = (s.q / (1 - s.q)) * (second / (4 * (y + s.T))) + 8 * EPS * (Math.abs(A) * (y + s.T) + Math.abs(B)) * r;
  }
  const Ic = Math.min(Math.max(f * aI - images + kv.I, 0), s.Mc * y);
  return {
    Fc,
    fc,
    Ic,
    errF: g * s.sumCdf + s.aliasCdf + kv.err,
    errf: g * s.sumPdf + s.aliasPdf + kv.errf,
    errI: g * s.sumInt + aliasI + kv.errI,
  };
}

/** Density and cdf of the continuous part on a uniform grid by two FFTs (the period is N dx). */
export function dampedGrid(
  s: DampedSolution,
  from: number,
  dx: number,
  count: number,
  N: number,
  wantPdf: boolean,
): { fc: Float64Array; Fc: Float64Array; errF: Float64Array; errf: Float64Array } {
  const mk = (re: Float64Array, im: Float64Array): Nodes => ({
    h: s.h,
    K: s.K,
    re,
    im,
    wre: re,
    wim: im,
    absCdf: 0,
    absPdf: 0,
    mass: 0,
  });
  const gC = new Float64Array(count);
  const gP = new Float64Array(count);
  sumOnGrid(mk(s.cRe, s.cIm), s.lo, from, N, 0, count, gC, null, null);
  if (wantPdf) sumOnGrid(mk(s.pRe, s.pIm), s.lo, from, N, 0, count, gP, null, null);
  const fc = new Float64Array(count);
  const Fc = new Float64Array(count);
  const errF = new Float64Array(count);
  const errf = new Float64Array(count);
  for (let j = 0; j < count; j++) {
    const y = from + j * dx - s.lo;
    if (y < 0) continue;
    const g = Math.exp(s.beta * y);
    const kv = takenOutAt(s, from + j * dx);
    Fc[j] = Math.min(Math.max(g * gC[j] + kv.F, 0), s.Mc);
    fc[j] = wantPdf ? Math.max(g * gP[j] + kv.f, 0) : 0;
    errF[j] = g * s.sumCdf + s.aliasCdf + kv.err;
    errf[j] = g * s.sumPdf + s.aliasPdf + kv.errf;
  }
  return { fc, Fc, errF, errf };
}

/** FFT size and period for a grid: N dx >= the period the tolerance needs and the grid fits in [lo, lo + N dx). */
export function gridPeriod(lo: number, from: number, dx: number, count: number, T: number): { N: number; T: number } {
  const last = from + (count - 1) * dx;
  const need = Math.max(T, last - Math.min(lo, from) + dx);
  const N = nextPowerOfTwo(Math.max(count, Math.ceil(need / dx)));
  return { N, T: N * dx };
}
