// Sums over connected labelled graphs of a weight per edge, the lognormal law's cumulants without cancellation.
import { add, exact, mul, type Est } from "../moment-error";

/** the arithmetic the recurrence runs in: doubles, or values with running error bounds (../moment-error.ts) */
interface Ring<T> {
  int(n: number): T;
  add(a: T, b: T): T;
  mul(a: T, b: T): T;
}
const DOUBLES: Ring<number> = { int: (n) => n, add: (a, b) => a + b, mul: (a, b) => a * b };
const ESTIMATES: Ring<Est> = { int: exact, add, mul };

/**
 * a^k C_k(d) for k = 1..n, C_k(d) the sum over the connected labelled graphs on k vertices of d^{edges}
 * (d >= 0), through C_{m+1}(d) = d^m J_m(1 + d), J_m the inversion enumerator of labelled trees on m + 1 vertices:
 * J_0 = 1, J_{m+1}(q) = sum_{i=0}^{m} C(m, i) [i+1]_q J_i(q) J_{m-i}(q), [k]_q = 1 + q + ... + q^{k-1} (Mallows &
 * Riordan, The inversion enumerator for labeled trees, Bull. AMS 74 (1968), 92-94). Every term is non-negative for
 * q >= 1, so no step cancels. The recurrence runs on T_m = t^m J_m, t = a d (T_{m+1} = t sum C(m, i) [i+1]_q T_i
 * T_{m-i}), so that its values stay on the scale of the results: J_m alone overflows where a is small (a lognormal
 * with a negative mu), d^m alone underflows where d is.
 */
function scaledSums<T>(r: Ring<T>, d: T, a: T, n: number): T[] {
  const q = r.add(r.int(1), d);
  const t = r.mul(a, d);
  const tm: T[] = [r.int(1)];
  // qBracket[i] = [i+1]_q
  const qBracket: T[] = [r.int(1)];
  // C(m, 0..m) by Pascal's rule in the ring itself: exact integers while below 2^53 (m <= 56), bounded past that
  let c: T[] = [r.int(1)];
  for (let m = 0; m + 1 < n; m++) {
    if (m > 0) c = [r.int(1), ...c.slice(1).map((v, i) => r.add(c[i], v)), r.int(1)];
    qBracket.push(r.add(r.int(1), r.mul(q, qBracket[m])));
    let s = r.int(0);
    for (let i = 0; i <= m; i++) s = r.add(s, r.mul(r.mul(c[i], qBracket[i]), r.mul(tm[i], tm[m - i])));
    tm.push(r.mul(t, s));
  }
  return tm.slice(0, Math.max(0, n)).map((v) => r.mul(a, v));
}

/** a^k C_k(d), k = 1..n, in doubles: non-negative terms only, each rounding relative */
export const connectedGraphSums = (d: number, a: number, n: number): number[] => scaledSums(DOUBLES, d, a, n);

/** the same with running error bounds: the value and bound of each a^k C_k(d), d and a themselves estimates */
export const connectedGraphSumsE = (d: Est, a: Est, n: number): Est[] => scaledSums(ESTIMATES, d, a, n);
