import type { Atom, CompiledModel } from "../types";
import { checkDeadline } from "../deadline";
import { mergeAtoms } from "../kinds";
import { directPoint, type DirectLaw, type DirectPoint } from "../direct/types";
import { directQuantile, directShortfall } from "../direct/answer";
import { DAMPED_BUDGET, MAX_K, dampable, dampedAt, dampedSetup, type DampedSolution } from "./damped";
import type { QuantileOptions, QuantileResult } from "./quantile";
import type { DensityOptions, DensityResult } from "./types";
import { invertContinuous } from "./continuous";
import { atomMass, solutionAt } from "./shared";
import { dampedExcess } from "./quantile-damped";
import { lawShape } from "./range";
import { shortfallLight } from "./shortfall";

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
    // a component with power tails and no direct evaluation would need the long-period route: the mixture's own is no worse
    if (!m.direct && !dampable(m) && lawShape(m).heavy) return false;
    out.push({ w, m });
    return true;
  };
  return walk(model, 1) && out.length > 1 ? out : null;
}

interface Value {
  F: number;
  S: number;
  f: number;
  /** bounds on |F - F_true| and |S - S_true| */
  eF: number;
  eS: number;
}

interface Component {
  w: number;
  atoms: Atom[];
  at(x: number): Value;
  /** E[(X - q)^+] and its bound; null when the mean does not exist */
  excess(q: number): { value: number; error: number } | null;
  terms(): number;
  notes(): string[];
  method: string;
}

function directComponent(w: number, m: CompiledModel): Component {
  const law = m.direct!;
  const pt = directPoint();
  const mean = m.momentIndex > 1 ? m.cumulants(1)[0] : null;
  const at = (x: number): Value => {
    law.at(x, pt);
    return { F: pt.cdf, S: pt.sf, f: pt.pdf, eF: pt.cdfErr, eS: pt.sfErr };
  };
  return {
    w,
    atoms: [],
    at,
    excess(q) {
      if (mean === null || !Number.isFinite(mean) || !(m.tails.right > 1)) return null;
      const v = at(q);
      // directShortfall gives q + E[(X - q)^+] / (1 - p) with p the component's own level at q
      const p = Math.min(Math.max(v.F, 0), 1);
      if (p >= 1 || v.S <= 0) return { value: 0, error: v.eS * Math.max(law.spread, 1) };
      const r = directShortfall(law, q, 0, p, m.tails, mean);
      const tail = 1 - p;
      return { value: (r.value - q) * tail, error: r.error * tail + 4 * Number.EPSILON * Math.abs(q) };
    },
    terms: () => 0,
    notes: () => law.notes,
    method: law.method,
  };
}

function dampedComponent(w: number, m: CompiledModel, R0: number, tol: number, target: number): Component | null {
  const lo = m.support[0];
  const atoms = m.kind.type === "mixed" ? [...m.kind.atoms].sort((u, v) => u.x - v.x) : [];
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  const budget = m.dampedKernels?.length || m.dampedSeverity ? MAX_K : DAMPED_BUDGET;
  const mean = m.momentIndex > 1 ? m.cumulants(1)[0] : null;
  const setup = (R: number) => dampedSetup(m, atoms, R, { tolerance: tol, wantPdf: true, budget });
  let R = R0;
  let s: DampedSolution | null = setup(R);
  if (!s) return null;
  let grows = 0;
  const inside = (x: number): Value => {
    const v = dampedAt(s!, x, true, false);
    const a = atomMass(atoms, x);
    return { F: a.below + v.Fc, S: a.above + (Mc - v.Fc), f: v.fc, eF: v.errF, eS: v.errF };
  };
  // beyond the range: the range grows (at most 8 times) when the tail left there matters, otherwise the
  // monotone bound S(x) in [0, S(R)] answers
  const grow = (x: number): boolean => {
    if (grows >= 8) return false;
    const next = setup(lo + 2 * (x - lo));
    if (!next) return false;
    grows++;
    s = next;
    R = lo + 2 * (x - lo);
    return true;
  };
  const at = (x: number): Value => {
    if (x < lo) return { F: 0, S: 1, f: 0, eF: 0, eS: 0 };
    if (x <= R) return inside(x);
    const r = inside(R);
    const sR = Math.max(r.S, 0) + r.eS;
    if (w * sR > target && grow(x)) return inside(x);
    return { F: 1 - sR / 2, S: sR / 2, f: 0, eF: sR / 2, eS: sR / 2 };
  };
  return {
    w,
    atoms,
    at,
    excess(q) {
      if (mean === null || !Number.isFinite(mean) || !(m.momentIndex > 1)) return null;
      if (q > R && !grow(q)) return { value: 0, error: Infinity };
      return dampedExcess(s!, atoms, mean, q);
    },
    terms: () => s!.K,
    notes: () => s!.notes,
    method: "gil-pelaez-damped",
  };
}

