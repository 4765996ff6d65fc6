import { scaleDamped, shiftDamped, sumDamped } from "./damped-cf";
import { carryScaleKernels, carryShiftKernels, carrySumKernels } from "./kernel-carry";
import { sumKernelRest } from "./damped-kernel-rest";
import { scaleDampedMajorant, shiftDampedMajorant, sumDampedMajorant } from "./damped-majorant";
import type { Node, NodeKind } from "./node";
import { repeatKind, scaleKind, shiftKind, sumKinds } from "./kinds";
import { convolveTables, powerTable } from "./lattice";
import { roundOf } from "./table-rounding";
import type { CompiledModel, LatticeTable, TailTerm } from "./types";
import { affineDirect } from "./direct/affine";
import { collectNotes, carryApproximation, combineScales, addCumulants, completeAtoms, beyondWindow } from "./operators-shared";
import { cumulantEst, withCumulantErrors } from "./cumulant-bounds";
import { stopLossBounds, type StopLossBounds } from "./invert/tail-moments";
import { repeatE, scaleE, shiftE, sumE } from "./cumulant-ops";
import { shiftedMajorant } from "./majorant";

export { compoundNode, pgfAt } from "./compound";
export { atomsNode, latticeNode, sampleNode } from "./tabulated";
export { mixNode } from "./mix-node";

/** Every finite power-tail index of the terms (either side), distinct and increasing. */
function powerIndicesOf(cs: Node[]): number[] {
  const all = cs.flatMap((c) => c.powerIndices ?? [c.tails.left, c.tails.right]).filter((b) => Number.isFinite(b));
  return [...new Set(all)].sort((u, v) => u - v);
}

/**
 * The term of a continuous sum whose power tail is strictly the heaviest (smallest index, on either side) and that has a
 * direct law, with the other terms' mean (they must have one); null otherwise.
 */
function heaviestTerm(cs: Node[]): TailTerm | null {
  const index = (c: Node) => Math.min(c.tails.left, c.tails.right);
  let best = -1;
  for (let j = 0; j < cs.length; j++) if (best < 0 || index(cs[j]) < index(cs[best])) best = j;
  const D = cs[best];
  const a = index(D);
  if (!D.direct || !Number.isFinite(a) || D.kind.type !== "continuous") return null;
  const rest = cs.filter((_, j) => j !== best);
  const restIndex = Math.min(...rest.map(index));
  if (!(restIndex > a)) return null;
  const restMoment = Math.min(...rest.map((c) => c.momentIndex));
  if (!(restMoment > 1)) return null;
  let shift = 0;
  for (const c of rest) {
    const m = c.cumulants(1)[0];
    if (m === null || !Number.isFinite(m)) return null;
    shift += m;
  }
  const restIndices = [...new Set(rest.flatMap((c) => [c.tails.left, c.tails.right]).filter((b) => Number.isFinite(b)))];
  const indices = [...restIndices, a + 2, ...restIndices.filter((b) => b < 3).map((b) => a + b - 1)];
  const dm = D.momentIndex > 1 ? D.cumulants(1)[0] : null;
  const images = imageTerms(cs, best, shift, dm);
  // D's stop-loss bounds from its moments, formed at the first use; G = D + shift moves u by the shift, rounded by at most
  // dv: the upper transform falls and the lower one rises in u, so each is taken dv towards the body
  let sl: StopLossBounds | null | undefined;
  const restBound = (u: number, side: 1 | -1): number => {
    if (sl === undefined) sl = D.momentIndex > 2 ? stopLossBounds(nodeMoments(D)) : null;
    if (!sl) return Infinity;
    const v = u - shift;
    const dv = Number.EPSILON * (Math.abs(u) + Math.abs(shift));
    return side === 1 ? sl.right(v - dv) : sl.left(v + dv);
  };
  return {
    ...(images ? { images } : {}),
    others: othersMoments(rest),
    rest: restBound,
    logCf: (t, re, im) => D.logCf(t, re, im),
    direct: shift === 0 ? D.direct : affineDirect(D.direct, 1, shift),
    shift,
    mean: dm === null || !Number.isFinite(dm) ? NaN : dm,
    // G = D + shift with this very shift: only D's mean carries an error
    meanError: dm === null || !Number.isFinite(dm) ? Infinity : (cumulantEst(D, 1)[0]?.e ?? Infinity),
    tails: D.tails,
    remainderAlpha: Math.min(...indices),
    indices,
    cfAbsError: (D.cfAbsError ?? 0) + (D.cfRelError ?? 0),
    ...(D.logMajorant ? { logAbsMajorant: shiftedMajorant(shift, D.logMajorant) } : {}),
  };
}

