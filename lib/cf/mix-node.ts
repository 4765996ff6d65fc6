/** The mixture node: CF, cumulants, kind and carried kernels of a weighted mix of laws. */
import { mixDamped } from "./damped-cf";
import { carryMixKernels } from "./kernel-carry";
import type { Node } from "./node";
import { cumulantsToRaw, rawToCumulants } from "./node";
import { cabs, nearestZero, sortedAnchor, unwrapFrom } from "./complex";
import { mixKinds } from "./kinds";
import { restep } from "./lattice";
import { pointErrOf, roundOf, type TableRound } from "./table-rounding";
import type { LatticeTable } from "./types";
import { collectNotes, carryApproximation, completeAtoms } from "./operators-shared";
import { withCumulantErrors } from "./cumulant-bounds";
import { addArgErrAt, addArgSlopes } from "./arg-rounding";
import { mixE } from "./cumulant-ops";
import { carryMixErrors } from "./damped-error-carry";
import { mixAbsMoment } from "./abs-moment";

/**
 * log sum_j w_j exp(L_j) over arrays, computed about a common centre (subtracting i mu t before summing), then the
 * imaginary part is unwrapped along the index from `anchor` (when >= 0).
 */
function logMix(ws: number[], parts: { re: Float64Array; im: Float64Array }[], lin: Float64Array | null, re: Float64Array, im: Float64Array, anchor: number) {
  const n = re.length;
  for (let k = 0; k < n; k++) {
    let sr = 0;
    let si = 0;
    const off = lin ? lin[k] : 0;
    for (let j = 0; j < ws.length; j++) {
      const m = ws[j] * Math.exp(parts[j].re[k]);
      const ph = parts[j].im[k] - off;
      sr += m * Math.cos(ph);
      si += m * Math.sin(ph);
    }
    re[k] = Math.log(cabs(sr, si));
    im[k] = Math.atan2(si, sr);
  }
  if (anchor >= 0) unwrapFrom(im, anchor);
  if (lin) for (let k = 0; k < n; k++) im[k] += lin[k];
}

/** Mixture: phi = sum_j w_j phi_j; raw moments mix linearly. */
export function mixNode(ws: number[], cs: Node[]): Node {
  if (cs.length === 1) return cs[0];
  const kind = completeAtoms(mixKinds(ws, cs.map((c) => c.kind)), cs, ws);
  const mu = cs.reduce((s, c, j) => s + ws[j] * c.location, 0);
  const node: Node = {
    kind,
    momentIndex: Math.min(...cs.map((c) => c.momentIndex)),
    tails: { left: Math.min(...cs.map((c) => c.tails.left)), right: Math.min(...cs.map((c) => c.tails.right)) },
    nodes: 1 + cs.reduce((s, c) => s + c.nodes, 0),
    get notes() {
      return collectNotes(cs);
    },
    location: mu,
    scale: Math.sqrt(cs.reduce((s, c, j) => s + ws[j] * (c.scale * c.scale + (c.location - mu) ** 2), 0)),
    support: [Math.min(...cs.map((c) => c.support[0])), Math.max(...cs.map((c) => c.support[1]))],
    logCf(t, re, im) {
      const parts = cs.map((c) => {
        const r = new Float64Array(t.length);
        const i = new Float64Array(t.length);
        c.logCf(t, r, i);
        return { re: r, im: i };
      });
      const lin = t.map((x) => mu * x);
      logMix(ws, parts, lin, re, im, sortedAnchor(t));
    },
    dampedLogCf: mixDamped(ws, cs),
    hasCompound: cs.some((c) => c.hasCompound),
    // |phi_j| <= 1: relative errors of the parts become absolute ones of the mixture
    cfAbsError: cs.reduce((e, c, j) => e + ws[j] * ((c.cfAbsError ?? 0) + (c.cfRelError ?? 0)), 0),
    argSlope: addArgSlopes(cs, ws),
    argErrAt: addArgErrAt(cs, ws),
    cumulants(n) {
      const raws = cs.map((c) => cumulantsToRaw(c.cumulants(n)));
      const mixed: (number | null)[] = [];
      for (let k = 0; k < n; k++) {
        let s: number | null = 0;
        for (let j = 0; j < cs.length; j++) s = s === null || raws[j][k] === null ? null : s + ws[j] * (raws[j][k] as number);
        mixed.push(s);
      }
      return rawToCumulants(mixed);
    },
  };
  withCumulantErrors(node, mixE(ws, cs));
  const am = mixAbsMoment(ws, cs);
  if (am) node.absMomentAbout = am;
  carryMixErrors(node, ws, cs);
  carryMixKernels(node, ws, cs);
  if (kind.type === "lattice" && cs.every((c) => c.table)) {
    node.table = (maxLength) => {
      const g = kind.step || 1;
      // each component's table is spread from its own step onto the common step g: ask for no more than fits
      const spread = (c: Node) => (c.kind.type === "lattice" && c.kind.step > 0 ? Math.max(1, Math.round(c.kind.step / g)) : 1);
      const tabs = cs.map((c) => c.table!(Math.floor((maxLength - 1) / spread(c)) + 1));
      if (tabs.some((x) => !x)) return null;
      // a component on a coarse step spread onto a fine common step can need billions of entries: no table then
      if ((tabs as LatticeTable[]).some((x) => (x.p.length - 1) * Math.round(x.step / g) + 1 > maxLength)) return null;
      const st = (tabs as LatticeTable[]).map((x) => restep(x, g));
      const lo = Math.min(...st.map((x) => x.origin));
      const hi = Math.max(...st.map((x) => x.origin + (x.p.length - 1) * g));
      const len = Math.round((hi - lo) / g) + 1;
      const out = new Float64Array(Math.min(len, maxLength));
      let tail = 0;
      st.forEach((x, j) => {
        const off = Math.round((x.origin - lo) / g);
        for (let k = 0; k < x.p.length; k++) {
          const v = ws[j] * x.p[k];
          if (off + k < out.length) out[off + k] += v;
          else tail += v;
        }
        tail += ws[j] * x.tailMass;
      });
      return { origin: lo, step: g, p: out, tailMass: tail, ...mixedRound(ws, tabs as LatticeTable[], out), ...mixedPointErr(ws, st, lo, g, out) };
    };
    carryApproximation(node, cs, ws);
  }
  if (cs.every((c) => c.countCgf)) {
    node.countCgf = (wr, wi, re, im) => {
      const parts = cs.map((c) => {
        const r = new Float64Array(wr.length);
        const i = new Float64Array(wr.length);
        c.countCgf!(wr, wi, r, i);
        return { re: r, im: i };
      });
      logMix(ws, parts, null, re, im, nearestZero(wr, wi));
    };
    node.p0 = cs.reduce((s, c, j) => s + ws[j] * (c.p0 ?? 0), 0);
  }
  return node;
}

