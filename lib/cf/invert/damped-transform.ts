// The damped transform psi_c of the continuous part less what is taken out in closed form, and the plan (beta, period, cut-off).
import type { Atom, CompiledModel } from "../types";
import type { SeverityKernel } from "../severity-kernel";
import { kernelsMass, subtractKernels } from "../damped-kernels";
import { scratch } from "../damped-scratch";
import { cutoffFor, envelopeOf, probeFrequencies, truncationAt, type Envelope } from "./nodes";
import { imageMoments } from "./damped-images";
import { slopeCutoff, slopeEnvelope, slopeTruncationAt } from "./damped-slope";

const EPS = Number.EPSILON;

/**
 * Relative rounding of one frequency term and its share of the accumulation in the pointwise sums (damped-eval.ts
 * dampedAt), per unit of |coefficient|: the phase e^{-i t_k y} from an exact argument (t_k exact, t_k y split by
 * Dekker's product) to within 4 eps, the block table e^{-i j h y} to 4 eps, their product 2 eps, the term's products
 * 2 eps (16 eps in all, with margin); sums of 8 terms, 8 of those per block and the blocks compensated (Neumaier):
 * gamma_7 + gamma_7 + 2 eps < 9 eps (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., eq. 4.4 and
 * sec. 4.3). 32 eps leaves the rest as margin.
 */
export const SUM_REL = 32 * EPS;

/**
 * The frequency step rounded down to 29 significant bits: then t_k = (k + 1/2) h is exact for every k < 2^22, so the
 * transform and the phases of the pointwise sums see the same nodes, with no rounding in between.
 */
export function exactStep(h: number): number {
  const q = Math.pow(2, Math.floor(Math.log2(h)) - 28);
  return Math.floor(h / q) * q;
}

/**
 * Relative allowance per unit of sum(|c_k|) for rounding in the sums and in the CF values: the derived SUM_REL when
 * the sums are taken point by point with exact nodes (dampedAt), otherwise the FFT routes' allowance; the CF's
 * relative error twice, except where psi is formed from the severity's transform (severityPsi), whose per-node noise
 * already carries the propagated CF error.
 */
export function sumAllowance(model: CompiledModel, K: number, pointwise: Exactness): number {
  const cf = model.dampedSeverity?.count && model.support[0] === 0 ? 0 : 2 * (model.cfRelError ?? 0);
  if (!pointwise) return 1e-14 + 8 * EPS * Math.sqrt(K) + cf;
  return (pointwise === "interpolated" ? FFT_REL : SUM_REL) + cf;
}

/**
 * How the sums of a solution are evaluated: false (FFT on a grid the request fixes: nodes rounded, the allowance
 * 1e-14 + 8 eps sqrt(K)), true (exact nodes, pointwise sums only: SUM_REL), "interpolated" (exact nodes, the sums by one
 * FFT on the solution's own grid, see damped-points.ts, or pointwise: FFT_REL)
 */
export type Exactness = boolean | "interpolated";

/**
 * Rounding of an FFT of the sums per unit of sum |c_k| on the solution's own grid (no pre-rotation, exact nodes): each
 * radix-2 level of the transform adds at most about 4.5 unit roundoffs of the inputs' absolute sum (a twiddle multiply
 * and an add; the partial transforms at one level partition the inputs, so their errors add to at most that per
 * level: Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 24.1, componentwise), taken as 8 eps a
 * level for N up to 2^22, plus 16 eps for the post-rotation and the output products. The wrapped bins' accumulation
 * (K/N terms a bin) is added where N is known (damped-points.ts).
 */
export const FFT_REL = (8 * 22 + 16) * EPS;

/** per-node noise of psi_c: rounding of the atom subtraction plus twice the CF's declared absolute error */
export function noiseOf(model: CompiledModel, atoms: Atom[]): number {
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  const kw = kernelsMass(model.dampedKernels ?? []) + (model.dampedSeverity?.w ?? 0);
  // a relative CF error acts on the atoms' share of psi as an absolute one; the kernels' closed forms round too
  return 16 * EPS * (1 + pa + kw) + 2 * (model.cfAbsError ?? 0) + 2 * pa * (model.cfRelError ?? 0);
}