/** What stopLossBounds reads of a model, from a node: its moment index, cumulants with their bounds, and support. */
function nodeMoments(D: Node): CompiledModel {
  const view: Pick<CompiledModel, "momentIndex" | "cumulants" | "cumulantErrors" | "support"> = {
    momentIndex: D.momentIndex,
    cumulants: (n) => D.cumulants(n),
    cumulantErrors: (n) => cumulantEst(D, Math.max(0, Math.min(Math.floor(n), 64))).map((v) => (v === null ? null : v.e)),
    support: D.support,
  };
  return view as CompiledModel;
}

/**
 * What momentBounds (invert/moment-tails.ts) reads of the sum Y of the other terms: the least moment index, the cumulants
 * added, each with the sum of the terms' derived bounds plus the rounding of the addition (n - 1 roundings of partial sums
 * at most sum |kappa| in size).
 */
function othersMoments(rest: Node[]): TailTerm["others"] {
  const view: Pick<CompiledModel, "momentIndex" | "cumulants" | "cumulantErrors" | "support"> = {
    momentIndex: Math.min(...rest.map((c) => c.momentIndex)),
    cumulants: (n) => addCumulants(rest.map((c) => c.cumulants(n)), n),
    cumulantErrors: (n) => {
      const m = Math.max(0, Math.min(Math.floor(n), 64));
      const per = rest.map((c) => cumulantEst(c, m));
      const out: (number | null)[] = [];
      for (let k = 0; k < m; k++) {
        let e = 0;
        let abs = 0;
        for (const p of per) {
          const v = p[k];
          if (v === null || v === undefined) {
            e = NaN;
            break;
          }
          e += v.e;
          abs += Math.abs(v.v);
        }
        out.push(Number.isNaN(e) ? null : e + rest.length * Number.EPSILON * abs);
      }
      return out;
    },
    support: [rest.reduce((s, c) => s + c.support[0], 0), rest.reduce((s, c) => s + c.support[1], 0)],
  };
  return view as CompiledModel;
}

/**
 * The images of the heaviest term D = cs[best] and of the next heaviest, when that one too has a direct law and a power
 * tail strictly heavier than the rest (see TailTerm.images): G_2 = D_2 + E[X - D_2] needs D's mean as well.
 */
