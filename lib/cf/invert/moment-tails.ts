import type { CompiledModel } from "../types";

const EPS = Number.EPSILON;
/** highest moment order tried in Markov's inequality (the best order for a light tail grows with the distance) */
const MAX_ORDER = 40;

/** log upper bounds on E[((X - lo) / c)^n], n = 1 .. (index 0 unused); NaN where no positive bound is known */
export interface MomentBounds {
  c: number;
  logU: Float64Array;
}

/**
 * Markov's inequality at its best order: P((X - lo) > r) <= E[(X - lo)^n] / r^n for X >= lo (every order), and
 * P(|X - lo| >= r) <= E[(X - lo)^n] / r^n for even n whatever the support (evenOnly); each candidate carries the rounding
 * of its logarithms (log U_n, n log(r / c)), so exp errs by a few ulps more. Infinity when no order is usable.
 */
export function markovTail(m: MomentBounds, r: number, evenOnly: boolean): number {
  if (!(r > 0)) return Infinity;
  const lr = Math.log(r / m.c);
  let best = Infinity;
  for (let n = evenOnly ? 2 : 1; n < m.logU.length; n += evenOnly ? 2 : 1) {
    const l = m.logU[n];
    if (Number.isNaN(l)) continue;
    best = Math.min(best, l - n * lr + 4 * EPS * (Math.abs(l) + n * Math.abs(lr) + n + 1));
  }
  return Math.exp(best) * (1 + 4 * EPS);
}

/**
 * E[(X - lo - r)^+] for X >= lo, r > 0, at its best order: (y - r)^+ <= y^n (n - 1)^{n-1} / (n^n r^{n-1}) for y >= 0 and
 * n >= 2 (the ratio (y - r) / y^n is largest at y = n r / (n - 1)), so E[(Y - r)^+] <= E[Y^n] (n - 1)^{n-1} / (n^n r^{n-1});
 * each candidate carries the rounding of its logarithms as markovTail's do. With evenOnly, X on either side of lo: for even n
 * the same inequality holds for every real y (both sides are >= 0, the left one 0 for y <= r), so E[(X - lo - r)^+] <=
 * E[(X - lo)^n] (n - 1)^{n-1} / (n^n r^{n-1}). Infinity when no order is usable.
 */
export function markovExcess(m: MomentBounds, r: number, evenOnly = false): number {
  if (!(r > 0)) return Infinity;
  const lr = Math.log(r / m.c);
  let best = Infinity;
  for (let n = 2; n < m.logU.length; n += evenOnly ? 2 : 1) {
    const l = m.logU[n];
    if (Number.isNaN(l)) continue;
    const shape = (n - 1) * Math.log(n - 1) - n * Math.log(n);
    best = Math.min(best, l + shape - (n - 1) * lr + 8 * EPS * (Math.abs(l) + Math.abs(shape) + n * Math.abs(lr) + n + 1));
  }
  return m.c * Math.exp(best) * (1 + 8 * EPS);
}

/**
 * Upper bounds on E[((X - lo) / c)^n], n = 1 .. N < min(momentIndex, MAX_ORDER + 1), as logarithms, c a scale that keeps
 * them in range; null when the cumulants or their bounds are missing. The raw moments come from the cumulants by the
 * recursion m_n = sum_j C(n - 1, j - 1) kappa_j m_{n - j} (Smith 1995, Int. Stat. Review 63, eq. 5; kappa_1 shifted by
 * lo), run on values v_n with an absolute bound e_n: each product C kappa_j v_{n - j} errs by |kappa_j| e +
 * delta_j (|v| + e) (delta_j the cumulant's derived bound, scaled), plus (n + 4) 2 eps of sum |C kappa_j v| for the
 * products and the sum. An order whose upper bound is not positive gets NaN (an odd moment of a law on both sides of lo);
 * a non-finite one ends the list.
 */
