import { CfError } from "../errors";
import type { DirectMethod } from "../direct/types";
import { directQuantiles } from "../direct/answer";
import { momentRest } from "../direct/shortfall";
import type { Atom, CompiledModel } from "../types";
import { evalLadder, growLadder, heavyLadder, invertWithinTerms, type HeavyLadder } from "./continuous";
import { atomMass, roundingOf, solutionAt } from "./shared";
import { lawShape } from "./range";
import { RICHARDSON_ESTIMATE_NOTE, richardsonAmplification } from "./richardson";
import { atomQuantiles, latticeQuantiles } from "./quantile-table";
import { heavyShortfall, shortfallLight } from "./shortfall";
import { stopLossBounds } from "./tail-moments";
import { solveLevels, type Evaluator } from "./solve-levels";
import { dampable } from "./damped";
import { dampedQuantiles } from "./quantile-damped";
import { mixtureQuantiles } from "./mixture";
import { lightAliasAt } from "./light-images";
import { truncationAt } from "./nodes";
import { tailTermExtent } from "./tail-extent";

export interface QuantileOptions {
  /** also return the expected shortfall ES_p = q_p + E[(X - q_p)^+] / (1 - p) (TVaR) */
  expectedShortfall?: boolean;
  /** absolute cdf accuracy used for the inversion (default 1e-14 light tails, 1e-9 power tails) */
  tolerance?: number;
}

export interface QuantileDiagnostics {
  method: "gil-pelaez" | "gil-pelaez-damped" | "lattice-table" | "discretised" | "lattice-fft" | "atoms" | "mixture" | DirectMethod;
  terms: number;
  range: { from: number; to: number };
  /** bound on |F_computed - F| used by the root finder */
  cdfError: number;
  /** per level: bound on |x - q_p| (Infinity where not resolved) */
  quantileError: Float64Array;
  /** per level: bound on the absolute error of ES (present when requested) */
  expectedShortfallError?: Float64Array;
  notes: string[];
  /**
   * the cdf error the levels were solved to (the request's, else 1e-10: the routes aim tighter where they can) and whether
   * cdfError meets it and every expected shortfall's bound its goal (shortfallGoalMissed)
   */
  tolerance?: { target: number; met: boolean };
  /** set where an expected shortfall's derived bound stays above its goal (a note names the levels); not part of the API answer */
  shortfallGoalMissed?: boolean;
}

export interface QuantileResult {
  p: Float64Array;
  x: Float64Array;
  expectedShortfall?: Float64Array;
  diagnostics: QuantileDiagnostics;
}

/**
 * Quantiles q_p = min{x : F(x) >= p} and expected shortfall. Atoms and lattice points are handled exactly
 * (a level inside a jump returns the atom), flat parts return their left end; in between, a bracketed
 * Newton iteration on the mid-point Gil-Pelaez sums (the upper tail solves S(x) = 1 - p so that p close to 1
 * keeps its relative accuracy). ES follows Acerbi & Tasche (2002), ES_p = q + E[(X - q)^+]/(1 - p), with
 * E[(X - q)^+] = int_q^inf S(y) dy integrated term by term in the same sums.
 */
export function quantiles(model: CompiledModel, pIn: ArrayLike<number>, options: QuantileOptions = {}): QuantileResult {
  const r = quantilesOf(model, pIn, options);
  const d = r.diagnostics;
  const target = options.tolerance ?? 1e-10;
  const met = d.cdfError <= target && !d.shortfallGoalMissed;
  d.tolerance = { target, met };
  if (!(d.cdfError <= target)) d.notes.push(`tolerance ${target} not reached: the levels were solved with a cdf bound of ${d.cdfError.toExponential(2)} (their quantile and ES bounds carry it)`);
  return r;
}

