/**
 * Moments of a per-claim layer Z = min((X - d)_+, l) in closed form, each with a derived bound on its absolute error
 * (running error analysis, ../moment-error.ts). From the partial moments M_j(a, b) = E[X^j; a < X <= b]:
 *   E Z^k = sum_{j=0}^k C(k, j) (-d)^{k-j} M_j(max(d, lo), d + l) + l^k S(d + l)
 * (the binomial expansion of (X - d)^k on d < X <= d + l, plus the atom at l; Klugman, Panjer & Willmot, Loss Models,
 * sec. 3.1 and 8.3, limited expected values). M_j is a difference of a normal or regularised incomplete gamma cdf
 * (lognormal, gamma, weibull; Loss Models app. A) or elementary (pareto). A normal cdf value carries its derived bound
 * (./normal-bounded.ts), an incomplete gamma value its derived bound (../invert/incgamma.ts); each plus the error of its argument times the
 * density's maximum over the argument's interval. Normal,
 * truncated normal and uniform claims, and claims a X + b (a > 0) of any of these, take their own forms further down.
 */
import { add, div, exact, exp, expm1, log, mul, neg, pow, powInt, sub, type Est } from "../moment-error";
import { normalPdf, type DirectLaw } from "./dist";
import { normalCdfBounded } from "./normal-bounded";
import { gammaPdf, incGamma } from "../invert/incgamma";

/** E[min((X - d)_+, l)^k] with its bound, for k >= 1 and real d (l may be Infinity when E X^k is finite) */
export type LayerMoment = (k: number, d: number, l: number) => Est;

/** a law's partial moments E[X^j; a < X <= b] (b may be Infinity) and survival function P(X > b), as estimates */
export interface Partial {
  lo: number;
  partial(j: number, a: number, b: number): Est;
  sf(b: number): Est;
}

export const INF_E: Est = { v: NaN, e: Infinity };

/** Phi(z) for an estimated z: Phi's derived bound at z's value plus max phi over [z - e, z + e] times e */
function phiE(z: Est): Est {
  if (z.v === Infinity) return exact(1);
  if (z.v === -Infinity) return exact(0);
  if (!Number.isFinite(z.e)) return INF_E;
  const b = normalCdfBounded(z.v);
  // phi is largest where |z| is smallest; 2x covers the rounding of normalPdf itself
  const lip = 2 * normalPdf(Math.max(0, Math.abs(z.v) - z.e));
  return { v: b.v, e: b.e + lip * z.e };
}

/**
 * P(s, z) (upper = false) or Q(s, z) for an estimated shape s and argument z: the incomplete gamma's derived bound
 * (../invert/incgamma.ts), plus the density's maximum over [z - e, z + e] times e (dP/dz is the Gamma(s, 1) density), plus the shape's error
 * times 2 (ln s + 2), which bounds |dP/ds| = |E[ln G; G < z] - P psi(s)| <= E|ln G| + |psi(s)| for s >= 1 (G ~ Gamma(s, 1):
 * E|ln G| <= sqrt(psi'(s) + psi(s)^2), psi'(s) <= 2, |psi(s)| <= ln s + 1; A&S 6.3, 6.4).
 */
export function incGammaE(s: Est, z: Est, upper: boolean): Est {
  if (z.v === Infinity) return exact(upper ? 0 : 1);
  if (!(z.v > 0)) return exact(upper ? 1 : 0);
  if (!Number.isFinite(z.e) || !Number.isFinite(s.e) || (s.e > 0 && s.v < 1) || z.e > 0.5 * z.v) return INF_E;
  const g = incGamma(s.v, z.v);
  const v = upper ? g.Q : g.P;
  const lo = z.v - z.e;
  const hi = z.v + z.e;
  // the Gamma(s, 1) density is unimodal with its mode at s - 1: its maximum over [lo, hi]
  const at = s.v - 1 >= lo && s.v - 1 <= hi ? s.v - 1 : s.v - 1 < lo ? lo : hi;
  const dens = at > 0 ? gammaPdf(s.v, 1, at) : s.v === 1 ? 1 : 0;
  return { v, e: (upper ? g.eQ : g.eP) + 2 * dens * z.e + 2 * (Math.log(s.v) + 2) * s.e };
}

