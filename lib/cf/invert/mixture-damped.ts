// A mixture's damped components (compounds and other laws bounded below with a damped transform): each set up once over
// the range the mixture's levels need, from loose probes of its own range first; see ./mixture-components.ts and ./mixture.ts.
import type { Atom, CompiledModel } from "../types";
import type { Component, Value } from "./mixture-component";
import { DAMPED_BUDGET, KERNEL_BUDGET, dampedAt, dampedPlan, dampedSetup, type DampedSolution } from "./damped";
import { atomMass } from "./shared";
import { dampedExcess } from "./quantile-damped";
import { dampedReach, startRange } from "./damped-reach";
import { markovExcess, markovTail, momentBounds } from "./moment-tails";

/**
 * A damped component in two steps: the loose probes of its own range first, then `finish`, its one setup at the tolerance,
 * over the range the mixture's levels need of it (dampedRanges below, from the loose solutions' bounds) or its own. A range
 * that a final search needs beyond that still grows (Component.cover), as before; foreseen, it costs one setup, not two.
 */
export interface DampedDraft {
  /** an upper bound on S(x) from the last loose solution (its own bound) and, past its range, the monotone S(x) <= S(R) */
  upper(x: number): number;
  /** the component's own range, where S(R) is below 0.8 times the smallest tail level */
  reach: number;
  /** x lies past the own range and the tail there is above the component's share of the target (as Component.needs) */
  needs(x: number): boolean;
  finish(R: number | null): Component | null;
}

export function dampedDraft(w: number, m: CompiledModel, tail: number, tol: number, target: number): DampedDraft | null {
  const lo = m.support[0];
  const atoms = m.kind.type === "mixed" ? [...m.kind.atoms].sort((u, v) => u.x - v.x) : [];
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  const budget = m.dampedKernels?.length || m.dampedSeverity ? KERNEL_BUDGET : DAMPED_BUDGET;
  // the cut-off from the cdf's truncation alone, as the quantile route's (./quantile-damped.ts): every bracket is decided
  // by the cdf's bounds, and the density only guides the search's steps (it carries the bound that cut-off leaves it)
  const setup = (R: number) =>
    dampedSetup(m, atoms, R, { tolerance: tol, wantPdf: true, budget, pointwise: true, plan: dampedPlan(m, atoms, R, tol, false, undefined, true, budget) });
  // the range: where S(R) falls below the smallest tail level asked (less a fifth), found by loose probes as the quantile
  // route's (./damped-reach.ts). Then past every component's range the mixture's S is below that level, so the deferred
  // first search (./mixture.ts) brackets each level within the farthest range; a component whose range ends left of a
  // level's bracket grows once to cover it. Not S(R) below tail / w: a level's quantile may then lie past every range,
  // where the deferred bounds leave its bracket open (two compounds weighted 0.3 and 0.7 at 0.9999: a bound of 7e4).
  // A first guess from the tail index alone lay ten times too far for Poisson(2)-pareto(1.5, 1) weighted 0.5 at 0.999
  // (1 662 against 165): 1.2e6 terms instead of 1.4e5.
  const reach = dampedReach(m, atoms, startRange(m, tail), 0.8 * tail, Math.max(tol, Math.min(1e-7, tail / 100)), budget, true);
  if (!reach) return null;
  const last = reach.last;
  // S(x) <= P(atoms above x) + M_c - F_c(x) + its bound inside the loose solution's range, S(x) <= S(probeR) past it
  const looseUpper = (x: number): number => {
    if (x < lo) return 1;
    if (!last) return 1;
    const y = Math.min(x, reach.probeR);
    const v = dampedAt(last, y, false, false);
    return Math.min(Math.max(atomMass(atoms, y).above + Mc - v.Fc + v.errF, 0), 1);
  };
  let atR = -1;
  return {
    upper: looseUpper,
    reach: reach.R,
    needs(x) {
      if (!(x > reach.R)) return false;
      if (atR < 0) atR = looseUpper(reach.R);
      if (w * atR <= target) return false;
      const mb = Number.isFinite(lo) ? momentBounds(m, lo, x - lo) : null;
      return !mb || w * markovTail(mb, x - lo, false) > target;
    },
    finish: (Rm) => {
      // the mixture's range where it sets one and the component can take it, else the component's own
      const own = reach.R;
      let R = Rm !== null && Rm > lo ? Rm : own;
      let s = setup(R);
      if (!s && R !== own) s = setup((R = own));
      return s ? dampedComponent(w, m, atoms, Mc, R, s, setup, target, own) : null;
    },
  };
}