function imageTerms(cs: Node[], best: number, shift: number, dm: number | null): TailTerm["images"] | null {
  if (cs.length < 2 || dm === null || !Number.isFinite(dm)) return null;
  const index = (c: Node) => Math.min(c.tails.left, c.tails.right);
  let second = -1;
  for (let j = 0; j < cs.length; j++) if (j !== best && (second < 0 || index(cs[j]) < index(cs[second]))) second = j;
  const D2 = cs[second];
  const a2 = index(D2);
  if (!D2.direct || !Number.isFinite(a2) || D2.kind.type !== "continuous" || !(D2.momentIndex > 1)) return null;
  const others = cs.filter((_, j) => j !== best && j !== second);
  if (!(Math.min(...others.map(index)) > a2)) return null;
  const m2 = D2.cumulants(1)[0];
  if (m2 === null || !Number.isFinite(m2)) return null;
  // E[X - D_2] = E[rest of D] - E[D_2] + E[D]
  const shift2 = shift - m2 + dm;
  const D = cs[best];
  const a1 = index(D);
  const finite = (c: Node) => [c.tails.left, c.tails.right].filter((b) => Number.isFinite(b));
  const otherIdx = [...new Set(others.flatMap(finite))];
  const indices = [...new Set([...otherIdx, a1 + 2, a2 + 2, ...[...otherIdx, ...finite(D2)].filter((b) => b < 3).map((b) => a1 + b - 1), ...[...otherIdx, ...finite(D)].filter((b) => b < 3).map((b) => a2 + b - 1)])];
  // for a derived bound on what the two terms' images leave (invert/heavy-residual2.ts): X = G_1 + G_2 - m + Z with
  // m = E[X] as computed, Z = the other terms less (shift2 - dm), and a bound on the means' errors and roundings
  const eMean = (c: Node) => cumulantEst(c, 1)[0]?.e ?? Infinity;
  // the other terms with power tails and density majorants apart (each about its mean as computed; any point serves)
  const heavyZ = others.filter((c) => Number.isFinite(index(c)) && c.direct?.powerTail && c.kind.type === "continuous" && Number.isFinite(c.cumulants(1)[0] ?? NaN));
  const lightZ = others.filter((c) => !heavyZ.includes(c));
  const mZ = heavyZ.map((c) => c.cumulants(1)[0]!);
  const split =
    heavyZ.length && lightZ.every((c) => !Number.isFinite(index(c)))
      ? {
          heavy: heavyZ.map((c, i) => ({ tail: c.direct!.powerTail!, m: mZ[i], spread: c.direct!.spread })),
          light: lightZ.length ? othersMoments(lightZ)! : null,
          lShift: shift2 - dm - mZ.reduce((a, b) => a + b, 0),
        }
      : null;
  const pair = {
    m: shift + dm,
    zShift: shift2 - dm,
    meanError: eMean(D) + eMean(D2) + 8 * Number.EPSILON * (Math.abs(shift) + Math.abs(dm) + Math.abs(m2) + Math.abs(shift2)),
    others: others.length ? othersMoments(others)! : null,
    ...(split ? { split } : {}),
  };
  return {
    laws: [
      { direct: shift === 0 ? D.direct! : affineDirect(D.direct!, 1, shift), tails: D.tails },
      { direct: shift2 === 0 ? D2.direct : affineDirect(D2.direct, 1, shift2), tails: D2.tails },
    ],
    remainderAlpha: Math.min(...indices),
    indices,
    pair,
  };
}

/** Independent sum: log phi = sum of log phi_j (each on its continuous branch). */
export function sumNode(cs: Node[]): Node {
  if (cs.length === 1) return cs[0];
  let kind: NodeKind = cs[0].kind;
  for (let j = 1; j < cs.length; j++) kind = sumKinds(kind, cs[j].kind);
  kind = completeAtoms(kind, cs, null);
  const allCount = cs.every((c) => c.countCgf);
  const node: Node = {
    kind,
    momentIndex: Math.min(...cs.map((c) => c.momentIndex)),
    tails: { left: Math.min(...cs.map((c) => c.tails.left)), right: Math.min(...cs.map((c) => c.tails.right)) },
    powerIndices: powerIndicesOf(cs),
    nodes: 1 + cs.reduce((s, c) => s + c.nodes, 0),
    get notes() {
      return collectNotes(cs);
    },
    location: cs.reduce((s, c) => s + c.location, 0),
    scale: combineScales(cs),
    support: [cs.reduce((s, c) => s + c.support[0], 0), cs.reduce((s, c) => s + c.support[1], 0)],
    logCf(t, re, im) {
      cs[0].logCf(t, re, im);
      const r2 = new Float64Array(t.length);
      const i2 = new Float64Array(t.length);
      for (let j = 1; j < cs.length; j++) {
        cs[j].logCf(t, r2, i2);
        for (let k = 0; k < t.length; k++) {
          re[k] += r2[k];
          im[k] += i2[k];
        }
      }
    },
    cumulants: (n) => addCumulants(cs.map((c) => c.cumulants(n)), n),
    dampedLogCf: sumDamped(cs),
    hasCompound: cs.some((c) => c.hasCompound),
    cfAbsError: cs.reduce((e, c) => e + (c.cfAbsError ?? 0), 0),
    cfRelError: cs.reduce((e, c) => e + (c.cfRelError ?? 0), 0),
  };
  withCumulantErrors(node, sumE(cs));
  carrySumKernels(node, cs);
  node.dampedMajorant = sumDampedMajorant(node, cs);
  if (node.dampedMajorant && node.dampedKernels && node.dampedKernels.cf === node.dampedLogCf) {
    const kr = sumKernelRest(cs.map((c) => c.dampedMajorant!), node.dampedKernels.kernels, node.support[0]);
    if (kr) node.dampedMajorant.kernelRest = kr;
  }
  const tail = heaviestTerm(cs);
  if (tail) node.tailTerm = tail;
  if (kind.type === "lattice" && cs.every((c) => c.table)) {
    node.table = (maxLength) => {
      const tabs = cs.map((c) => c.table!(maxLength));
      if (tabs.some((x) => !x)) return null;
      const lat = kind as { step: number };
      if (beyondWindow(node, tabs.reduce((s, x) => s + x!.origin, 0), lat.step || 1, maxLength)) return null;
      return convolveTables(tabs as LatticeTable[], maxLength);
    };
    carryApproximation(node, cs, cs.map(() => 1));
  }
  if (allCount) {
    node.countCgf = (wr, wi, re, im) => {
      cs[0].countCgf!(wr, wi, re, im);
      const r2 = new Float64Array(wr.length);
      const i2 = new Float64Array(wr.length);
      for (let j = 1; j < cs.length; j++) {
        cs[j].countCgf!(wr, wi, r2, i2);
        for (let k = 0; k < wr.length; k++) {
          re[k] += r2[k];
          im[k] += i2[k];
        }
      }
    };
    node.p0 = cs.reduce((s, c) => s * (c.p0 ?? 0), 1);
  }
  return node;
}

