import type { Atom, CompiledModel } from "../types";
import type { GammaKernel } from "../damped-kernels";
import type { SeverityKernel } from "../severity-kernel";
import { incGamma } from "./incgamma";
import { markovTail, momentBounds, type MomentBounds } from "./moment-tails";
import { kernelsDensityBeyond } from "../damped-kernels";

const EPS = Number.EPSILON;

/**
 * A bound B(z), non-increasing in z > 0, on |G(lo + z) - A|: G the damped route's inverted function (continuous part
 * less the gamma kernels, the one-claim and the two-claim terms), A its limit. G - A is minus the mass of those parts
 * beyond lo + z, so |G - A| <= S_c + sum |w_k| S_k + w S_1 + w_2 S_2:
 *   S_c(z) <= P(X - lo > z) <= E[(X - lo)^n] / z^n (Markov, ./moment-tails.ts), the least over the orders available;
 *   S_k: the gamma kernels' tails Q(shape, rate (x - at)) in closed form (incGamma, to its stated accuracy);
 *   S_1: the severity's own sf, w - w F_X from the one-claim term's closed form with its bound;
 *   S_2 <= 2 S_1(z / 2) (X_1 + X_2 > z needs one claim above z / 2).
 * Every part is the tail of a positive measure (or bounds one), so B is non-increasing, and the images
 * sum_{m >= 1} (-1)^m q^m (G(y + m T) - A) that the damped cdf keeps after the closed-form shift are at most
 * q / (1 - q) B(y + T) at y = x - lo: a per-point bound in place of the uniform q / (1 - q) second / T^2.
 * Null when the model states no cumulants with bounds (the uniform bound stands).
 */
export function imageTail(
  model: CompiledModel,
  atoms: Atom[],
  lo: number,
  kernels: readonly GammaKernel[],
  severity: SeverityKernel | null,
  pair: SeverityKernel["pair"] | null,
  T: number,
): ((z: number) => number) | null {
  if (!model.cumulantErrors) return null;
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  // the moments are computed on first use: the quantile search makes many loose solutions it evaluates at one point
  let mom: MomentBounds | null | undefined;
  const continuous = (z: number) => {
    // the nearest image is a period away
    if (mom === undefined) mom = momentBounds(model, lo, T);
    return mom ? Math.min(Mc, markovTail(mom, z, false)) : Mc;
  };
  const sevTail = (x: number) => {
    if (!severity) return 0;
    const v = severity.at(x);
    return Math.max(severity.w - v.F + v.err + 4 * EPS * severity.w, 0);
  };
  return (z: number) => {
    if (!(z > 0)) return Infinity;
    const x = lo + z;
    let b = continuous(z);
    for (const k of kernels) {
      const y = x - k.at;
      if (!(y > 0)) {
        b += Math.abs(k.w);
        continue;
      }
      const u = k.rate * y;
      const g = incGamma(k.shape, u);
      // Q plus its derived bound (./incgamma.ts)
      b += Math.abs(k.w) * (g.Q + g.eQ);
    }
    if (severity) b += sevTail(x);
    if (pair && pair.w > 0) {
      b += severity && severity.w > 0 ? (2 * pair.w * sevTail(lo + z / 2)) / severity.w : (pair.w * pair.moments[1]) / (z * z);
    }
    return b * (1 + 8 * EPS);
  };
}

/**
 * A bound on the inverted function's density beyond lo + T (its images are at most q / (1 - q) times it): for a density
 * non-increasing there f_c(y) <= S_c(lo + (y - lo) / 2) / ((y - lo) / 2), with S_c(lo + z) <= P(X - lo > z) by Markov's
 * inequality at its best order (./moment-tails.ts, where the model bounds its cumulants), by the first order E[X - lo] / z
 * (where the mean exists) and by the continuous mass; plus the gamma kernels', the one-claim and the two-claim terms' own
 * densities beyond lo + T
 */
export function densityBeyondWindow(model: CompiledModel, atoms: Atom[], T: number, pair: SeverityKernel["pair"] | null): number {
  const lo = model.support[0];
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  const mean = model.cumulants(1)[0];
  const z = T / 2;
  let S = Mc;
  if (mean !== null && Number.isFinite(mean) && model.momentIndex > 1) S = Math.min(S, (Math.max(mean - lo, 0) / z) * (1 + 4 * EPS));
  const mom = model.cumulantErrors ? momentBounds(model, lo, z) : null;
  if (mom) S = Math.min(S, markovTail(mom, z, false));
  const ks = model.dampedKernels ?? [];
  const sev = model.dampedSeverity;
  return (
    (S / z) * (1 + 4 * EPS) +
    (ks.length ? kernelsDensityBeyond(ks, lo + T) : 0) +
    (sev ? sev.densityBeyond(lo + T) : 0) +
    (pair ? pair.densityBeyond(lo + T) : 0)
  );
}

