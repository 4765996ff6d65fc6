import type { Atom, CompiledModel } from "../types";
import type { GammaKernel } from "../damped-kernels";
import type { ContinuousPart } from "./part";
import { nodeRounding } from "../arg-rounding";

/**
 * Lipschitz constants, in t, of what the inversions evaluate at their rounded nodes fl((k + 1/2) h) (../arg-rounding.ts):
 * the first absolute moments of the measures whose transforms they are. NaN where no bound is derived (a law without
 * a first absolute moment bound, or a subtracted heavy tail term); the callers then leave the term out.
 */

const EPS = Number.EPSILON;

/**
 * E|X - c| <= sqrt(E (X - c)^2) = sqrt(kappa_2 + (kappa_1 - c)^2) (Lyapunov), the cumulants with their derived bounds
 * (CompiledModel.cumulantErrors); for X >= lo also E(X - lo) + |lo - c|, the least of the two. NaN where neither is known.
 */
export function absMomentAbout(model: CompiledModel, c: number): number {
  const lo = model.support[0];
  const order = model.momentIndex > 2 ? 2 : model.momentIndex > 1 ? 1 : 0;
  if (order === 0) return NaN;
  const k = model.cumulants(order);
  const e = model.cumulantErrors?.(order) ?? [];
  const k1 = k[0];
  const e1 = e[0];
  if (typeof k1 !== "number" || typeof e1 !== "number" || !Number.isFinite(k1 + e1)) return NaN;
  let best = Infinity;
  const k2 = k[1];
  const e2 = e[1];
  if (order === 2 && typeof k2 === "number" && typeof e2 === "number" && Number.isFinite(k2 + e2)) {
    const d = (Math.abs(k1 - c) + e1) * (1 + EPS);
    best = Math.sqrt((Math.max(k2, 0) + e2 + d * d) * (1 + 4 * EPS)) * (1 + 2 * EPS);
  }
  if (Number.isFinite(lo)) best = Math.min(best, (Math.max(k1 + e1 - lo, 0) + Math.abs(lo - c)) * (1 + 4 * EPS) + EPS * Math.abs(lo));
  return Number.isFinite(best) ? best : NaN;
}

/**
 * The undamped part phi_part(t) = [(phi - sum atoms) / w - kernels - phi_G] e^{-i t c} (./part.ts evalPart, all at the same
 * t): its derivative is at most (E|X - c| + sum p_j |x_j - c|) / w + sum |b| E|G_k - c| (+ E|G - c| for the tail term,
 * not derived here: NaN). Kernel k is Gamma(power + j, rate) on the side of `at`: E|G - c| <= |at - c| + (power + j) / rate.
 */
export function partLipschitz(part: ContinuousPart): number {
  if (part.tail) return NaN;
  let s = absMomentAbout(part.model, part.center);
  for (const a of part.atoms) s += a.p * Math.abs(a.x - part.center);
  s /= part.weight;
  for (const k of part.kernels) k.b.forEach((b, j) => (s += Math.abs(b) * (Math.abs(k.at - part.center) + (k.power + j) / k.rate)));
  return s * (1 + (4 + part.atoms.length) * EPS);
}

/**
 * The damped psi(t) = e^{beta lo} [E e^{(it - beta) X} - atoms - kernels - one-claim terms] e^{-i t lo} (./damped-psi.ts
 * psiOf) at fixed beta: in t each piece's derivative is at most E[(Y - lo) e^{-beta (Y - lo)}] times its mass (Y >= lo its
 * law), at most its first moment about lo and at most its mass / (e beta) (y e^{-beta y} <= 1 / (e beta)): the model
 * (E(X - lo)), the atoms (p_j, x_j), the kernels (|w_k|, at_k - lo + shape_k / rate_k) and the severity's one- and
 * two-claim laws (w_1 E X_1, w_2 E X_2; they start at lo = 0).
 */
export function dampedLipschitz(model: CompiledModel, atoms: Atom[], kernels: readonly GammaKernel[], pairOut: boolean, beta: number): number {
  const lo = model.support[0];
  const cap = beta > 0 ? 1 / (Math.E * beta) : Infinity;
  const piece = (mass: number, moment: number) => Math.min(mass * moment, mass * cap);
  const m = absMomentAbout(model, lo);
  let s = piece(1, Number.isFinite(m) ? m : Infinity);
  for (const a of atoms) s += piece(a.p, Math.abs(a.x - lo));
  for (const k of kernels) s += piece(Math.abs(k.w), Math.abs(k.at - lo) + k.shape / k.rate);
  const sev = model.dampedSeverity;
  if (sev) {
    s += piece(Math.abs(sev.w), sev.moments[0]);
    if (pairOut && sev.pair) s += piece(Math.abs(sev.pair.w), sev.pair.moments[0]);
  }
  return s * (1 + (8 + atoms.length + kernels.length) * EPS);
}

/**
 * The damped route's nodes: psi is evaluated at fl((k + 1/2) h) (`rounded`; null where the step makes them exact) and the
 * model's own slope acts on |w| <= t + beta; each node's noise grows by (u L + S) t_k + S beta (../arg-rounding.ts).
 */
export function addGridNoise(
  model: CompiledModel,
  atoms: Atom[],
  beta: number,
  pairOut: boolean,
  rounded: Float64Array | null,
  t: Float64Array,
  noise: Float64Array,
): void {
  const S0 = model.cfArgSlope ?? 0;
  const S = Number.isFinite(S0) ? S0 : 0;
  const L0 = rounded ? dampedLipschitz(model, atoms, model.dampedKernels ?? [], pairOut, beta) : 0;
  const L = Number.isFinite(L0) ? L0 : 0;
  if (L === 0 && S === 0) return;
  const sb = S * beta * (1 + 2 * EPS);
  for (let k = 0; k < t.length; k++) noise[k] += nodeRounding(L, S, t[k]) + sb;
}
