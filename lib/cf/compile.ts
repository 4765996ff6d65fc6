import type { FamilyModel, Model } from "./schema";
import { FAMILY_SPECS, type FamilyParams } from "./families/spec";
import { affineDirect } from "./direct/affine";
import { affineDist } from "./families/dist";
import type { CompiledModel, LatticeTable } from "./types";
import type { Node } from "./node";
import { validateModel } from "./validate";
import { toLawKind } from "./kinds";
import { MAX_LATTICE } from "./limits";
import { layerNode, type LayerTerms } from "./layer";
import { claimMode, layerContinuousMajorant } from "./layer-majorant";
import { densityDisc } from "./families/layer-analytic";
import { compoundMajorant } from "./compound-majorant";
import { studentTLogCfError } from "./families/student-t";
import { MONOTONE_ABS_CF, mixMajorant, repeatMajorant, scaleMajorant, scaledMajorant, selfMajorant, shiftMajorant, shiftedMajorant, sumMajorant, uniformMajorant } from "./majorant";
import { familyMajorant, monotoneExtras } from "./family-majorants";
import type { DiscretiseOptions } from "./discretise";
import { familyDampedMajorant } from "./damped-majorant";
import { compoundNode, latticeNode, mixNode, repeatNode, sampleNode, scaleNode, shiftNode, sumNode } from "./operators";
import { cumulantEst, withCumulantErrors } from "./cumulant-bounds";
import { latticeE, sampleE } from "./cumulant-ops";
import { foldStableSum } from "./stable-fold";
import { latticeSumDirect, MAX_LATTICE_SUM_TERMS, trimTable } from "./direct/lattice-sum";
import type { DirectLaw } from "./direct/types";
import { convolveRelTables, convolveTables } from "./lattice";
import { roundOf } from "./table-rounding";
import { twoSumErr } from "./moment-error";
import { cumulantAbsMoment, familyAbsMoment } from "./abs-moment";

/** Options of compile(). */
export interface CompileOptions {
  /**
   * Severities without a cheap CF (lognormal, pareto, weibull, lomax, burr, ...) inside compounds are discretised onto
   * a lattice (mean-preserving) when this object is given; it sets the target cdf error or the span. false: never.
   * Absent: compounds of lognormal, pareto, weibull, lomax, burr and log-logistic severities stay continuous (atom at
   * 0, damped inversion; where the severity's density jumps or has a power at its lower end, gamma kernels matching
   * that endpoint are taken out of the transform); the other such severities (inverse gamma) are discretised and
   * labelled so.
   */
  discretise?: DiscretiseOptions | false;
  /**
   * Compounds of per-claim layered claims: "continuous" (default) keeps the aggregate law continuous with its atoms at
   * multiples of the limit listed; "bracket" rounds every claim down and up onto a lattice (the two compounds bracket
   * the law, and hold its mean exactly). An explicit `discretise` object also brackets them.
   */
  layeredCompounds?: "continuous" | "bracket";
}