/** Plan for the range [lo, R]: beta (R - lo) = U, e^{-beta T} <= tol / (8 M_c), and the envelope of |psi_c|. */
export interface DampedPlan {
  beta: number;
  T: number;
  U: number;
  env: Envelope;
  tmax: number;
  noise: number;
  /** the two-claim term is taken out of psi too (see SeverityKernel.pair) */
  pairOut: boolean;
  /** the sums' estimated rounding (CF noise included) over tol / 4: above 1 the plan cannot reach the tolerance */
  rounding: number;
  /**
   * an envelope of |c'| (./damped-slope.ts) where the cut-off was chosen by the summation-by-parts bound at the range's
   * end (pointwise cdf sums only: the bound then holds per point, away from the period's ends), else null
   */
  slope: Envelope | null;
}

/**
 * psi_c at the nodes t (atoms, kernels and the one-claim term taken out); with `noise` given, also a bound on each
 * node's absolute error from the CF values (the constant noiseOf, or per node where the one-claim term shares the
 * severity transform values with psi)
 */
export function psiOf(model: CompiledModel, atoms: Atom[], beta: number, pairOut = false, planning = false) {
  const lo = model.support[0];
  const sev = model.dampedSeverity;
  if (sev?.count && lo === 0) return severityPsi(sev, sev.count, atoms, beta, pairOut ? (sev.pair?.w ?? 0) : 0, planning);
  const base = noiseOf(model, atoms);
  return (t: Float64Array, re: Float64Array, im: Float64Array, noise?: Float64Array) => {
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
    if (sev) subtractSeverity(sev, beta, t, re, im);
    if (noise) noise.fill(base);
  };
}

/**
 * psi_c = P_N(phi) - atoms - p_1 phi (- p_2 phi^2 with the two-claim term out) for a compound whose support starts at
 * 0, phi the severity's damped transform evaluated once for every term. Per-node error: rounding (16 eps per unit of
 * magnitude), the count's own CF error, and for an error d in phi sup |P_N'(z) - p_1 (- 2 p_2 z)| d <= E N |z|^j d,
 * |z| <= |phi| + d, j = 1 (2 with the two-claim term out: the sum then starts at n = 3), which falls with |phi|; or,
 * for a count that bounds its slope near a point (Poisson: |P_N'(z)| = lambda |P_N(z)| <= lambda |P_N(phi)| e^{lambda d}),
 * (that slope + p_1 + 2 p_2 |z|) d, which falls with |P_N(phi)| (Poisson(1000): far below E N d away from t = 0).
 * Where the severity and the count give phi and log P_N(phi) rectangular (no log and exp of phi), they are taken so,
 * and d is the bound the severity's route returns for these values.
 */