function quantilesOf(model: CompiledModel, pIn: ArrayLike<number>, options: QuantileOptions): QuantileResult {
  const p = Float64Array.from(pIn);
  for (let i = 0; i < p.length; i++) {
    if (!(p[i] >= 0 && p[i] <= 1)) throw new CfError("invalid_model", `/p/${i}`, "each level p must be a number in [0, 1]");
  }
  // a single named law (or scaled / shifted) with a direct evaluation: no inversion
  if (model.direct) {
    const mean = model.momentIndex > 1 ? model.cumulants(1)[0] : null;
    const meanErr = mean === null ? Infinity : (model.cumulantErrors?.(1)[0] ?? Infinity);
    return directQuantiles(model.direct, p, options.expectedShortfall ?? false, model.tails, mean, meanErr, model.notes, options.expectedShortfall ? momentRest(model) : undefined);
  }
  const kind = model.kind;
  if (kind.type === "lattice") return withModelNotes(model, latticeQuantiles(model, kind.origin, kind.step, p, options));
  if (kind.type === "discrete") {
    if (!kind.atoms) throw new CfError("not_applicable", "", "this discrete law has too many atoms to list; its quantiles cannot be computed");
    return atomQuantiles(kind.atoms, p, options);
  }
  const atoms: Atom[] = kind.type === "mixed" ? [...kind.atoms].sort((u, v) => u.x - v.x) : [];
  const w = 1 - atoms.reduce((s, a) => s + a.p, 0);
  if (w <= 1e-14) return atomQuantiles(atoms, p, options);
  if (model.components) {
    const r = mixtureQuantiles(model, p, options);
    if (r) return withModelNotes(model, inSupport(model, atoms, r));
  }
  if (dampable(model)) {
    const r = dampedQuantiles(model, atoms, p, options);
    if (r) return withModelNotes(model, inSupport(model, atoms, r));
  }
  const shape = lawShape(model);
  return withModelNotes(model, inSupport(model, atoms, shape.heavy ? heavyQuantiles(model, atoms, w, p, options) : lightQuantiles(model, atoms, w, p, options)));
}

/**
 * The quantile lies in [x - e, x + e] and in the support [lo, hi]: an answer outside the support moves to the nearer end,
 * its bound to what is left of the interval there (Poisson(1)-lognormal(0, 2.5) at p = 0.001: -2170 +- 2170 became 0 +-
 * 0.036); a level at most the mass of an atom at a finite lower end (nothing lies below it) has that end as its exact
 * quantile, and there ES_p = lo + (E X - lo) / (1 - p) (X >= lo), within the mean's derived bound over 1 - p (it was the
 * route's integral at its own quantile: 24.4 +- 8.7 against 22.78 for that law at 0.001). Elsewhere the expected
 * shortfall keeps the route's value and bound.
 */
function inSupport(model: CompiledModel, atoms: Atom[], r: QuantileResult): QuantileResult {
  const [lo, hi] = model.support;
  const base = Number.isFinite(lo) ? atoms.filter((a) => a.x === lo).reduce((s, a) => s + a.p, 0) : 0;
  const { x, p } = r;
  const err = r.diagnostics.quantileError;
  const es = r.expectedShortfall;
  const esErr = r.diagnostics.expectedShortfallError;
  const mean = base > 0 && es && esErr && model.momentIndex > 1 && model.cumulantErrors ? [model.cumulants(1)[0], model.cumulantErrors(1)[0]] : null;
  for (let i = 0; i < x.length; i++) {
    if (base > 0 && p[i] <= base * (1 - 4 * Number.EPSILON)) {
      x[i] = lo;
      err[i] = 0;
      if (mean && mean[0] !== null && mean[1] !== null && Number.isFinite(mean[0]) && Number.isFinite(mean[1])) {
        const v = lo + (mean[0] - lo) / (1 - p[i]);
        const e = (mean[1] + 4 * Number.EPSILON * (Math.abs(mean[0]) + Math.abs(lo))) / (1 - p[i]) + 4 * Number.EPSILON * Math.abs(v);
        if (!(e >= esErr![i])) {
          es![i] = v;
          esErr![i] = e;
        }
      }
    } else if (x[i] < lo && x[i] + err[i] >= lo) {
      err[i] = Math.min(x[i] + err[i] - lo, err[i]) * (1 + 4 * Number.EPSILON);
      x[i] = lo;
    } else if (x[i] > hi && x[i] - err[i] <= hi) {
      err[i] = Math.min(hi - (x[i] - err[i]), err[i]) * (1 + 4 * Number.EPSILON);
      x[i] = hi;
    }
  }
  return r;
}