/** lognormal(mu, sigma): M_j(a, b) = e^{j mu + j^2 sigma^2 / 2} [Phi(beta_j) - Phi(alpha_j)], z - j sigma (Loss Models app. A.4.1.1) */
export function lognormalPartial(mu: number, sigma: number): Partial {
  const zOf = (x: number, j: number): Est => {
    if (x === 0) return { v: -Infinity, e: 0 };
    if (x === Infinity) return { v: Infinity, e: 0 };
    return sub(div(sub(log(exact(x)), exact(mu)), exact(sigma)), mul(exact(j), exact(sigma)));
  };
  return {
    lo: 0,
    partial(j, a, b) {
      const za = zOf(a, j);
      const zb = zOf(b, j);
      // both above the median: the difference of the upper tails keeps its digits
      const diff = za.v > 0 ? sub(phiE(neg(za)), phiE(neg(zb))) : sub(phiE(zb), phiE(za));
      const s = exact(sigma);
      const pre = exp(add(mul(exact(j), exact(mu)), mul(exact((j * j) / 2), mul(s, s))));
      return mul(pre, diff);
    },
    sf: (b) => phiE(neg(zOf(b, 0))),
  };
}

/** gamma(shape s, rate r): M_j(a, b) = s (s+1) ... (s+j-1) r^{-j} [P(s+j, r b) - P(s+j, r a)] (Loss Models app. A.3.2.1) */
export function gammaPartial(shape: number, rate: number): Partial {
  const z = (x: number): Est => (x === Infinity ? { v: Infinity, e: 0 } : mul(exact(rate), exact(x)));
  const sh = (j: number) => add(exact(shape), exact(j));
  return {
    lo: 0,
    partial(j, a, b) {
      let pre = exact(1);
      for (let i = 0; i < j; i++) pre = mul(pre, add(exact(shape), exact(i)));
      pre = div(pre, powInt(exact(rate), j));
      const s = sh(j);
      const za = z(a);
      const upper = za.v > s.v;
      const diff = upper ? sub(incGammaE(s, za, true), incGammaE(s, z(b), true)) : sub(incGammaE(s, z(b), false), incGammaE(s, za, false));
      return mul(pre, diff);
    },
    sf: (b) => incGammaE(sh(0), z(b), true),
  };
}

/** weibull(k, lambda): M_j(a, b) = lambda^j Gamma(1 + j/k) [P(1 + j/k, (b/lambda)^k) - P(1 + j/k, (a/lambda)^k)] (Loss Models app. A.3.2.3) */
export function weibullPartial(k: number, lambda: number, rawE: (m: number) => Est): Partial {
  const z = (x: number): Est => (x === Infinity ? { v: Infinity, e: 0 } : pow(div(exact(x), exact(lambda)), k));
  return {
    lo: 0,
    partial(j, a, b) {
      const s = add(exact(1), div(exact(j), exact(k)));
      const za = z(a);
      const upper = za.v > s.v;
      const diff = upper ? sub(incGammaE(s, za, true), incGammaE(s, z(b), true)) : sub(incGammaE(s, z(b), false), incGammaE(s, za, false));
      return mul(j === 0 ? exact(1) : rawE(j), diff);
    },
    sf: (b) => (b === Infinity ? exact(0) : exp(neg(z(b)))),
  };
}

/**
 * pareto(alpha, xm), a >= xm: M_j(a, b) = alpha xm^j (a/xm)^{j-alpha} (1 - (b/a)^{j-alpha}) / (alpha - j), the bracket as
 * -expm1((j - alpha) ln(b/a)) so that b near a keeps its digits; alpha xm^alpha ln(b/a) at j = alpha (Loss Models app. A.2.3.1).
 * alpha may be a rounded quantity (1 / xi) given as an estimate: the formula's arithmetic carries its bound.
 */
