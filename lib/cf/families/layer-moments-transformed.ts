/**
 * Per-claim layer moments, with derived bounds, for the transformed-beta and transformed-gamma claims without an
 * elementary partial moment: Burr XII (log-logistic is Burr with alpha = 1) and inverse gamma. The frame is
 * ./layer-moments.ts (partial moments M_j(a, b) = E[X^j; a < X <= b], the binomial expansion, the atom at the limit).
 *
 * Burr(alpha, gamma, theta): V = U / (1 + U), U = (X/theta)^gamma, is Beta(1, alpha) (S(x) = (1 + U)^-alpha), and
 * X^j = theta^j (V / (1 - V))^{j/gamma}, so with p = 1 + j/gamma, q = alpha - j/gamma > 0:
 *   M_j(a, b) = E X^j [I_{v(b)}(p, q) - I_{v(a)}(p, q)]
 * (Klugman, Panjer & Willmot, Loss Models, app. A.2.2.2, the Burr limited moments through the incomplete beta).
 * Inverse gamma(alpha, theta): G = theta / X is Gamma(alpha, 1), and with s = alpha - j > 0
 *   M_j(a, b) = E X^j [P(s, theta/a) - P(s, theta/b)]
 * (Loss Models app. A.3.3.3, the transformed-gamma family's limited moments through the incomplete gamma).
 * E X^j carries its own bound (./cumulant-errors.ts). An order j at or past the tail index (q or s <= 0) has no such
 * form: a Burr claim's partial moment over a bounded interval then goes by the series of ./layer-moments-series.ts,
 * which also takes every bounded interval with 0 < q <= 1 (there the incomplete beta's stated accuracy, relative to
 * E X^j with Gamma(q) large, bounded a log-logistic(1.2) layer's mean only to 1e-8 relative; the series to 1e-14);
 * an inverse gamma claim's over a bounded interval with s <= 1 goes by the series and panels there too. Over an
 * unbounded interval such an order's moment is infinite (INF: the layer reports it as not existing or unbounded).
 *
 * The incomplete beta at an argument that is itself rounded (v = u/(1 + u), w = 1/(1 + u), u = (x/theta)^gamma):
 * I's derived bound (./incbeta-bounded.ts incBetaValue), plus the Beta(p, q) density's maximum over the argument's interval times
 * its bound (the density is unimodal, monotone or U-shaped: log f = (p-1) ln v + (q-1) ln(1-v) + c is concave for
 * p, q >= 1 and convex for p, q <= 1, and monotone otherwise, so the maximum is at the mode if it lies inside, else at
 * an end), plus each rounded shape's move times sqrt(psi'(shape)) (|dI/dp| <= sd(ln V); as in ./layer-moments-shapes.ts).
 * The upper tail is taken as I_w(q, p) from w = 1/(1 + u) directly, so a point far in the tail keeps its digits.
 */
import { incBetaValue } from "./incbeta-bounded";
import { add, div, exact, mul, pow, sub, type Est } from "../moment-error";
import { lgamma } from "./special";
import { incGammaE, INF_E, layerMomentFrom, type LayerMoment, type Partial } from "./layer-moments";
import { burrPartialBounded, inverseGammaPartialBounded } from "./layer-moments-series";

/** one ulp of slack on a bound computed in floating point */
const UP = 1 + 2 ** -40;
/** psi'(x) <= 1/x + 1/x^2 for x > 0 (DLMF 5.15.1, as in ./layer-moments-shapes.ts) */
const trigammaMajorant = (x: number) => 1 / x + 1 / (x * x);

/** the Beta(p, q) density's maximum over [lo, hi] (0 <= lo <= hi <= 1), doubled to cover its own rounding */
function betaDensityMax(p: number, q: number, lo: number, hi: number): number {
  const lb = lgamma(p) + lgamma(q) - lgamma(p + q);
  const f = (x: number) => {
    if (x <= 0) return p < 1 ? Infinity : p === 1 ? Math.exp(-lb) : 0;
    if (x >= 1) return q < 1 ? Infinity : q === 1 ? Math.exp(-lb) : 0;
    return Math.exp((p - 1) * Math.log(x) + (q - 1) * Math.log1p(-x) - lb);
  };
  let m = Math.max(f(lo), f(hi));
  if (p > 1 && q > 1) {
    const mode = (p - 1) / (p + q - 2);
    if (mode > lo && mode < hi) m = Math.max(m, f(mode));
  }
  return 2 * m;
}

/**
 * I_x(p, q) (upper = false) or 1 - I_x(p, q) = I_{1-x}(q, p), given x and y = 1 - x as estimates (the one named by
 * `upper` is the argument actually used), with its bound (module comment)
 */