/**
 * A light-tailed component by the mid-point Gil-Pelaez sums (./continuous, with its endpoint kernels): values on the
 * inversion window [a, b]; outside it the monotone bounds F(x) <= F(a) and S(x) <= S(b).
 */
function lightComponent(w: number, m: CompiledModel, tolIn: number): Component | null {
  const atoms = m.kind.type === "mixed" ? [...m.kind.atoms].sort((u, v) => u.x - v.x) : [];
  const wc = 1 - atoms.reduce((s, a) => s + a.p, 0);
  const shape = lawShape(m);
  if (shape.heavy) return null;
  let tol = tolIn;
  const solve = () =>
    invertContinuous(m, atoms, { kind: "points", x: new Float64Array([shape.center]) }, { method: "gil-pelaez", tolerance: tol / wc, wantPdf: false });
  let out = solve();
  // a slowly decaying CF: relax the target (the bounds follow) rather than spend seconds per evaluation
  while (out.solution!.nodes.K > 1 << 17 && tol < 1e-9) {
    tol *= 100;
    out = solve();
  }
  const sol = out.solution!;
  const e = wc * sol.error.cdf + 4 * Number.EPSILON;
  const { a, b } = sol.window;
  const values = solutionAt(sol, atoms, wc);
  const inside = (x: number): Value => ({ ...values(x), eF: e, eS: e });
  const [slo, shi] = m.support;
  const at = (x: number): Value => {
    if (x < slo) return { F: 0, S: 1, f: 0, eF: 0, eS: 0 };
    if (x > shi) return { F: 1, S: 0, f: 0, eF: 0, eS: 0 };
    if (x < a) {
      const r = inside(a);
      const fa = Math.max(r.F, 0) + r.eF;
      return { F: fa / 2, S: 1 - fa / 2, f: 0, eF: fa / 2, eS: fa / 2 };
    }
    if (x > b) {
      const r = inside(b);
      const sb = Math.max(r.S, 0) + r.eS;
      return { F: 1 - sb / 2, S: sb / 2, f: 0, eF: sb / 2, eS: sb / 2 };
    }
    return inside(x);
  };
  const mean = m.momentIndex > 1 ? m.cumulants(1)[0] : null;
  return {
    w,
    atoms,
    at,
    excess(q) {
      if (mean === null || !Number.isFinite(mean)) return null;
      if (q >= b) {
        // beyond the window: S(y) <= S(b) there, over at most 8 spreads of a light tail (as shortfallLight assumes)
        const sb = Math.max(inside(b).S, 0) + e;
        return { value: 0, error: sb * 8 * shape.spread };
      }
      // below the window: E[(X - q)^+] = E[(X - a)^+] + (a - q) - int_q^a F, the last within (a - q) F(a)
      const qq = Math.max(q, a);
      const r = shortfallLight(sol, atoms, wc, qq, 0, e, 0, shape.spread);
      const fa = q < a ? Math.max(inside(a).F, 0) + e : 0;
      return { value: r.value - qq + (qq - q), error: r.error + (qq - q) * fa };
    },
    terms: () => sol.nodes.K,
    notes: () => out.notes,
    method: "gil-pelaez",
  };
}

