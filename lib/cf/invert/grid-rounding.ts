import type { Atom, CompiledModel } from "../types";
import type { GammaKernel } from "../damped-kernels";
import type { ContinuousPart } from "./part";
import type { Envelope } from "./nodes";
import { cabs } from "../complex";

/**
 * Lipschitz constants, in t, of what the inversions evaluate at their rounded nodes fl((k + 1/2) h) (../arg-rounding.ts):
 * the first absolute moments of the measures whose transforms they are. NaN where no bound is derived (a law or a
 * subtracted heavy tail term without a first absolute moment bound); the callers then leave the term out.
 */

const EPS = Number.EPSILON;
const U = EPS / 2;

/**
 * E|X - c| <= sqrt(E (X - c)^2) = sqrt(kappa_2 + (kappa_1 - c)^2) (Lyapunov), the cumulants with their derived bounds
 * (CompiledModel.cumulantErrors); for X >= lo also E(X - lo) + |lo - c|; and the tree's own bound where it derives one
 * (CompiledModel.absMomentAbout: Student t and stable terms without a variance, ../abs-moment.ts); the least of them.
 * NaN where none is known.
 */
export function absMomentAbout(model: CompiledModel, c: number): number {
  const own = model.absMomentAbout ? model.absMomentAbout(c) : NaN;
  const fromK = absMomentFromCumulants(model, c);
  const m = Math.min(Number.isFinite(own) ? own : Infinity, Number.isFinite(fromK) ? fromK : Infinity);
  return Number.isFinite(m) ? m : NaN;
}

function absMomentFromCumulants(model: CompiledModel, c: number): number {
  const lo = model.support[0];
  const order = model.momentIndex > 2 ? 2 : model.momentIndex > 1 ? 1 : 0;
  if (order === 0) return NaN;
  const k = model.cumulants(order);
  const e = model.cumulantErrors?.(order) ?? [];
  const k1 = k[0];
  const e1 = e[0];
  if (typeof k1 !== "number" || typeof e1 !== "number" || !Number.isFinite(k1 + e1)) return NaN;
  let best = Infinity;
  const k2 = k[1];
  const e2 = e[1];
  if (order === 2 && typeof k2 === "number" && typeof e2 === "number" && Number.isFinite(k2 + e2)) {
    const d = (Math.abs(k1 - c) + e1) * (1 + EPS);
    best = Math.sqrt((Math.max(k2, 0) + e2 + d * d) * (1 + 4 * EPS)) * (1 + 2 * EPS);
  }
  if (Number.isFinite(lo)) best = Math.min(best, (Math.max(k1 + e1 - lo, 0) + Math.abs(lo - c)) * (1 + 4 * EPS) + EPS * Math.abs(lo));
  return Number.isFinite(best) ? best : NaN;
}

/**
 * Said with an answer whose inverted part has no derived Lipschitz constant (partLipschitz NaN: a law, or a subtracted
 * power-tail term, without a derived bound on its first absolute moment: no mean, as a Cauchy term or a stable one with
 * alpha <= 1, or a term of a kind ../abs-moment.ts does not bound): the rounded nodes' move is then left out of the
 * bounds (`nodeMoves`, `roundingOf`) wherever the nodes are not exact doubles (the FFT's, the heavy route's).
 */
export const NODE_ROUNDING_NOTE =
  "where the inversion's frequency nodes are not exact doubles, their rounding (2^-53 of each frequency) moves the transform by an amount not derived for this law (no bound on E|X - c| is derived for it: a term without a mean, or one whose first absolute moment is not bounded) and left out of the error bounds";

/** the note when the part's Lipschitz constant is not derived */
export function nodeRoundingNotes(part: ContinuousPart): string[] {
  return Number.isFinite(partLipschitz(part)) ? [] : [NODE_ROUNDING_NOTE];
}

/**
 * The undamped part phi_part(t) = [(phi - sum atoms) / w - kernels - phi_G] e^{-i t c} (./part.ts evalPart, all at the same
 * t): its derivative is at most (E|X - c| + sum p_j |x_j - c|) / w + sum |b| E|G_k - c| + E|G - c| for the tail term
 * (TailTerm.absMomentAbout; NaN where not derived). Kernel k is Gamma(power + j, rate) on the side of `at`: E|G - c| <=
 * |at - c| + (power + j) / rate.
 */
export function partLipschitz(part: ContinuousPart): number {
  const g = part.tail ? (part.tail.absMomentAbout ? part.tail.absMomentAbout(part.center) : NaN) : 0;
  if (!Number.isFinite(g)) return NaN;
  let s = absMomentAbout(part.model, part.center);
  for (const a of part.atoms) s += a.p * Math.abs(a.x - part.center);
  s /= part.weight;
  s += g;
  for (const k of part.kernels) k.b.forEach((b, j) => (s += Math.abs(b) * (Math.abs(k.at - part.center) + (k.power + j) / k.rate)));
  return s * (1 + (4 + part.atoms.length) * EPS);
}

