/**
 * Upper bounds on first absolute moments E|X - c| of the tree's nodes (Node.absMomentAbout), where no finite variance
 * gives one (Lyapunov): the inversions' rounded nodes move the transform by u t times it (./invert/grid-rounding.ts).
 * Every value returned is an upper bound including its own rounding (u = 2^-53 per operation, Math.exp, log, pow, tan,
 * atan, cos within one ulp, allowed two), NaN where none is derived.
 */
import type { Node } from "./node";
import { cumulantEst } from "./cumulant-bounds";
import { lgamma, lgammaErr } from "./families/special";

const EPS = Number.EPSILON;
const U = EPS / 2;

/**
 * From the cumulants with their derived bounds: E|X - c| <= sqrt(kappa_2 + (kappa_1 - c)^2) (Lyapunov); for X >= lo
 * also E(X - lo) + |lo - c|, for X <= hi E(hi - X) + |hi - c|; the least of these, NaN where none is known.
 */
export function cumulantAbsMoment(node: Node, c: number): number {
  if (!(node.momentIndex > 1)) return NaN;
  const k = cumulantEst(node, node.momentIndex > 2 ? 2 : 1);
  return fromCumulants(k[0], k[1], node.support[0], node.support[1], c);
}

type Est = { v: number; e: number } | null | undefined;

function fromCumulants(k1: Est, k2: Est, lo: number, hi: number, c: number): number {
  if (!k1 || !Number.isFinite(k1.v + k1.e)) return NaN;
  let best = Infinity;
  if (k2 && Number.isFinite(k2.v + k2.e)) {
    const d = (Math.abs(k1.v - c) + k1.e) * (1 + EPS);
    best = Math.sqrt((Math.max(k2.v, 0) + k2.e + d * d) * (1 + 4 * EPS)) * (1 + 2 * EPS);
  }
  if (Number.isFinite(lo)) best = Math.min(best, (Math.max(k1.v + k1.e - lo, 0) + Math.abs(lo - c)) * (1 + 4 * EPS) + EPS * Math.abs(lo));
  if (Number.isFinite(hi)) best = Math.min(best, (Math.max(hi - k1.v + k1.e, 0) + Math.abs(hi - c)) * (1 + 4 * EPS) + EPS * Math.abs(hi));
  return Number.isFinite(best) ? best : NaN;
}

/** The least of the node's own bound (absMomentAbout) and the cumulants' one; NaN where neither is derived. */
export function absMomentOf(node: Node, c: number): number {
  const a = node.absMomentAbout ? node.absMomentAbout(c) : NaN;
  const b = cumulantAbsMoment(node, c);
  const m = Math.min(Number.isFinite(a) ? a : Infinity, Number.isFinite(b) ? b : Infinity);
  return Number.isFinite(m) ? m : NaN;
}

/** E|X - c| <= m0 + |x0 - c| (triangle inequality) for a bound m0 on E|X - x0| */
const about = (m0: number, x0: number) => (c: number) => (Number.isFinite(m0) ? (m0 + Math.abs(x0 - c)) * (1 + 2 * EPS) : NaN);

/**
 * Student t (nu > 1): E|T - loc| = scale 2 sqrt(nu) Gamma((nu + 1)/2) / (sqrt(pi) (nu - 1) Gamma(nu/2)) (common practice;
 * tests/fixtures/abs-moment). The ratio of Gammas from lgamma with lgammaErr at both arguments, (nu + 1)/2 rounded (moving
 * lgamma by at most |psi(x)| u x, |psi(x)| <= |log x| + 1/x), nu - 1 rounded (exact for nu <= 2).
 */
export function studentTAbsMoment(nu: number, loc: number, scale: number): ((c: number) => number) | undefined {
  if (!(nu > 1) || !Number.isFinite(nu)) return undefined;
  const x1 = (nu + 1) / 2;
  const x2 = nu / 2;
  const L = lgamma(x1) - lgamma(x2);
  const eL = lgammaErr(x1) + lgammaErr(x2) + (Math.abs(Math.log(x1)) + 1 / x1) * U * x1 * (1 + 4 * EPS) + U * Math.abs(L) + EPS * (Math.abs(lgamma(x1)) + Math.abs(lgamma(x2)));
  const r = Math.exp(L + eL * (1 + 4 * EPS) + EPS * Math.abs(L));
  const m0 = ((scale * 2 * Math.sqrt(nu) * r) / (Math.sqrt(Math.PI) * (nu - 1))) * (1 + 16 * EPS);
  return about(m0, loc);
}

