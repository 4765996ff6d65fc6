// The damped transform psi_c of a law's continuous part less what is taken out in closed form, and its probes (kept per model).
import type { Atom, CompiledModel } from "../types";
import type { SeverityKernel } from "../severity-kernel";
import { kernelsMass } from "../damped-kernels";
import { kernelsRounding, subtractKernels } from "../damped-kernels-sum";
import { severityPsi, stepwise } from "./damped-psi-severity";
import { envelopeOf, probeFrequencies, type Envelope } from "./nodes";
import { cabs } from "../complex";
import { derivedEnvelope, derivedFloor, jumpTail, phiBounds, splitTail, type DerivedBounds, type PhiBounds } from "./damped-envelope";

export type { PhiBounds };

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

function baseNoise(model: CompiledModel, atoms: Atom[], rel = model.cfRelError ?? 0, abs = model.cfAbsError ?? 0): number {
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  const kw = model.dampedSeverity?.w ?? 0;
  // a relative CF error acts on the atoms' share of psi as an absolute one; the kernels' rounding is subtractKernels'
  // per node (it falls with |z|^shape)
  return 16 * EPS * (1 + pa + kw) + 2 * abs + 2 * pa * rel;
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
  const rel = model.cfRelError ?? 0;
  const abs = model.cfAbsError ?? 0;
  const absAt = model.dampedAbsErrorAt;
  const relAt = model.dampedRelErrorAt ?? (absAt ? () => rel : undefined);
  // without the CF's own errors: those are added per node below where the model bounds them per frequency
  const kw = sev?.w ?? 0;
  const floor = planning ? base + 16 * EPS * kernelsMass(model.dampedKernels ?? []) : 0;
  // each atom's distance from lo and damped weight once (an atom at lo, as a compound's P(N = 0): no phase to take)
  const ds = Float64Array.from(atoms, (a) => a.x - lo);
  const ams = Float64Array.from(atoms, (a) => a.p * Math.exp(-beta * (a.x - lo)));
  return (t: Float64Array, re: Float64Array, im: Float64Array, noise?: Float64Array) => {
    // the relative error at each node where the model bounds it per frequency (a compound of pareto claims: the claims'
    // rounding falls like 1 / t), else the constant; a plan's probe keeps the constant (its floor is above it anyway)
    const rk = noise && relAt && !planning ? stepwise(relAt, beta, t, rel) : null;
    const ak = rk && absAt ? stepwise(absAt, beta, t, abs) : null;
    // the final setup's noise per node: the CF's errors and the arithmetic below at this node's own sizes (a plan's probe
    // keeps the constant base, whose 16 eps (1 + pa) stands for the arithmetic)
    const own = noise && !planning;
    if (own) for (let k = 0; k < t.length; k++) noise![k] = 16 * EPS * kw + (ak ? 2 * ak[k] : 2 * abs);
    else if (noise) noise.fill(base);
    model.dampedLogCf!(beta, t, re, im);
    const blo = beta * lo;
    const n = ds.length;
    for (let k = 0; k < t.length; k++) {
      const arg = re[k] + blo;
      const m = Math.exp(arg);
      const tlo = t[k] * lo;
      const ph = im[k] - tlo;
      let r = m * Math.cos(ph);
      let i = m * Math.sin(ph);
      let sa = 0;
      let atomsRound = 0;
      for (let a = 0; a < n; a++) {
        const d = ds[a];
        // cos 0 = 1 and sin 0 = 0 exactly: the same values without the calls
        r -= d === 0 ? ams[a] : ams[a] * Math.cos(t[k] * d);
        i -= d === 0 ? 0 : ams[a] * Math.sin(t[k] * d);
        sa += ams[a];
        atomsRound += ams[a] * (6 + t[k] * d);
      }
      re[k] = r;
      im[k] = i;
      if (own) {
        // in units of eps = 2u, both parts together: m = exp(arg) within eps + u (|arg| + |beta lo|) relative (the sum and
        // the product rounded, exp one ulp), the phase within u (|t lo| + |ph|), cos and sin one ulp each, the product u:
        // m (5 + |arg| + |beta lo| + |t lo| + |ph|); each atom's weight (exp, a product) 1.5 eps, its cos and sin one ulp
        // plus u t d for the rounded phase t d, the product u: (6 + t d) p e^{-beta d}; each of the n subtractions u of a
        // partial sum <= m + sum of the weights (one rounding per operation, Higham, Accuracy and Stability, sec. 2.2;
        // exp, cos and sin within one ulp); second-order terms inside the last factor
        const arith = m * (5 + Math.abs(arg) + Math.abs(blo) + Math.abs(tlo) + Math.abs(ph)) + atomsRound + n * (m + sa);
        // the CF's relative error acts on e^L, of modulus m (the atoms' share and psi's alike, kernels or not): per
        // frequency where the model bounds it so, else the constant one (sumAllowance leaves it out of the final setup's)
        noise![k] += EPS * arith * (1 + 16 * EPS) + 2 * (rk ? rk[k] : rel) * m * (1 + 4 * EPS);
      }
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
export type Probed = Envelope & {
  noise: Float64Array;
  phi: Float64Array | null;
  dphi?: Float64Array;
  dphiFrom?: number;
  phiBound?: PhiBounds;
  /** derived through the operators' bounds (a sum of compounds and gamma terms), which do not see the kernels cancel */
  throughOperators?: boolean;
  /**
   * with throughOperators: the bound on |psi_c'| at every frequency from each probe on that the probe formed beside the size
   * (the operators' slope, the kernels' and the kernel rest's, at the probe's damping beta), which ./damped-sum-slope.ts
   * sumSlopeBounds forms the same way: kept so that it is not formed twice
   */
  opSlope?: { beta: number; s: Float64Array };
};

const PROBES = new WeakMap<CompiledModel, Map<string, Probed>>();
const MAX_PROBES = 32;

/**
 * `derived` false: the envelope from the samples alone even where the severity derives bounds (the plan's fallback where
 * the derived envelope needs more terms than its budget; the answer then says so, DAMPED_SAMPLED_NOTE)
 */
export function probe(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean, derived = true): Probed {
  let memo = PROBES.get(model);
  if (!memo) PROBES.set(model, (memo = new Map()));
  const key = probeKey(beta, pairOut, atoms, derived);
  let hit = memo.get(key);
  if (!hit) {
    if (memo.size >= MAX_PROBES) memo.clear();
    hit = probeAt(model, atoms, beta, pairOut, memo, derived);
    memo.set(key, hit);
  }
  return hit;
}

/** whether probe() has this damping's envelope already (the plan then chooses it at no transform cost, see PROBE_COST) */
export function probed(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean, derived = true): boolean {
  return PROBES.get(model)?.has(probeKey(beta, pairOut, atoms, derived)) ?? false;
}

/**
 * a probe of this model already made at a damping in [want / 2, 2 want] (pairOut, derived as asked), the nearest to want
 * by ratio (want itself first), or null: a plan judges its dampings on it instead of probing want (see planFor)
 */
export function probedNear(model: CompiledModel, atoms: Atom[], want: number, pairOut: boolean, derived: boolean): { beta: number; env: Probed } | null {
  const memo = PROBES.get(model);
  if (!memo) return null;
  const exact = memo.get(probeKey(want, pairOut, atoms, derived));
  if (exact) return { beta: want, env: exact };
  const tail = `|${pairOut}|${atoms.length}|${derived}`;
  let best: { beta: number; env: Probed } | null = null;
  let dist = Math.LN2;
  for (const [key, env] of memo) {
    if (!key.endsWith(tail)) continue;
    const beta = Number(key.slice(0, key.length - tail.length));
    const d = Math.abs(Math.log(beta / want));
    if (beta > 0 && d <= dist) {
      dist = d;
      best = { beta, env };
    }
  }
  return best;
}

/** what an answer says where its damped route's truncation bound rests on sampled sizes of the transform */
export const DAMPED_SAMPLED_NOTE =
  "frequency truncation bounded from the transform's size sampled at 8 frequencies per octave (no derived bound on this transform, or one that would need more terms than the route allows): an estimate between the samples";

const probeKey = (beta: number, pairOut: boolean, atoms: Atom[], derived: boolean) => `${beta}|${pairOut}|${atoms.length}|${derived}`;

/**
 * the transform's samples at a probe (psi, its noise, |phi| of the severity), per compiled model and damping: the derived
 * probe and the samples' one (the plan's fallback, dampedPlan) at the same damping share them; each probe takes copies
 */
type Samples = { pr: Float64Array; pi: Float64Array; nz: Float64Array; phi: Float64Array | null };
const SAMPLES = new WeakMap<CompiledModel, Map<string, Samples>>();
const sampleKey = (beta: number, pairOut: boolean, atoms: Atom[]) => `${beta}|${pairOut}|${atoms.length}`;
function samplesOf(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean): Samples | undefined {
  return SAMPLES.get(model)?.get(sampleKey(beta, pairOut, atoms));
}
function keepSamples(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean, s: Samples): void {
  let memo = SAMPLES.get(model);
  if (!memo) SAMPLES.set(model, (memo = new Map()));
  if (memo.size >= MAX_PROBES) memo.clear();
  memo.set(sampleKey(beta, pairOut, atoms), { pr: s.pr.slice(), pi: s.pi.slice(), nz: s.nz.slice(), phi: s.phi ? s.phi.slice() : null });
}
/** the kept samples copied into the probe's arrays (false: none kept) */
function takeSamples(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean, out: Samples): boolean {
  const s = samplesOf(model, atoms, beta, pairOut);
  if (!s || !!s.phi !== !!out.phi) return false;
  out.pr.set(s.pr);
  out.pi.set(s.pi);
  out.nz.set(s.nz);
  if (s.phi) out.phi!.set(s.phi);
  return true;
}

function probeAt(model: CompiledModel, atoms: Atom[], beta: number, pairOut: boolean, memo: Map<string, Probed>, derived: boolean) {
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
    const phi2 = new Float64Array(n);
    if (!takeSamples(model, atoms, beta, pairOut, { pr, pi, nz, phi }) || !takeSamples(model, atoms, beta, !pairOut, { pr: other.re, pi: other.im, nz: other.noise, phi: phi2 })) {
      severityPsi(sev, sev.count, atoms, beta, pairOut ? w2 : 0, true)(tp, pr, pi, nz, other, phi);
      keepSamples(model, atoms, beta, pairOut, { pr, pi, nz, phi });
      keepSamples(model, atoms, beta, !pairOut, { pr: other.re, pi: other.im, nz: other.noise, phi });
    }
    // the bounds on phi serve both remainders (the same transform values) and, kept with the probe, its slope envelope
    const pb = derived && atoms.every((a) => a.x === 0) ? phiBounds(sev, beta, tp, phi) : null;
    memo.set(probeKey(beta, !pairOut, atoms, derived), envelopeFrom(tp, other.re, other.im, other.noise, phi, pb && derivedFloor(sev.count, pb, !pairOut), pb));
    return envelopeFrom(tp, pr, pi, nz, phi, pb && derivedFloor(sev.count, pb, pairOut), pb);
  }
  if (sev?.count && model.support[0] === 0) {
    const phi = new Float64Array(n);
    if (!takeSamples(model, atoms, beta, pairOut, { pr, pi, nz, phi })) {
      severityPsi(sev, sev.count, atoms, beta, pairOut ? w2 : 0, true)(tp, pr, pi, nz, undefined, phi);
      keepSamples(model, atoms, beta, pairOut, { pr, pi, nz, phi });
    }
    const pb = derived && atoms.every((a) => a.x === 0) ? phiBounds(sev, beta, tp, phi) : null;
    return envelopeFrom(tp, pr, pi, nz, phi, pb && derivedFloor(sev.count, pb, pairOut && w2 > 0), pb);
  }
  if (!takeSamples(model, atoms, beta, pairOut, { pr, pi, nz, phi: null })) {
    psiOf(model, atoms, beta, pairOut, true)(tp, pr, pi, nz);
    keepSamples(model, atoms, beta, pairOut, { pr, pi, nz, phi: null });
  }
  // the model's own bound on what is left after its atoms at 0 and kernels (a compound of gamma claims), non-increasing
  const rb = model.dampedRemainderBound;
  // (relative to lo, as psiOf takes it: a shifted compound's remainder is the compound's own, ../kernel-carry.ts)
  if (derived && rb && Number.isFinite(model.support[0]) && atoms.every((a) => a.x === model.support[0])) {
    const size = Float64Array.from(tp, (t) => rb(beta, t));
    // past the last probe t_n the bound falls at least like (t_n / t)^q: a term c sigma^-e, e >= q, is at most
    // c sigma_n^-e (sigma_n / t_n)^e (t_n / t)^q (sigma = |rate + beta - i t| >= t), and sigma_n / t_n is 1 within 1e-20 there
    // (the probes end 2^54 times past the law's scale); q <= 1 leaves the density-type tail unbounded
    const q = model.dampedRemainderDecay ?? 0;
    const tn = tp[n - 1];
    const R = size[n - 1] * 1.001;
    const far = q > 0 && Math.max(model.scale, 1e-300) * tn > 1e10;
    const tail = far ? { cdf: R / q, pdf: q > 1 ? (R * tn) / (q - 1) : jumpTail(model.dampedRemainderJump, beta, tn) } : { cdf: Infinity, pdf: Infinity };
    // the remainder's split (F falling fast, G of bounded variation): the density's tails from F and G's variation
    const j = model.dampedRemainderJump;
    const split = far && j && j.decay > 1 ? { fast: Float64Array.from(tp, (t) => j.fast(beta, t) * 1.001), fastTail: (j.fast(beta, tn) * 1.001 * tn) / (j.decay - 1), tv: j.tv(beta) } : undefined;
    return envelopeFrom(tp, pr, pi, nz, null, { size, slope: new Float64Array(n).fill(Infinity), tail, ...(split ? { split } : {}) });
  }
  // a sum of compounds and gamma terms: psi_c is the transform past lo less the atom there and the kernels, bounded through
  // the operators (../damped-majorant.ts) plus each kernel's own size w e^{-beta (at - lo)} (rate / |rate + beta - i t|)^shape
  // (and its slope, (|at - lo| + shape / |rate + beta - i t|) times that); an atom subtracted with another mass adds the difference
  const dm = model.dampedMajorant;
  const lo = model.support[0];
  if (derived && dm && !sev && atoms.every((a) => a.x === lo)) {
    const ks = model.dampedKernels ?? [];
    const off = Math.abs(atoms.reduce((s, a) => s + a.p, 0) - dm.atom) * (1 + 4 * EPS);
    const size = new Float64Array(n);
    const slope = new Float64Array(n);
    const tn = tp[n - 1];
    // a sum whose bounds see its own kernels cancel its gamma terms (../damped-kernel-rest.ts): the least of both
    const kr = dm.kernelRest && dm.kernelRest.kernels === model.dampedKernels ? dm.kernelRest : null;
    const d = dm.decay(beta, tn);
    let R = d.R;
    let q = d.q;
    for (let i = 0; i < n; i++) {
      size[i] = dm.rest(beta, tp[i]) + off;
      slope[i] = dm.slope(beta, tp[i]);
    }
    // where the power is 1 (exponential claims or terms), the split's fast part and total variation (see jumpTail), each
    // kernel of shape 1 adding its own: w r e^{-(r + beta) y} past its point, a jump and a fall (2 |w| r)
    const sp = d.split ? { ...d.split } : null;
    for (const k of ks) {
      const w = Math.abs(k.w) * Math.exp(-beta * (k.at - lo)) * (1 + 8 * EPS);
      if (sp) {
        const v = w * Math.pow(k.rate / tn, k.shape) * (1 + 16 * EPS);
        if (k.shape > 1) {
          sp.R += v;
          sp.q = Math.min(sp.q, k.shape);
        } else if (k.shape === 1) sp.tv += 2 * w * k.rate * (1 + 4 * EPS);
        else sp.tv = Infinity;
      }
      for (let i = 0; i < n; i++) {
        const r = Math.hypot(k.rate + beta, tp[i]);
        const v = w * Math.pow(k.rate / r, k.shape) * (1 + 16 * EPS);
        size[i] += v;
        slope[i] += v * (Math.abs(k.at - lo) + k.shape / r) * (1 + 4 * EPS);
      }
      R += w * Math.pow(k.rate / tn, k.shape) * (1 + 16 * EPS);
      q = Math.min(q, k.shape);
    }
    for (let i = 0; i < n; i++) {
      size[i] *= 1 + 4 * (ks.length + 2) * EPS;
      slope[i] *= 1 + 4 * (ks.length + 2) * EPS;
    }
    if (kr) {
      const dk = kr.decay(beta, tn);
      if (dk.q > 0 && dk.R / dk.q < R / q) {
        R = dk.R;
        q = dk.q;
      }
      for (let i = 0; i < n; i++) {
        const b = kr.at(beta, tp[i]);
        size[i] = Math.min(size[i], (b.rest + off) * (1 + 4 * EPS));
        slope[i] = Math.min(slope[i], b.slope);
      }
    }
    // past the last probe: int R (t_n / t)^q / t = R / q (cdf) and int R (t_n / t)^q = R t_n / (q - 1) (density), the atom's
    // difference not decaying
    const pdfSplit = sp ? splitTail(sp.R, sp.q, sp.tv, tn) : Infinity;
    const tail = off > 0 || !(q > 0) ? null : { cdf: (R / q) * (1 + 4 * EPS), pdf: Math.min(q > 1 ? ((R * tn) / (q - 1)) * (1 + 4 * EPS) : Infinity, pdfSplit) };
    if (tail) return { ...envelopeFrom(tp, pr, pi, nz, null, { size, slope, tail }), throughOperators: true, opSlope: { beta, s: slope } };
  }
  return envelopeFrom(tp, pr, pi, nz, null);
}

function envelopeFrom(tp: Float64Array, pr: Float64Array, pi: Float64Array, nz: Float64Array, phi: Float64Array | null, bounds: DerivedBounds | null = null, phiBound: PhiBounds | null = null): Probed {
  const mag = new Float64Array(tp.length);
  for (let i = 0; i < tp.length; i++) mag[i] = cabs(pr[i], pi[i]);
  // values below the rounding of the atom subtraction and the CF's own error are not resolved (the floor at each probe)
  const e = envelopeOf(tp, mag, (_t, i) => nz[i]);
  if (!bounds) return { ...e, noise: nz, phi };
  return { ...derivedEnvelope(e, mag, nz, bounds), noise: nz, phi, ...(phiBound ? { phiBound } : {}) };
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

