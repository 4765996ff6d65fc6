import { CfError } from "../errors";
import { directDensity } from "../direct/answer";
import { MAX_GRID_POINTS } from "../limits";
import type { Atom, CompiledModel, LatticeTable } from "../types";
import { invertContinuous, type PartOutput, type Request } from "./continuous";
import { latticeCumulative, solveLattice, type LatticeSolution } from "./lattice";
import { dampable } from "./damped";
import { dampedDensity } from "./density-damped";
import { mixtureDensity } from "./mixture";
import { bulkWindow, lawShape } from "./range";
import { atomMass } from "./shared";
import { lightPointErrors } from "./light-images";
import { tableEntryErrors } from "./lattice-points";
import { pointErrOf } from "../table-rounding";
import type { DensityOptions, DensityResult, InversionDiagnostics, PointErrors } from "./types";

export const DEFAULT_TOLERANCE = 1e-10;
/** power tails converge only algebraically in the period, so their default target is looser */
export const DEFAULT_TOLERANCE_HEAVY = 1e-8;
const AUTO_GRID_POINTS = 1024;

/**
 * Distribution of a compiled model at points or on a grid: density of the continuous part (or pmf on a
 * lattice), cdf and sf, with atoms separated. Methods: "fft" (grid sums by fft.js), "gil-pelaez"
 * (pointwise mid-point sums), "auto" (fft for grids of 32+ points, pointwise otherwise).
 * Throws CfError("not_applicable") for a density of a law without one, CfError("limit_exceeded") for grids
 * above MAX_GRID_POINTS, CfError("invalid_model") for malformed requests (pointer into the options).
 */
/** the damped route's looser targets where the requested one is out of its budget: tolerance x 100, 10^4, 10^6 */
const DAMPED_RELAX = 100;
const DAMPED_RELAX_STEPS = 3;

export function density(model: CompiledModel, options: DensityOptions = {}): DensityResult {
  const r = densityOf(model, options);
  const heavyTails = Number.isFinite(Math.min(model.tails.left, model.tails.right));
  const damped = r.diagnostics.method === "fft-damped" || r.diagnostics.method === "gil-pelaez-damped";
  return withTolerance(r, options.tolerance ?? (heavyTails && !damped ? DEFAULT_TOLERANCE_HEAVY : DEFAULT_TOLERANCE));
}

/**
 * The target the answer was computed to and whether its bounds meet it (DensityDiagnostics.tolerance); where they do not,
 * a note says so plainly, with the bounds reached and the part of the budget that kept them there.
 */
function withTolerance(r: DensityResult, target: number): DensityResult {
  const d = r.diagnostics;
  const e = d.error;
  const pdfE = r.pdf || r.pmf ? e.pdf : NaN;
  const met = e.cdf <= target && !(pdfE > target);
  d.tolerance = { target, met };
  if (met || d.notes.some((n) => n.startsWith("tolerance "))) return r;
  const damped = d.method === "fft-damped" || d.method === "gil-pelaez-damped";
  const parts: [number, string][] = [
    [
      e.aliasing,
      damped
        ? "the aliasing of the damped law over its period (the damping is limited by the farthest point, since the sums' errors grow by e^{beta (x - lo)}, and the period by the route's frequency budget)"
        : "the aliasing left in the periodised law (power tails shrink only algebraically with the period; the period doublings stop where the next one could not lower the bound)",
    ],
    [e.truncation, "the frequency cut-off (the characteristic function decays slowly)"],
    [e.rounding, "floating-point rounding in the sums (cancellation; a tighter target is not attainable in double precision here)"],
  ];
  parts.sort((u, v) => v[0] - u[0]);
  const why = parts[0][0] > 0 ? `; the largest part of the bound is ${parts[0][1]}` : "";
  d.notes.push(`tolerance ${target} not reached: cdf bound ${e.cdf.toExponential(2)}${pdfE > 0 ? `, density bound ${pdfE.toExponential(2)}` : ""}${why}`);
  return r;
}

/** the cdf and sf (values and bounds) of a second damped solution without the density, where its bound is smaller */
function withCdfOf(r: DensityResult, c: DensityResult | null) {
  const d = r.diagnostics;
  if (!c || !(c.diagnostics.error.cdf < d.error.cdf) || c.cdf.length !== r.cdf.length) return;
  r.cdf.set(c.cdf);
  r.sf.set(c.sf);
  if (d.pointError && c.diagnostics.pointError) {
    d.pointError.cdf = c.diagnostics.pointError.cdf;
    d.pointError.sf = c.diagnostics.pointError.sf;
  }
  // the parts of the bound (aliasing, truncation, rounding) are the cdf's, so the second solution's
  d.error = { ...c.diagnostics.error, pdf: d.error.pdf };
  d.notes.push(
    `cdf and sf from a second damped solution without the density (${c.diagnostics.terms} frequency terms), which reaches a cdf bound of ${c.diagnostics.error.cdf.toExponential(2)}`,
  );
}