export function momentBounds(model: CompiledModel, lo: number, r0 = Infinity): MomentBounds | null {
  const top = Number.isFinite(model.momentIndex) ? Math.min(MAX_ORDER, Math.ceil(model.momentIndex) - 1) : MAX_ORDER;
  if (top < 1) return null;
  let memo = CACHE.get(model);
  if (!memo) CACHE.set(model, (memo = new Map()));
  // a model's high cumulants can be costly (Poisson(25)-lognormal: 2 ms to order 8, 2 s to order 40): orders are added
  // (6, 12, 24, 40) only while the bound at the nearest distance r0 still falls with the order. The moments of |X - lo|
  // are log-convex (Lyapunov's inequality), so once m_n / m_{n-2} >= r0^2 higher orders only raise the bound at r0;
  // farther points keep a valid, if not their best, bound
  for (let N = Math.min(6, top); ; N = Math.min(top, 2 * N)) {
    const key = `${lo}:${N}`;
    let res = memo.get(key);
    if (res === undefined) memo.set(key, (res = boundsUpTo(model, lo, N)));
    if (!res || N >= top) return res;
    const L = res.logU;
    const n = L.length - 1;
    if (n < N || !(Number.isFinite(L[n]) && Number.isFinite(L[n - 2]))) return res;
    if ((L[n] - L[n - 2]) / 2 >= Math.log(r0 / res.c)) return res;
  }
}

const CACHE = new WeakMap<CompiledModel, Map<string, MomentBounds | null>>();

function boundsUpTo(model: CompiledModel, lo: number, N0: number): MomentBounds | null {
  // the orders the model states as finite numbers (a node may list fewer than asked, e.g. the truncated normal's 24;
  // a sum of it then has NaN beyond): the error bounds are asked for those only
  const all = model.cumulants(N0);
  let N = 0;
  while (N < N0 && N < all.length && typeof all[N] === "number" && Number.isFinite(all[N])) N++;
  if (N < 1) return null;
  const k = all.slice(0, N);
  const ke = model.cumulantErrors!(N);
  const k1 = k[0];
  const k2 = N >= 2 ? k[1] : 0;
  if (k1 === null || !Number.isFinite(k1)) return null;
  const c = Math.max(Math.abs(k1 - lo) + Math.sqrt(Math.max(k2 ?? 0, 0)), 1e-300);
  const kt: number[] = [0];
  const dt: number[] = [0];
  for (let j = 1; j <= N; j++) {
    const kj = k[j - 1];
    const ej = ke[j - 1];
    if (kj === null || ej === null || !Number.isFinite(kj) || !Number.isFinite(ej)) break;
    const cj = Math.pow(c, j);
    const raw = j === 1 ? kj - lo : kj;
    const v = raw / cj;
    if (!Number.isFinite(v) || !Number.isFinite(cj)) break;
    // kappa_1 - lo rounds once; pow and the division within (j + 4) eps
    const e = (ej + (j === 1 ? EPS * (Math.abs(kj) + Math.abs(lo)) : 0)) / cj + (j + 4) * 2 * EPS * Math.abs(v);
    kt.push(v);
    dt.push(e);
  }
  const M = kt.length - 1;
  if (M < 1) return null;
  const v = new Float64Array(M + 1);
  const e = new Float64Array(M + 1);
  const logU: number[] = [0];
  v[0] = 1;
  // binomial coefficients C(n - 1, j - 1), exact in doubles up to n = 40 (below 2^53)
  let row = [1];
  for (let n = 1; n <= M; n++) {
    if (n > 1) {
      const next = [1];
      for (let i = 1; i < n - 1; i++) next.push(row[i - 1] + row[i]);
      next.push(1);
      row = next;
    }
    let s = 0;
    let sAbs = 0;
    let err = 0;
    for (let j = 1; j <= n; j++) {
      const C = row[j - 1];
      const t = C * kt[j] * v[n - j];
      s += t;
      sAbs += Math.abs(t);
      err += C * (Math.abs(kt[j]) * e[n - j] + dt[j] * (Math.abs(v[n - j]) + e[n - j]));
    }
    err += (n + 4) * 2 * EPS * sAbs;
    v[n] = s;
    e[n] = err * (1 + 4 * n * EPS);
    const U = s + e[n];
    if (!Number.isFinite(U)) break;
    logU.push(U > 0 ? Math.log(U) : NaN);
  }
  return logU.length > 1 ? { c, logU: Float64Array.from(logU) } : null;
}