/**
 * Per-entry bounds of a mixture's table where every (restepped) component has them (./table-rounding.ts pointErrOf): entry
 * k a sum of at most J products w_j p_jk, within gamma_{J+1} of itself (as in mixedRound below), plus sum_j w_j e_jk.
 */
function mixedPointErr(ws: number[], st: LatticeTable[], lo: number, g: number, out: Float64Array): { pointErr?: Float64Array } {
  const pes = st.map((x) => pointErrOf(x));
  if (pes.some((e) => !e)) return {};
  const e = new Float64Array(out.length);
  st.forEach((x, j) => {
    const off = Math.round((x.origin - lo) / g);
    const pe = pes[j]!;
    for (let k = 0; k < pe.length && off + k < e.length; k++) e[off + k] += ws[j] * pe[k];
  });
  const U = Number.EPSILON / 2;
  const J = st.length + 1;
  const gm = (J * U) / (1 - J * U);
  const grow = 1 + (st.length + 4) * Number.EPSILON;
  for (let k = 0; k < e.length; k++) e[k] = (e[k] * (1 + gm) + gm * Math.abs(out[k])) * grow;
  return { pointErr: e };
}

/**
 * The rounding bound of a mixture's table (./table-rounding.ts) where every component's is known: each entry a sum of at
 * most J products w_j p_jk (the weights as given are the law), within gamma_{J+1} of itself (Higham, Accuracy and
 * Stability of Numerical Algorithms, 2nd ed., sec. 3.1, 4.2: non-negative terms), plus the components' own errors
 * weighted: every entry within sum_j w_j pmf_j + gamma_{J+1} max out, the sum within sum_j w_j l1_j + gamma_{J+1} sum out.
 */
function mixedRound(ws: number[], tabs: LatticeTable[], out: Float64Array): { round?: TableRound } {
  let pmf = 0;
  let l1 = 0;
  for (let j = 0; j < tabs.length; j++) {
    const r = roundOf(tabs[j]);
    if (!r) return {};
    pmf += ws[j] * r.pmf;
    l1 += ws[j] * r.l1;
  }
  const U = Number.EPSILON / 2;
  const J = tabs.length + 1;
  const g = (J * U) / (1 - J * U);
  let mx = 0;
  let sum = 0;
  for (let k = 0; k < out.length; k++) {
    if (out[k] > mx) mx = out[k];
    sum += out[k];
  }
  const grow = 1 + (tabs.length + 4) * Number.EPSILON;
  return { round: { pmf: (pmf + g * mx) * grow, l1: (l1 + g * sum * (1 + out.length * Number.EPSILON)) * grow } };
}