function densityOf(model: CompiledModel, options: DensityOptions): DensityResult {
  const heavyTails = Number.isFinite(Math.min(model.tails.left, model.tails.right));
  const tol = options.tolerance ?? (heavyTails ? DEFAULT_TOLERANCE_HEAVY : DEFAULT_TOLERANCE);
  if (!(tol > 0 && Number.isFinite(tol))) throw new CfError("invalid_model", "/tolerance", "tolerance must be a positive finite number");
  if (options.x && options.grid) throw new CfError("invalid_model", "/x", "give either points x or a grid, not both");
  const kind = model.kind;
  if (kind.type === "lattice") return latticeResult(model, kind.origin, kind.step, options, tol);
  if (kind.type === "discrete") {
    if (!kind.atoms) {
      throw new CfError("not_applicable", "", "this law is discrete without a common lattice and too many atoms to list; it has no density and its cdf cannot be inverted here");
    }
    return atomsOnly(kind.atoms, options);
  }
  const atoms: Atom[] = kind.type === "mixed" ? [...kind.atoms].sort((p, q) => p.x - q.x) : [];
  const req = buildRequest(model, options, atoms, tol);
  // a single named law (or scaled / shifted) with a direct evaluation answers without inversion unless the request
  // asks for a specific inversion (method, range or frequency cut-off)
  if (model.direct && (options.method ?? "auto") === "auto" && !options.range && options.maxFrequency === undefined) {
    return directDensity(model.direct, req.kind === "points" ? req.x : gridX(req.from, req.dx, req.count), model.notes, options.out);
  }
  // a mixture (possibly scaled or shifted) answers from its components, each by its own route
  if (model.components && (options.method ?? "auto") === "auto" && !options.range && options.maxFrequency === undefined) {
    const at: DensityOptions =
      req.kind === "points"
        ? { ...options, grid: undefined, x: req.x }
        : { ...options, x: undefined, grid: { from: req.from, to: req.from + req.dx * (req.count - 1), count: req.count } };
    const r = mixtureDensity(model, at, density);
    if (r) return r;
  }
  const method = pickMethod(options, req);
  const wantPdf = !options.cdfOnly;
  const w = 1 - atoms.reduce((s, a) => s + a.p, 0);
  let out: PartOutput;
  if (w <= 1e-14) {
    return atomsOnly(atoms, options);
  }
  // aggregate laws bounded below: damped inversion (no long period for heavy or subexponential tails)
  if (dampable(model) && !options.range && options.maxFrequency === undefined) {
    const t0 = options.tolerance ?? DEFAULT_TOLERANCE;
    let r = dampedDensity(model, atoms, req, t0, wantPdf, method === "fft");
    // where no damped plan reaches the tolerance within the route's budget (a lognormal sigma 2.5 compound far out), the
    // same route at a looser target still answers with derived bounds, reported against the request's tolerance
    // (density() says it was not met): the general route would need a period holding the whole slowly decaying law
    for (let k = 1; !r && k <= DAMPED_RELAX_STEPS; k++) {
      const looser = t0 * DAMPED_RELAX ** k;
      r = dampedDensity(model, atoms, req, looser, wantPdf, method === "fft");
      if (r) {
        r.diagnostics.notes.push(`no damped plan reaches ${t0} within the route's frequency budget at these points; solved to ${looser} instead`);
        // the density's truncation is what needs the terms: the cdf and sf alone may still reach the target
        for (let j = 0; wantPdf && j < k; j++) {
          const c = dampedDensity(model, atoms, req, t0 * DAMPED_RELAX ** j, false, method === "fft");
          if (c) {
            withCdfOf(r, c);
            break;
          }
        }
      }
    }
    if (r) return r;
  }
  out = invertContinuous(model, atoms, req, {
    method,
    tolerance: tol / w,
    wantPdf,
    range: options.range,
    maxFrequency: options.maxFrequency,
  });
  const xs = req.kind === "points" ? req.x : gridX(req.from, req.dx, req.count);
  const n = xs.length;
  const buf = options.out ?? {};
  const fits = (b: Float64Array | undefined): b is Float64Array => !!b && b.length === n;
  const cdf = fits(buf.cdf) ? buf.cdf : new Float64Array(n);
  const sf = fits(buf.sf) ? buf.sf : new Float64Array(n);
  const pdf = out.pdf ? (fits(buf.pdf) ? buf.pdf : new Float64Array(n)) : undefined;
  // outside the known support the values are exact; inside, moving a value into [0, 1] (density >= 0) can only
  // bring it closer to the truth, so the bounds below still hold
  const [slo, shi] = model.support;
  for (let i = 0; i < n; i++) {
    const { below, above } = atomMass(atoms, xs[i]);
    if (xs[i] < slo || xs[i] > shi) {
      cdf[i] = xs[i] < slo ? 0 : 1;
      sf[i] = xs[i] < slo ? 1 : 0;
      if (pdf) pdf[i] = 0;
      continue;
    }
    cdf[i] = Math.min(1, Math.max(0, below + w * out.cdf[i]));
    sf[i] = Math.min(1, Math.max(0, above + w * out.sf[i]));
    if (pdf) pdf[i] = Math.max(0, w * out.pdf![i]);
  }
  const e = out.error;
  const diagnostics: InversionDiagnostics = {
    method: out.method,
    gridSize: out.gridSize,
    terms: out.terms,
    frequencyStep: out.h,
    maxFrequency: out.maxFrequency,
    range: { from: out.window.a, to: out.window.b },
    capturedMass: atoms.reduce((s, a) => s + a.p, 0) + w * out.captured,
    error: {
      aliasing: w * e.aliasing,
      truncation: w * e.truncation,
      rounding: w * e.rounding + 4 * Number.EPSILON,
      pdf: wantPdf ? w * e.pdf : NaN,
      cdf: w * e.cdf + 4 * Number.EPSILON,
    },
    levels: out.levels,
    notes: [...out.notes, ...model.notes],
  };
  // the light route's pointwise sums bound each point's cdf and sf on its own (./light-images.ts); the density keeps
  // the whole answer's bound
  if (out.method === "gil-pelaez" && out.solution && !lawShape(model).heavy) {
    const pc = lightPointErrors(model, out.solution, w, xs, diagnostics.error.cdf, out.beyond);
    if (pc) diagnostics.pointError = { pdf: new Float64Array(n).fill(wantPdf ? diagnostics.error.pdf : NaN), cdf: pc, sf: Float64Array.from(pc) };
  }
  return { x: Float64Array.from(xs), pdf, cdf, sf, atoms, diagnostics };
}

