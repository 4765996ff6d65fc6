// The error budget of a mixture's density: which tolerance each component is answered at (see ./mixture.ts mixtureDensity).
import type { CompiledModel } from "../types";
import { checkDeadline } from "../deadline";
import type { DensityOptions, DensityResult } from "./types";
import { DEFAULT_TOLERANCE, DEFAULT_TOLERANCE_HEAVY } from "./density";
import { dampable } from "./damped";
import { probe } from "./damped-psi";
import { cutoffFor } from "./nodes";

/**
 * Each component's density at its share of the mixture's target: the weighted bounds sum to the mixture's, whatever each
 * component reaches (its bound is what it carries). Components by inversion whose weight is below an equal share
 * (w < 1/n of the n inverted) are answered last, one after another, each at its share of what the others left of the
 * target, (target - sum of the answered ones' weighted bounds) / (n_left w), where that is looser than its own target: a
 * component of weight 0.06 whose mass ends far below the grid's end then takes a period half as long, and as the answered
 * ones mostly stay below their shares, the later ones get more. So the costliest come last: ordered by the frequency
 * cut-off their transform's envelope asks at that share (the damped plan's first probe, at beta = 4 / span, which their
 * own plan then finds made). Never tighter than before. The target: the one asked, else the tightest of the inverted
 * components' own defaults (a power-tailed one's looser default never loosens the others).
 */
export function componentDensities(
  leaves: { w: number; m: CompiledModel }[],
  options: DensityOptions,
  one: (m: CompiledModel, o: DensityOptions) => DensityResult,
): { w: number; r: DensityResult }[] {
  const ownTarget = (m: CompiledModel) => options.tolerance ?? (Number.isFinite(Math.min(m.tails.left, m.tails.right)) ? DEFAULT_TOLERANCE_HEAVY : DEFAULT_TOLERANCE);
  const target = leaves.reduce((t, { m }) => (m.direct ? t : Math.min(t, ownTarget(m))), Infinity);
  const inverted = leaves.filter(({ m }) => !m.direct).length;
  const light = (l: { w: number; m: CompiledModel }) => !l.m.direct && l.w * inverted < 1;
  const parts: { w: number; r: DensityResult }[] = new Array(leaves.length);
  let used = 0;
  const add = (r: DensityResult, w: number) => {
    used += w * Math.max(r.diagnostics.error.cdf, options.cdfOnly ? 0 : r.diagnostics.error.pdf);
  };
  const lights: number[] = [];
  leaves.forEach((l, i) => {
    if (light(l)) {
      lights.push(i);
      return;
    }
    checkDeadline("mixture-density");
    const r = one(l.m, { ...options, out: undefined });
    parts[i] = { w: l.w, r };
    add(r, l.w);
  });
  const share = (l: { w: number; m: CompiledModel }, left: number) => {
    const own = ownTarget(l.m);
    const s = used < target ? (target - used) / (left * l.w) : 0;
    return Math.min(Math.max(own, s), Math.max(own, 1e-6));
  };
  if (lights.length > 1) {
    const cost = new Map(lights.map((i) => [i, cutoffAt(leaves[i].m, options, share(leaves[i], lights.length))]));
    lights.sort((a, b) => cost.get(a)! - cost.get(b)!);
  }
  lights.forEach((i, k) => {
    checkDeadline("mixture-density");
    const l = leaves[i];
    const r = one(l.m, { ...options, tolerance: share(l, lights.length - k), out: undefined });
    parts[i] = { w: l.w, r };
    add(r, l.w);
  });
  return parts;
}

/**
 * The cdf's cut-off the damped plan's first probe asks of a component at tolerance tol (0 where it is not inverted by the
 * damped route): its range ends at the request's farthest point (./density-damped.ts), so the probe is the one its plan
 * makes first (kept per model, ./damped-psi.ts); a cost proxy, no bound rests on it
 */
function cutoffAt(m: CompiledModel, o: DensityOptions, tol: number): number {
  if (!dampable(m) || (o.method !== undefined && o.method !== "auto")) return 0;
  const lo = m.support[0];
  let R = lo;
  if (o.x) {
    const xs = o.x as ArrayLike<number>;
    for (let i = 0; i < xs.length; i++) if (xs[i] > R) R = xs[i];
  }
  else if (o.grid) {
    const { from, to, count } = o.grid;
    const dx = count > 1 ? (to - from) / (count - 1) : 1;
    for (let i = 0; i < count; i++) if (from + i * dx > R) R = from + i * dx;
  }
  if (!(R > lo)) R = lo + Math.max(m.scale, 1e-300);
  const span = Math.max(R - lo, 1e-6 * Math.max(m.scale, Math.abs(lo), 1e-300));
  const atoms = m.kind.type === "mixed" ? [...m.kind.atoms].sort((u, v) => u.x - v.x) : [];
  const target = tol / (8 * Math.exp(4));
  const env = probe(m, atoms, 4 / span, false, true);
  // the cdf's alone: the density's uniform tail is loose where the plan bounds it otherwise (a jump's split, by parts)
  const t = cutoffFor(env, Infinity, target);
  return Number.isFinite(t) ? t : Number.MAX_VALUE;
}
