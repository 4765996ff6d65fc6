import { scaleDamped, shiftDamped, sumDamped } from "./damped-cf";
import { scaledLogRound, shiftedLogRound, summedLogRound } from "./families/log-round";
import { carryScaleKernels, carryShiftKernels, carrySumKernels } from "./kernel-carry";
import { carryScaleRemainder, carryShiftRemainder, sumDampedRemainder } from "./sum-remainder";
import { sumKernelRest } from "./damped-kernel-rest";
import { scaleDampedMajorant, shiftDampedMajorant, sumDampedMajorant } from "./damped-majorant";
import type { Node, NodeKind } from "./node";
import { repeatKind, scaleKind, shiftKind, sumKinds } from "./kinds";
import { convolveTables, powerTable } from "./lattice";
import { pointErrOf, roundOf } from "./table-rounding";
import type { LatticeTable } from "./types";
import { collectNotes, carryApproximation, combineScales, addCumulants, completeAtoms, beyondWindow } from "./operators-shared";
import { withCumulantErrors } from "./cumulant-bounds";
import { repeatE, scaleE, shiftE, sumE } from "./cumulant-ops";
import { powerIndicesOf, heaviestTerm } from "./operators-tail";
import { addArgErrAt, addArgErrDampedAt, addArgErrDampedOn, addArgSlopes, scaleArgErrAt, scaleArgErrDampedAt, scaleArgErrDampedOn, scaleArgSlope } from "./arg-rounding";
import { carryScaleErrors, carryShiftErrors, carrySumErrors } from "./damped-error-carry";
import { repeatAbsMoment, scaleAbsMoment, shiftAbsMoment, sumAbsMoment } from "./abs-moment";

export { compoundNode, pgfAt } from "./compound";
export { atomsNode, latticeNode, sampleNode } from "./tabulated";
export { mixNode } from "./mix-node";

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
    argSlope: addArgSlopes(cs),
    argErrAt: addArgErrAt(cs),
    argErrDampedAt: addArgErrDampedAt(cs),
    argErrDampedOn: addArgErrDampedOn(cs),
    ...summedLogRound(cs),
  };
  withCumulantErrors(node, sumE(cs));
  const am = sumAbsMoment(cs);
  if (am) node.absMomentAbout = am;
  carrySumErrors(node, cs);
  carrySumKernels(node, cs);
  node.dampedMajorant = sumDampedMajorant(node, cs);
  if (node.dampedMajorant && node.dampedKernels && node.dampedKernels.cf === node.dampedLogCf) {
    const kr = sumKernelRest(cs.map((c) => c.dampedMajorant!), node.dampedKernels.kernels, node.support[0]);
    if (kr) node.dampedMajorant.kernelRest = kr;
  }
  const sr = sumDampedRemainder(node, cs);
  if (sr) node.dampedRemainder = sr;
  // the tail analysis over every independent term, nested sums opened: NB(1.5, 0.4) x weibull + stable(1.25) + (t(4) +
  // t(2.5)) then takes the stable's and the t(2.5)'s images out with the pair's derived bound (the nested sum, with no
  // direct law, left the stable's alone, whose stop-loss bound needs a fourth moment of the rest: an estimate answered)
  node.sumTerms = cs.flatMap((c) => c.sumTerms ?? [c]);
  const tail = heaviestTerm(node.sumTerms);
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

export const SCALE_ROUNDING_NOTE =
  "the rounding of the scaled frequency a t is not bounded for a term without a first absolute moment: where the answer inverts the CF, that move of the CF values is left out of its error bounds";

