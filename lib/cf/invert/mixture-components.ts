/** The components of a mixture, each answered by its own route (direct law, damped inversion, Gil-Pelaez); see mixture.ts. */
import type { Atom, CompiledModel } from "../types";
import { checkDeadline } from "../deadline";
import { mergeAtoms } from "../kinds";
import type { DirectLaw, DirectPoint } from "../direct/types";
import type { Component, Value } from "./mixture-component";
import { dampable } from "./damped";
import { invertWithinTerms } from "./continuous";
import { atomMass, solutionAt } from "./shared";
import { lightTailTarget } from "./quantile-damped";
import { lawShape } from "./range";
import { evalLadder, growLadder, heavyLadder } from "./heavy";
import { RICHARDSON_ESTIMATE_NOTE, richardsonAmplification } from "./richardson";
import { shortfallLight } from "./shortfall";
import { heavyShortfall } from "./shortfall-heavy";
import { stopLossBounds } from "./tail-moments";
import { markovExcess, momentBounds } from "./moment-tails";
import { directComponent } from "./mixture-direct";
import { dampedDraft, dampedRanges, type DampedDraft } from "./mixture-damped";

/**
 * Values from an inversion window [a, b]: inside(x) within it, outside it the monotone bounds F(x) <= F(a) (left) and
 * S(x) <= S(b) (right) answered as the midpoint of [0, bound], exact beyond the support.
 */