/** Every approximation made in the model (CF quadratures, discretisations) is stated with the answer. */
function withModelNotes(model: CompiledModel, r: QuantileResult): QuantileResult {
  r.diagnostics.notes = [...new Set([...r.diagnostics.notes, ...model.notes])];
  return r;
}

function lightQuantiles(model: CompiledModel, atoms: Atom[], w: number, p: Float64Array, o: QuantileOptions): QuantileResult {
  const shape = lawShape(model);
  // every root-finding step costs one pass over the nodes: when a slowly decaying CF needs very many, relax the
  // target (the error estimates follow) rather than spend seconds per level
  const tol = o.tolerance ?? 1e-14;
  const out = invertWithinTerms(
    model,
    atoms,
    { kind: "points", x: new Float64Array([shape.center]) },
    { method: "gil-pelaez", tolerance: tol / w, wantPdf: false },
    o.tolerance === undefined ? 1 << 17 : Infinity,
    1e-9 / w,
  );
  const sol = out.solution!;
  // the sums' truncation: the terms k >= K carry |phi(t_k)| / (pi (k + 1/2)) <= (h / pi) E(t_k) / t_k with E the envelope
  // (./nodes.ts) and E(t)/t non-increasing, so h E(t_k)/t_k <= int_{t_k - h}^{t_k} E/t and their sum is at most
  // (1/pi) int_{(K - 1/2) h}^inf E(t)/t dt: the envelope's tail at the probe at or below (K - 1/2) h (the window's
  // uniform bound doubles the tail at K h)
  const tStar = (sol.nodes.K - 0.5) * sol.nodes.h;
  const trunc = Math.min(sol.error.truncation, truncationAt(sol.envelope, tStar).cdf);
  const roundCdf = sol.sumErrCdf - sol.error.truncation;
  // the uniform aliasing is 2 |F_h(a)| plus twice the sums' own error at a (continuous.ts lightPath), that error now the
  // tighter truncation plus the rounding
  const aliasCdf = Math.min(sol.error.cdf - sol.sumErrCdf, sol.aliasCore + 2 * (trunc + roundCdf));
  const errCdf = w * (trunc + roundCdf + aliasCdf) * (1 + 4 * Number.EPSILON) + 4 * Number.EPSILON;
  // per point: the aliasing (./light-images.ts) and the rounding of the phases, which grows with |x - center| (shared.ts
  // roundingOf), where they are below the window's uniform bounds; the truncation is the same everywhere
  const aliasAt = lightAliasAt(model, sol, w);
  const errAt = (x: number) => {
    const alias = aliasAt ? Math.min(aliasCdf, aliasAt(x)) : aliasCdf;
    const round = Math.min(roundCdf, roundingOf(sol.part, sol.nodes, Math.abs(x - sol.part.center)).cdf);
    return w * (trunc + round + alias) * (1 + 4 * Number.EPSILON) + 4 * Number.EPSILON;
  };
  const ev: Evaluator = {
    eval: solutionAt(sol, atoms, w),
    errCdf,
    errAt,
    lo: sol.window.a,
    hi: sol.window.b,
    terms: sol.nodes.K,
  };
  const notes = [...out.notes];
  const { x, err } = solveLevels(ev, atoms, p, shape.support, shape.spread, notes);
  let es: Float64Array | undefined;
  let esErr: Float64Array | undefined;
  if (o.expectedShortfall) {
    es = new Float64Array(p.length);
    esErr = new Float64Array(p.length);
    const tails = stopLossBounds(model);
    for (let i = 0; i < p.length; i++) {
      const r = shortfallLight(sol, atoms, w, x[i], p[i], errCdf, err[i], tails);
      es[i] = r.value;
      esErr[i] = r.error;
    }
  }
  return {
    p,
    x,
    expectedShortfall: es,
    diagnostics: {
      method: "gil-pelaez",
      terms: sol.nodes.K,
      range: { from: sol.window.a, to: sol.window.b },
      cdfError: errCdf,
      quantileError: err,
      expectedShortfallError: esErr,
      notes,
    },
  };
}