/**
 * Stable law, 1 < alpha < 2, S1 scale g, skewness b, mean d: E|X - d| = (2/pi) g Gamma(1 - 1/alpha) (1 + b^2 T^2)^{1/(2 alpha)}
 * cos(arctan(b T) / alpha), T = tan(pi alpha / 2) (the fractional absolute moment of stable laws at p = 1, Samorodnitsky and
 * Taqqu 1994, Property 1.2.17; recalled from memory, checked against a quadrature in tests/fixtures/abs-moment). The factor
 * f(B) = (1 + B^2)^{1/(2 alpha)} cos(arctan(B) / alpha) rises with B = |b T| (f' has the sign of tan(th) cos(th/alpha) -
 * sin(th/alpha) >= 0, th = arctan B), so it is taken at an upper bound of |T| = cot(pi (alpha - 1)/2) (alpha - 1 exact,
 * cot falling); Gamma falls on (0, 1.46), so it is taken at a lower bound of 1 - 1/alpha. `param` S0: the mean
 * loc - b g T is formed here with its rounding bound (T bracketed the same way).
 */
export function stableAbsMoment(alpha: number, beta: number, g: number, loc: number, param: "S0" | "S1"): ((c: number) => number) | undefined {
  if (!(alpha > 1 && alpha < 2) || !(g > 0) || !Number.isFinite(g)) return undefined;
  const e = alpha - 1;
  const y = (Math.PI * e) / 2;
  const tUp = (1 / Math.tan(y * (1 - 4 * EPS))) * (1 + 8 * EPS);
  const yh = y * (1 + 5 * U);
  const tLo = yh < 1.5707963267948966 ? Math.max(0, (1 / Math.tan(yh)) * (1 - 8 * EPS)) : 0;
  if (!Number.isFinite(tUp)) return undefined;
  const B = Math.abs(beta) * tUp * (1 + 2 * EPS);
  const S = 1 + B * B;
  const P = Math.pow(S, 1 / (2 * alpha)) * (1 + 6 * EPS + U * Math.log(S));
  const q = (Math.atan(B) / alpha) * (1 - 4 * EPS);
  const C = Math.cos(q) * (1 + 4 * EPS);
  const z = 1 - 1 / alpha - 2 * U;
  if (!(z > 0)) return undefined;
  const G = Math.exp(lgamma(z) + lgammaErr(z) * (1 + 4 * EPS) + EPS * Math.abs(lgamma(z))) * (1 + 2 * EPS);
  const m0 = (2 / Math.PI) * g * G * P * C * (1 + 16 * EPS);
  if (param === "S1") return about(m0, loc);
  // S0: the mean d = loc - b g T (T < 0), the computed one off by at most |b| g (tUp - tLo) and its roundings
  const t = Math.tan((Math.PI * alpha) / 2);
  const d = loc - beta * g * t;
  const dErr = Math.abs(beta) * g * Math.max(tUp - Math.abs(t), Math.abs(t) - tLo, 0) * (1 + 4 * EPS) + 4 * EPS * (Math.abs(loc) + Math.abs(beta) * g * tUp);
  return about(m0 + dErr, d);
}

/** the node's own bound, for a family with one derived here (families whose variance serves have none) */
export function familyAbsMoment(family: string, p: Record<string, unknown>): ((c: number) => number) | undefined {
  const num = (k: string, d: number) => (typeof p[k] === "number" ? (p[k] as number) : d);
  if (family === "student_t") return studentTAbsMoment(num("nu", NaN), num("loc", 0), num("scale", 1));
  if (family === "stable") return stableAbsMoment(num("alpha", NaN), num("beta", 0), num("scale", 1), num("loc", 0), p.param === "S0" ? "S0" : "S1");
  return undefined;
}

/**
 * A group of terms read through their cumulants (their sum's kappa_1, kappa_2 and support, each with the terms' derived
 * bounds and the additions' rounding): cumulantAbsMoment of the sum.
 */
function groupAbsMoment(cs: readonly Node[]): (c: number) => number {
  if (cs.length === 1) return (c) => cumulantAbsMoment(cs[0], c);
  let at: ((c: number) => number) | null = null;
  // (formed at the first call: most models never ask)
  return (c) => (at ??= groupOf(cs))(c);
}

function groupOf(cs: readonly Node[]): (c: number) => number {
  const order = cs.every((x) => x.momentIndex > 2) ? 2 : 1;
  const ks = cs.map((x) => (x.momentIndex > 1 ? cumulantEst(x, order) : []));
  const sum = (j: number) => {
    let v = 0;
    let e = 0;
    let a = 0;
    for (const k of ks) {
      const r = k[j];
      if (!r) return null;
      v += r.v;
      e += r.e;
      a += Math.abs(r.v);
    }
    return { v, e: (e + cs.length * EPS * a) * (1 + cs.length * EPS) };
  };
  const k1 = sum(0);
  const k2 = order === 2 ? sum(1) : null;
  const lo = cs.reduce((s, x) => s + x.support[0], 0) - cs.length * EPS * cs.reduce((s, x) => s + Math.abs(x.support[0]), 0);
  const hi = cs.reduce((s, x) => s + x.support[1], 0) + cs.length * EPS * cs.reduce((s, x) => s + Math.abs(x.support[1]), 0);
  return (c) => fromCumulants(k1, k2, lo, hi, c);
}