/** Law of aX: phi(t) = phi_X(a t); for a < 0, log phi_X(a t) = conj log phi_X(|a| t) keeps the branch continuous. */
export function scaleNode(a: number, c: Node): Node {
  const aa = Math.abs(a);
  const node: Node = {
    kind: scaleKind(c.kind, a),
    momentIndex: c.momentIndex,
    tails: a > 0 ? c.tails : { left: c.tails.right, right: c.tails.left },
    powerIndices: c.powerIndices,
    nodes: 1 + c.nodes,
    get notes() {
      return c.notes;
    },
    location: a * c.location,
    scale: aa * c.scale,
    support: a > 0 ? [a * c.support[0], a * c.support[1]] : [a * c.support[1], a * c.support[0]],
    logCf(t, re, im) {
      const s = new Float64Array(t.length);
      for (let k = 0; k < t.length; k++) s[k] = aa * t[k];
      c.logCf(s, re, im);
      if (a < 0) for (let k = 0; k < t.length; k++) im[k] = -im[k];
    },
    cumulants: (n) => c.cumulants(n).map((v, k) => (v === null ? null : v * a ** (k + 1))),
    dampedLogCf: scaleDamped(a, c),
    hasCompound: c.hasCompound,
    cfAbsError: c.cfAbsError,
    cfRelError: c.cfRelError,
  };
  withCumulantErrors(node, scaleE(a, c));
  carryScaleKernels(node, a, c);
  node.dampedMajorant = scaleDampedMajorant(node, a, c);
  if (c.table && c.kind.type === "lattice") {
    node.table = (maxLength) => {
      const tab = c.table!(maxLength);
      if (!tab) return null;
      // (the values move nowhere: the table's rounding bound, where known, stays; ./table-rounding.ts)
      const round = roundOf(tab) ?? undefined;
      if (a > 0) return { origin: a * tab.origin, step: a * tab.step, p: tab.p, tailMass: tab.tailMass, cdfError: tab.cdfError, ...(round ? { round } : {}) };
      // reversing a truncated table puts the cut below its origin, where tailMass (an upper-tail mass) cannot go: an
      // exact table falls back to the CF route (its CF is the lattice law's); a discretised one must not (its node's
      // CF is the continuous law's, so an FFT of it on the lattice is not this table), and the cut mass joins its
      // cdf error instead (every cdf and sf value moves by at most that mass)
      if (tab.tailMass > 0 && tab.cdfError === undefined) return null;
      const p = tab.p.slice().reverse();
      const cdfError = tab.cdfError === undefined ? undefined : tab.cdfError + tab.tailMass;
      return { origin: a * (tab.origin + (tab.p.length - 1) * tab.step), step: aa * tab.step, p, tailMass: 0, cdfError, ...(round ? { round } : {}) };
    };
    node.approximate = c.approximate;
  }
  if (c.countCgf && Number.isInteger(a) && a > 0) {
    node.countCgf = (wr, wi, re, im) => {
      const sr = wr.map((v) => a * v);
      const si = wi.map((v) => a * v);
      c.countCgf!(sr, si, re, im);
    };
    node.p0 = c.p0;
  }
  return node;
}