function heavyQuantiles(model: CompiledModel, atoms: Atom[], w: number, p: Float64Array, o: QuantileOptions): QuantileResult {
  const shape = lawShape(model);
  const alpha = Math.max(shape.alpha, 0.1);
  // rough extent of the requested levels from the power tail S(x) ~ (scale/x)^alpha
  let ext = shape.spread;
  for (let i = 0; i < p.length; i++) {
    const tp = Math.min(p[i], 1 - p[i]);
    if (tp > 0) ext = Math.max(ext, shape.spread * Math.pow(2 / tp, 1 / alpha));
  }
  const T0 = Math.max(64 * shape.spread, 8 * ext);
  // the combined scale overstates the heaviest tail's constant when the other terms are wide: the levels of the
  // heaviest-tailed term's own law (plus a few spreads for the rest) give a shorter first period. The answer is kept
  // only when every quantile lies inside an eighth of that period, as the estimate above intends (checked before the
  // expected shortfall is computed); else once more with the period from the quantiles just found (a quarter to spare),
  // and failing that with the estimate above.
  const near = tailTermExtent(model, atoms, p, shape.center, shape.spread);
  if (near !== null) {
    let T1 = Math.max(64 * shape.spread, 8 * near);
    for (let k = 0; k < 2 && T1 < T0 / 2; k++) {
      let far = 0;
      const inside = (x: Float64Array, err: Float64Array) => {
        let ok = true;
        for (let i = 0; i < p.length; i++) {
          if (p[i] <= 0 || p[i] >= 1) continue;
          far = Math.max(far, Math.abs(x[i] - shape.center));
          if (!(Math.abs(x[i] - shape.center) <= T1 / 8 && Number.isFinite(err[i]))) ok = false;
        }
        return ok;
      };
      const r = heavyQuantilesAt(model, atoms, w, p, o, T1, shape, inside);
      if (r) return r;
      if (!Number.isFinite(far)) break;
      T1 = Math.max(2 * T1, 10 * far);
    }
  }
  return heavyQuantilesAt(model, atoms, w, p, o, T0, shape)!;
}

/**
 * A bound on |x - q_p| from the errors at two points beside x instead of the largest error seen anywhere: with e(y) the
 * cdf bound at y, F_h(x - d) + e(x - d) < p and F_h(x + d) - e(x + d) > p put q_p in [x - d, x + d] (F is
 * non-decreasing). d starts at 1.0625 (|F_h(x) - p| + e(x)) / f_h(x) and doubles up to four times; Infinity when the bracket
 * does not close (the caller keeps its own bound). Above the median the same on S = 1 - F.
 */
function localBracket(ev: Evaluator, lad: HeavyLadder, scratch: LadderScratch, w: number, x: number, p: number): number {
  const upper = p > 0.5;
  const at = (y: number) => {
    const v = ev.eval(y);
    const e = w * evalLadder(lad, y, scratch).errCdf + 4 * Number.EPSILON;
    // signed distance of the level from the value, beyond the error: < 0 below q_p, > 0 above it
    return { g: upper ? 1 - p - v.S : v.F - p, e, f: v.f };
  };
  const mid = at(x);
  if (!(mid.f > 0)) return Infinity;
  // the bracket is verified below, so its first width may be the first-order one (slightly widened)
  let d = ((Math.abs(mid.g) + mid.e) / mid.f) * 1.0625 + 8 * Number.EPSILON * Math.abs(x);
  for (let k = 0; k < 5; k++, d *= 2) {
    const l = at(x - d);
    const r = at(x + d);
    if (l.g + l.e < 0 && r.g - r.e > 0) return d;
  }
  return Infinity;
}