/**
 * The damped psi(t) = e^{beta lo} [E e^{(it - beta) X} - atoms - kernels - one-claim terms] e^{-i t lo} (./damped-psi.ts
 * psiOf) at fixed beta: a bound on |psi'| over [t (1 - 2u), oo), piece by piece (each piece a measure Y >= lo of its mass,
 * whose transform's derivative is at most E[(Y - lo) e^{-beta (Y - lo)}], at most its first moment about lo and at most its
 * mass / (e beta), y e^{-beta y} <= 1 / (e beta)):
 *  - the model: dampedMajorant.slope(beta, t) where the tree derives it (non-increasing in t), else E(X - lo) and 1 / (e beta);
 *  - an atom at x: p (x - lo) e^{-beta (x - lo)} exactly (its transform's derivative has that size);
 *  - a kernel w Gamma(shape, rate) from `at`: |w| e^{-beta (at - lo)} (rate / |rate + beta - i t|)^shape (at - lo + shape /
 *    |rate + beta - i t|), falling in t;
 *  - the severity's one- and two-claim laws: w_1 slope(t) where the severity states it, else w_1 E X_1 and w_1 / (e beta);
 *    w_2 E X_2 and w_2 / (e beta).
 */
export function dampedSlopeAt(model: CompiledModel, atoms: Atom[], kernels: readonly GammaKernel[], pairOut: boolean, beta: number): (t: number) => number {
  const lo = model.support[0];
  const cap = beta > 0 ? 1 / (Math.E * beta) : Infinity;
  const m = absMomentAbout(model, lo);
  const flat0 = Math.min(Number.isFinite(m) ? m : Infinity, cap);
  let fixed = 0;
  for (const a of atoms) fixed += a.p * (a.x - lo) * Math.exp(-beta * (a.x - lo));
  const sev = model.dampedSeverity;
  if (sev && !sev.slope) fixed += Math.abs(sev.w) * Math.min(sev.moments[0], cap);
  if (sev && pairOut && sev.pair) fixed += Math.abs(sev.pair.w) * Math.min(sev.pair.moments[0], cap);
  const dm = model.dampedMajorant;
  const ks = kernels.map((k) => ({ w: Math.abs(k.w) * Math.exp(-beta * (k.at - lo)), d: Math.max(k.at - lo, 0), shape: k.shape, rate: k.rate }));
  const grow = 1 + (16 + atoms.length + kernels.length) * EPS;
  return (t: number) => {
    const t0 = t * (1 - 2 * U);
    let s = fixed + (dm ? Math.min(dm.slope(beta, t0), flat0) : flat0);
    if (sev?.slope) s += Math.abs(sev.w) * Math.min(sev.slope(t0), sev.moments[0], cap);
    for (const k of ks) {
      const r = Math.hypot(k.rate + beta, t0);
      s += k.w * Math.pow(k.rate / r, k.shape) * (k.d + k.shape / r);
    }
    return s * grow;
  };
}

/** the growth of t over which addGridNoise keeps one slope and error bound: at most (1 + 2^-7)^p looser for a bound falling
 *  like t^-p (or growing like t^p) */
const SLOPE_RUN = 1 + 1 / 128;

/**
 * The damped route's nodes: psi is evaluated at fl((k + 1/2) h) (`rounded`; null where the step makes them exact) and the
 * model's own slope S acts on |w| <= t + beta; each node's noise grows by u t_k D(t_k) + S (t_k + beta) (../arg-rounding.ts),
 * D = dampedSlopeAt's bound on |psi'| past t_j (1 - 2u), t_j the first node of t_k's run (t_k <= t_j SLOPE_RUN), or, where the plan's envelope covers t_k, by at most
 * |psi~_k| + its noise + env(t_k) (the value computed there and the exact one), the lesser kept.
 */