/** A first range [lo, R] for a damped component: R past the mean by 6 sd, and by the power tail's level asked for. */
function firstRange(m: CompiledModel, tail: number): number {
  const lo = m.support[0];
  const k = m.cumulants(2);
  const mean = k[0];
  const sd = k[1] !== null && k[1] >= 0 ? Math.sqrt(k[1]) : null;
  let R = mean !== null && sd !== null && Number.isFinite(mean) ? mean + 8 * sd : m.location + 8 * m.scale;
  if (Number.isFinite(m.tails.right)) R = Math.max(R, lo + (m.location - lo + m.scale) * Math.pow(2 / tail, 1 / Math.max(m.tails.right, 0.1)));
  return R > lo ? R : lo + Math.max(m.scale, 1e-300);
}

function components(leaves: { w: number; m: CompiledModel }[], tol: number, tail: number): Component[] | null {
  const out: Component[] = [];
  for (const { w, m } of leaves) {
    checkDeadline("mixture-components");
    if (m.direct) out.push(directComponent(w, m));
    else {
      const c = (dampable(m) ? dampedComponent(w, m, firstRange(m, tail), tol, tol / (4 * leaves.length)) : null) ?? lightComponent(w, m, tol);
      if (!c) return null;
      out.push(c);
    }
  }
  return out;
}

/** The mixture's atoms: the components' atoms weighted, equal points merged, sorted. */
function mixtureAtoms(cs: Component[]): Atom[] {
  return mergeAtoms(cs.flatMap((c) => c.atoms.map((a) => ({ x: a.x, p: c.w * a.p }))));
}

function mixtureLaw(model: CompiledModel, cs: Component[]): DirectLaw {
  return {
    method: "closed-form",
    support: model.support,
    center: model.location,
    spread: model.scale,
    notes: [],
    at(x: number, out: DirectPoint) {
      let F = 0;
      let S = 0;
      let f = 0;
      let eF = 0;
      let eS = 0;
      for (const c of cs) {
        const v = c.at(x);
        F += c.w * v.F;
        S += c.w * v.S;
        f += c.w * v.f;
        eF += c.w * v.eF;
        eS += c.w * v.eS;
      }
      const round = 4 * Number.EPSILON * cs.length;
      out.pdf = f;
      out.cdf = Math.min(Math.max(F, 0), 1);
      out.sf = Math.min(Math.max(S, 0), 1);
      out.pdfErr = Infinity;
      out.cdfErr = eF + round * Math.max(F, 1e-300);
      out.sfErr = eS + round * Math.max(S, 1e-300);
    },
  };
}

function methodsNote(cs: Component[]): string {
  const counts = new Map<string, number>();
  for (const c of cs) counts.set(c.method, (counts.get(c.method) ?? 0) + 1);
  return `mixture answered from its ${cs.length} components (${[...counts].map(([k, n]) => `${n} by ${k}`).join(", ")})`;
}

/**
 * q_p = min{x : F(x) >= p}: when F is within its bound of p a little left of the root found (a flat stretch, e.g.
 * between separated components), the answer moves to the stretch's left end y = min{y : F(y) + e(y) >= p}; the
 * quantile then lies in [y, x + err], and that width is the error.
 */