export function paretoPartial(alpha: number | Est, xm: number): Partial {
  const al = typeof alpha === "number" ? exact(alpha) : alpha;
  return {
    lo: xm,
    partial(j, a, b) {
      const ja = sub(exact(j), al);
      const scale = mul(al, powInt(exact(xm), j));
      if (ja.v === 0 && ja.e === 0) return b === Infinity ? INF_E : mul(scale, log(div(exact(b), exact(a))));
      const head = exp(mul(ja, log(div(exact(a), exact(xm)))));
      const bracket = b === Infinity ? (ja.v < 0 ? exact(1) : INF_E) : neg(expm1(mul(ja, log(div(exact(b), exact(a))))));
      return div(mul(mul(scale, head), bracket), neg(ja));
    },
    sf: (b) => (b === Infinity ? exact(0) : b <= xm ? exact(1) : exp(mul(neg(al), log(div(exact(b), exact(xm)))))),
  };
}

/** binomial coefficient C(k, j), exact for the orders asked (k <= 12) */
function choose(k: number, j: number): number {
  let c = 1;
  for (let i = 1; i <= j; i++) c = (c * (k - j + i)) / i;
  return c;
}

/** E[min((X - d)_+, l)^k] from a law's partial moments (the formula at the top) */
export function layerMomentFrom(p: Partial): LayerMoment {
  return (k, d, l) => {
    if (!Number.isFinite(d) || !(l > 0)) return INF_E;
    const b = d + l;
    const a = Math.max(d, p.lo);
    if (b <= p.lo) return powInt(exact(l), k); // every claim exceeds the layer's top: Z = l
    // the layer actually integrated is (d, fl(d + l)]: its limit l' = fl(d + l) - d; the moment moves by at most
    // k max(l, l')^{k-1} |l - l'| (the derivative of E min(W, t)^k in t is k t^{k-1} P(W > t) <= k t^{k-1})
    const lp = b === Infinity ? exact(Infinity) : sub(exact(b), exact(d));
    let s = exact(0);
    for (let j = 0; j <= k; j++) {
      const term = mul(mul(exact(choose(k, j)), powInt(exact(-d), k - j)), p.partial(j, a, b));
      s = add(s, term);
    }
    if (b < Infinity) s = add(s, mul(powInt(lp, k), p.sf(b)));
    if (b < Infinity) {
      const dl = Math.abs(lp.v - l) + lp.e;
      if (dl > 0) s = { v: s.v, e: s.e + k * Math.max(l, lp.v + lp.e) ** (k - 1) * dl * (1 + 2 ** -40) };
    }
    return Number.isFinite(s.v) ? s : INF_E;
  };
}

/**
 * lomax(alpha, theta): X + theta is pareto(alpha, xm = theta), so its layer (d, l) is the pareto's layer (d + theta, l);
 * where d + theta rounds, the moment moves by at most k l^{k-1} |delta d| (its derivative in d is
 * -k E[Z^{k-1}; d < P < d + l], of size at most k l^{k-1}; for an unlimited layer, k times the layer moment of order
 * k - 1 at the interval's lower end)
 */
export function lomaxLayerMoment(alpha: number | Est, theta: number): LayerMoment {
  const pareto = layerMomentFrom(paretoPartial(alpha, theta));
  return (k, d, l) => {
    const dp = add(exact(d), exact(theta));
    const r = pareto(k, dp.v, l);
    if (dp.e === 0) return r;
    // unlimited: the derivative -k E[(P - d)_+^{k-1}] is largest in size at the interval's lower end (as in the affine map)
    let slope: number;
    if (l < Infinity) slope = k * l ** (k - 1);
    else if (k === 1) slope = 1;
    else {
      const low = pareto(k - 1, dp.v - dp.e * (1 + 2 ** -40), Infinity);
      slope = k * (low.v + low.e);
    }
    return { v: r.v, e: r.e + slope * dp.e * (1 + 2 ** -40) };
  };
}

/** the law with its layer moments attached (the per-claim layer reads them for its moments and their bounds) */
export function withLayerMoment(law: DirectLaw, p: Partial | LayerMoment): DirectLaw {
  return { ...law, layerMoment: typeof p === "function" ? p : layerMomentFrom(p) };
}

/** sqrt(2 pi) as a double: 2 pi rounds by at most u relative, the square root halves that and rounds once more */
const SQRT2PI: Est = { v: Math.sqrt(2 * Math.PI), e: 2 ** -51 * Math.sqrt(2 * Math.PI) };

