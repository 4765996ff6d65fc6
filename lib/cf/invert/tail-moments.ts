import type { CompiledModel } from "../types";
import { cumulantsToCentralE, type Est, type EstList } from "../moment-error";

/**
 * Bounds on the stop-loss transforms E[(X - u)^+] and E[(u - X)^+] of the whole law from its central moments: for any
 * c < u and even n, (x - u)^+ <= k_n (x - c)^n / (u - c)^{n-1} with k_n = (n - 1)^{n-1} / n^n (below u the left side is
 * 0; above, with s = x - c >= d = u - c, (s - d) / s^n is largest at s = n d / (n - 1), where it is k_n / d^{n-1}: 1/4 for
 * n = 2, 0.105 for n = 4), so E[(X - u)^+] <= k_n E (X - c)^n / (u - c)^{n-1}, the best of n = 2, 4, ..., 12 (40 on demand,
 * stopLossBounds). With c the computed mean mu_h and
 * |mu - mu_h| <= e_mu, Minkowski's inequality gives (E (X - c)^n)^{1/n} <= (m_n + e_n)^{1/n} + e_mu, m_n the central
 * moment with its running-error bound e_n (moment-error.ts). Beyond an end of the model's support the transform is 0.
 * Null where the moments (or their bounds) are missing.
 */
export interface StopLossBounds {
  /** >= E[(X - u)^+]; `goal`: see stopLossBounds */
  right(u: number, goal?: number): number;
  /** >= E[(u - X)^+] */
  left(u: number, goal?: number): number;
}

/** the orders taken: up to 12 at first; up to 40 on demand (every family's cumulants and their bounds reach it: the
 * Bernoulli table goes to 42) */
const FIRST_ORDER = 12;
const LAST_ORDER = 40;

/** (E (X - c)^n)^{1/n} per even n up to `top` (below the moment index), by Minkowski from the central moments; null without them */
function momentRoots(model: CompiledModel, top: number): { c: number; roots: [number, number][]; order: number } | null {
  let order = top;
  while (order >= 2 && !(order < model.momentIndex)) order--;
  order -= order % 2;
  if (order < 2 || !model.cumulantErrors) return null;
  const kappa = model.cumulants(order);
  const errs = model.cumulantErrors(order);
  const ests: EstList = kappa.map((v, k) => (v === null || errs[k] === null || !Number.isFinite(errs[k] as number) ? null : { v, e: errs[k] as number }));
  if (!ests[0]) return null;
  const mu = ests[0] as Est;
  const central = cumulantsToCentralE(ests);
  const roots: [number, number][] = [];
  for (let n = 2; n <= order; n += 2) {
    const m = central[n - 1];
    if (!m || !Number.isFinite(m.e)) continue;
    const r = Math.pow(Math.max(m.v, 0) + m.e, 1 / n) * (1 + 1e-14) + mu.e;
    if (Number.isFinite(r)) roots.push([n, r]);
  }
  return roots.length ? { c: mu.v, roots, order } : null;
}

/**
 * The bounds from the orders up to 12; where a caller passes a `goal` (an absolute size it would like the bound below) and
 * the bound at the 12th order is above it while still falling with the order (its best n the last), the orders up to 40
 * are formed once and taken too. Far out that matters: normal + uniform 8.6 standard deviations out, 1.9e-8 at n = 12,
 * 1.2e-10 at n = 40, against about 1e-23. The higher orders cost a compound's cumulants to order 40 (up to 80 ms for a
 * sum of three compounds), so only on demand.
 */
export function stopLossBounds(model: CompiledModel): StopLossBounds | null {
  const first = momentRoots(model, FIRST_ORDER);
  if (!first) return null;
  const c = first.c;
  let roots = first.roots;
  let extended = !(first.order === FIRST_ORDER && model.momentIndex > FIRST_ORDER + 2);
  const bound = (dist: number, goal: number) => {
    if (!(dist > 0)) return Infinity;
    let best = Infinity;
    let bestN = 0;
    // k_n r^n / dist^(n-1) = dist (r / dist)^n k_n, formed in logs so that neither power overflows
    for (const [n, r] of roots) {
      const b = dist * Math.exp(n * Math.log(r / dist) + (n - 1) * Math.log(n - 1) - n * Math.log(n)) * (1 + 1e-13);
      if (b < best) [best, bestN] = [b, n];
    }
    if (best > goal && !extended && bestN === roots[roots.length - 1][0]) {
      extended = true;
      const more = momentRoots(model, LAST_ORDER);
      // the same mean (its first cumulant is the same computation), so only the roots are taken
      if (more && more.c === c) roots = more.roots;
      return bound(dist, goal);
    }
    return best;
  };
  const [lo, hi] = model.support;
  return {
    right: (u, goal = Infinity) => (u >= hi ? 0 : bound(u - c, goal)),
    left: (u, goal = Infinity) => (u <= lo ? 0 : bound(c - u, goal)),
  };
}