/** Build the node tree of a validated model. */
export function buildNode(m: Model, opts: CompileOptions = {}): Node {
  const buildNode_ = (x: Model) => buildNode(x, opts);
  if ("family" in m) {
    const node = FAMILY_SPECS[m.family].build(m);
    const direct = FAMILY_SPECS[m.family].direct?.(m as unknown as FamilyParams);
    if (direct) node.direct = direct;
    const params = m as unknown as Record<string, number>;
    if (MONOTONE_ABS_CF.has(m.family)) {
      const x = monotoneExtras(m.family, params);
      node.logMajorant = selfMajorant(node, x.q, x.slope);
    } else {
      const fm = familyMajorant(m.family, params);
      if (fm) node.logMajorant = fm;
    }
    const am = familyAbsMoment(m.family, params);
    if (am) node.absMomentAbout = am;
    // a law with a mean but no variance, bounded on one side (pareto, lomax, Burr, ... of tail index in (1, 2]): E|X - c|
    // from its mean and that end (cumulantAbsMoment), so a sum holding it bounds its own (../abs-moment.ts sumAbsMoment)
    else if (node.momentIndex > 1 && node.momentIndex <= 2 && (Number.isFinite(node.support[0]) || Number.isFinite(node.support[1])))
      node.absMomentAbout = (c) => cumulantAbsMoment(node, c);
    const dm = familyDampedMajorant(m.family, params, node);
    if (dm) node.dampedMajorant = dm;
    if (m.family === "student_t") {
      const p = m as unknown as { nu: number; scale?: number };
      node.logCfErr = studentTLogCfError(p.nu, p.scale ?? 1);
    }
    else if (m.family === "uniform") {
      const u = m as unknown as { a: number; b: number };
      node.logMajorant = uniformMajorant(u.a, u.b);
    }
    return node;
  }
  if ("sum" in m) {
    const cs = m.sum.map(buildNode_);
    // a term that is one point c (its support [c, c]: a point law, a compound whose count is 0) only moves the rest: the sum
    // is the rest shifted by c, which keeps the rest's own routes (a direct law, its tail term); where several such terms
    // add up, only when they sum exactly (all at 0, or one of them), so no rounding of the shift enters
    const isFixed = (c: Node) => c.support[0] === c.support[1] && Number.isFinite(c.support[0]);
    const fixed = cs.filter(isFixed);
    if (fixed.length > 0 && fixed.length < cs.length && (fixed.length === 1 || fixed.every((c) => c.support[0] === 0))) {
      // the nodes already built, not built again
      const rest = sumOf(cs.filter((c) => !isFixed(c)), m.sum.filter((_, j) => !isFixed(cs[j])));
      const at = fixed.length === 1 ? fixed[0].support[0] : 0;
      return at === 0 ? rest : shifted(at, rest);
    }
    return sumOf(cs, m.sum);
  }
  if ("scale" in m) return scaled(m.scale, buildNode_(m.of));
  if ("shift" in m) return shifted(m.shift, buildNode_(m.of));
  return operatorNode(m, buildNode_, opts);
}

/** The independent sum of built terms (their models for the stable fold): one term is itself. */
function sumOf(cs: Node[], terms: Model[]): Node {
  const node = sumNode(cs);
  if (cs.length > 1) {
    node.logMajorant = sumMajorant(cs);
    node.logCfErr = sumErr(cs.map((c) => c.logCfErr));
    // stable terms of one alpha: pdf, cdf and quantiles from the one stable law they add up to
    const folded = foldStableSum(terms);
    if (folded) node.direct = folded;
    else {
      // one continuous term with a direct law plus lattice terms with a short table: summed over the lattice points
      const withLattice = latticeSumOf(cs);
      if (withLattice) node.direct = withLattice;
    }
  }
  return node;
}

/**
 * X + K1 + ... for one continuous term X with a direct law and lattice terms K_j whose (convolved) table has per-entry
 * bounds and at most MAX_LATTICE_SUM_TERMS points (./direct/lattice-sum.ts); null otherwise. The terms' spread is checked
 * from their variances before any table is built.
 */
/**
 * A table whose dropped mass is a bound: a recursion's (continued past the table), or 0 where the table reaches the law's
 * last point; any other (1 - sum, whose cancellation hides a mass below u) widened by that subtraction's error, the sum's
 * rounding and the entries' l1 bound (the law's mass is 1): 1 - sum p_exact <= 1 - s + l1 + 2u s + u (s summed again,
 * compensated), whatever the table's own tailMass says; placed from the table's tailFrom on, else anywhere (0).
 */
function withTrustedTail(t: LatticeTable, hi: number): LatticeTable {
  if (t.pointRel) return t;
  if (t.tailMass === 0 && t.origin + (t.p.length - 1) * t.step >= hi) return t;
  const r = roundOf(t);
  if (!r) return t;
  // 1 - sum again, the sum compensated (Neumaier: within 2u |s| + gamma_n^2 sum |p|, Higham sec. 4.3) and the
  // subtraction within u: the dropped mass is at most that plus the entries' l1 bound
  let s = 0;
  let c = 0;
  for (let k = 0; k < t.p.length; k++) {
    const v = Math.max(t.p[k], 0);
    const z = s + v;
    c += twoSumErr(s, v, z);
    s = z;
  }
  s += c;
  const u = Number.EPSILON / 2;
  const n = t.p.length + 2;
  const g2 = ((n * u) / (1 - n * u)) ** 2;
  const rest = Math.max(0, 1 - s) + (2 * u + g2) * s + u;
  // (that mass lies where the table says, else anywhere in its range: a compound's cut count misses claims inside it)
  return { ...t, tailMass: (rest + r.l1) * (1 + 4 * u), tailFrom: t.tailFrom ?? 0 };
}