/** Law of aX: phi(t) = phi_X(a t); for a < 0, log phi_X(a t) = conj log phi_X(|a| t) keeps the branch continuous. */
export function scaleNode(a: number, c: Node): Node {
  const aa = Math.abs(a);
  const argSlope = scaleArgSlope(a, c);
  const node: Node = {
    kind: scaleKind(c.kind, a),
    momentIndex: c.momentIndex,
    tails: a > 0 ? c.tails : { left: c.tails.right, right: c.tails.left },
    powerIndices: c.powerIndices,
    // (nodes counts the tree's rounding nodes, 8 units each in the log-CF's bound: scaling t by a power of 2 and negating
    // the imaginary part round nothing, so such a scale adds none)
    nodes: (aa === 2 ** Math.round(Math.log2(aa)) ? 0 : 1) + c.nodes,
    get notes() {
      // the rounding of a t moves phi(a t) by up to u |a t| E|X|: without a first absolute moment (Cauchy, stable alpha <= 1,
      // pareto alpha <= 1) no such bound is derived, and the answer says so rather than take it as 0
      return Number.isNaN(argSlope) ? [...c.notes, SCALE_ROUNDING_NOTE] : c.notes;
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
    argSlope,
    argErrAt: scaleArgErrAt(a, c),
    argErrDampedAt: scaleArgErrDampedAt(a, c),
    argErrDampedOn: scaleArgErrDampedOn(a, c),
    ...scaledLogRound(c, a),
  };
  withCumulantErrors(node, scaleE(a, c));
  const am = scaleAbsMoment(a, c);
  if (am) node.absMomentAbout = am;
  carryScaleErrors(node, a, c);
  carryScaleKernels(node, a, c);
  node.dampedMajorant = scaleDampedMajorant(node, a, c);
  carryScaleRemainder(node, a, c);
  if (c.table && c.kind.type === "lattice") {
    node.table = (maxLength) => {
      const tab = c.table!(maxLength);
      if (!tab) return null;
      // (the values move nowhere: the table's rounding bound, where known, stays; ./table-rounding.ts)
      const round = roundOf(tab) ?? undefined;
      // (and so do the per-entry bounds, reversed with the entries below)
      const pe = pointErrOf(tab);
      if (a > 0) return { origin: a * tab.origin, step: a * tab.step, p: tab.p, tailMass: tab.tailMass, cdfError: tab.cdfError, ...(round ? { round } : {}), ...(pe ? { pointErr: pe } : {}) };
      // reversing a table cut at its upper end puts the cut below its origin: an exact table keeps the dropped mass there
      // (tailBelow; a cut from both ends or inside, tailFrom below the end, is anywhere); a discretised one's cut mass
      // joins its cdf error instead (every cdf and sf value moves by at most that mass)
      const p = tab.p.slice().reverse();
      const pointErr = pe ? pe.slice().reverse() : undefined;
      const origin = a * (tab.origin + (tab.p.length - 1) * tab.step);
      if (tab.cdfError === undefined) {
        // (a recursion's table, pointRel, drops only what follows its end)
        const below = tab.tailMass > 0 && (tab.tailFrom ?? (tab.pointRel ? tab.p.length : 0)) >= tab.p.length;
        return { origin, step: aa * tab.step, p, tailMass: tab.tailMass, ...(below ? { tailBelow: true } : {}), ...(round ? { round } : {}), ...(pointErr ? { pointErr } : {}) };
      }
      return { origin, step: aa * tab.step, p, tailMass: 0, cdfError: tab.cdfError + tab.tailMass, ...(round ? { round } : {}), ...(pointErr ? { pointErr } : {}) };
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
    argSlope: c.argSlope,
    argErrAt: c.argErrAt,
    ...shiftedLogRound(c, b),
  };
  withCumulantErrors(node, shiftE(b, c));
  const am = shiftAbsMoment(b, c);
  if (am) node.absMomentAbout = am;
  carryShiftErrors(node, b, c);
  carryShiftKernels(node, b, c);
  node.dampedMajorant = shiftDampedMajorant(node, c);
  carryShiftRemainder(node, b, c);
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
    argSlope: n * (c.argSlope ?? 0),
    argErrAt: addArgErrAt([c], [n]),
    argErrDampedAt: addArgErrDampedAt([c], [n]),
    argErrDampedOn: addArgErrDampedOn([c], [n]),
    ...summedLogRound([c], [n]),
  };
  withCumulantErrors(node, repeatE(n, c));
  const am = repeatAbsMoment(n, c);
  if (am) node.absMomentAbout = am;
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
