import type { Atom, CompiledModel } from "../types";
import { checkDeadline } from "../deadline";
import { mergeAtoms } from "../kinds";
import { directPoint, type DirectLaw, type DirectPoint } from "../direct/types";
import { directQuantile } from "../direct/answer";
import type { QuantileOptions, QuantileResult } from "./quantile";
import type { DensityOptions, DensityResult, PointErrors } from "./types";
import { components, mixtureAtoms, mixtureLaw, methodsNote } from "./mixture-components";
import { mixtureExcesses } from "./mixture-shortfall";
import { componentDensities } from "./mixture-budget";

/**
 * A mixture F = sum_j w_j F_j answered from its components: each component by its own route (a named law by its
 * closed form or special function, an aggregate law bounded below by the damped inversion), so that the mixture
 * never needs a period long enough for its slowest component's transform. Sums of the components' values carry the
 * weighted sums of their bounds; the quantile search works on the mixture's cdf with those per-point bounds (the
 * bracket walk of ../direct/answer), expected shortfall from E[(X - q)^+] = sum_j w_j E[(X_j - q)^+].
 * A scaled or shifted mixture is the mixture of the scaled or shifted components (compile pushes them down).
 */

/** Components at the leaves of nested mixtures with their product weights, or null when one has no route here. */
export function mixtureLeaves(model: CompiledModel): { w: number; m: CompiledModel }[] | null {
  if (!model.components) return null;
  const out: { w: number; m: CompiledModel }[] = [];
  const walk = (m: CompiledModel, w: number): boolean => {
    const cs = m.components?.();
    if (cs && cs.length > 1) return cs.every((c) => walk(c.model, w * c.weight));
    if (m.kind.type !== "continuous" && m.kind.type !== "mixed") return false;
    out.push({ w, m });
    return true;
  };
  return walk(model, 1) && out.length > 1 ? out : null;
}

/**
 * q_p = min{x : F(x) >= p}: when F is within its bound of p a little left of the root found (a flat stretch, e.g.
 * between separated components), the answer moves to the stretch's left end y = min{y : F(y) + e(y) >= p}; the
 * quantile then lies in [y, x + err], and that width is the error.
 */
function leftEnd(law: DirectLaw, r: { x: number; err: number }, p: number, spread: number, pt: DirectPoint, known: readonly number[] = []): { x: number; err: number; flat: boolean } {
  if (!Number.isFinite(r.x) || !Number.isFinite(r.err) || p <= 0 || p >= 1) return { ...r, flat: false };
  const up = (y: number) => {
    law.at(y, pt);
    return pt.cdf + pt.cdfErr >= p;
  };
  law.at(r.x, pt);
  const dx = Math.min(Math.max(1e-7 * Math.max(Math.abs(r.x), spread), pt.pdf > 0 ? (8 * pt.cdfErr) / pt.pdf : Infinity), 0.01 * spread);
  if (!(dx > 0)) return { ...r, flat: false };
  // a point already evaluated in [x - dx, x) (the search's own, answered again at no cost) where F + e < p: the true F is
  // below p there, so the quantile lies past it and no stretch to its left can hold it (the walk below would only widen the
  // bracket the search found)
  for (const y of known) {
    if (!(y >= r.x - dx && y < r.x)) continue;
    law.at(y, pt);
    if (pt.cdf + pt.cdfErr < p) return { ...r, flat: false };
  }
  if (!up(r.x - dx)) return { ...r, flat: false };
  // walk left until F + e < p (or the support's start), then bisect
  let hi = r.x - dx;
  let d = 2 * dx;
  let lo = r.x - d;
  for (let k = 0; k < 200 && lo > law.support[0] && up(lo); k++) {
    hi = lo;
    d *= 2;
    lo = r.x - d;
  }
  if (lo <= law.support[0]) lo = law.support[0];
  for (let k = 0; k < 100 && hi - lo > 4 * Number.EPSILON * Math.max(Math.abs(hi), spread); k++) {
    const mid = 0.5 * (lo + hi);
    if (up(mid)) hi = mid;
    else lo = mid;
  }
  return { x: hi, err: r.x + r.err - lo, flat: true };
}