function latticeSumOf(cs: Node[]): DirectLaw | null {
  const cont = cs.filter((c) => c.kind.type === "continuous");
  if (cont.length !== 1 || !cont[0].direct) return null;
  const lat = cs.filter((c) => c !== cont[0]);
  if (!lat.every((c) => c.kind.type === "lattice" && c.table && !c.approximate)) return null;
  let width = 0;
  for (const c of lat) {
    const step = (c.kind as { step: number }).step || 1;
    const v = c.cumulants(2)[1];
    const lo = c.support[0];
    const mean = c.cumulants(1)[0];
    if (v === null || mean === null || !Number.isFinite(v) || !Number.isFinite(lo) || !Number.isFinite(mean)) return null;
    width += (mean - lo + 40 * Math.sqrt(Math.max(v, 0))) / step;
  }
  if (!(width <= 2 * MAX_LATTICE_SUM_TERMS)) return null;
  const tabs: LatticeTable[] = [];
  for (const c of lat) {
    const t = c.table!(MAX_LATTICE_SUM_TERMS + 1);
    if (!t) return null;
    tabs.push(withTrustedTail(trimTable(t), c.support[1]));
  }
  // tables with per-entry relative bounds keep them through direct sums; others take the whole-table bounds
  let t: LatticeTable | null = tabs[0];
  for (let i = 1; i < tabs.length && t; i++) t = convolveRelTables(t, tabs[i], MAX_LATTICE_SUM_TERMS + 1);
  if (!t) t = convolveTables(tabs, MAX_LATTICE_SUM_TERMS + 1);
  return latticeSumDirect(cont[0].direct, t, lat.reduce((s, c) => s + c.support[0], 0));
}

/** a X: the direct evaluation and a mixture's components follow the scale */
function scaled(a: number, child: Node): Node {
  const node = scaleNode(a, child);
  node.logMajorant = scaleMajorant(a, child);
  // the continuous part's majorant follows, its atoms moved as ./kinds.ts scaleKind moves the node's (the inversion takes it only for exactly those atoms)
  const cm = child.continuousMajorant;
  const cmMaj = cm && scaledMajorant(a, cm.maj);
  if (cm && cmMaj) node.continuousMajorant = { atoms: cm.atoms.map((x) => ({ x: a * x.x, p: x.p })), maj: cmMaj };
  const ce = child.logCfErr;
  if (ce) node.logCfErr = (t) => ce(Math.abs(a) * t);
  if (!(a !== 0 && Number.isFinite(a))) return node;
  if (child.direct) node.direct = affineDirect(child.direct, a, 0);
  if (child.dist && a > 0) node.dist = affineDist(child.dist, a, 0);
  if (child.mixParts) node.mixParts = { weights: child.mixParts.weights, parts: child.mixParts.parts.map((c) => scaled(a, c)) };
  return node;
}

/** X + b: the direct evaluation and a mixture's components follow the shift */
function shifted(b: number, child: Node): Node {
  const node = shiftNode(b, child);
  node.logMajorant = shiftMajorant(b, child);
  // the continuous part's majorant follows, its atoms moved as ./kinds.ts shiftKind moves the node's (the inversion takes it only for exactly those atoms)
  const cm = child.continuousMajorant;
  if (cm) node.continuousMajorant = { atoms: cm.atoms.map((x) => ({ x: x.x + b, p: x.p })), maj: shiftedMajorant(b, cm.maj) };
  node.logCfErr = child.logCfErr;
  if (!Number.isFinite(b)) return node;
  if (child.direct) node.direct = affineDirect(child.direct, 1, b);
  if (child.dist) node.dist = affineDist(child.dist, 1, b);
  if (child.mixParts) node.mixParts = { weights: child.mixParts.weights, parts: child.mixParts.parts.map((c) => shifted(b, c)) };
  return node;
}