function pickMethod(options: DensityOptions, req: Request): "fft" | "gil-pelaez" {
  const m = options.method ?? "auto";
  if (m === "fft") {
    if (req.kind !== "grid") throw new CfError("not_applicable", "/method", "the fft method needs a uniform grid; use gil-pelaez or auto for arbitrary points");
    return "fft";
  }
  if (m === "gil-pelaez") return "gil-pelaez";
  return req.kind === "grid" && req.count >= 32 ? "fft" : "gil-pelaez";
}

function buildRequest(model: CompiledModel, o: DensityOptions, atoms: Atom[], tol: number): Request {
  if (o.x) {
    const x = Float64Array.from(o.x as ArrayLike<number>);
    if (x.length > MAX_GRID_POINTS) throw new CfError("limit_exceeded", "/x", `at most ${MAX_GRID_POINTS} points per request`);
    for (let i = 0; i < x.length; i++) {
      if (!Number.isFinite(x[i])) throw new CfError("invalid_model", `/x/${i}`, "every point must be a finite number");
    }
    return { kind: "points", x };
  }
  if (o.grid) {
    const { from, to, count } = o.grid;
    if (!Number.isInteger(count) || count < 1) throw new CfError("invalid_model", "/grid/count", "count must be a positive integer");
    if (count > MAX_GRID_POINTS) throw new CfError("limit_exceeded", "/grid/count", `at most ${MAX_GRID_POINTS} grid points`);
    if (!Number.isFinite(from) || !Number.isFinite(to)) throw new CfError("invalid_model", "/grid", "grid ends must be finite numbers");
    if (count > 1 && !(to > from)) throw new CfError("invalid_model", "/grid/to", "grid end must be above its start");
    const dx = count > 1 ? (to - from) / (count - 1) : 1;
    if (count === 1) return { kind: "points", x: new Float64Array([from]) };
    return { kind: "grid", from, dx, count };
  }
  const g = autoGrid(model, atoms, tol);
  return { kind: "grid", from: g.from, dx: (g.to - g.from) / (g.count - 1), count: g.count };
}