/** ratio of the geometric steps of imageIntegralTail's Riemann sum (the first FINE_STEPS, then FAR_RATIO), and their number */
const INT_RATIO = 1.25;
const FINE_STEPS = 24;
const FAR_RATIO = 2;
const INT_STEPS = 96;

/**
 * A bound on int_c^inf |G(lo + z) - A| dz (c > 0), what the images of the integrated cdf leave at c: B from imageTail is
 * non-increasing, so on [z_j, z_{j+1}] the integrand is at most B(z_j) (an upper Riemann sum on z_0 = c, z_{j+1} = 1.25 z_j
 * for 24 steps, then 2 z_j, so that the last point is far out), and beyond C = z_J at most E[(Y - C)^+] <= second / (4 C)
 * ((u - C)^+ <= u^2 / (4 C), the bound the images used alone; `second` the second moment about lo of what G holds,
 * ./damped-transform.ts imageMoments). Every J gives a bound; the least is returned (J = 0 is the second-moment bound
 * itself), each sum's rounding within (J + 6) eps.
 */
export function imageIntegralTail(B: (z: number) => number, c: number, second: number): number {
  if (!(c > 0)) return Infinity;
  let best = second / (4 * c);
  let sum = 0;
  let z = c;
  for (let j = 0; j < INT_STEPS; j++) {
    const b = B(z);
    if (!Number.isFinite(b)) break;
    const next = z * (j < FINE_STEPS ? INT_RATIO : FAR_RATIO);
    sum += b * (next - z);
    z = next;
    const cand = sum * (1 + (j + 6) * EPS) + second / (4 * z);
    if (cand < best) best = cand;
    // the tail bound alone is already below what the sum holds: more steps cannot lower the total much
    if (second / (4 * z) < 1e-3 * sum) break;
  }
  return best * (1 + 4 * EPS);
}

/**
 * Limits and second moment of the inverted function G (continuous part less kernels and the one-claim term) for its
 * images: G(z) -> A and int_lo^z G = A (z - lo) - B + r(z) far out, |G(z) - A| <= second / (z - lo)^2, |r(z)| <=
 * second / (4 (z - lo)); null without a finite second moment.
 */
export function imageMoments(model: CompiledModel, atoms: Atom[], pairOut: boolean): { A: number; B: number; second: number } | null {
  const lo = model.support[0];
  const k2 = model.cumulants(2);
  if (!(model.momentIndex > 2) || k2[0] === null || k2[1] === null || !Number.isFinite(k2[0]) || !Number.isFinite(k2[1])) return null;
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  const m1 = k2[0] - lo;
  let mc = m1;
  let second = k2[1] + m1 * m1;
  for (const a of atoms) {
    mc -= a.p * (a.x - lo);
    second -= a.p * (a.x - lo) ** 2;
  }
  let W = 0;
  let mK = 0;
  for (const k of model.dampedKernels ?? []) {
    const d = k.at - lo;
    W += k.w;
    mK += k.w * (d + k.shape / k.rate);
    second += Math.abs(k.w) * (d * d + (2 * d * k.shape) / k.rate + (k.shape * (k.shape + 1)) / (k.rate * k.rate));
  }
  // the one-claim term w F_X (X from 0, like the compound): weight w, mean w E X, second moment w E X^2 about lo
  const sev = model.dampedSeverity;
  if (sev) {
    const d = -lo;
    W += sev.w;
    mK += sev.w * (d + sev.moments[0]);
    second += sev.w * (d * d + 2 * d * sev.moments[0] + sev.moments[1]);
    // and the two-claim term w2 F_{X_1 + X_2}
    const pr = sev.pair;
    if (pairOut && pr) {
      W += pr.w;
      mK += pr.w * (d + pr.moments[0]);
      second += pr.w * (d * d + 2 * d * pr.moments[0] + pr.moments[1]);
    }
  }
  if (!Number.isFinite(mc) || !Number.isFinite(second)) return null;
  return { A: Mc - W, B: mc - mK, second: Math.max(second, 0) };
}

/**
 * The limit A of the inverted function G far out (continuous mass less the kernels', the one-claim and, with pairOut, the
 * two-claim terms' weights), finite whatever the moments: with imageTail's B it takes the cdf's images out where no second
 * moment exists (a power tail of index <= 2), sum_{m >= 1} (-1)^m q^m G(y + m T) = -A q / (1 + q) + at most q / (1 - q) B(y + T)
 */
export function imageLimit(model: CompiledModel, atoms: Atom[], pairOut: boolean): number {
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  let W = 0;
  for (const k of model.dampedKernels ?? []) W += k.w;
  const sev = model.dampedSeverity;
  if (sev) W += sev.w + (pairOut && sev.pair ? sev.pair.w : 0);
  return Mc - W;
}