function operatorNode(mIn: Model, buildNode_: (x: Model) => Node, opts: CompileOptions): Node {
  const m = mIn as Exclude<Model, FamilyModel>;
  if ("layer" in m) return withLayerMajorant(m.of, m.layer, buildNode_(m.of));
  if ("repeat" in m) {
    const child = buildNode_(m.of);
    const node = repeatNode(m.repeat, child);
    node.logMajorant = repeatMajorant(m.repeat, child);
    const ce = child.logCfErr;
    if (ce) node.logCfErr = (t) => m.repeat * ce(t);
    return node;
  }
  if ("mix" in m) {
    const weights = m.mix.map((c) => c.weight);
    const parts = m.mix.map((c) => buildNode_(c.of));
    const node = mixNode(weights, parts);
    node.logMajorant = mixMajorant(weights, parts);
    // |sum w_j phi_j (1 + e_j)| against |sum w_j phi_j|: bounded by max e_j only where the parts do not cancel
    node.logCfErr = sumErr(parts.map((c) => c.logCfErr));
    if (parts.length > 1) node.mixParts = { weights, parts };
    return node;
  }
  if ("compound" in m) {
    const count = buildNode_(m.compound.count);
    const sev = buildNode_(m.compound.each);
    const node = compoundNode(count, sev, opts.discretise === false ? null : (opts.discretise ?? { auto: true }), false, opts.layeredCompounds === "bracket");
    // log P(phi_X) moves with phi_X by at most the count's slope |P'/P| (|phi_X| <= 1)
    const se = sev.logCfErr;
    const slope = Math.max(1, count.cgfSlope ?? 1);
    if (se) node.logCfErr = (t) => slope * se(t);
    // a continuous severity with a derived majorant: the compound's continuous part (its atom at 0 taken out)
    if (sev.kind.type === "continuous" && sev.logMajorant && (node.kind.type === "continuous" || (node.kind.type === "mixed" && node.kind.atomsComplete && node.kind.atoms.every((a) => a.x === 0)))) {
      const cm = compoundMajorant(count, sev.logMajorant, node.kind.type === "mixed" ? node.kind.atoms : []);
      if (cm && cm.atoms.length === 0) node.logMajorant = cm.maj;
      else if (cm) node.continuousMajorant = cm;
    }
    return node;
  }
  if ("lattice" in m) return withCumulantErrors(latticeNode(m.lattice.origin, m.lattice.step, m.lattice.p), latticeE(m.lattice.origin, m.lattice.step, m.lattice.p));
  if ("sample" in m) return withCumulantErrors(sampleNode(m.sample, MAX_LATTICE, m.weights), sampleE(m.sample, m.weights));
  throw new Error("unreachable: validated model without a known node");
}

/** A per-claim layer of a family claim with a unimodal density: the derived majorant of its continuous part. */
function withLayerMajorant(of: Model, terms: Partial<LayerTerms>, X: Node): Node {
  const node = layerNode(X, terms, X.kind.type === "continuous" ? densityDisc(of) : null);
  if (!("family" in of) || !X.dist || !X.direct || node.kind.type !== "mixed") return node;
  const mode = claimMode(of.family, of as unknown as Record<string, number>);
  if (mode === null) return node;
  const cm = layerContinuousMajorant(X.dist, X.direct, mode, terms.deductible ?? 0, terms.limit ?? Infinity, terms.share ?? 1, node.kind.atoms ?? []);
  if (!cm) return node;
  if (cm.atoms.length === 0) node.logMajorant = cm.maj;
  else node.continuousMajorant = cm;
  return node;
}

const sumErr = (fs: (((t: number) => number) | undefined)[]) => {
  const gs = fs.filter((f): f is (t: number) => number => !!f);
  if (!gs.length) return undefined;
  return (t: number) => gs.reduce((acc, g) => acc + g(t), 0);
};

/** latticeTable returns null rather than a table whose dropped mass exceeds this. */
export const USEFUL_TAIL = 1e-11;