/** z^i phi(z) for an estimated z (0 at an infinite z): exp and the products each round once (../moment-error.ts) */
function zPowPhi(z: Est, i: number): Est {
  if (!Number.isFinite(z.v)) return exact(0);
  return div(mul(powInt(z, i), exp(mul(exact(-0.5), mul(z, z)))), SQRT2PI);
}

/**
 * normal(mu, sigma): Y = X - d is normal(m, sigma), m = mu - d, and on 0 < Y <= l, with alpha = (d - mu)/sigma and
 * beta = (d + l - mu)/sigma, E[Y^k; 0 < Y <= l] = sum_i C(k, i) m^{k-i} sigma^i J_i, J_i = E[Z^i; alpha < Z <= beta]
 * for a standard normal Z, by J_0 = Phi(beta) - Phi(alpha), J_1 = phi(alpha) - phi(beta) and
 * J_i = (i - 1) J_{i-2} + alpha^{i-1} phi(alpha) - beta^{i-1} phi(beta) (integration by parts of z^{i-1} z phi(z);
 * JKB vol. 1, ch. 13, sec. 10.1, truncated normal moments); plus the atom l^k Phi(-beta). Expanding about d, not 0,
 * keeps the binomial sum free of the cancellation a large mean would cause.
 */
export function normalLayerMoment(mu: number, sigma: number): LayerMoment {
  const s = exact(sigma);
  return (k, d, l) => {
    if (!(l > 0) || !Number.isFinite(d)) return INF_E;
    const m = sub(exact(mu), exact(d));
    const alpha = div(neg(m), s);
    const beta = l === Infinity ? exact(Infinity) : div(sub(exact(l), m), s);
    let r = normalSlab(m, s, alpha, beta, k);
    if (l < Infinity) r = add(r, mul(powInt(exact(l), k), phiE(neg(beta))));
    return Number.isFinite(r.v) ? r : INF_E;
  };
}

/** P(alpha < Z <= beta) for a standard normal Z, as the difference of upper tails when both ends are above 0 */
const normalMass = (alpha: Est, beta: Est): Est =>
  alpha.v > 0 ? sub(phiE(neg(alpha)), phiE(neg(beta))) : sub(phiE(beta), phiE(alpha));

/** E[(m + s Z)^k; alpha < Z <= beta] for a standard normal Z (the J_i recurrence above) */
function normalSlab(m: Est, s: Est, alpha: Est, beta: Est, k: number): Est {
  const J: Est[] = [normalMass(alpha, beta), sub(zPowPhi(alpha, 0), zPowPhi(beta, 0))];
  for (let i = 2; i <= k; i++) J[i] = add(mul(exact(i - 1), J[i - 2]), sub(zPowPhi(alpha, i - 1), zPowPhi(beta, i - 1)));
  let r = exact(0);
  for (let i = 0; i <= k; i++) r = add(r, mul(mul(exact(choose(k, i)), powInt(m, k - i)), mul(powInt(s, i), J[i])));
  return r;
}

/** max and min of estimates: both are 1-Lipschitz in each argument, so the larger bound carries over */
const maxE = (a: Est, b: Est): Est => ({ v: Math.max(a.v, b.v), e: Math.max(a.e, b.e) });
const minE = (a: Est, b: Est): Est => ({ v: Math.min(a.v, b.v), e: Math.max(a.e, b.e) });

/**
 * normal(mu, sigma) conditioned on [lower, upper]: the layer's integrand against the untruncated normal over the
 * truncation interval, divided by its mass: (E[(X - d)^k; max(d, lower) < X <= min(d + l, upper)]
 * + l^k P(max(d + l, lower) < X <= upper)) / P(lower < X <= upper), each piece by the normal slab above. Where a
 * piece's interval is empty only within the rounding of its ends, no bound is given (INF).
 */