function dampedComponent(
  w: number,
  m: CompiledModel,
  atoms: Atom[],
  Mc: number,
  R0: number,
  s0: DampedSolution,
  setup: (R: number) => DampedSolution | null,
  target: number,
  own: number,
): Component {
  const lo = m.support[0];
  const mean = m.momentIndex > 1 ? m.cumulants(1)[0] : null;
  let R = R0;
  let s: DampedSolution | null = s0;
  let grows = 0;
  // the law's moments bound its tail (Markov at the best order, ./moment-tails.ts): past the range a light tail is then
  // answered without growing the range, where the inversion's own bound at R (which grows toward the range's end) would
  // ask for a setup two to four times as long; inside it, where that bound is the tighter
  const moments = (x: number) => (Number.isFinite(lo) ? momentBounds(m, lo, x - lo) : null);
  const inside = (x: number): Value => {
    const v = dampedAt(s!, x, true, false);
    const a = atomMass(atoms, x);
    const S = a.above + (Mc - v.Fc);
    // past the own range (S below 0.8 of the tail level) where the inversion's bound is above the share of the target:
    // S also lies in [0, M], M the moments' bound (as past the range), so in the intersection of the two enclosures
    if (x > own && w * v.errF > target) {
      const mb = moments(x);
      const M = mb ? markovTail(mb, x - lo, false) : Infinity;
      const hi = Math.min(S + v.errF, M);
      const lw = Math.max(S - v.errF, 0);
      if (hi - lw < 2 * v.errF && hi >= lw) {
        const e = (hi - lw) / 2;
        return { F: 1 - (lw + e), S: lw + e, f: v.fc, eF: e + 2 * Number.EPSILON, eS: e };
      }
    }
    return { F: a.below + v.Fc, S, f: v.fc, eF: v.errF, eS: v.errF };
  };
  // beyond the range: the range grows (at most 8 times) when the tail left there matters, otherwise the
  // monotone bound S(x) in [0, S(R)] answers
  const grow = (x: number, factor = 2): boolean => {
    if (grows >= 8) return false;
    const next = setup(lo + factor * (x - lo));
    if (!next) return false;
    grows++;
    s = next;
    R = lo + factor * (x - lo);
    return true;
  };
  let defer = false;
  let far = -Infinity;
  // the bound on S(x) past the range: S(R) and its bound, or the moments' where that is smaller
  let atR: { R: number; s: number } | null = null;
  const tailBound = (x: number): number => {
    // S(R) and its bound, once per range
    if (!atR || atR.R !== R) {
      const r = inside(R);
      atR = { R, s: Math.max(r.S, 0) + r.eS };
    }
    let sR = atR.s;
    if (w * sR > target) {
      const mb = moments(x);
      if (mb) sR = Math.min(sR, markovTail(mb, x - lo, false));
    }
    return sR;
  };
  const at = (x: number): Value => {
    if (x < lo) return { F: 0, S: 1, f: 0, eF: 0, eS: 0 };
    if (x <= R) return inside(x);
    const sR = tailBound(x);
    if (w * sR > target) {
      if (defer) far = Math.max(far, x);
      else if (grow(x)) return inside(x);
    }
    return { F: 1 - sR / 2, S: sR / 2, f: 0, eF: sR / 2, eS: sR / 2 };
  };
  return {
    w,
    atoms,
    at,
    excess(q) {
      if (mean === null || !Number.isFinite(mean) || !(m.momentIndex > 1)) return null;
      if (q > R) {
        // E[(X - q)^+] in [0, b] from the moments when w b is below the target, else a longer range
        const mb = moments(q);
        const b = mb ? markovExcess(mb, q - lo) : Infinity;
        if (w * b <= target) return { value: b / 2, error: b / 2 };
        if (!grow(q)) return { value: 0, error: Infinity };
      }
      return dampedExcess(s!, atoms, mean, q);
    },
    terms: () => s!.K,
    notes: () => s!.notes,
    method: "gil-pelaez-damped",
    deferred(on) {
      defer = on;
      if (on) far = -Infinity;
    },
    beyond: () => far,
    reach: () => R,
    needs: (x) => x > R && w * tailBound(x) > target,
    // x at four fifths of the range: the sums' bound grows toward the range's end, where the plan meets the tolerance
    cover: (x) => x <= R || grow(x, 1.25),
  };
}