/** Grid covering the bulk (tail mass about 1e-8 each side for light tails; location +- 10 scales for heavy). */
export function autoGrid(model: CompiledModel, atoms: Atom[], _tol: number): { from: number; to: number; count: number } {
  let { from, to } = bulkWindow(lawShape(model), 1e-8, 10);
  for (const a of atoms) {
    from = Math.min(from, a.x);
    to = Math.max(to, a.x);
  }
  if (!(to > from)) to = from + 1;
  return { from, to, count: AUTO_GRID_POINTS };
}

function gridX(from: number, dx: number, count: number): Float64Array {
  const x = new Float64Array(count);
  for (let i = 0; i < count; i++) x[i] = from + i * dx;
  return x;
}

function pointsOf(options: DensityOptions, fallback: Float64Array): Float64Array {
  if (options.x) return Float64Array.from(options.x as ArrayLike<number>);
  if (options.grid) {
    const { from, to, count } = options.grid;
    if (!Number.isInteger(count) || count < 1) throw new CfError("invalid_model", "/grid/count", "count must be a positive integer");
    if (count > MAX_GRID_POINTS) throw new CfError("limit_exceeded", "/grid/count", `at most ${MAX_GRID_POINTS} grid points`);
    return count === 1 ? new Float64Array([from]) : gridX(from, (to - from) / (count - 1), count);
  }
  return fallback;
}

function atomsOnly(atomsIn: Atom[], options: DensityOptions): DensityResult {
  const atoms = [...atomsIn].sort((p, q) => p.x - q.x);
  const xs = pointsOf(options, Float64Array.from(atoms.map((a) => a.x)));
  const n = xs.length;
  const pmf = new Float64Array(n);
  const cdf = new Float64Array(n);
  const sf = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const { below, above } = atomMass(atoms, xs[i]);
    // sums of the atoms' masses may round past 1 (a sample's masses w_i / sum w): the true values lie in [0, 1]
    cdf[i] = Math.min(1, below);
    sf[i] = Math.min(1, above);
    for (const a of atoms) if (a.x === xs[i]) pmf[i] += a.p;
  }
  const err = 4 * Number.EPSILON * Math.max(1, atoms.length);
  return {
    x: xs,
    pmf,
    cdf,
    sf,
    atoms,
    diagnostics: {
      method: "atoms",
      gridSize: atoms.length,
      terms: 0,
      frequencyStep: NaN,
      maxFrequency: NaN,
      range: { from: atoms.length ? atoms[0].x : NaN, to: atoms.length ? atoms[atoms.length - 1].x : NaN },
      capturedMass: atoms.reduce((s, a) => s + a.p, 0),
      error: { aliasing: 0, truncation: 0, rounding: err, pdf: err, cdf: err },
      levels: 1,
      notes: ["purely atomic law: pmf at the atoms, step-function cdf"],
    },
  };
}

/**
 * Per-point bounds of a table built by a recursion (t.pointRel): the pmf at k within pointRel(k) p_k, the cdf, a Kahan sum
 * of the p_j up to k (each within pointRel(j) <= pointRel(k) relative), within (pointRel(k) + 2 eps) F(k) (Higham, sec.
 * 4.3: Kahan's sum is within 2u + O(n u^2) of the sum of |terms|); past the table the pmf is answered 0, within the
 * table's bound on p_k there (t.beyond); the cdf past the table and the sf (which carry the dropped tail) keep the whole
 * table's bound, as does any point whose own bound would exceed it.
 */
function tablePointErrors(t: LatticeTable, xs: Float64Array, pmf: Float64Array, cdf: Float64Array, sol: LatticeSolution): PointErrors {
  const n = xs.length;
  const rel = t.pointRel!;
  const out = { pdf: new Float64Array(n).fill(sol.errorPmf), cdf: new Float64Array(n).fill(sol.errorCdf), sf: new Float64Array(n).fill(sol.errorCdf) };
  for (let i = 0; i < n; i++) {
    const u = (xs[i] - t.origin) / t.step;
    const k = Math.floor(u + 1e-9);
    // a recursion's table starts at the law's first point: below it the pmf and cdf are exactly 0
    if (k < 0) {
      out.pdf[i] = out.cdf[i] = 0;
      continue;
    }
    const onLattice = Math.abs(u - Math.round(u)) <= 1e-9 * Math.max(1, Math.abs(u));
    if (k >= t.p.length) {
      // answered 0 past the table: the error is the pmf itself
      if (t.beyond) out.pdf[i] = Math.min(sol.errorPmf, onLattice ? t.beyond(Math.round(u)) : 0);
      continue;
    }
    const r = rel(k);
    out.pdf[i] = Math.min(sol.errorPmf, onLattice ? r * pmf[i] : 0);
    out.cdf[i] = Math.min(sol.errorCdf, (r + 2 * Number.EPSILON) * cdf[i]);
  }
  return out;
}