/**
 * Independent sum: E|sum X_i - c| <= E|L - c'| + sum_h E|H_h - m_h| + |c' + sum m_h - c| for any numbers m_h, c' (triangle
 * inequality), H the terms with their own bound (m_h their computed mean, else location), L the others together (their
 * sum's variance or lower end), c' = fl(c - fl(sum m_h)) with both roundings counted. Absent where no term has its own bound.
 */
export function sumAbsMoment(cs: readonly Node[]): ((c: number) => number) | undefined {
  if (!cs.some((x) => x.absMomentAbout)) return undefined;
  const heavy = cs.filter((x) => x.absMomentAbout);
  const light = cs.filter((x) => !x.absMomentAbout);
  const rest = light.length ? groupAbsMoment(light) : (c: number) => Math.abs(c);
  // (the heavy terms' part formed at the first call: most models never ask)
  let fixed = NaN;
  let M = 0;
  let mErr = 0;
  let done = false;
  return (c) => {
    if (!done) {
      done = true;
      const ms = heavy.map(centreOf);
      fixed = 0;
      for (let j = 0; j < heavy.length; j++) fixed += absMomentOf(heavy[j], ms[j]);
      let Ma = 0;
      for (const m of ms) {
        M += m;
        Ma += Math.abs(m);
      }
      mErr = heavy.length * EPS * Ma;
    }
    if (!Number.isFinite(fixed)) return NaN;
    const c2 = c - M;
    const r = rest(c2);
    return (r + fixed + U * Math.abs(c2) + mErr) * (1 + (4 + cs.length) * EPS);
  };
}

/** a X: E|a X - c| = |a| E|X - c/a|, c/a rounded (within u |c/a|) */
export function scaleAbsMoment(a: number, x: Node): ((c: number) => number) | undefined {
  if (!x.absMomentAbout || !(a !== 0 && Number.isFinite(a))) return undefined;
  return (c) => {
    const q = c / a;
    return Math.abs(a) * (absMomentOf(x, q) + 2 * U * Math.abs(q)) * (1 + 4 * EPS);
  };
}

/** X + b: E|X + b - c| = E|X - (c - b)|, c - b rounded */
export function shiftAbsMoment(b: number, x: Node): ((c: number) => number) | undefined {
  if (!x.absMomentAbout || !Number.isFinite(b)) return undefined;
  return (c) => {
    const q = c - b;
    return (absMomentOf(x, q) + 2 * U * Math.abs(q)) * (1 + 2 * EPS);
  };
}

/** n independent copies: E|sum X_i - c| <= n E|X - m| + |n m - c| (m the computed mean, else location) */
export function repeatAbsMoment(n: number, x: Node): ((c: number) => number) | undefined {
  if (!x.absMomentAbout) return undefined;
  let m = NaN;
  let one = NaN;
  return (c) => {
    if (Number.isNaN(m)) {
      m = centreOf(x);
      one = absMomentOf(x, m);
    }
    return (n * one + Math.abs(n * m - c) + 2 * U * (Math.abs(n * m) + Math.abs(c))) * (1 + 4 * EPS);
  };
}

/** a term's computed mean, else its location: any number serves as the centre in the triangle inequality */
function centreOf(x: Node): number {
  const m = x.momentIndex > 1 ? x.cumulants(1)[0] : null;
  return m !== null && Number.isFinite(m) ? m : x.location;
}

/** mixture: E|X - c| = sum_j w_j E|X_j - c| */
export function mixAbsMoment(ws: readonly number[], cs: readonly Node[]): ((c: number) => number) | undefined {
  if (!cs.some((x) => x.absMomentAbout)) return undefined;
  return (c) => {
    let s = 0;
    cs.forEach((x, j) => (s += Math.abs(ws[j]) * absMomentOf(x, c)));
    return s * (1 + (cs.length + 2) * EPS);
  };
}

/** the tail term G = D + shift (../invert/part.ts withTailLaw): E|G - c| = E|D - (c - shift)|, c - shift rounded */
export function tailAbsMoment(D: Node, shift: number): (c: number) => number {
  return (c) => {
    const q = c - shift;
    return (absMomentOf(D, q) + 2 * U * Math.abs(q)) * (1 + 2 * EPS);
  };
}
