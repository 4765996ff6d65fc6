import type { Atom, CompiledModel } from "../types";
import { dampedAt, dampedSetup, type DampedSolution } from "./damped";
import { atomMass } from "./shared";
import { markovTail, momentBounds } from "./moment-tails";

/** growth of the range between the loose probes (the last one is trimmed by bisection before the final inversion) */
const GROWTH = 2;
/**
 * points each probe is evaluated at (they weigh the two-claim term's cost against the terms it saves): one at R and 12
 * bisection steps
 */
const PROBE_POINTS = 14;

/** how far past the first guess (as a multiple of its distance from lo) a range from Markov's inequality is taken first */
const MARKOV_SPAN = 16;

/**
 * The least R past lo (to a thousandth) where Markov's inequality on the law's moments about lo, at its best order, puts
 * P(X - lo > R - lo) at or below `level` (null without moment bounds, or where none is found within 2^20 times R0's
 * distance); the moments' orders are those that serve R0 (./moment-tails.ts momentBounds), valid at every distance
 */
function markovRange(model: CompiledModel, R0: number, level: number): number | null {
  const lo = model.support[0];
  if (!Number.isFinite(lo) || !model.cumulantErrors || !(R0 > lo)) return null;
  const mb = momentBounds(model, lo, R0 - lo);
  if (!mb) return null;
  const ok = (r: number) => markovTail(mb, r, false) <= level;
  let b = R0 - lo;
  let a = 0;
  for (let k = 0; k < 20 && !ok(b); k++) {
    a = b;
    b *= 2;
  }
  if (!ok(b)) return null;
  for (let k = 0; k < 40 && b - a > 1e-3 * b; k++) {
    const mid = 0.5 * (a + b);
    if (ok(mid)) b = mid;
    else a = mid;
  }
  return lo + b;
}

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
  // Markov's inequality at its best order (./moment-tails.ts) gives a range mR where S is surely below half the level, so a
  // loose inversion there cannot fail (its bound is far below the level): no probe goes past it, and the first one is set up
  // there where it lies within MARKOV_SPAN times the first guess's distance from lo (each doubling it spares costs two or
  // three probes of the transform, more than the longer loose inversion's terms); the bisection below then trims it from the
  // last range known short (or from lo). Seed 1 of the random bench, an 8-part mixture of compounds: 27 -> 21 probes in the
  // loose inversions, the answers unchanged
  const mR = markovRange(model, R, 0.5 * level);
  const sure = mR !== null && mR > prev ? mR : Infinity;
  // (not for a power right tail: its moments exist only below the tail's index, and Markov's inequality at such an order
  // lies far past the level's point, Poisson(2)-pareto(3) at 0.999: 194 against 18, a loose inversion of 25 569 terms
  // where the doublings from the first guess took one of 3 996; the range's bisection then ends at the same point)
  let fromMarkov = sure <= lo + MARKOV_SPAN * (R - lo) && !Number.isFinite(model.tails.right);
  const R1 = R;
  if (fromMarkov) R = sure;
  let last: DampedSolution | null = null;
  let probeR = R;
  let shrinks = 0;
  for (let it = 0; it < 40; it++) {
    let probe = dampedSetup(model, atoms, R, { tolerance: loose, wantPdf: false, budget, pointwise: true, points: PROBE_POINTS, wantInt: false, transient: !keep, byParts: true });
    // a Markov range past what the budget allows: the doublings from the first guess instead
    if (!probe && fromMarkov) {
      fromMarkov = false;
      R = R1;
      probe = dampedSetup(model, atoms, R, { tolerance: loose, wantPdf: false, budget, pointwise: true, points: PROBE_POINTS, wantInt: false, transient: !keep, byParts: true });
    }
    fromMarkov = false;
    // the first guess past what the budget allows (a power tail's index below 1 puts it far out: pareto(0.8) + gamma(2) at
    // 0.999 started at 77 000, ten times the range needed): quarter the distance from lo, at most four times, before
    // giving the law up to the undamped route
    if (!probe && last === null && shrinks < 4) {
      shrinks++;
      R = lo + 0.25 * (R - lo);
      continue;
    }
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
    R = Math.min(lo + GROWTH * (R - lo), sure > R ? sure : Infinity);
  }
  return { R, last, probeR };
}