export function truncatedNormalLayerMoment(mu: number, sigma: number, lower: number, upper: number): LayerMoment {
  const s = exact(sigma);
  const zOf = (x: number): Est => (Number.isFinite(x) ? div(sub(exact(x), exact(mu)), s) : exact(x));
  const za = zOf(lower);
  const zb = zOf(upper);
  const mass = normalMass(za, zb);
  // an interval (lo, hi]: empty, non-empty, or undecided within the bounds of its ends
  const state = (lo: Est, hi: Est) => (hi.v - hi.e > lo.v + lo.e ? 1 : hi.v + hi.e <= lo.v - lo.e ? 0 : -1);
  return (k, d, l) => {
    if (!(l > 0) || !Number.isFinite(d)) return INF_E;
    const m = sub(exact(mu), exact(d));
    const alpha = div(neg(m), s);
    const beta = l === Infinity ? exact(Infinity) : div(sub(exact(l), m), s);
    const lo = maxE(alpha, za);
    const hi = minE(beta, zb);
    const st = state(lo, hi);
    if (st < 0) return INF_E;
    let r = st ? normalSlab(m, s, lo, hi, k) : exact(0);
    if (l < Infinity) {
      const alo = maxE(beta, za);
      const sa = state(alo, zb);
      if (sa < 0) return INF_E;
      if (sa) r = add(r, mul(powInt(exact(l), k), normalMass(alo, zb)));
    }
    r = div(r, mass);
    return Number.isFinite(r.v) ? r : INF_E;
  };
}

/**
 * uniform(a, b): with p = max(a - d, 0) and q = min(b - d, l) (both 1-Lipschitz in the rounded difference),
 * E[Y^k; 0 < Y <= l] = (q^{k+1} - p^{k+1}) / ((k + 1)(b - a)), plus the atom l^k (b - d - l)_+ / (b - a)
 */
export function uniformLayerMoment(a: number, b: number): LayerMoment {
  const w = sub(exact(b), exact(a));
  return (k, d, l) => {
    if (!(l > 0) || !Number.isFinite(d)) return INF_E;
    if (d >= b) return exact(0);
    const bd = sub(exact(b), exact(d));
    const ad = sub(exact(a), exact(d));
    const p: Est = { v: Math.max(ad.v, 0), e: ad.e };
    const q: Est = { v: Math.min(bd.v, l), e: bd.e };
    let r = div(sub(powInt(q, k + 1), powInt(p, k + 1)), mul(exact(k + 1), w));
    if (l < Infinity) {
      const over = sub(bd, exact(l));
      r = add(r, div(mul(powInt(exact(l), k), { v: Math.max(over.v, 0), e: over.e }), w));
    }
    return Number.isFinite(r.v) ? r : INF_E;
  };
}

/**
 * the layer of s X + b (s > 0): min((s X + b - d)_+, l) = s min((X - d')_+, l') with d' = (d - b)/s, l' = l/s, so
 * E = s^k E'(d', l'). d' and l' round (two and one steps, their bounds from ../moment-error.ts); the moment of X moves
 * by at most k l'^{k-1} per unit of either (its derivatives are -k E[Z^{k-1}; d' < X < d' + l'] in d' and
 * k l'^{k-1} P(X > d' + l') in l'); for an unlimited layer the d'-derivative -k E[(X - d')_+^{k-1}] is largest in size
 * at the interval's lower end, where X's own layer moment of order k - 1 bounds it (P(X > d') <= 1 at k = 1).
 * A factor s that is itself a rounded quantity (sigma / xi, b - a) comes as an estimate: d', l' and s^k carry its bound.
 */
export function affineLayerMoment(inner: LayerMoment, s: number | Est, b: number): LayerMoment {
  const se = typeof s === "number" ? exact(s) : s;
  if (!(se.v - se.e > 0)) return () => INF_E;
  return (k, d, l) => {
    const dp = div(sub(exact(d), exact(b)), se);
    const lp = l === Infinity ? exact(Infinity) : div(exact(l), se);
    const r = inner(k, dp.v, lp.v);
    if (!Number.isFinite(r.e) || !Number.isFinite(dp.e) || !Number.isFinite(lp.e)) return INF_E;
    let slope: number;
    if (l < Infinity) slope = k * (lp.v + lp.e) ** (k - 1);
    else if (k === 1) slope = 1;
    else {
      const low = inner(k - 1, dp.v - dp.e * (1 + 2 ** -40), Infinity);
      slope = k * (low.v + low.e);
    }
    const moved = dp.e + lp.e === 0 ? r : { v: r.v, e: r.e + slope * (dp.e + lp.e) * (1 + 2 ** -40) };
    return mul(powInt(se, k), moved);
  };
}