/** Law of X + b: log phi = log phi_X + i b t. */
export function shiftNode(b: number, c: Node): Node {
  const node: Node = {
    kind: shiftKind(c.kind, b),
    momentIndex: c.momentIndex,
    tails: c.tails,
    nodes: 1 + c.nodes,
    get notes() {
      return c.notes;
    },
    location: c.location + b,
    scale: c.scale,
    support: [c.support[0] + b, c.support[1] + b],
    logCf(t, re, im) {
      c.logCf(t, re, im);
      for (let k = 0; k < t.length; k++) im[k] += b * t[k];
    },
    cumulants: (n) => c.cumulants(n).map((v, k) => (k === 0 && v !== null ? v + b : v)),
    dampedLogCf: shiftDamped(b, c),
    hasCompound: c.hasCompound,
    cfAbsError: c.cfAbsError,
    cfRelError: c.cfRelError,
  };
  withCumulantErrors(node, shiftE(b, c));
  carryShiftKernels(node, b, c);
  node.dampedMajorant = shiftDampedMajorant(node, c);
  if (c.table && c.kind.type === "lattice") {
    node.table = (maxLength) => {
      const tab = c.table!(maxLength);
      return tab ? { ...tab, origin: tab.origin + b } : null;
    };
    node.approximate = c.approximate;
  }
  if (c.countCgf && Number.isInteger(b) && b >= 0) {
    node.countCgf = (wr, wi, re, im) => {
      c.countCgf!(wr, wi, re, im);
      for (let k = 0; k < wr.length; k++) {
        re[k] += b * wr[k];
        im[k] += b * wi[k];
      }
    };
    node.p0 = b === 0 ? c.p0 : 0;
  }
  return node;
}

/** Sum of n independent copies: log phi = n log phi_X (the continuous branch makes this the right power). */
export function repeatNode(n: number, c: Node): Node {
  const ex = 1 / Math.min(2, Math.max(c.momentIndex, 1));
  const node: Node = {
    kind: repeatKind(c.kind, n),
    momentIndex: c.momentIndex,
    tails: c.tails,
    nodes: 1 + c.nodes,
    get notes() {
      return c.notes;
    },
    location: n * c.location,
    scale: n ** ex * c.scale,
    support: [n * c.support[0], n * c.support[1]],
    logCf(t, re, im) {
      c.logCf(t, re, im);
      for (let k = 0; k < t.length; k++) {
        re[k] *= n;
        im[k] *= n;
      }
    },
    cumulants: (m) => c.cumulants(m).map((v) => (v === null ? null : n * v)),
    dampedLogCf: c.dampedLogCf
      ? (beta, t, re, im) => {
          c.dampedLogCf!(beta, t, re, im);
          for (let k = 0; k < t.length; k++) {
            re[k] *= n;
            im[k] *= n;
          }
        }
      : undefined,
    hasCompound: c.hasCompound,
    cfAbsError: n * (c.cfAbsError ?? 0),
    cfRelError: n * (c.cfRelError ?? 0),
  };
  withCumulantErrors(node, repeatE(n, c));
  if (c.table && c.kind.type === "lattice") {
    node.table = (maxLength) => {
      const tab = c.table!(maxLength);
      if (!tab) return null;
      if (beyondWindow(node, n * tab.origin, tab.step, maxLength)) return null;
      return powerTable(tab, n, maxLength);
    };
    carryApproximation(node, [c], [n]);
  }
  if (c.countCgf) {
    node.countCgf = (wr, wi, re, im) => {
      c.countCgf!(wr, wi, re, im);
      for (let k = 0; k < wr.length; k++) {
        re[k] *= n;
        im[k] *= n;
      }
    };
    node.p0 = (c.p0 ?? 0) ** n;
  }
  return node;
}