function incBetaE(x: Est, y: Est, p: Est, q: Est, upper: boolean): Est {
  // the tail asked for, as I_z(a, b) with z its own estimate
  const [z, a, b] = upper ? [y, q, p] : [x, p, q];
  if (z.v <= 0 && z.e === 0) return exact(0);
  if (z.v >= 1 && z.e === 0) return exact(1);
  if (!Number.isFinite(z.e) || !Number.isFinite(a.e) || !Number.isFinite(b.e)) return INF_E;
  const zc = Math.min(Math.max(z.v, 0), 1);
  const r = incBetaValue(a.v, b.v, zc);
  if (!r) return INF_E;
  const v = r.v;
  const lo = Math.max(z.v - z.e, 0);
  const hi = Math.min(z.v + z.e, 1);
  let e = r.e + (z.e > 0 ? betaDensityMax(a.v, b.v, lo, hi) * z.e : 0);
  for (const s of [a, b]) {
    if (s.e === 0) continue;
    if (!(s.v - s.e > 0)) return INF_E;
    e += s.e * Math.sqrt(trigammaMajorant(s.v - s.e));
  }
  return Number.isFinite(e) ? { v, e: e * UP } : INF_E;
}

/** Burr XII(alpha, gamma, theta) partial moments (module comment); rawE(j) = E X^j with its bound */
export function burrPartial(alpha: number, gamma: number, theta: number, rawE: (j: number) => Est): Partial {
  // U = (x/theta)^gamma, V = U/(1 + U), W = 1/(1 + U)
  const vw = (x: number): [Est, Est] => {
    if (x <= 0) return [exact(0), exact(1)];
    if (x === Infinity) return [exact(1), exact(0)];
    const u = pow(div(exact(x), exact(theta)), gamma);
    if (u.v === Infinity) return [exact(1), exact(0)];
    const opu = add(exact(1), u);
    return [div(u, opu), div(exact(1), opu)];
  };
  return {
    lo: 0,
    partial(j, a, b) {
      const r = div(exact(j), exact(gamma));
      const p = add(exact(1), r);
      const q = sub(exact(alpha), r);
      const [va, wa] = vw(a);
      const [vb, wb] = vw(b);
      // at or past the tail index (finite only over a bounded interval), or q <= 1 there: by series (module comment)
      if (!(q.v - q.e > 0) || (b !== Infinity && q.v <= 1)) return b === Infinity ? INF_E : burrPartialBounded(alpha, gamma, theta, j, { va, wa, vb, wb });
      // above the mean p/(p + q) the difference of upper tails keeps its digits
      const upper = va.v > p.v / (p.v + q.v);
      const diff = upper ? sub(incBetaE(va, wa, p, q, true), incBetaE(vb, wb, p, q, true)) : sub(incBetaE(vb, wb, p, q, false), incBetaE(va, wa, p, q, false));
      return j === 0 ? diff : mul(rawE(j), diff);
    },
    // S(b) = W^alpha
    sf: (b) => {
      const [, w] = vw(b);
      return w.v === 0 && w.e === 0 ? exact(0) : pow(w, alpha);
    },
  };
}

/** inverse gamma(alpha, theta) partial moments (module comment); rawE(j) = E X^j with its bound */
export function inverseGammaPartial(alpha: number, theta: number, rawE: (j: number) => Est): Partial {
  // z = theta / x: Infinity at x = 0, 0 at x = Infinity
  const zOf = (x: number): Est => (x <= 0 ? exact(Infinity) : x === Infinity ? exact(0) : div(exact(theta), exact(x)));
  return {
    lo: 0,
    partial(j, a, b) {
      const s = sub(exact(alpha), exact(j));
      const za = zOf(a); // the larger z
      const zb = zOf(b);
      // at or past the index (finite only over a bounded interval), or s <= 1 there: by series (module comment)
      if (!(s.v - s.e > 0) || (b !== Infinity && s.v <= 1)) return b === Infinity ? INF_E : inverseGammaPartialBounded(alpha, theta, j, za, zb);
      // X in (a, b] is G in [theta/b, theta/a): P(s, za) - P(s, zb), or Q(s, zb) - Q(s, za) when both are past s
      const upper = zb.v > s.v;
      const diff = upper ? sub(incGammaE(s, zb, true), incGammaE(s, za, true)) : sub(incGammaE(s, za, false), incGammaE(s, zb, false));
      return j === 0 ? diff : mul(rawE(j), diff);
    },
    // P(X > b) = P(G < theta/b) = P(alpha, theta/b)
    sf: (b) => incGammaE(exact(alpha), zOf(b), false),
  };
}

/** the layer moments of a Burr XII claim (log-logistic: alpha = 1) */
export function burrLayerMoment(alpha: number, gamma: number, theta: number, rawE: (j: number) => Est): LayerMoment {
  return layerMomentFrom(burrPartial(alpha, gamma, theta, rawE));
}

/** the layer moments of an inverse gamma claim */
export function inverseGammaLayerMoment(alpha: number, theta: number, rawE: (j: number) => Est): LayerMoment {
  return layerMomentFrom(inverseGammaPartial(alpha, theta, rawE));
}
