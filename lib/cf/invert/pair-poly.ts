import type { PowerSide, PowerTail } from "../direct/power-tail";

/**
 * The pair bound's algebra (./heavy-residual2.ts): posynomials sum_i c_i u^(-q_i) in the distance u, each operation rounded
 * up, and one power-tailed part's tails, truncated moments and density majorants as such posynomials (from its power-law
 * majorants, ../direct/power-tail.ts).
 */

const U = Number.EPSILON;

/** sum_i c_i u^(-q_i), c_i >= 0 */
export type Poly = { c: number[]; q: number[] };

export const mono = (c: number, q: number): Poly => ({ c: [c], q: [q] });
export const ZERO: Poly = { c: [], q: [] };
export function add(...ps: Poly[]): Poly {
  return { c: ps.flatMap((p) => p.c), q: ps.flatMap((p) => p.q) };
}
export function mul(a: Poly, b: Poly): Poly {
  const out: Poly = { c: [], q: [] };
  for (let i = 0; i < a.c.length; i++)
    for (let j = 0; j < b.c.length; j++) {
      out.c.push(a.c[i] * b.c[j] * (1 + 2 * U));
      out.q.push(a.q[i] + b.q[j]);
    }
  return out;
}
/** p(rho u) as a polynomial in u */
export function at(p: Poly, rho: number): Poly {
  return { c: p.c.map((c, i) => c * Math.pow(rho, -p.q[i]) * (1 + 4 * U * (2 + Math.abs(p.q[i])))), q: p.q };
}
export function value(p: Poly, u: number): number {
  let s = 0;
  for (let i = 0; i < p.c.length; i++) s += p.c[i] * Math.pow(u, -p.q[i]);
  return s * (1 + 4 * (p.c.length + 2) * U);
}

/** one heavy part H = G - m: its one-sided quantities per direction (1 right, -1 left) and two-sided ones, in t >= t0 */
export interface Heavy {
  t0: number;
  sf: [Poly, Poly];
  pi: [Poly, Poly];
  f0: [Poly, Poly];
  f1: [Poly, Poly];
  f2: [Poly, Poly];
  /** sup of the density */
  fmax: number;
  /** P(|H| > t), E[|H|; |H| > t], E[H^2; |H| <= t], E|H| */
  P: Poly;
  E1: Poly;
  M2: Poly;
  EA: number;
}

export function heavyPart(tail: PowerTail, m: number, spread: number): Heavy | null {
  // t0: every power side's origin within t0/8 of m and its `from` below 7 t0/8; every end within t0 of m
  let t0 = 0;
  for (const [d, s] of [[1, tail.right], [-1, tail.left]] as const) {
    if ("end" in s) t0 = Math.max(t0, d * (s.end - m));
    else t0 = Math.max(t0, 8 * Math.abs(m - s.origin), (8 / 7) * s.from);
  }
  t0 = t0 * (1 + 1e-12);
  const one = (d: 1 | -1, s: PowerSide) => {
    if ("end" in s) return { sf: ZERO, pi: ZERO, f0: ZERO, f1: ZERO, f2: ZERO };
    // z = t + d (m - origin) >= t (1 - |m - origin| / t0) = kappa t
    const kappa = 1 - Math.abs(m - s.origin) / t0;
    const fj = (j: number): Poly => ({ c: s.d[j].a.map((a, i) => a * Math.pow(kappa, -s.d[j].p[i]) * (1 + 8 * U * (s.d[j].p[i] + 2))), q: s.d[j].p.slice() });
    const f0 = fj(0);
    const sf: Poly = { c: f0.c.map((c, i) => (c / (f0.q[i] - 1)) * (1 + 4 * U)), q: f0.q.map((q) => q - 1) };
    const pi: Poly = { c: sf.c.map((c, i) => (sf.q[i] > 1 ? (c / (sf.q[i] - 1)) * (1 + 4 * U) : Infinity)), q: sf.q.map((q) => q - 1) };
    return { sf, pi, f0, f1: fj(1), f2: fj(2) };
  };
  // below t0 the tails are bounded by 1: t0 at least where the majorant's P(|H| > t) falls to 1 (steps of 1.25 from a
  // 64th of the law's spread), so that E|H| and E[H^2; ...] are not dominated by the majorant's blow-up at 0
  t0 = Math.max(t0, spread / 64);
  for (let it = 0; it < 400; it++) {
    const r0 = one(1, tail.right);
    const l0 = one(-1, tail.left);
    if (value(add(r0.sf, l0.sf), t0) <= 1) break;
    t0 *= 1.25;
  }
  const r = one(1, tail.right);
  const l = one(-1, tail.left);
  const P = add(r.sf, l.sf);
  if (P.q.some((q) => !(q > 1))) return null;
  // E[|H|; |H| > t] = t P(|H| > t) + E[(|H| - t)^+]
  const E1 = add({ c: P.c.slice(), q: P.q.map((q) => q - 1) }, r.pi, l.pi);
  // E[H^2; |H| <= r] <= t0^2 + int_t0^r 2 s P(|H| > s) ds: c s^-q gives 2c r^(2-q)/(2-q) for q < 2, 2c t0^(2-q)/(q-2) above
  // (q next to 2 lowered a little first)
  const M2: Poly = { c: [t0 * t0 * (1 + 2 * U)], q: [0] };
  for (let i = 0; i < P.c.length; i++) {
    let q = P.q[i];
    let c = P.c[i];
    if (Math.abs(q - 2) < 1e-6) {
      // s^-q <= s^-q' t0^(q' - q) for s >= t0 and q' < q
      const q2 = q - 2e-6;
      c *= Math.pow(t0, q2 - q) * (1 + 8 * U);
      q = q2;
    }
    if (q < 2) {
      M2.c.push(((2 * c) / (2 - q)) * (1 + 8 * U));
      M2.q.push(q - 2);
    } else M2.c[0] += ((2 * c * Math.pow(t0, 2 - q)) / (q - 2)) * (1 + 8 * U);
  }
  const below = belowT0(tail, m, t0);
  M2.c[0] += below.m2 - t0 * t0 * (1 + 2 * U);
  let EA = below.e1;
  for (let i = 0; i < P.c.length; i++) EA += (P.c[i] * Math.pow(t0, 1 - P.q[i])) / (P.q[i] - 1);
  if (![E1, M2].every((p) => p.c.every((c) => Number.isFinite(c)))) return null;
  return { t0, sf: [r.sf, l.sf], pi: [r.pi, l.pi], f0: [r.f0, l.f0], f1: [r.f1, l.f1], f2: [r.f2, l.f2], fmax: tail.fmax, P, E1, M2, EA: EA * (1 + 4 * U) };
}

