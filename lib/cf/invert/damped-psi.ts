// The damped transform psi_c of a law's continuous part less what is taken out in closed form, and its probes (kept per model).
import type { Atom, CompiledModel } from "../types";
import type { SeverityKernel } from "../severity-kernel";
import { kernelsMass } from "../damped-kernels";
import { kernelsRounding, subtractKernels } from "../damped-kernels-sum";
import { scratch } from "../damped-scratch";
import { envelopeOf, probeFrequencies, type Envelope } from "./nodes";

const EPS = Number.EPSILON;
/**
 * per-node noise of psi_c: rounding of the atom subtraction plus twice the CF's declared absolute error, and a bound at
 * every node on what psiOf adds per node for the kernels' factors (kernelsRounding)
 */
export function noiseOf(model: CompiledModel, atoms: Atom[]): number {
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  const ks = model.dampedKernels;
  return baseNoise(model, atoms) + (ks ? kernelsRounding(ks, model.support[0], 1 + pa + (model.dampedSeverity?.w ?? 0)) : 0);
}

function baseNoise(model: CompiledModel, atoms: Atom[]): number {
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  const kw = model.dampedSeverity?.w ?? 0;
  // a relative CF error acts on the atoms' share of psi as an absolute one; the kernels' rounding is subtractKernels'
  // per node (it falls with |z|^shape)
  return 16 * EPS * (1 + pa + kw) + 2 * (model.cfAbsError ?? 0) + 2 * pa * (model.cfRelError ?? 0);
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
  const base = baseNoise(model, atoms);
  const floor = planning ? base + 16 * EPS * kernelsMass(model.dampedKernels ?? []) : 0;
  return (t: Float64Array, re: Float64Array, im: Float64Array, noise?: Float64Array) => {
    if (noise) noise.fill(base);
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
    // the kernels' factors' rounding per node (it falls with |z|^shape)
    if (model.dampedKernels) subtractKernels(model.dampedKernels, lo, beta, t, re, im, noise);
    if (sev) subtractSeverity(sev, beta, t, re, im);
    // a plan's probe keeps at least the floor it had when the kernels were charged 16 eps per unit of weight at every node:
    // without it the cut-off chases values the per-node bound resolves at high t (Poisson(2)-pareto: 311k terms instead of
    // 240k, for a cdf bound 2% lower); a floor above the noise only adds allowance
    if (noise && planning) for (let k = 0; k < t.length; k++) noise[k] = Math.max(noise[k], floor);
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
export type Probed = Envelope & { noise: Float64Array; phi: Float64Array | null; dphi?: Float64Array; dphiFrom?: number };
const PROBES = new WeakMap<CompiledModel, Map<string, Probed>>();
const MAX_PROBES = 32;

export function probe(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean): Probed {
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
  // values below the rounding of the atom subtraction and the CF's own error are not resolved (the floor at each probe)
  return { ...envelopeOf(tp, mag, (_t, i) => nz[i]), noise: nz, phi };
}

/**
 * |phi'| at the probe's frequencies from index `from` on where the severity gives it (SeverityKernel.slopeAt), its
 * closed-form bound (SeverityKernel.slope) below; kept with the probe and extended downwards when a later plan asks
 */
export function slopeValues(model: CompiledModel, beta: number, env: Probed, from = 0): Float64Array | null {
  const sev = model.dampedSeverity;
  if (!sev?.slopeAt || !sev.slope || !env.phi) return null;
  const n = env.t.length;
  const lo = Math.max(0, Math.min(from, n));
  if (!env.dphi) {
    env.dphi = new Float64Array(n);
    for (let i = 0; i < n; i++) env.dphi[i] = sev.slope(env.t[i]);
    env.dphiFrom = n;
  }
  const done = env.dphiFrom ?? n;
  if (lo < done) {
    sev.slopeAt(beta, env.t.subarray(lo, done), env.dphi.subarray(lo, done));
    env.dphiFrom = lo;
  }
  return env.dphi;
}