/**
 * The range each damped component needs, from its loose solution before any final setup (null: its own): for each level
 * p whose quantile may lie past the nearest own range, a bracket [a, b] of the point where the mixture's upper bound
 * S(x) <= sum_j w_j min(1, S_j(x) + e_j(x)) (the damped components' from their loose solutions, the others' own values
 * and bounds) falls to 1 - p, by bisection to a thousandth of b's distance from the support's start; b lies past the
 * quantile. A component whose own range ends before b and whose tail matters at max(a, its range end) takes
 * [lo, lo + 1.25 (b - lo)], the farthest such b. The final search still grows a range whose tail its brackets need
 * (./mixture.ts); this only spares it the setups it can foresee.
 */
export function dampedRanges(done: (Component | null)[], drafts: { w: number; m: CompiledModel; d: DampedDraft }[], levels: readonly number[]): (number | null)[] {
  const sUp = (x: number): number => {
    let S = 0;
    for (const c of done) {
      if (!c) continue;
      const v = c.at(x);
      S += c.w * Math.min(Math.max(v.S, 0) + v.eS, 1);
    }
    for (const { w, d } of drafts) S += w * d.upper(x);
    return S * (1 + 4 * Number.EPSILON * (done.length + 1));
  };
  const start = Math.min(...drafts.map(({ m }) => m.support[0]));
  const near = Math.min(...drafts.map(({ d }) => d.reach));
  const far = Math.max(...drafts.map(({ d }) => d.reach));
  const want: number[] = drafts.map(() => -Infinity);
  const sNear = sUp(near);
  let sFar = -1;
  for (const p of levels) {
    const level = 1 - p;
    if (!(p > 0.5 && p < 1) || sNear <= level) continue;
    // b past the quantile: the farthest own range, doubled while the bound there is above the level
    let a = near;
    let b = far;
    if (sFar < 0) sFar = sUp(far);
    let s = sFar;
    for (let k = 0; k < 30 && s > level; k++) {
      a = b;
      b = start + 2 * (b - start);
      s = sUp(b);
    }
    if (!(s <= level)) continue;
    for (let k = 0; k < 40 && b - a > 1e-3 * (b - start); k++) {
      const mid = 0.5 * (a + b);
      if (sUp(mid) <= level) b = mid;
      else a = mid;
    }
    drafts.forEach(({ d }, k) => {
      if (b > d.reach && d.needs(Math.max(a, d.reach + Math.abs(d.reach) * 1e-12 + Number.MIN_VALUE))) want[k] = Math.max(want[k], b);
    });
  }
  return drafts.map(({ m }, k) => (want[k] > -Infinity ? m.support[0] + 1.25 * (want[k] - m.support[0]) : null));
}