/**
 * int_0^t0 P(|H| > s) ds and int_0^t0 2 s P(|H| > s) ds (the parts of E|H| and E[H^2; |H| <= r] below t0), at most t0 and
 * t0^2: P(|H| > s) is non-increasing, so on each piece [s_j, s_{j+1}] of a geometric grid (t0 2^(-j/4), down to t0 / 256,
 * then [0, t0 / 256] with P <= 1) it is at most its value at s_j, each side's from the majorant in the distance from its
 * origin z = s + d (m - origin) where z >= from (that distance itself, not the lower bound kappa s used beyond t0: the
 * majorants' origin may lie several units from m, where t0 = 8 |m - origin| made t0^2 the whole of E[B^2; ...]), else 1;
 * a side with an end has none beyond it. Every product and sum rounded up (64 u overall).
 */
function belowT0(tail: PowerTail, m: number, t0: number): { e1: number; m2: number } {
  const side = (d: 1 | -1, sd: PowerSide, t: number): number => {
    if ("end" in sd) return t >= d * (sd.end - m) ? 0 : 1;
    const z = t + d * (m - sd.origin);
    if (!(z >= sd.from && z > 0)) return 1;
    let v = 0;
    const f = sd.d[0];
    for (let i = 0; i < f.a.length; i++) v += f.p[i] > 1 ? ((f.a[i] * Math.pow(z, 1 - f.p[i])) / (f.p[i] - 1)) * (1 + 8 * U * (f.p[i] + 3)) : Infinity;
    return v * (1 + 4 * (f.a.length + 2) * U);
  };
  const P = (t: number) => Math.min(1, side(1, tail.right, t) + side(-1, tail.left, t));
  const N = 32;
  let lo = t0 * 2 ** (-N / 4);
  let e1 = lo;
  let m2 = lo * lo;
  for (let j = N - 1; j >= 0; j--) {
    const hi = j === 0 ? t0 : t0 * 2 ** (-j / 4);
    const p = P(lo);
    e1 += (hi - lo) * p;
    m2 += (hi * hi - lo * lo) * p;
    lo = hi;
  }
  return { e1: Math.min(t0, e1 * (1 + 64 * U)), m2: Math.min(t0 * t0, m2 * (1 + 64 * U)) * (1 + 2 * U) };
}

/** sum the coefficients of equal powers (each sum rounded up) */
export function merge(p: Poly): Poly {
  const by = new Map<number, number>();
  for (let i = 0; i < p.c.length; i++) if (p.c[i] !== 0) by.set(p.q[i], (by.get(p.q[i]) ?? 0) + p.c[i]);
  const q = [...by.keys()];
  return { c: q.map((k) => by.get(k)! * (1 + 4 * p.c.length * U)), q };
}