function windowed(inside: (x: number) => Value, a: number, b: number, [slo, shi]: readonly [number, number]): (x: number) => Value {
  return (x) => {
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
  // a slowly decaying CF: relax the target (the bounds follow) rather than spend seconds per evaluation
  const out = invertWithinTerms(
    m,
    atoms,
    { kind: "points", x: new Float64Array([shape.center]) },
    { method: "gil-pelaez", tolerance: tolIn / wc, wantPdf: false },
    1 << 17,
    1e-9 / wc,
  );
  const sol = out.solution!;
  const e = wc * sol.error.cdf + 4 * Number.EPSILON;
  const { a, b } = sol.window;
  const values = solutionAt(sol, atoms, wc);
  const inside = (x: number): Value => ({ ...values(x), eF: e, eS: e });
  const at = windowed(inside, a, b, m.support);
  const mean = m.momentIndex > 1 ? m.cumulants(1)[0] : null;
  const tails = stopLossBounds(m);
  return {
    w,
    atoms,
    at,
    excess(q) {
      if (mean === null || !Number.isFinite(mean)) return null;
      if (q >= b) {
        // beyond the window E[(X - q)^+] lies in [0, B] (answered as its midpoint), B the least of the moments' bounds:
        // central moments to order 12 (tail-moments.ts), and Markov's at its best order (moment-tails.ts) on the distance
        // from the mean (even orders) and from a finite lower end (every order); no bound without them
        const B = Math.min(tails ? tails.right(q) : Infinity, excessFromMoments(m, mean, q));
        return Number.isFinite(B) ? { value: B / 2, error: B / 2 } : { value: 0, error: Infinity };
      }
      // below the window: E[(X - q)^+] = E[(X - a)^+] + (a - q) - int_q^a F, the last within (a - q) F(a)
      const qq = Math.max(q, a);
      const r = shortfallLight(sol, atoms, wc, qq, 0, e, 0, tails);
      const fa = q < a ? Math.max(inside(a).F, 0) + e : 0;
      return { value: r.value - qq + (qq - q), error: r.error + (qq - q) * fa };
    },
    terms: () => sol.nodes.K,
    notes: () => out.notes,
    method: "gil-pelaez",
  };
}

/** E[(X - q)^+] <= the least Markov bound at the best order: on |X - mean| (even orders), and on X - lo where lo is finite */
function excessFromMoments(m: CompiledModel, mean: number, q: number): number {
  if (!m.cumulantErrors) return Infinity;
  let best = Infinity;
  if (q > mean) {
    const mb = momentBounds(m, mean, q - mean);
    if (mb) best = markovExcess(mb, q - mean, true);
  }
  const lo = m.support[0];
  if (Number.isFinite(lo) && q > lo) {
    const mb = momentBounds(m, lo, q - lo);
    if (mb) best = Math.min(best, markovExcess(mb, q - lo));
  }
  return best;
}

/**
 * A power-tailed component with neither a direct law nor the damped route (e.g. a sum of a pareto and a NIG term): the
 * period-doubling Gil-Pelaez sums with Richardson extrapolation of ./heavy, per point, with the quantile route's first
 * period (T0 from the tail levels asked for, S(x) ~ (spread / x)^alpha) and its probe-driven doublings. Its values are
 * taken inside the first period's window [c - T0/2, c + T0/2]; outside it the monotone bounds F(x) <= F(a), S(x) <= S(b).
 * The error per point is twice the ladder's (as the quantile route's), so a mixture with a heavy component never falls
 * back to one transform of the whole mixture (whose atoms and slowest component's CF it cannot separate).
 */
function heavyComponent(w: number, m: CompiledModel, tol: number, tail: number): Component | null {
  const shape = lawShape(m);
  if (!shape.heavy) return null;
  const atoms = m.kind.type === "mixed" ? [...m.kind.atoms].sort((u, v) => u.x - v.x) : [];
  const wc = 1 - atoms.reduce((s, a) => s + a.p, 0);
  const alpha = Math.max(shape.alpha, 0.1);
  const ext = shape.spread * Math.pow(2 / Math.min(Math.max(tail, 1e-300), 0.5), 1 / alpha);
  const T0 = Math.max(64 * shape.spread, 8 * ext);
  const lad = heavyLadder(m, atoms, T0, 5, tol);
  const scratch = { pdf: new Float64Array(1), cdf: new Float64Array(1), sf: new Float64Array(1), one: new Float64Array(1) };
  const probes = [shape.center - T0 / 8, shape.center, shape.center + T0 / 8];
  for (let more = 0; more < 3; more++) {
    checkDeadline("mixture-heavy-component");
    const worst = Math.max(...probes.map((x) => evalLadder(lad, x, scratch).errCdf));
    const floorNext = richardsonAmplification(lad.expC, lad.levels.length + 1) * lad.trC;
    if (worst <= tol || floorNext >= worst || !growLadder(lad)) break;
  }
  const a = shape.center - T0 / 2;
  const b = shape.center + T0 / 2;
  const inside = (x: number): Value => {
    const r = evalLadder(lad, x, scratch);
    const mass = atomMass(atoms, x);
    const e = 2 * wc * r.errCdf + 4 * Number.EPSILON;
    return { F: mass.below + wc * r.cdf, S: mass.above + wc * r.sf, f: wc * r.pdf, eF: e, eS: e };
  };
  const at = windowed(inside, a, b, m.support);
  const mean = m.momentIndex > 1 ? m.cumulants(1)[0] : null;
  let excessAt: ((q: number, target: number) => { value: number; error: number; estimated?: boolean; reached?: boolean }) | null = null;
  // whether any value answered rests on the Richardson estimate (the ladder's, or an expected shortfall's)
  let esEstimated = false;
  // whether a derived stop-loss bound stayed above its goal (reported, not replaced by the estimate: ./shortfall.ts)
  let esMissed = false;
  return {
    w,
    atoms,
    at,
    excess(q) {
      if (mean === null || !Number.isFinite(mean) || !(m.momentIndex > 1)) return null;
      excessAt ??= heavyShortfall(m, atoms, wc, mean, shape, tol, Math.max(ext, Math.abs(q - shape.center)), lad);
      const v = at(q);
      // E[(X - q)^+] to about 1e-8 of the tail mass beyond q, on the scale of q (as the quantile route's ES)
      const r = excessAt(q, 1e-8 * Math.max(v.S, 1e-12) * Math.max(1, Math.abs(q), shape.spread));
      if (r.estimated) esEstimated = true;
      else if (!r.reached) esMissed = true;
      return r;
    },
    terms: () => lad.levels[lad.levels.length - 1].K,
    notes: () => [
      `power tails: ${lad.levels.length} period doublings from T = ${T0.toPrecision(4)}, Richardson extrapolation`,
      ...(lad.estimated || esEstimated ? [RICHARDSON_ESTIMATE_NOTE] : []),
      ...(esMissed ? ["expected shortfall goal not reached in a power-tailed component: its derived stop-loss bound is larger; the expectedShortfallError entries carry it"] : []),
    ],
    shortfallMissed: () => esMissed,
    method: "gil-pelaez",
  };
}

/** the loosest cdf target a power-tailed component's share reaches (as the density's shares, ./mixture-budget.ts) */
const POWER_SHARE_CAP = 1e-6;
/** the share of the mixture's target left to its closed-form components, per unit of their weight */
const DIRECT_RESERVE = 0.01;

const powerTailed = (m: CompiledModel) => Number.isFinite(m.tails.right);

/**
 * The factor by which the damped components with a power right tail (whose terms grow as a power of 1/target, where a
 * light tail's grow as its log) may loosen their cdf target: the mixture's cdf bound is sum_j w_j e_j, each e_j within its
 * component's target, and the closed-form components' own bounds lie far below the target (rounding of a special
 * function), so their weight W_D less a reserve DIRECT_RESERVE W_D goes to the power-tailed ones (weight W_P):
 * W_L tol + W_P a tol + DIRECT_RESERVE W_D tol = tol with a = (W_P + (1 - DIRECT_RESERVE) W_D) / W_P; every other component
 * keeps its target. Never tighter than before.
 */
function powerTailShare(leaves: { w: number; m: CompiledModel }[]): number {
  let wD = 0;
  let wP = 0;
  for (const { w, m } of leaves) {
    if (m.direct) wD += w;
    else if (dampable(m) && powerTailed(m)) wP += w;
  }
  return wP > 0 ? Math.max(1, (wP + (1 - DIRECT_RESERVE) * wD) / wP) : 1;
}

/**
 * tail: the smallest upper tail level asked for (damped ranges); lowTail: the smallest of both tails (heavy periods);
 * asked: the tolerance was the request's (else tol is the default, and a damped component's cdf target shrinks with a
 * light tail's level, as the quantile route's: its plan takes the cdf alone, and a level far in that tail needs the sf to
 * a relative accuracy); levels: the levels asked, whose quantiles past a damped component's own range set its range
 */
export function components(
  leaves: { w: number; m: CompiledModel }[],
  tol: number,
  tail: number,
  lowTail = tail,
  asked = true,
  levels: readonly number[] = [],
): Component[] | null {
  const out: (Component | null)[] = [];
  const drafts: { i: number; w: number; m: CompiledModel; d: DampedDraft }[] = [];
  const loosen = powerTailShare(leaves);
  for (const { w, m } of leaves) {
    checkDeadline("mixture-components");
    if (m.direct) out.push(directComponent(w, m));
    else {
      const base = asked ? tol : lightTailTarget(m, tol, tail);
      const own = dampable(m) && powerTailed(m) ? Math.min(base * loosen, Math.max(base, POWER_SHARE_CAP)) : base;
      const d = dampable(m) ? dampedDraft(w, m, tail, own, tol / (4 * leaves.length)) : null;
      if (d) {
        drafts.push({ i: out.length, w, m, d });
        out.push(null);
        continue;
      }
      const c = lightComponent(w, m, tol) ?? heavyComponent(w, m, tol, lowTail);
      if (!c) return null;
      out.push(c);
    }
  }
  // every damped component is set up once, over its own range or, where a level's quantile lies past it and its tail
  // matters there, over one that covers that level (as a grown range, see cover)
  const Rs = drafts.length ? dampedRanges(out, drafts, levels) : drafts.map(() => null);
  drafts.forEach(({ i, w, m, d }, k) => {
    checkDeadline("mixture-components");
    out[i] = d.finish(Rs[k]) ?? lightComponent(w, m, tol) ?? heavyComponent(w, m, tol, lowTail);
  });
  return out.every((c) => c) ? (out as Component[]) : null;
}

/** The mixture's atoms: the components' atoms weighted, equal points merged, sorted. */
export function mixtureAtoms(cs: Component[]): Atom[] {
  return mergeAtoms(cs.flatMap((c) => c.atoms.map((a) => ({ x: a.x, p: c.w * a.p }))));
}

export function mixtureLaw(model: CompiledModel, cs: Component[]): DirectLaw {
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

export function methodsNote(cs: Component[]): string {
  const counts = new Map<string, number>();
  for (const c of cs) counts.set(c.method, (counts.get(c.method) ?? 0) + 1);
  return `mixture answered from its ${cs.length} components (${[...counts].map(([k, n]) => `${n} by ${k}`).join(", ")})`;
}