type LadderScratch = { pdf: Float64Array; cdf: Float64Array; sf: Float64Array; one: Float64Array };

function heavyQuantilesAt(
  model: CompiledModel,
  atoms: Atom[],
  w: number,
  p: Float64Array,
  o: QuantileOptions,
  T0: number,
  shape: ReturnType<typeof lawShape>,
  keep?: (x: Float64Array, err: Float64Array) => boolean,
): QuantileResult | null {
  const tol = o.tolerance ?? 1e-10;
  const notes: string[] = [];
  const scratch: LadderScratch = { pdf: new Float64Array(1), cdf: new Float64Array(1), sf: new Float64Array(1), one: new Float64Array(1) };
  const lad = heavyLadder(model, atoms, T0, 5, tol, !o.expectedShortfall);
  // a derived bound is kept even where it cannot reach tol within the levels below (six at most): a finite bound is
  // reported before an estimate, the tolerance report says it was not met
  const ext = T0 / 8;
  const probes = [shape.center - ext, shape.center, shape.center + ext];
  let prevD = NaN;
  for (let more = 0; more < 3; more++) {
    const vals = probes.map((x) => evalLadder(lad, x, scratch));
    const worst = Math.max(...vals.map((v) => v.errCdf));
    // where a derived bound is possible (./heavy-residual.ts, ./heavy-residual2.ts), the levels grow until it reaches the
    // tolerance too, while it is within reach of the doublings left: within 1e3 tol at first, then at the rate of the last
    // doubling (each doubles the nodes)
    const dWorst = Math.max(...vals.map((v) => v.derivedCdf));
    const rate = Number.isFinite(prevD) && prevD > 0 ? Math.min(1, dWorst / prevD) : NaN;
    const reach = Number.isFinite(rate) ? dWorst * rate ** (3 - more) <= tol : dWorst <= 1e3 * tol;
    prevD = dWorst;
    const derivedShort = (lad.resid !== null || lad.pair !== null) && dWorst > tol && reach;
    // the sums' own bound, amplified by one more extrapolation level, would already exceed what is reached
    const floorNext = richardsonAmplification(lad.expC, lad.levels.length + 1) * lad.trC;
    if ((worst <= tol && !derivedShort) || (!derivedShort && floorNext >= worst) || !growLadder(lad)) break;
  }
  let seenErr = 0;
  const ev: Evaluator = {
    eval(x: number) {
      const r = evalLadder(lad, x, scratch);
      seenErr = Math.max(seenErr, w * r.errCdf);
      const m = atomMass(atoms, x);
      return { F: m.below + w * r.cdf, S: m.above + w * r.sf, f: w * r.pdf };
    },
    errCdf: 0,
    lo: -Infinity,
    hi: Infinity,
    terms: lad.levels[lad.levels.length - 1].K,
  };
  for (const x of probes) ev.eval(x);
  ev.errCdf = 2 * seenErr + 4 * Number.EPSILON;
  notes.push(`power tails: ${lad.levels.length} period doublings from T = ${T0.toPrecision(4)}, Richardson extrapolation`);
  const [lo, hi] = shape.support;
  const xs = new Float64Array(p.length);
  const err = new Float64Array(p.length);
  for (let i = 0; i < p.length; i++) {
    const pi = p[i];
    if (pi === 0 || pi === 1) {
      xs[i] = pi === 0 ? lo : hi;
      continue;
    }
    let L = Number.isFinite(lo) ? lo : shape.center - shape.spread;
    let R = Number.isFinite(hi) ? hi : shape.center + shape.spread;
    let k = 0;
    while (!Number.isFinite(lo) && ev.eval(L).F >= pi && k++ < 60) L = shape.center - shape.spread * 2 ** k;
    k = 0;
    while (!Number.isFinite(hi) && ev.eval(R).S > 1 - pi && k++ < 60) R = shape.center + shape.spread * 2 ** k;
    const sub = solveLevels({ ...ev, lo: L, hi: R }, atoms, new Float64Array([pi]), shape.support, shape.spread, notes);
    xs[i] = sub.x[0];
    err[i] = sub.err[0];
    // the error bound used must cover this point's own extrapolation error
    if (Number.isFinite(xs[i])) {
      const r = evalLadder(lad, xs[i], scratch);
      if (w * r.errCdf > ev.errCdf && r.pdf > 0) err[i] = Math.max(err[i], (2 * w * r.errCdf) / (w * r.pdf));
      err[i] = Math.min(err[i], localBracket(ev, lad, scratch, w, xs[i], pi));
    }
  }
  // a period the caller does not keep: no expected shortfall spent on it
  if (keep && !keep(xs, err)) return null;
  // every value whose cdf bound was the Richardson estimate (not derived: ./heavy-residual.ts) marks the answer
  let estimated = lad.estimated;
  let shortfallGoalMissed = false;
  const lastErr = ev.errCdf;
  const terms = ev.terms;
  const range = { from: shape.center - T0 / 2, to: shape.center + T0 / 2 };
  let es: Float64Array | undefined;
  let esErr: Float64Array | undefined;
  if (o.expectedShortfall) {
    es = new Float64Array(p.length).fill(NaN);
    esErr = new Float64Array(p.length).fill(Infinity);
    const mean = model.cumulants(1)[0];
    if (!(model.momentIndex > 1) || mean === null || !Number.isFinite(mean)) {
      notes.push("expected shortfall does not exist (the mean is infinite)");
    } else {
      let span = 0;
      for (let i = 0; i < p.length; i++) if (Number.isFinite(xs[i])) span = Math.max(span, Math.abs(xs[i] - shape.center));
      const sh = heavyShortfall(model, atoms, w, mean, shape, tol, span, lad);
      const missed: number[] = [];
      for (let i = 0; i < p.length; i++) {
        if (!Number.isFinite(xs[i]) || p[i] >= 1) continue;
        // ES needs E[(X - q)^+] to about 1e-8 (1 - p) relative to the scale of q
        const r = sh(xs[i], 1e-8 * (1 - p[i]) * Math.max(1, Math.abs(xs[i]), shape.spread));
        es[i] = xs[i] + r.value / (1 - p[i]);
        esErr[i] = (r.error + Math.max(lastErr, tol) * err[i]) / (1 - p[i]) + 4 * Number.EPSILON * Math.abs(es[i]);
        if (r.estimated) estimated = true;
        else if (!r.reached) missed.push(p[i]);
      }
      notes.push("expected shortfall of power tails: E|X - q| by the mid-point sum with period doubling and Richardson extrapolation");
      if (missed.length) {
        shortfallGoalMissed = true;
        notes.push(
          `expected shortfall goal 1e-8 (1 - p) max(1, |q|, spread) not reached at p = ${missed.join(", ")}: within the periods affordable the derived bound of the aliasing left is larger; the expectedShortfallError entries carry the bound reached`,
        );
      }
    }
  }
  if (estimated) notes.push(RICHARDSON_ESTIMATE_NOTE);
  return {
    p,
    x: xs,
    expectedShortfall: es,
    diagnostics: { method: "gil-pelaez", terms, range, cdfError: Math.max(lastErr, tol) * w, quantileError: err, expectedShortfallError: esErr, notes, ...(shortfallGoalMissed ? { shortfallGoalMissed } : {}) },
  };
}