function leftEnd(law: DirectLaw, r: { x: number; err: number }, p: number, spread: number, pt: DirectPoint): { x: number; err: number; flat: boolean } {
  if (!Number.isFinite(r.x) || !Number.isFinite(r.err) || p <= 0 || p >= 1) return { ...r, flat: false };
  const up = (y: number) => {
    law.at(y, pt);
    return pt.cdf + pt.cdfErr >= p;
  };
  law.at(r.x, pt);
  const dx = Math.min(Math.max(1e-7 * Math.max(Math.abs(r.x), spread), pt.pdf > 0 ? (8 * pt.cdfErr) / pt.pdf : Infinity), 0.01 * spread);
  if (!(dx > 0) || !up(r.x - dx)) return { ...r, flat: false };
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

/** Quantiles and expected shortfall of a mixture from its components; null when a component has no route here. */
export function mixtureQuantiles(model: CompiledModel, p: Float64Array, o: QuantileOptions): QuantileResult | null {
  const leaves = mixtureLeaves(model);
  if (!leaves) return null;
  const tol = o.tolerance ?? 1e-10;
  let tail = 0.5;
  for (let i = 0; i < p.length; i++) if (p[i] > 0 && p[i] < 1) tail = Math.min(tail, 1 - p[i]);
  const cs = components(leaves, tol, tail);
  if (!cs) return null;
  const law = mixtureLaw(model, cs);
  const atoms = mixtureAtoms(cs);
  const pt = directPoint();
  const n = p.length;
  const x = new Float64Array(n);
  const err = new Float64Array(n);
  let cdfError = 0;
  let flat = false;
  for (let i = 0; i < n; i++) {
    checkDeadline("mixture-quantile");
    const pi = p[i];
    // a level inside an atom's jump: the atom, exactly (the jump's ends clear of the bounds)
    let hit = false;
    for (const a of atoms) {
      law.at(a.x, pt);
      if (pt.cdf - a.p + pt.cdfErr < pi && pi <= pt.cdf - pt.cdfErr) {
        x[i] = a.x;
        err[i] = 0;
        cdfError = Math.max(cdfError, pt.cdfErr);
        hit = true;
        break;
      }
    }
    if (hit) continue;
    const r = leftEnd(law, directQuantile(law, pi), pi, model.scale, pt);
    if (r.flat) flat = true;
    x[i] = r.x;
    err[i] = r.err;
    if (Number.isFinite(r.x)) {
      law.at(r.x, pt);
      cdfError = Math.max(cdfError, pt.cdfErr, pt.sfErr);
    }
  }
  const notes = [methodsNote(cs)];
  if (flat) notes.push("a level falls on a flat stretch of the cdf: the left end is returned, the error spans the stretch");
  let es: Float64Array | undefined;
  let esErr: Float64Array | undefined;
  if (o.expectedShortfall) {
    es = new Float64Array(n).fill(NaN);
    esErr = new Float64Array(n).fill(Infinity);
    let exists = true;
    for (let i = 0; i < n; i++) {
      const q = x[i];
      if (!Number.isFinite(q)) continue;
      if (p[i] >= 1) {
        es[i] = q;
        esErr[i] = err[i];
        continue;
      }
      let value = 0;
      let error = 0;
      for (const c of cs) {
        const r = c.excess(q);
        if (!r) {
          exists = false;
          break;
        }
        value += c.w * r.value;
        error += c.w * r.error;
      }
      if (!exists) break;
      law.at(q, pt);
      const w = 1 - p[i];
      es[i] = q + value / w;
      // ES(q') - ES(q*) = int_{q*}^{q'} (S(q*) - S(y)) dy / (1 - p): at most (|S(q) - (1 - p)| + e + f dq) dq / (1 - p)
      const dq = err[i];
      const slope = Math.abs(pt.sf - w) + pt.sfErr + 2 * Math.max(pt.pdf, 0) * dq;
      esErr[i] = (error + slope * dq) / w + 4 * Number.EPSILON * Math.abs(es[i]);
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
  const parts = leaves.map(({ w, m }) => {
    checkDeadline("mixture-density");
    return { w, r: one(m, { ...options, out: undefined }) };
  });
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
  e.cdf += round;
  e.pdf += round * (pdf ? Math.max(...pdf.map(Math.abs)) : 0);
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
    },
  };
}
