import type { Atom, CompiledModel } from "../types";
import { dampedAt, dampedSetup, type DampedSolution } from "./damped";
import { atomMass } from "./shared";

/** growth of the range between the loose probes (the last one is trimmed by bisection before the final inversion) */
const GROWTH = 2;
/**
 * points each probe is evaluated at (they weigh the two-claim term's cost against the terms it saves): one at R and 12
 * bisection steps
 */
const PROBE_POINTS = 14;

/**
 * A first range end for a law bounded below: past the mean by 6 sd, and by the power tail's level `tail`; a heavy tail
 * puts mean + 6 sd far past the levels asked (Poisson(1)-lognormal(0, 2.5) at 0.95: 3 131 against 140), and a loose
 * probe's terms grow with its range: no further than 8 times the mean (the probes then double it).
 */
export function startRange(model: CompiledModel, tail: number): number {
  const lo = model.support[0];
  const k = model.cumulants(2);
  const mean = k[0];
  const sd = k[1] !== null && k[1] >= 0 ? Math.sqrt(k[1]) : null;
  let R = mean !== null && sd !== null && Number.isFinite(mean) ? mean + 6 * sd : model.location + 6 * model.scale;
  if (Number.isFinite(model.tails.right)) R = Math.max(R, lo + (model.location - lo + model.scale) * Math.pow(2 / tail, 1 / Math.max(model.tails.right, 0.1)));
  if (mean !== null && Number.isFinite(mean) && mean > lo) R = Math.min(R, lo + 8 * (mean - lo));
  return R > lo ? R : lo + Math.max(model.scale, 1e-300);
}

/**
 * The range [lo, R] of a damped inversion, bounded below at lo, whose upper tail S(R) is below `level`: cheap loose
 * inversions (cdf target `loose`) from R0, the range doubled until S(R) + its bound < level, then the smallest R past
 * the previous probe where the loose inversion still shows that (bisection, 12 steps): the last doubling overshoots by
 * up to twice, and the final inversion's terms grow with the range. Returns the range, the last loose solution (null
 * when none was made) and the range it was set up for, or null when the transform decays too slowly for the damped route.
 * `keep`: the last loose solution is kept (its own arrays) for the caller's use after further setups, not a transient one.
 */
export function dampedReach(
  model: CompiledModel,
  atoms: Atom[],
  R0: number,
  level: number,
  loose: number,
  budget: number,
  keep = false,
): { R: number; last: DampedSolution | null; probeR: number } | null {
  const lo = model.support[0];
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  const sfBound = (s: DampedSolution, x: number) => {
    const v = dampedAt(s, x, false, false);
    return atomMass(atoms, x).above + Mc - v.Fc + v.errF;
  };
  let R = R0;
  let prev = lo;
  // a compound exceeds x whenever one claim does: S(x) >= P(N >= 1) S_X(x), with S_X from the one-claim term's closed form
  // (less its bound), so no range where that is still above the level can end the search: the doublings start past it
  // (each loose inversion costs two probes of the transform; Poisson(0.1)-lognormal(0, 1.5) at 0.999 started at
  // 8 E X = 2.5, some six doublings short of where it ends)
  const sev = model.dampedSeverity;
  if (sev && sev.count && sev.w > 0 && lo === 0) {
    const pn = Math.max(1 - atoms.reduce((s, a) => s + (a.x === 0 ? a.p : 0), 0), 0);
    const below = (x: number) => {
      const v = sev.at(x, false, false);
      return pn * (Math.max(sev.w - v.F - v.err, 0) / sev.w) * (1 - 8 * Number.EPSILON) > level;
    };
    for (let it = 0; it < 60 && below(R); it++) {
      prev = R;
      R = lo + GROWTH * (R - lo);
    }
  }
  let last: DampedSolution | null = null;
  let probeR = R;
  for (let it = 0; it < 40; it++) {
    const probe = dampedSetup(model, atoms, R, { tolerance: loose, wantPdf: false, budget, pointwise: true, points: PROBE_POINTS, wantInt: false, transient: !keep, byParts: true });
    if (!probe) return null;
    last = probe;
    probeR = R;
    if (sfBound(probe, R) < level) {
      let a = prev;
      let b = R;
      for (let j = 0; j < 12 && b - a > 1e-3 * (b - lo); j++) {
        const mid = 0.5 * (a + b);
        if (sfBound(probe, mid) < level) b = mid;
        else a = mid;
      }
      R = b;
      break;
    }
    prev = R;
    R = lo + GROWTH * (R - lo);
  }
  return { R, last, probeR };
}