/** The law with every point it was asked kept (each costs every component's evaluation), and those points. */
function remembering(law: DirectLaw): { law: DirectLaw; seen: () => number[]; forget: (drop: (x: number) => boolean) => void } {
  const memo = new Map<number, DirectPoint>();
  return {
    law: {
      ...law,
      at(x: number, out: DirectPoint) {
        let v = memo.get(x);
        if (!v) {
          law.at(x, (v = directPoint()));
          memo.set(x, v);
        }
        Object.assign(out, v);
      },
    },
    seen: () => [...memo.keys()],
    forget(drop) {
      for (const x of [...memo.keys()]) if (drop(x)) memo.delete(x);
    },
  };
}

/** Quantiles and expected shortfall of a mixture from its components; null when a component has no route here. */
export function mixtureQuantiles(model: CompiledModel, p: Float64Array, o: QuantileOptions): QuantileResult | null {
  const leaves = mixtureLeaves(model);
  if (!leaves) return null;
  const tol = o.tolerance ?? 1e-10;
  let tail = 0.5;
  let lowTail = 0.5;
  for (let i = 0; i < p.length; i++) {
    if (!(p[i] > 0 && p[i] < 1)) continue;
    tail = Math.min(tail, 1 - p[i]);
    lowTail = Math.min(lowTail, p[i], 1 - p[i]);
  }
  const cs = components(leaves, tol, tail, lowTail, o.tolerance !== undefined, Array.from(p));
  if (!cs) return null;
  const { law, seen, forget } = remembering(mixtureLaw(model, cs));
  const atoms = mixtureAtoms(cs);
  const atomErr = cs.reduce((s, c) => s + c.w * (c.atomErr ?? 0), 0);
  const pt = directPoint();
  const n = p.length;
  const x = new Float64Array(n);
  const err = new Float64Array(n);
  // per level: answered by an atom (its cdf bound is the one at the atom), on a flat stretch
  const atAtom = new Uint8Array(n);
  const onFlat = new Uint8Array(n);
  // levels in increasing order: each search starts from the points the earlier ones evaluated (the last answer below
  // it, the nearest point above)
  const order = Array.from(p.keys()).sort((u, v) => p[u] - p[v]);
  // final: the stretch's left end too (leftEnd); a first search, whose values past a range may be wide, leaves it out
  const solve = (i: number, final: boolean) => {
    checkDeadline("mixture-quantile");
    const pi = p[i];
    // a level inside an atom's jump: the atom, exactly (the jump's ends clear of the bounds)
    for (const a of atoms) {
      law.at(a.x, pt);
      // F(a-) = F(a) - mass: the masses' own bounds (a direct component's atoms) widen it
      if (pt.cdf - a.p + pt.cdfErr + atomErr < pi && pi <= pt.cdf - pt.cdfErr) {
        x[i] = a.x;
        err[i] = 0;
        atAtom[i] = 1;
        return;
      }
    }
    // Newton steps from the mixture's density: each point costs every component's evaluation (seed 3's 7-part compound mix:
    // 52 -> 41 points for seven levels with ES)
    const q = directQuantile(law, pi, seen(), true);
    const r = final ? leftEnd(law, q, pi, model.scale, pt, seen()) : { ...q, flat: false };
    onFlat[i] = r.flat ? 1 : 0;
    x[i] = r.x;
    err[i] = r.err;
  };
  // first with the ranged components deferring their growth: a point past a range is answered from the monotone
  // bound there (wide where the tail matters, so the search cannot settle on it); then each such range grows once to
  // cover the answers' brackets that need its tail, and those levels are searched again: the points they evaluated
  // inside their first brackets past an old range's end are evaluated afresh, the others (honest, and decided beyond
  // their bounds) still bracket the roots. A level left without an answer is searched again as before this deferral
  // (every range growing to twice the farthest point that needs it), its points past any deferring range forgotten.
  for (const c of cs) c.deferred?.(true);
  for (const i of order) solve(i, false);
  for (const c of cs) c.deferred?.(false);
  const settled = (i: number) => !(p[i] > 0 && p[i] < 1) || (Number.isFinite(x[i]) && Number.isFinite(err[i]));
  const again = new Uint8Array(n);
  let changed = Infinity;
  let deferredFrom = Infinity;
  for (const c of cs) {
    if (!c.cover || !((c.beyond?.() ?? -Infinity) > -Infinity)) continue;
    const R = c.reach!();
    deferredFrom = Math.min(deferredFrom, R);
    // the farthest bracket end that needs this component's tail past its range, and the levels whose brackets do
    let want = -Infinity;
    const hit: number[] = [];
    for (let i = 0; i < n; i++) {
      // the tail bound falls with x: it matters somewhere in the bracket past R when it does at the bracket's first
      // point past R
      const y = x[i] + err[i];
      if (settled(i) && y > R && c.needs!(Math.max(x[i] - err[i], R + Math.abs(R) * 1e-12 + Number.MIN_VALUE))) {
        want = Math.max(want, y);
        hit.push(i);
      }
    }
    if (want > R && c.cover(want)) {
      changed = Math.min(changed, R);
      for (const i of hit) again[i] = 1;
    }
  }
  let open = false;
  for (let i = 0; i < n; i++) {
    if (settled(i)) continue;
    open = true;
    again[i] = 1;
  }
  forget((y) => (open && y > deferredFrom) || (y > changed && order.some((i) => again[i] === 1 && Math.abs(y - x[i]) <= err[i])));
  for (const i of order) {
    if (again[i]) solve(i, true);
    else if (!atAtom[i]) {
      const r = leftEnd(law, { x: x[i], err: err[i] }, p[i], model.scale, pt, seen());
      onFlat[i] = r.flat ? 1 : 0;
      x[i] = r.x;
      err[i] = r.err;
    }
  }
  let cdfError = 0;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i])) continue;
    law.at(x[i], pt);
    cdfError = Math.max(cdfError, pt.cdfErr, atAtom[i] ? 0 : pt.sfErr);
  }
  const flat = onFlat.some((v) => v === 1);
  const notes = [methodsNote(cs)];
  if (flat) notes.push("a level falls on a flat stretch of the cdf: the left end is returned, the error spans the stretch");
  let es: Float64Array | undefined;
  let esErr: Float64Array | undefined;
  if (o.expectedShortfall) {
    es = new Float64Array(n).fill(NaN);
    esErr = new Float64Array(n).fill(Infinity);
    let exists = true;
    // each component's excess at every level asked, in one call where it can share work among them (a direct law's
    // tail sweep); a component without a mean stops the rest
    const asked: number[] = [];
    for (let i = 0; i < n; i++) if (Number.isFinite(x[i]) && p[i] < 1) asked.push(i);
    const value = new Float64Array(n);
    const error = new Float64Array(n);
    if (asked.length) exists = mixtureExcesses(cs, x, p, asked, value, error);
    for (let i = 0; i < n && exists; i++) {
      const q = x[i];
      if (!Number.isFinite(q)) continue;
      if (p[i] >= 1) {
        es[i] = q;
        esErr[i] = err[i];
        continue;
      }
      law.at(q, pt);
      const w = 1 - p[i];
      es[i] = q + value[i] / w;
      // ES(q') - ES(q*) = int_{q*}^{q'} (S(q*) - S(y)) dy / (1 - p): at most (|S(q) - (1 - p)| + e + f dq) dq / (1 - p)
      const dq = err[i];
      const slope = Math.abs(pt.sf - w) + pt.sfErr + 2 * Math.max(pt.pdf, 0) * dq;
      esErr[i] = (error[i] + slope * dq) / w + 4 * Number.EPSILON * Math.abs(es[i]);
    }
    if (!exists) {
      es.fill(NaN);
      esErr.fill(Infinity);
      notes.push("expected shortfall does not exist (a component has no finite mean)");
    } else notes.push("expected shortfall from E[(X - q)^+] = sum_j w_j E[(X_j - q)^+], each component by its own route");
  }
  for (const c of cs) notes.push(...c.notes());
  let from = Infinity;
  let to = -Infinity;
  for (const v of x) if (Number.isFinite(v)) [from, to] = [Math.min(from, v), Math.max(to, v)];
  return {
    p,
    x,
    expectedShortfall: es,
    diagnostics: {
      method: "mixture",
      terms: cs.reduce((s, c) => s + c.terms(), 0),
      range: from <= to ? { from, to } : { from: model.location, to: model.location },
      cdfError,
      quantileError: err,
      expectedShortfallError: esErr,
      notes: [...new Set(notes)],
      ...(cs.some((c) => c.shortfallMissed?.()) ? { shortfallGoalMissed: true } : {}),
    },
  };
}

