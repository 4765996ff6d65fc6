// Quantiles and expected shortfall of laws with power tails: the period-doubling ladder with its derived (or estimated)
// bounds, the levels solved on it, and the shortfall from its stop-loss sums (./quantile.ts dispatches here).
import { nodeRoundingNotes } from "./grid-rounding";
import type { Atom, CompiledModel } from "../types";
import { evalLadder, growLadder, heavyLadder, type HeavyLadder } from "./continuous";
import { atomMass } from "./shared";
import { lawShape } from "./range";
import { RICHARDSON_ESTIMATE_NOTE, richardsonAmplification } from "./richardson";
import { heavyShortfall } from "./shortfall-heavy";
import { chooseTop } from "./heavy-top";
import { solveLevels, type Evaluator } from "./solve-levels";
import { tailTermExtent } from "./tail-extent";
import type { QuantileOptions, QuantileResult } from "./quantile";

export function heavyQuantiles(model: CompiledModel, atoms: Atom[], w: number, p: Float64Array, o: QuantileOptions): QuantileResult {
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
  // where a derived bound answers, the top level alone (./heavy-top.ts), else level by level
  const lad = heavyLadder(model, atoms, T0, 5, tol, !o.expectedShortfall, true);
  // a derived bound is kept even where it cannot reach tol within the levels below (six at most): a finite bound is
  // reported before an estimate, the tolerance report says it was not met
  const ext = T0 / 8;
  const probes = [shape.center - ext, shape.center, shape.center + ext];
  if (!lad.levels.length && !chooseTop(lad, probes, tol)) for (let l = 0; l < 3; l++) growLadder(lad);
  let prevD = NaN;
  for (let more = 0; more < 3 && !lad.top; more++) {
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
    terms: (lad.top?.nodes ?? lad.levels[lad.levels.length - 1]).K,
  };
  for (const x of probes) ev.eval(x);
  ev.errCdf = 2 * seenErr + 4 * Number.EPSILON;
  notes.push(...nodeRoundingNotes(lad.part));
  notes.push(
    lad.top && lad.levels.length === 0
      ? `power tails: period T = ${T0.toPrecision(4)} doubled ${lad.top.l} times, the last period's sums with the derived bound of the images left`
      : `power tails: ${lad.levels.length} period doublings from T = ${T0.toPrecision(4)}, Richardson extrapolation`,
  );
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
