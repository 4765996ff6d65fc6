import type { CompiledModel } from "../types";
import { cumulantsToCentralE, type Est, type EstList } from "../moment-error";
import { MAX_MOMENT_ORDER } from "../limits";

/**
 * Bounds on the stop-loss transforms E[(X - u)^+] and E[(u - X)^+] of the whole law from its central moments: for any
 * c < u and even n, (x - u)^+ <= k_n (x - c)^n / (u - c)^{n-1} with k_n = (n - 1)^{n-1} / n^n (below u the left side is
 * 0; above, with s = x - c >= d = u - c, (s - d) / s^n is largest at s = n d / (n - 1), where it is k_n / d^{n-1}: 1/4 for
 * n = 2, 0.105 for n = 4), so E[(X - u)^+] <= k_n E (X - c)^n / (u - c)^{n-1}, the best of n = 2, 4, ..., 12. With c the computed mean mu_h and
 * |mu - mu_h| <= e_mu, Minkowski's inequality gives (E (X - c)^n)^{1/n} <= (m_n + e_n)^{1/n} + e_mu, m_n the central
 * moment with its running-error bound e_n (moment-error.ts). Beyond an end of the model's support the transform is 0.
 * Null where the moments (or their bounds) are missing.
 */
export interface StopLossBounds {
  /** >= E[(X - u)^+] */
  right(u: number): number;
  /** >= E[(u - X)^+] */
  left(u: number): number;
}

export function stopLossBounds(model: CompiledModel): StopLossBounds | null {
  let order = MAX_MOMENT_ORDER;
  while (order >= 2 && !(order < model.momentIndex)) order--;
  order -= order % 2;
  if (order < 2 || !model.cumulantErrors) return null;
  const kappa = model.cumulants(order);
  const errs = model.cumulantErrors(order);
  const ests: EstList = kappa.map((v, k) => (v === null || errs[k] === null || !Number.isFinite(errs[k] as number) ? null : { v, e: errs[k] as number }));
  if (!ests[0]) return null;
  const mu = ests[0] as Est;
  const central = cumulantsToCentralE(ests);
  // (E (X - c)^n)^{1/n} per even n (Infinity where not bounded)
  const roots: [number, number][] = [];
  for (let n = 2; n <= order; n += 2) {
    const m = central[n - 1];
    if (!m || !Number.isFinite(m.e)) continue;
    const r = Math.pow(Math.max(m.v, 0) + m.e, 1 / n) * (1 + 1e-14) + mu.e;
    if (Number.isFinite(r)) roots.push([n, r]);
  }
  if (!roots.length) return null;
  const c = mu.v;
  const bound = (dist: number) => {
    if (!(dist > 0)) return Infinity;
    let best = Infinity;
    // k_n r^n / dist^(n-1) = dist (r / dist)^n k_n, formed in logs so that neither power overflows
    for (const [n, r] of roots) best = Math.min(best, dist * Math.exp(n * Math.log(r / dist) + (n - 1) * Math.log(n - 1) - n * Math.log(n)) * (1 + 1e-13));
    return best;
  };
  const [lo, hi] = model.support;
  return { right: (u) => (u >= hi ? 0 : bound(u - c)), left: (u) => (u <= lo ? 0 : bound(c - u)) };
}