/**
 * Density, cdf and sf of a mixture: the weighted sums of the components' answers (each from its own route) at the
 * same points, the bounds likewise; atoms weighted and merged. null when a component has no route here.
 */
export function mixtureDensity(
  model: CompiledModel,
  options: DensityOptions,
  one: (m: CompiledModel, o: DensityOptions) => DensityResult,
): DensityResult | null {
  const leaves = mixtureLeaves(model);
  if (!leaves) return null;
  // each component at its share of the target (./mixture-budget.ts)
  const parts = componentDensities(leaves, options, one);
  if (parts.some(({ r }) => !r.pdf && !options.cdfOnly)) return null;
  const n = parts[0].r.x.length;
  const pdf = options.cdfOnly ? undefined : new Float64Array(n);
  const cdf = new Float64Array(n);
  const sf = new Float64Array(n);
  const e = { aliasing: 0, truncation: 0, rounding: 0, pdf: 0, cdf: 0 };
  const weighted: Atom[] = [];
  const counts = new Map<string, number>();
  const notes: string[] = [];
  let terms = 0;
  let gridSize = 0;
  let hMax = 0;
  let tMax = 0;
  let levels = 1;
  let captured = 0;
  let from = Infinity;
  let to = -Infinity;
  for (const { w, r } of parts) {
    for (let i = 0; i < n; i++) {
      if (pdf && r.pdf) pdf[i] += w * r.pdf[i];
      cdf[i] += w * r.cdf[i];
      sf[i] += w * r.sf[i];
    }
    for (const a of r.atoms) weighted.push({ x: a.x, p: w * a.p });
    const d = r.diagnostics;
    for (const k of ["aliasing", "truncation", "rounding", "pdf", "cdf"] as const) e[k] += w * d.error[k];
    counts.set(d.method, (counts.get(d.method) ?? 0) + 1);
    notes.push(...d.notes);
    terms += d.terms;
    gridSize = Math.max(gridSize, d.gridSize);
    hMax = Math.max(hMax, d.frequencyStep);
    tMax = Math.max(tMax, d.maxFrequency);
    levels = Math.max(levels, d.levels);
    captured += w * d.capturedMass;
    from = Math.min(from, d.range.from);
    to = Math.max(to, d.range.to);
  }
  // summing n terms rounds by at most n ulps of the result
  const round = 2 * Number.EPSILON * parts.length;
  // per point: the weighted sums of the components' own point bounds, where every component has them
  let pointError: PointErrors | undefined;
  if (parts.every(({ r }) => r.diagnostics.pointError)) {
    pointError = { pdf: new Float64Array(n), cdf: new Float64Array(n), sf: new Float64Array(n) };
    for (const { w, r } of parts) {
      const pe = r.diagnostics.pointError!;
      for (let i = 0; i < n; i++) {
        pointError.pdf[i] += w * pe.pdf[i];
        pointError.cdf[i] += w * pe.cdf[i];
        pointError.sf[i] += w * pe.sf[i];
      }
    }
    for (let i = 0; i < n; i++) {
      pointError.cdf[i] += round * cdf[i];
      pointError.sf[i] += round * sf[i];
      if (pdf) pointError.pdf[i] += round * (Number.isFinite(pdf[i]) ? Math.abs(pdf[i]) : 0);
    }
  }
  e.cdf += round;
  // over the finite values: an infinite density at a point (a component's power singularity) is exact there
  e.pdf += round * (pdf ? pdf.reduce((m, v) => (Number.isFinite(v) ? Math.max(m, Math.abs(v)) : m), 0) : 0);
  for (let i = 0; i < n; i++) {
    cdf[i] = Math.min(Math.max(cdf[i], 0), 1);
    sf[i] = Math.min(Math.max(sf[i], 0), 1);
  }
  const note = `mixture answered from its ${parts.length} components (${[...counts].map(([k, c]) => `${c} by ${k}`).join(", ")})`;
  return {
    x: parts[0].r.x,
    ...(pdf ? { pdf } : {}),
    cdf,
    sf,
    atoms: mergeAtoms(weighted),
    diagnostics: {
      method: "mixture",
      gridSize,
      terms,
      frequencyStep: hMax,
      maxFrequency: tMax,
      range: { from, to },
      capturedMass: captured,
      error: e,
      levels,
      notes: [...new Set([note, ...notes])],
      ...(pointError ? { pointError } : {}),
    },
  };
}