export function addGridNoise(
  model: CompiledModel,
  atoms: Atom[],
  beta: number,
  pairOut: boolean,
  rounded: Float64Array | null,
  t: Float64Array,
  noise: Float64Array,
  env: Envelope | undefined,
  re: Float64Array,
  im: Float64Array,
): void {
  const S0 = model.cfArgSlope ?? 0;
  const S = Number.isFinite(S0) ? S0 * (1 + 2 * EPS) : 0;
  const slope = rounded ? dampedSlopeAt(model, atoms, model.dampedKernels ?? [], pairOut, beta) : null;
  // the model's finer bound per frequency where derived (a compound's severity rounding)
  const errD = S > 0 ? model.cfArgErrDampedAt : undefined;
  const errOn = errD ? model.cfArgErrDampedOn : undefined;
  if (!slope && S === 0) return;
  // (the envelope's arrays read once: envelopes of several shapes met in the loop sent it back to the interpreter)
  const et = env?.t;
  const ev = env?.env;
  const n = t.length;
  // the slope bound holds past t (1 - 2u) and does not increase, so the value at a run's first node serves the run's later
  // nodes, and the model's error bound over the run (cfArgErrDampedOn) serves each of them: both are taken afresh once t
  // has grown by SLOPE_RUN (a few hundred calls over 2^20 nodes instead of one a node). The runs are found first, so the
  // loop over the nodes below calls no closures (a closure of another model met there sent it back to the interpreter)
  const runEnd: number[] = [];
  const runL: number[] = [];
  const runE: number[] = [];
  for (let k = 0; k < n; ) {
    const from = t[k];
    const until = from * SLOPE_RUN;
    const L = slope ? slope(from) : 0;
    const E = errOn ? errOn(beta, from, until) : NaN;
    let e = k + 1;
    // (a bound not derived over the run, or errD without its run form: asked at the node alone, and again at the next one)
    if ((slope || errOn) && Number.isFinite(L) && (!errD || E >= 0)) while (e < n && t[e] >= from && t[e] <= until) e++;
    else if (!slope && !errD) e = n;
    runEnd.push(e);
    runL.push(L);
    // neither bound derived (L not finite): left out (the module's note)
    runE.push(errD ? (E >= 0 ? E : errD(beta, from)) * (1 + 2 * EPS) : NaN);
    k = e;
  }
  const withErr = !!errD;
  let i = 0;
  let k = 0;
  for (let r = 0; r < runEnd.length; r++) {
    const L = runL[r];
    const lt = Number.isFinite(L) ? U * L * (1 + 4 * EPS) : 0;
    const ek = runE[r];
    for (const e = runEnd[r]; k < e; k++) {
      const st = S * (t[k] + beta);
      let move = lt * t[k] + (withErr ? Math.min(st, ek) : st);
      if (et && move > 0) {
        const lo = t[k] * (1 - 2 * U);
        while (i + 1 < et.length && et[i + 1] <= lo) i++;
        // inside the probed range only (past the last probe the envelope is a fitted tail)
        if (et[0] <= lo && i + 1 < et.length) move = Math.min(move, (cabs(re[k], im[k]) * (1 + 4 * EPS) + noise[k] + ev![i]) * (1 + 4 * EPS));
      }
      noise[k] += move;
    }
  }
}

/** u = 2^-53 with the products' and the caps' few roundings */
const GRID_U = U * (1 + 8 * EPS);

/**
 * buildNodes' per-node moves of the part: the rounded node (off by j u t_k, j = 1 point by point and 2 on the FFT; 0 where the
 * nodes are exact) and the model's own rounded arguments (cfArgSlope S / w per unit t) move the value by at most
 * j u t_k D(t_k) + S t_k / w, D a bound on |psi'| past t_k (1 - 2u): partLipschitz's L, or for a part without atoms or a tail
 * whose model derives a slope majorant S about c0, S(t_j) + |c - c0| M(t_j) at t_j (1 - 2u), t_j the first node of t_k's run
 * (t_k <= t_j SLOPE_RUN; both non-increasing, so at most (1 + 2^-7)^p looser for majorants falling like t^-p than at t_k
 * itself, at a call per run instead of per node; ./envelope-bound.ts uses the same majorants) plus each endpoint kernel's
 * closed-form derivative |b| (|at - c| + m / |rate - i t|) |1 - i t / rate|^-m at t_k. And by at
 * most |psi~_k| + its error + env(t_k): the value computed there (within its relative error and the declared absolute one)
 * and the exact one (the step the truncation bound integrates, inside the probed range only). The lesser is kept; a bound
 * not derived (L, S) is left out. `block` takes each block of nodes with their values, in order; `sums` the cdf and pdf
 * sums (1/pi) sum m_k / (k + 1/2) and (h/pi) sum m_k.
 */