function checkBuffers(t: Float64Array, re: Float64Array, im: Float64Array) {
  if (re.length < t.length || im.length < t.length) throw new RangeError(`output buffers hold ${Math.min(re.length, im.length)} values, ${t.length} needed`);
}

/** Wrap an internal node as the public CompiledModel. */
export function toCompiled(node: Node): CompiledModel {
  const continuous = node.kind.type === "continuous";
  // the cumulant lists (and their bounds) per order count, computed once per model: they are pure in n, a compound's cost
  // O(n^3) with its bounds, and the plans ask again and again (a mixture of 8 compounds: 1 366 calls for the mean alone)
  const kappa = new Map<number, (number | null)[]>();
  const kappaErr = new Map<number, (number | null)[]>();
  const logCf = (t: Float64Array, re: Float64Array, im: Float64Array) => {
    checkBuffers(t, re, im);
    if (t.length === 0) return;
    let special = false;
    for (let k = 0; k < t.length; k++) if (!Number.isFinite(t[k])) special = true;
    if (!special) return node.logCf(t, re, im);
    // non-finite t: NaN stays NaN; +-Inf gives phi = 0 for laws with a density, undefined (NaN) otherwise
    const finite = t.filter((x) => Number.isFinite(x));
    const r = new Float64Array(finite.length);
    const i = new Float64Array(finite.length);
    node.logCf(finite, r, i);
    for (let k = 0, j = 0; k < t.length; k++) {
      if (Number.isFinite(t[k])) {
        re[k] = r[j];
        im[k] = i[j++];
      } else if (Number.isNaN(t[k]) || !continuous) {
        re[k] = NaN;
        im[k] = NaN;
      } else {
        re[k] = -Infinity;
        im[k] = 0;
      }
    }
  };
  const compiled: CompiledModel = {
    logCf,
    cf(t, re, im) {
      logCf(t, re, im);
      for (let k = 0; k < t.length; k++) {
        const m = Math.exp(re[k]);
        if (m === 0) {
          re[k] = 0;
          im[k] = 0;
        } else {
          const a = im[k];
          re[k] = m * Math.cos(a);
          im[k] = m * Math.sin(a);
        }
      }
    },
    kind: toLawKind(node.kind),
    momentIndex: node.momentIndex,
    cumulants: (n) => orders(kappa, n, (k) => node.cumulants(k)),
    cumulantErrors: (n) => orders(kappaErr, n, (k) => cumulantEst(node, k).map((v) => (v === null ? null : v.e))),
    location: node.location,
    scale: node.scale > 0 && Number.isFinite(node.scale) ? node.scale : 1,
    support: node.support,
    tails: node.tails,
    nodes: node.nodes,
    cfAbsError: node.cfAbsError ?? 0,
    cfRelError: node.cfRelError ?? 0,
    cfArgSlope: node.argSlope ?? 0,
    ...(node.argErrAt ? { cfArgErrAt: node.argErrAt } : {}),
    ...(node.argErrDampedAt ? { cfArgErrDampedAt: node.argErrDampedAt } : {}),
    ...(node.argErrDampedAt && node.argErrDampedOn ? { cfArgErrDampedOn: node.argErrDampedOn } : {}),
    ...(node.direct ? { direct: node.direct } : {}),
    ...(node.absMomentAbout ? { absMomentAbout: node.absMomentAbout } : {}),
    ...(node.tailTerm && continuous ? { tailTerm: node.tailTerm } : {}),
    ...(node.powerIndices && node.powerIndices.length > 1 ? { powerIndices: node.powerIndices } : {}),
    ...(node.bounds ? { bounds: node.bounds } : {}),
    ...(node.logMajorant ? { logAbsMajorant: node.logMajorant } : {}),
    ...(node.continuousMajorant ? { continuousMajorant: node.continuousMajorant } : {}),
    logCfUlps: 8 * Math.max(1, node.nodes),
    ...(node.logCfErr ? { logCfExtraError: node.logCfErr } : {}),
    ...(node.transformSeries?.length ? { transformSeries: node.transformSeries } : {}),
    ...(node.densityJumps?.length ? { densityJumps: node.densityJumps } : {}),
    ...(node.densityKinks?.length ? { densityKinks: node.densityKinks } : {}),
    ...(node.densityBends?.length ? { densityBends: node.densityBends } : {}),
    ...(node.mixParts ? { components: lazyComponents(node.mixParts) } : {}),
    // read on access: a discretised compound adds its error bound to its notes when its table is built
    get notes() {
      return node.kind.type === "mixed" && !node.kind.atomsComplete ? [...node.notes, "not every atom of this mixed law is listed"] : node.notes;
    },
  };
  const damped = node.dampedLogCf;
  // the damped inversion answers aggregate laws (a compound anywhere in the tree) and laws bounded below with a power
  // right tail: damping takes the place of the ever-longer periods of the power-tail route (pareto(3) + weibull(0.5):
  // 15 s and a density bound of 0.04 there, 0.2 s and 3e-9 damped). Light sums keep the undamped route, whose
  // truncation bounds are derived from the families' majorants (damped, sums of gammas or lognormals were slower)
  if (damped && (node.hasCompound || Number.isFinite(node.tails.right)) && Number.isFinite(node.support[0]) && (node.kind.type === "continuous" || node.kind.type === "mixed")) {
    compiled.dampedLogCf = (beta, t, re, im) => {
      checkBuffers(t, re, im);
      damped(beta, t, re, im);
    };
    if (node.dampedKernels && node.dampedKernels.cf === damped) compiled.dampedKernels = node.dampedKernels.kernels;
    if (node.dampedKernels && node.dampedKernels.cf === damped && node.dampedRemainder && node.dampedRemainder.cf === damped) {
      compiled.dampedRemainderBound = node.dampedRemainder.bound;
      compiled.dampedRemainderDecay = node.dampedRemainder.decay;
      if (node.dampedRemainder.jump) compiled.dampedRemainderJump = node.dampedRemainder.jump;
    }
    if (node.dampedSeverity && node.dampedSeverity.cf === damped) compiled.dampedSeverity = node.dampedSeverity.kernel;
    if (node.dampedMajorant && node.dampedMajorant.cf === damped) compiled.dampedMajorant = node.dampedMajorant;
    if (node.dampedRelErrorAt && node.dampedRelErrorAt.cf === damped) compiled.dampedRelErrorAt = node.dampedRelErrorAt.at;
    if (node.dampedErrorAt && node.dampedErrorAt.cf === damped) compiled.dampedAbsErrorAt = node.dampedErrorAt.at;
  }
  if (node.kind.type === "lattice" && node.table) {
    const table = node.table;
    // a table that drops more than USEFUL_TAIL of the mass is not returned: the CF route does better there
    compiled.latticeTable = (maxLength) => {
      const t = table(Math.max(1, Math.min(Math.floor(maxLength), MAX_LATTICE)));
      return t && (t.tailMass <= USEFUL_TAIL || node.approximate) ? t : null;
    };
  }
  if (node.kind.type === "lattice" && node.approximate) compiled.discretisedLattice = true;
  return compiled;
}

/** A mixture's components compiled on first use (most requests never ask for them). */
function lazyComponents(mp: { weights: number[]; parts: Node[] }): () => { weight: number; model: CompiledModel }[] {
  let done: { weight: number; model: CompiledModel }[] | null = null;
  return () => (done ??= mp.parts.map((c, i) => ({ weight: mp.weights[i], model: toCompiled(c) })));
}

/** Validate a model in the notation and compile it; throws CfError with a JSON pointer on invalid input. */
export function compile(model: Model | unknown, options: CompileOptions = {}): CompiledModel {
  return toCompiled(buildNode(validateModel(model), options));
}

/** the first n (0..64) entries from `memo`, computed by `of` once per n; a copy, so that no caller can change the kept list */
function orders(memo: Map<number, (number | null)[]>, n: number, of: (n: number) => (number | null)[]): (number | null)[] {
  const k = Math.max(0, Math.min(Math.floor(n), 64));
  let r = memo.get(k);
  if (!r) memo.set(k, (r = of(k)));
  return r.slice();
}
