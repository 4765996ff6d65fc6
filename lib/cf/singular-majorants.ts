import { lgamma, lgammaErr } from "./families/special";
import { majorant, type LogMajorant } from "./majorant";

const EPS = Number.EPSILON;

/**
 * Majorants of |phi| for densities with an integrable power singularity at a support end, where f has no bounded
 * variation and the total-variation bounds of family-majorants.ts do not apply. The tool is the second mean value
 * theorem (Bonnet; e.g. Zygmund, Trigonometric Series, ch. I): for g non-negative and monotone on [c, e] (decreasing:
 * g(c+) its largest value; increasing: g(e-)), |int_c^e g e^{itx} dx| <= 2 sup g / t (multiply by the phase that makes the
 * integral real; the cosine's integral over any sub-interval is at most 2 / t). Cutting the singular end off at a
 * distance d, |phi(t)| <= P(d) + 2 f(d) / t, P(d) the mass cut off; with f(x) <= C x^{s-1} near the end, P(d) <= C d^s / s
 * and the least of C (d^s / s + 2 d^{s-1} / t) is at d = 2 (1 - s) / t: C (2 (1 - s) / t)^s / (s (1 - s)), which falls like
 * t^-s exactly (the tail power s). The same rule is used for the Weibull with shape below 1 (family-majorants.ts).
 */

/** C (d^s / s + 2 d^{s-1} / u) at d = min(2 (1 - s) / u, cap): the bound of one singular end, non-increasing in u */
function endTerm(C: number, s: number, u: number, cap: number): number {
  const d = Math.min((2 * (1 - s)) / u, cap);
  return C * (Math.pow(d, s) / s + (2 * Math.pow(d, s - 1)) / u);
}

/**
 * Beta(alpha, beta) on [a, b] with a shape below 1 (w = b - a, |phi_X(t)| = |phi_Y(w t)| for Y on [0, 1], density
 * y^{alpha-1} (1 - y)^{beta-1} / B(alpha, beta), JKB vol. 2 ch. 25). One shape below 1 (say alpha, beta >= 1): f is
 * decreasing on (0, 1), C = 1 / B, cap 1. Both below 1: f falls to its least value at y* = (1 - alpha) / (2 - alpha - beta)
 * and rises again; each end is cut off within its monotone piece (cap y*, resp. 1 - y*), with C = (1 - y*)^{beta-1} / B
 * at the lower end (the other factor's sup on (0, y*)), likewise at the upper end. The generalized pareto with xi < -1 is
 * Beta(1, -1 / xi) on [mu, mu - sigma / xi]. Slope about the midpoint: |E (X - c) e^{it(X - c)}| <= w / 2.
 */
export function betaSingularMajorant(al: number, be: number, a: number, b: number): LogMajorant {
  const w = b - a;
  // 1 / B(alpha, beta) with its lgamma errors (special.ts lgammaErr) and the sum's roundings
  const lb = lgamma(al) + lgamma(be) - lgamma(al + be);
  const lbErr = lgammaErr(al) + lgammaErr(be) + lgammaErr(al + be) + 4 * EPS * (Math.abs(lgamma(al)) + Math.abs(lgamma(be)) + Math.abs(lgamma(al + be)));
  const invB = Math.exp(-lb + lbErr) * (1 + 8 * EPS);
  const both = al < 1 && be < 1;
  const ys = both ? (1 - al) / (2 - al - be) : al < 1 ? 1 : 0;
  const ends: { C: number; s: number; cap: number }[] = [];
  if (al < 1) ends.push({ C: invB * (both ? Math.pow(1 - ys, be - 1) : 1), s: al, cap: ys });
  if (be < 1) ends.push({ C: invB * (both ? Math.pow(ys, al - 1) : 1), s: be, cap: 1 - ys });
  const q = Math.min(...ends.map((e) => e.s));
  const m = 1 + 64 * EPS; // the pow, exp and sums of each term
  const bound = (t: number) => {
    const u = w * Math.abs(t);
    let v = 0;
    for (const e of ends) v += endTerm(e.C, e.s, u, e.cap);
    return v * m;
  };
  return majorant(
    (t, out) => {
      for (let i = 0; i < t.length; i++) out[i] = Math.min(0, Math.log(bound(t[i])));
    },
    // each end's term at s >= t is at most its value at t times (t / s)^{s_end} (cut at d t / s, still inside its
    // monotone piece, and C d^s / s + 2 C d^{s-1} / u least at the uncapped d): the sum falls at least like (t / s)^q
    (t) => {
      const v = bound(t);
      return v < 1 ? { log: Math.log(v), q } : { log: 0, q: 0 };
    },
    {
      center: 0.5 * (a + b),
      at: (t, out) => {
        out.fill(0.5 * w * (1 + 4 * EPS), 0, t.length);
      },
    },
  );
}

/**
 * Burr XII(alpha, gamma, theta) with gamma < 1 (log-logistic: alpha = 1): f = alpha gamma y / (x (1 + y)^{alpha+1}),
 * y = (x / theta)^gamma, is decreasing on (0, inf) (d log f / dx = ((gamma - 1) - (alpha + 1) gamma y / (1 + y)) / x < 0)
 * and unbounded at 0 (Klugman, Panjer & Willmot, Loss Models, app. A). F(d) = 1 - (1 + y)^{-alpha} <= alpha y (its
 * derivative in y is at most alpha) and f(x) <= alpha gamma theta^-gamma x^{gamma-1}: C = alpha gamma theta^-gamma,
 * s = gamma, no cap.
 * Slope about 0 (alpha gamma > 1, E X finite): x f = alpha gamma y / (1 + y)^{alpha+1} is unimodal in x, 0 at both
 * ends, peak gamma (1 + 1/alpha)^{-alpha-1} at y = 1 / alpha: |phi'(t)| <= 2 peak / t and <= E X =
 * theta Gamma(1 + 1/gamma) Gamma(alpha - 1/gamma) / Gamma(alpha) (ibid.).
 */
export function burrSingularMajorant(alpha: number, g: number, theta: number): LogMajorant {
  const C = alpha * g * Math.pow(theta, -g);
  const m = 1 + 64 * EPS;
  const bound = (t: number) => endTerm(C, g, Math.abs(t), Infinity) * m;
  let slope;
  if (alpha * g > 1) {
    const peak = g * Math.pow(1 + 1 / alpha, -alpha - 1) * m;
    const l = lgamma(1 + 1 / g) + lgamma(alpha - 1 / g) - lgamma(alpha);
    const lErr = lgammaErr(1 + 1 / g) + lgammaErr(alpha - 1 / g) + lgammaErr(alpha) + 4 * EPS * (Math.abs(l) + 1);
    const mean = theta * Math.exp(l + lErr) * m;
    slope = {
      center: 0,
      at: (t: Float64Array, out: Float64Array) => {
        for (let i = 0; i < t.length; i++) out[i] = Math.min(mean, (2 * peak) / Math.abs(t[i]));
      },
    };
  }
  return majorant(
    (t, out) => {
      for (let i = 0; i < t.length; i++) out[i] = Math.min(0, Math.log(bound(t[i])));
    },
    (t) => {
      const v = bound(t);
      return v < 1 ? { log: Math.log(v), q: g } : { log: 0, q: 0 };
    },
    slope,
  );
}