function severityPsi(sev: SeverityKernel, count: NonNullable<SeverityKernel["count"]>, atoms: Atom[], beta: number, w2: number, planning: boolean) {
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  // the severity's transform and the count's log-pgf taken rectangular where both have that form: no log and exp of phi
  const rect = !!(sev.dampedCf && count.logPgf);
  // `also`: the same remainder with the two-claim term out as well (weight also.w2), from the same transform values (a
  // plan's probe makes both plans from one evaluation of the severity's transform)
  return (
    t: Float64Array,
    re: Float64Array,
    im: Float64Array,
    noise?: Float64Array,
    also?: { w2: number; re: Float64Array; im: Float64Array; noise: Float64Array },
    phiAbs?: Float64Array,
  ) => {
    const a = scratch("sevRe", t.length);
    const b = scratch("sevIm", t.length);
    // d: the bound on the severity transform values' absolute error (the route's own where it returns one; a plan's
    // probe, whose short run takes the per-frequency route, is charged the bound of every route the setup may take)
    let d = sev.cfAbsError;
    if (rect) {
      const dr = sev.dampedCf!(beta, t, a, b);
      if (!planning) d = Math.min(d, dr);
      count.logPgf!(a, b, re, im);
    } else {
      sev.dampedLogCf(beta, t, a, b);
      count.cgf(a, b, re, im);
    }
    for (let k = 0; k < t.length; k++) {
      // the count's cumulant function at phi (re, im are overwritten with psi below)
      const cr = re[k];
      const ci = im[k];
      const m = Math.exp(cr);
      let r = m * Math.cos(ci);
      let i = m * Math.sin(ci);
      for (const at of atoms) {
        const am = at.p * Math.exp(-beta * at.x);
        r -= am * Math.cos(t[k] * at.x);
        i -= am * Math.sin(t[k] * at.x);
      }
      // phi = fr + i fi, |phi| = ph
      let fr: number;
      let fi: number;
      let ph: number;
      if (rect) {
        fr = a[k];
        fi = b[k];
        const s2 = fr * fr + fi * fi;
        ph = s2 > 1e-290 ? Math.sqrt(s2) * (1 + 2 * EPS) : Math.hypot(fr, fi) * (1 + 2 * EPS);
      } else {
        ph = Math.exp(a[k]);
        fr = ph * Math.cos(b[k]);
        fi = ph * Math.sin(b[k]);
      }
      if (phiAbs) phiAbs[k] = ph;
      r -= sev.w * fr;
      i -= sev.w * fi;
      // an error d in phi moves P_N(phi) - p_1 phi (- p_2 phi^2) by at most E N |z|^j d (see above), or, where the
      // count bounds its slope near phi (|P_N'| far below E N where |P_N| is small), by (slope + p_1 + 2 p_2 z) d;
      // m is |P_N(phi)| within its exp's rounding; exp of the cumulant function rounds within a few eps of |cr| + |ci|
      let base = 0;
      let slope = Infinity;
      const z = ph + d;
      if (noise) {
        const expRound = EPS * (4 + 2 * Math.abs(cr) + 2 * Math.abs(ci));
        base = 16 * EPS * (1 + pa + sev.w) + expRound * m + count.absError + 2 * count.relError * (m + pa);
        if (count.slopeNear) slope = count.slopeNear(m * (1 + expRound), d);
      }
      if (also) {
        const v = also.w2;
        also.re[k] = r - v * (fr * fr - fi * fi);
        also.im[k] = i - v * 2 * fr * fi;
        also.noise[k] = base + 16 * EPS * v + Math.min(count.mean * (v > 0 ? z * z : z) * d, (slope + sev.w + 2 * v * z) * d);
      }
      if (w2 > 0) {
        r -= w2 * (fr * fr - fi * fi);
        i -= w2 * 2 * fr * fi;
      }
      re[k] = r;
      im[k] = i;
      if (noise) noise[k] = base + 16 * EPS * w2 + Math.min(count.mean * (w2 > 0 ? z * z : z) * d, (slope + sev.w + 2 * w2 * z) * d);
    }
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

/**
 * the probes made per compiled model, by damping and whether the two-claim term is out: the quantile search plans each
 * loose solution and the final one (twice where the wider budget is tried), and a plan probes at beta = 4 / span before
 * probing its chosen beta, often the same one; the atoms are the model's own, so the key is complete
 */
/** a probe's envelope of |psi_c|, its per-node noise and, for a compound's remainder, |phi| of the severity (else null) */
type Probed = Envelope & { noise: Float64Array; phi: Float64Array | null };
const PROBES = new WeakMap<CompiledModel, Map<string, Probed>>();
const MAX_PROBES = 32;

function probe(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean): Probed {
  let memo = PROBES.get(model);
  if (!memo) PROBES.set(model, (memo = new Map()));
  const key = probeKey(beta, pairOut, atoms);
  let hit = memo.get(key);
  if (!hit) {
    if (memo.size >= MAX_PROBES) memo.clear();
    hit = probeAt(model, atoms, beta, pairOut, memo);
    memo.set(key, hit);
  }
  return hit;
}

const probeKey = (beta: number, pairOut: boolean, atoms: Atom[]) => `${beta}|${pairOut}|${atoms.length}`;

function probeAt(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean, memo: Map<string, Probed>) {
  const tp = probeFrequencies(Math.max(model.scale, 1e-300));
  const n = tp.length;
  const pr = new Float64Array(n);
  const pi = new Float64Array(n);
  const nz = new Float64Array(n);
  // a compound with a two-claim term: both remainders (with and without it) from one evaluation of the severity's
  // transform, the other one kept for the plan that asks for it next
  const sev = model.dampedSeverity;
  const w2 = sev?.pair?.w ?? 0;
  if (sev?.count && model.support[0] === 0 && w2 > 0) {
    const other = { w2: pairOut ? 0 : w2, re: new Float64Array(n), im: new Float64Array(n), noise: new Float64Array(n) };
    const phi = new Float64Array(n);
    severityPsi(sev, sev.count, atoms, beta, pairOut ? w2 : 0, true)(tp, pr, pi, nz, other, phi);
    memo.set(probeKey(beta, !pairOut, atoms), envelopeFrom(tp, other.re, other.im, other.noise, phi));
    return envelopeFrom(tp, pr, pi, nz, phi);
  }
  if (sev?.count && model.support[0] === 0) {
    const phi = new Float64Array(n);
    severityPsi(sev, sev.count, atoms, beta, pairOut ? w2 : 0, true)(tp, pr, pi, nz, undefined, phi);
    return envelopeFrom(tp, pr, pi, nz, phi);
  }
  psiOf(model, atoms, beta, pairOut, true)(tp, pr, pi, nz);
  return envelopeFrom(tp, pr, pi, nz, null);
}

function envelopeFrom(tp: Float64Array, pr: Float64Array, pi: Float64Array, nz: Float64Array, phi: Float64Array | null): Probed {
  const mag = new Float64Array(tp.length);
  for (let i = 0; i < tp.length; i++) mag[i] = Math.hypot(pr[i], pi[i]);
  // values below the rounding of the atom subtraction and the CF's own error are not resolved (envelopeOf asks
  // for the floor at each probe frequency in turn)
  const at = new Map<number, number>();
  for (let i = 0; i < tp.length; i++) at.set(tp[i], nz[i]);
  return { ...envelopeOf(tp, mag, (t) => at.get(t) ?? nz[0]), noise: nz, phi };
}

/** cost of the two-claim term at one point, in units of one frequency term (its panels against the transform's work) */
const PAIR_COST = 60;

/**
 * U trades the period (T = span A / U) against the frequency cut-off (the sums' target is tol / (8 e^U)) and the
 * rounding that e^U amplifies: the U in [2, 8] with the fewest terms whose rounding estimate stays below tol / 4.
 * With a two-claim term available, both plans are made and the cheaper for `points` evaluation points is kept.
 * `periodOf` maps the period a plan needs to the one it will get (an FFT grid's N dx, N a power of 2), so the terms
 * are counted over the period actually used. `pdfReach`: the density is answered at the tolerance (density(), not a
 * quantile's bracket), so a cut-off whose density truncation cannot reach its target counts against the plan.
 * `byParts`: the cdf alone is wanted, point by point, each with its own bound (the quantile search): the cut-off may come
 * from the truncation bound by parts at the range's end (./damped-slope.ts).
 */
export function dampedPlan(
  model: CompiledModel,
  atoms: Atom[],
  R: number,
  tol: number,
  wantPdf: boolean,
  points = 256,
  pointwise: Exactness = false,
  budget = Infinity,
  periodOf: (T: number) => number = (T) => T,
  pdfReach = wantPdf,
  byParts = false,
): DampedPlan {
  const plain = planFor(model, atoms, R, tol, wantPdf, false, pointwise, budget, periodOf, pdfReach, byParts);
  // the second plan only where it can pay: the plain plan's terms exceed what the term costs at the points
  const can = model.dampedSeverity?.count && model.dampedSeverity.pair && model.support[0] === 0 && plain.K > PAIR_COST * points;
  const pair = can ? planFor(model, atoms, R, tol, wantPdf, true, pointwise, budget, periodOf, pdfReach, byParts) : null;
  if (!pair) return plain.plan;
  return pair.K + PAIR_COST * points < plain.K ? pair.plan : plain.plan;
}

function planFor(
  model: CompiledModel,
  atoms: Atom[],
  R: number,
  tol: number,
  wantPdf: boolean,
  pairOut: boolean,
  pointwise: Exactness,
  budget: number,
  periodOf: (T: number) => number,
  pdfReach: boolean,
  byParts: boolean,
): { plan: DampedPlan; K: number } {
  const lo = model.support[0];
  const span = Math.max(R - lo, 1e-6 * Math.max(model.scale, Math.abs(lo), 1e-300));
  // the inverted function is the continuous part less the kernels: its size bounds the images
  const w2 = pairOut ? (model.dampedSeverity?.pair?.w ?? 0) : 0;
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 1e-300) + kernelsMass(model.dampedKernels ?? []) + (model.dampedSeverity?.w ?? 0) + w2;
  const A = Math.max(Math.log((8 * Mc) / tol), 2);
  const noise = noiseOf(model, atoms);
  // with the cdf's images taken out (imageMoments) the aliasing is q second / T^2 instead of q Mc: beta T need only be
  // log(8 second / (T^2 tol)), solved by a few fixed-point steps (the period shrinks, which raises the need again)
  const im = imageMoments(model, atoms, pairOut);
  const periodFor = (U: number) => {
    let a = A;
    let T = Math.max((span * a) / U, span * 1.25);
    if (!im) return T;
    for (let it = 0; it < 4; it++) {
      a = Math.min(A, Math.max(2, Math.log((8 * (im.second / (T * T) + 4 * EPS * Math.abs(im.A))) / tol)));
      T = Math.max((span * a) / U, span * 1.25);
    }
    return T;
  };
  const env0 = probe(model, atoms, 4 / span, pairOut);
  // the cdf alone, summed point by point: the cut-off may come from the summation-by-parts bound at y = span
  const bySlope = byParts && pointwise === true && !wantPdf && !pdfReach;
  const slope0 = bySlope ? slopeEnvelope(model, atoms, 4 / span, pairOut, env0, env0.noise, env0.phi) : null;
  const cutoffEnd = (env: Envelope, sl: Envelope | null, T: number, target: number) =>
    (sl ? slopeCutoff(env, sl, T, span, target) : undefined) ?? cutoffFor(env, wantPdf ? target : Infinity, target);
  let best = { U: 4, K: Infinity, bad: Infinity };
  for (let U = 2; U <= 8; U += 0.5) {
    const beta = U / span;
    const T = periodFor(U);
    const target = tol / (8 * Math.exp(U));
    let tmax = cutoffEnd(env0, slope0, T, target);
    if (!Number.isFinite(tmax)) tmax = env0.t[env0.t.length - 1];
    const K = Math.max(16, (tmax * periodOf(T)) / (2 * Math.PI));
    // scale of the cdf sum: (1/pi) int |psi_c| / |beta - i t| up to tmax
    // and of the CF values' own noise, the same integral of the per-node noise (the probe's, largest first)
    let S = (Mc * env0.t[0]) / (Math.PI * beta);
    let Z = (env0.noise[0] * env0.t[0]) / (Math.PI * beta);
    for (let i = 0; i + 1 < env0.t.length && env0.t[i] < tmax; i++) {
      const w = (env0.t[i + 1] - env0.t[i]) / (Math.PI * Math.max(env0.t[i], beta));
      S += env0.env[i] * w;
      Z += env0.noise[i] * w;
    }
    const round = Math.exp(U) * (sumAllowance(model, K, pointwise) * S + (pointwise ? Z : 0));
    // a cut-off that cannot reach the truncation target (cutoffFor then returns its best) counts against the plan too
    const tr = truncationAt(env0, tmax);
    const reach = Math.max((slope0 ? slopeTruncationAt(env0, slope0, tmax, T, span) : tr.cdf) / target, pdfReach ? tr.pdf / target : 0);
    const bad = Math.max(round / (tol / 4), reach);
    // within the budget of terms first (a plan past it is refused by the setup): there the fewest terms whose rounding
    // is below tol / 4, else the smallest rounding (the bounds then state what is reached)
    const fits = K <= budget;
    const bestFits = best.K <= budget;
    if (fits !== bestFits) {
      if (fits) best = { U, K, bad };
    } else if ((bad <= 1 && (best.bad > 1 || K < best.K)) || (bad > 1 && best.bad > 1 && bad < best.bad)) best = { U, K, bad };
  }
  const U = best.U;
  const beta = U / span;
  const env = probe(model, atoms, beta, pairOut);
  const slope = bySlope ? slopeEnvelope(model, atoms, beta, pairOut, env, env.noise, env.phi) : null;
  const target = tol / (8 * Math.exp(U));
  const T = periodFor(U);
  let tmax = cutoffEnd(env, slope, T, target);
  if (!Number.isFinite(tmax)) tmax = env.t[env.t.length - 1];
  return { plan: { beta, T, U, env, tmax, noise, pairOut, rounding: best.bad, slope }, K: (tmax * periodOf(T)) / (2 * Math.PI) };
}