export function nodeMoves(part: ContinuousPart, env: Envelope, B: number, exact: boolean) {
  const L = exact ? 0 : partLipschitz(part);
  const lip = Number.isFinite(L) ? L : 0;
  const S0 = (part.model.cfArgSlope ?? 0) / part.weight;
  const S = Number.isFinite(S0) ? S0 * (1 + 2 * EPS) : 0;
  // the model's finer bound at t where derived (a scaled child's slope majorant), per unit weight
  const errAt = part.model.cfArgErrAt;
  const iw = (1 + 4 * EPS) / part.weight;
  const maj = part.atoms.length === 0 && !part.tail && lip > 0 ? part.model.logAbsMajorant : undefined;
  const slopeMaj = maj?.slope;
  const kd = part.kernels.flatMap((k) => k.b.map((b, j) => ({ b: Math.abs(b), m: k.power + j, rate: k.rate, d: Math.abs(k.at - part.center) })));
  let pa = 0;
  for (const a of part.atoms) pa += a.p;
  let kb = 0;
  for (const q of kd) kb += q.b;
  // the computed value's absolute error beyond its relative one: the declared CF error, the subtractions' rounding
  const abs0 = (2 * part.cfAbsError + 16 * EPS * (1 + pa + kb)) / part.weight;
  const tl = new Float64Array(B);
  // the majorants are taken at the first node of each run over which t grows by at most SLOPE_RUN (both are non-increasing,
  // so the run's first value bounds its later nodes, as in addGridNoise): ts holds a block's run starts, run[i] node i's run
  const ts = slopeMaj ? new Float64Array(B) : null;
  const run = slopeMaj ? new Int32Array(B) : null;
  const sv = slopeMaj ? new Float64Array(B) : null;
  const mv = slopeMaj ? new Float64Array(B) : null;
  const dCen = slopeMaj ? Math.abs(part.center - slopeMaj.center) * (1 + 4 * EPS) + 4 * EPS * Math.abs(part.center) : 0;
  const et = env.t;
  let ie = 0;
  let gc1 = 0;
  let gp1 = 0;
  let gc2 = 0;
  let gp2 = 0;
  // the current run's end (t at most this) and its S(t_j) + |c - c0| M(t_j), carried from one block to the next
  let runUntil = -Infinity;
  let runS = 0;
  return {
    block(tb: Float64Array, n: number, i0: number, re: Float64Array, im: Float64Array, rel: Float64Array): void {
      if (lip === 0 && S === 0 && !errAt) return;
      for (let i = 0; i < n; i++) tl[i] = tb[i] * (1 - 2 * GRID_U);
      let nr = 0;
      if (slopeMaj) {
        // run -1: the run carried over from the previous block
        let until = runUntil;
        for (let i = 0; i < n; i++) {
          if (!(tl[i] >= 0 && tl[i] <= until)) {
            ts![nr] = tl[i];
            until = tl[i] * SLOPE_RUN;
            nr++;
          }
          run![i] = nr - 1;
        }
        runUntil = until;
        slopeMaj.at(ts!.subarray(0, nr), sv!.subarray(0, nr));
        maj!(ts!.subarray(0, nr), mv!.subarray(0, nr));
        for (let r = 0; r < nr; r++) sv![r] += dCen * Math.exp(mv![r]);
      }
      for (let i = 0; i < n; i++) {
        const tk = tb[i];
        let d = lip;
        if (sv) {
          const r = run![i];
          let s = r < 0 ? runS : sv[r];
          for (const q of kd) {
            const r = Math.hypot(1, tl[i] / q.rate);
            s += q.b * (q.d + q.m / (q.rate * r)) * Math.pow(r, -q.m);
          }
          s *= 1 + (8 + kd.length) * EPS;
          if (s < d) d = s;
        }
        let own = S * tk;
        if (errAt) {
          const e = errAt(tk) * iw;
          if (Number.isFinite(e)) own = S > 0 ? Math.min(own, e) : e;
        }
        const m1 = GRID_U * d * tk;
        let cap = Infinity;
        while (ie + 1 < et.length && et[ie + 1] <= tl[i]) ie++;
        if (et[0] <= tl[i] && ie + 1 < et.length) {
          const a = cabs(re[i0 + i], im[i0 + i]);
          cap = (a * (1 + rel[i] + 4 * EPS) + abs0 + env.env[ie]) * (1 + 4 * EPS);
        }
        const a1 = Math.min(m1 + own, cap);
        const a2 = Math.min(2 * m1 + own, cap);
        const inv = 1 / (i0 + i + 0.5);
        gc1 += a1 * inv;
        gp1 += a1;
        gc2 += a2 * inv;
        gp2 += a2;
      }
      if (nr > 0) runS = sv![nr - 1];
    },
    /** g: the running sums' relative allowance (1 + K eps) */
    sums(h: number, g: number) {
      const f = g * g * (1 + 4 * EPS);
      return { grid: { cdf1: (gc1 * f) / Math.PI, pdf1: (gp1 * h * f) / Math.PI, cdf2: (gc2 * f) / Math.PI, pdf2: (gp2 * h * f) / Math.PI } };
    },
  };
}