function latticeResult(model: CompiledModel, origin: number, step: number, options: DensityOptions, tol: number): DensityResult {
  if (!(step > 0) || !Number.isFinite(origin)) throw new CfError("not_applicable", "", "lattice law with an invalid step");
  const sol = solveLattice(model, origin, step, tol);
  const t = sol.table;
  const { cdf: C, sf: S0 } = latticeCumulative(t.p);
  const S = S0;
  // the dropped mass may lie past any point (a reversed table's lies below every point: tailBelow, its sf misses none)
  const above = sol.method !== "lattice-fft" && !t.tailBelow ? t.tailMass : 0;
  if (above > 0) for (let i = 0; i < S.length; i++) S[i] += above;
  const n0 = t.p.length;
  let xs: Float64Array;
  let pmf: Float64Array;
  let cdf: Float64Array;
  let sf: Float64Array;
  if (!options.x && !options.grid) {
    // the table itself, trimmed of negligible ends
    let i0 = 0;
    let i1 = n0 - 1;
    // only cells that are empty (an exact table) or whose mass underflows are trimmed; the rest are answered
    const cut = sol.errorPmf > 0 ? 1e-300 : 0;
    const [slo, shi] = model.support;
    while (i0 < i1 && (t.p[i0] <= cut || t.origin + i0 * t.step < slo - 1e-9 * t.step)) i0++;
    while (i1 > i0 && (t.p[i1] <= cut || t.origin + i1 * t.step > shi + 1e-9 * t.step)) i1--;
    const n = i1 - i0 + 1;
    xs = new Float64Array(n);
    pmf = new Float64Array(n);
    cdf = new Float64Array(n);
    sf = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      xs[i] = t.origin + (i0 + i) * t.step;
      pmf[i] = Math.max(t.p[i0 + i], 0);
      cdf[i] = Math.min(1, C[i0 + i]);
      sf[i] = Math.min(1, S[i0 + i]);
    }
  } else {
    xs = pointsOf(options, new Float64Array(0));
    const n = xs.length;
    pmf = new Float64Array(n);
    cdf = new Float64Array(n);
    sf = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(xs[i])) throw new CfError("invalid_model", `/x/${i}`, "every point must be a finite number");
      const u = (xs[i] - t.origin) / t.step;
      const k = Math.floor(u + 1e-9);
      const onLattice = Math.abs(u - Math.round(u)) <= 1e-9 * Math.max(1, Math.abs(u));
      if (k < 0) {
        cdf[i] = 0;
        sf[i] = 1;
      } else if (k >= n0) {
        cdf[i] = 1 - above;
        sf[i] = above;
      } else {
        cdf[i] = Math.min(1, C[k]);
        sf[i] = Math.min(1, S[k]);
        if (onLattice) pmf[i] = Math.max(t.p[Math.round(u)], 0);
      }
    }
  }
  // per point: a recursion's relative bounds, else the entries' own bounds where the table carries them (./lattice-points.ts)
  const pe = sol.method === "lattice-table" ? pointErrOf(t) : null;
  const pointError =
    sol.method === "lattice-table" && t.pointRel && t.origin === 0 ? tablePointErrors(t, xs, pmf, cdf, sol) : pe ? tableEntryErrors(t, pe, xs, cdf, sf, sol) : undefined;
  return {
    x: xs,
    pmf,
    cdf,
    sf,
    atoms: [],
    diagnostics: {
      ...(pointError ? { pointError } : {}),
      method: sol.method,
      gridSize: sol.gridSize,
      terms: sol.method === "lattice-fft" ? sol.gridSize : 0,
      frequencyStep: (2 * Math.PI) / (sol.gridSize * step),
      maxFrequency: Math.PI / step,
      range: { from: t.origin, to: t.origin + (n0 - 1) * t.step },
      capturedMass: 1 - t.tailMass,
      error: { aliasing: sol.method === "lattice-fft" ? sol.errorPmf : 0, truncation: sol.method !== "lattice-fft" ? t.tailMass : 0, rounding: 8 * Number.EPSILON, pdf: sol.errorPmf, cdf: sol.errorCdf },
      levels: 1,
      notes: [...sol.notes, ...model.notes],
    },
  };
}
