import { lgamma, lgammaErr } from "../families/special";
import { tanHalfPi } from "./stable-kernel";

/**
 * Power-law majorants of a density and its first two derivatives in each tail: on a side with a tail,
 * |f^(j)(y)| <= sum_i a[j][i] z^(-p[j][i]) for z = side (y - origin) >= from (j = 0, 1, 2), each term falling in z; on a
 * side where the support ends, f = 0 beyond `end`. `fmax` bounds the density everywhere. ../invert/heavy-residual.ts
 * bounds the aliasing a power-tailed term leaves in the inversion sums through them.
 */
export interface PowerTerms {
  a: number[];
  p: number[];
}

export type PowerSide = { origin: number; from: number; d: [PowerTerms, PowerTerms, PowerTerms] } | { end: number };

export interface PowerTail {
  right: PowerSide;
  left: PowerSide;
  fmax: number;
}

const U = Number.EPSILON;

/** sum_i a_i z^-p_i */
export function powerAt(t: PowerTerms, z: number): number {
  let s = 0;
  for (let i = 0; i < t.a.length; i++) s += t.a[i] * Math.pow(z, -t.p[i]);
  return s * (1 + 4 * (t.a.length + 2) * U);
}

/** a terms' coefficients rounded up by a relative `slack` (the rounding of their logarithms) */
function up(a: number[], slack: number): number[] {
  return a.map((v) => v * (1 + slack));
}

/**
 * Student t (nu, loc, scale), from f(z) = C (1 + z^2/nu)^(-a), a = (nu + 1)/2, z = (y - loc)/scale: with u = z^2/nu,
 * f' = -(2a/nu) C z (1 + u)^(-a-1) and f'' = (2a/nu) C (1 + u)^(-a-2) ((2a + 1) u - 1), |(2a + 1) u - 1| <= (2a + 1)(1 + u),
 * and (1 + u)^(-b) <= u^(-b): |f| <= C nu^a z^(-nu-1), |f'| <= C (nu + 1) nu^a z^(-nu-2),
 * |f''| <= C (nu + 1)(nu + 2) nu^a z^(-nu-3) for z > 0 (either side, by symmetry). `logCUp` bounds log(C / scale) above.
 */
export function studentPowerTail(nu: number, loc: number, scale: number, logCUp: number): PowerTail {
  const la = ((nu + 1) / 2) * Math.log(nu);
  // la rounds within 4u of its size; the powers scale^p / scale^(j+1) are folded into the logs below
  const slack = 8 * U * (1 + Math.abs(la) + Math.abs(logCUp) + (nu + 4) * Math.abs(Math.log(scale)));
  const term = (j: number, k: number) => Math.exp(logCUp + la + (nu + 1 + j) * Math.log(scale) - j * Math.log(scale) + Math.log(k));
  const d: [PowerTerms, PowerTerms, PowerTerms] = [
    { a: up([term(0, 1)], slack), p: [nu + 1] },
    { a: up([term(1, nu + 1)], slack), p: [nu + 2] },
    { a: up([term(2, (nu + 1) * (nu + 2))], slack), p: [nu + 3] },
  ];
  const side = { origin: loc, from: 0, d };
  return { right: side, left: side, fmax: Math.exp(logCUp) * (1 + 4 * U) };
}

/** Pareto (alpha, xm): f = alpha xm^alpha y^(-alpha-1) on y >= xm, |f^(j)| = alpha (alpha + 1) .. (alpha + j) xm^alpha y^(-alpha-1-j). */
export function paretoPowerTail(alpha: number, xm: number): PowerTail {
  const l = Math.log(alpha) + alpha * Math.log(xm);
  const slack = 8 * U * (2 + Math.abs(l) + alpha * Math.abs(Math.log(xm)));
  const c = Math.exp(l);
  return {
    right: {
      origin: 0,
      from: xm,
      d: [
        { a: up([c], slack), p: [alpha + 1] },
        { a: up([c * (alpha + 1)], slack + 4 * U), p: [alpha + 2] },
        { a: up([c * (alpha + 1) * (alpha + 2)], slack + 8 * U), p: [alpha + 3] },
      ],
    },
    left: { end: xm },
    fmax: (alpha / xm) * (1 + 4 * U),
  };
}

/** Gamma(x) rounded up, from lgamma and its derived bound */
function gammaUp(x: number): number {
  return Math.exp(lgamma(x) + lgammaErr(x) + 4 * U * (1 + Math.abs(lgamma(x))));
}

/**
 * Stable (S1 form: location d1, scale g), 1 < alpha < 2. With the standard law's CF phi(t) = exp(-c t^alpha e^(-i alpha
 * theta0)) for t > 0 (tan(alpha theta0) = beta tan(pi alpha/2), c = 1/cos(alpha theta0); Zolotarev 1986, sec. 2.5, as in
 * ./stable-series.ts), f^(j)(z) = (1/pi) Re int_0^inf (-it)^j e^(-izt) phi(t) dt, and for z > 0 the ray t = r e^(-i psi*),
 * psi* = min(pi/2, pi/(2 alpha) - theta0), may replace the real axis (the same sector argument as ./stable-series.ts).
 * There e^(-s) = 1 - s + R_2 with |R_2| <= |s|^2/2 (Re s >= 0): the 1 gives Re of j!/(iz)^(j+1) (-i)^j, which is 0;
 * -s gives a term of size c Gamma(alpha + j + 1) z^(-alpha-j-1); R_2 at most
 * (1/pi) int_0^inf r^j e^(-z r sin psi*) c^2 r^(2 alpha)/2 dr = c^2 Gamma(2 alpha + j + 1) / (2 pi) (z sin psi*)^(-2 alpha-j-1).
 * The left tail is the right one of beta -> -beta. |f| <= (1/pi) int_0^inf |phi| = Gamma(1 + 1/alpha)/pi (|phi(t)| = e^(-t^alpha)).
 */
export function stablePowerTail(alpha: number, beta: number, g: number, d1: number): PowerTail | null {
  if (!(alpha > 1 && alpha < 2) || !(Math.abs(beta) <= 1) || !(g > 0)) return null;
  const side = (b: number): PowerSide | null => {
    const tb = b * tanHalfPi(alpha);
    const theta0 = b === -1 ? Math.PI / alpha - Math.PI / 2 : Math.atan(tb) / alpha;
    const c = 1 / Math.cos(alpha * theta0);
    const psi = Math.min(Math.PI / 2, Math.PI / (2 * alpha) - theta0);
    // psi, c and the sine within a few ulps: a relative margin of 1e-12 on the coefficients and on sin psi covers them
    const s = Math.sin(psi) * (1 - 1e-12);
    if (!(s > 0) || !(c > 0) || !Number.isFinite(c)) return null;
    const d = [0, 1, 2].map((j) => {
      // in units of y: f_Y^(j)(y) = f^(j)(z)/g^(j+1), z = (y - d1)/g, so a z^-p = a g^p (y - d1)^-p
      const p1 = alpha + j + 1;
      const p2 = 2 * alpha + j + 1;
      const a1 = ((c * gammaUp(p1)) / Math.PI) * Math.pow(g, p1 - j - 1);
      const a2 = ((c * c * gammaUp(p2)) / (2 * Math.PI)) * Math.pow(s, -p2) * Math.pow(g, p2 - j - 1);
      return { a: up([a1, a2], 1e-12), p: [p1, p2] };
    }) as [PowerTerms, PowerTerms, PowerTerms];
    return { origin: d1, from: 0, d };
  };
  const right = side(beta);
  const left = side(-beta);
  if (!right || !left) return null;
  return { right, left, fmax: (gammaUp(1 + 1 / alpha) / (Math.PI * g)) * (1 + 1e-12) };
}

/**
 * The majorants of a X + b (a != 0): f_Y^(j)(y) = f_X^(j)((y - b)/a) / (|a| a^j), the distance scales by |a|
 * (a z^-p = a |a|^p z_Y^-p), the sides swap for a < 0.
 */
export function affinePowerTail(pt: PowerTail, a: number, b: number): PowerTail {
  const aa = Math.abs(a);
  const slack = 8 * U;
  const move = (s: PowerSide): PowerSide => {
    if ("end" in s) return { end: a * s.end + b };
    // each power of |a| within (p + 2) 2u of itself (pow and the quotient)
    const d = s.d.map((t, j) => ({ a: t.a.map((v, i) => ((v * Math.pow(aa, t.p[i])) / Math.pow(aa, j + 1)) * (1 + slack * (t.p[i] + j + 3))), p: t.p })) as [PowerTerms, PowerTerms, PowerTerms];
    // the origin a origin + b is rounded: the callers take their distances inward by a few ulps of the points and the origin
    return { origin: a * s.origin + b, from: aa * s.from, d };
  };
  const r = move(pt.right);
  const l = move(pt.left);
  return { right: a > 0 ? r : l, left: a > 0 ? l : r, fmax: (pt.fmax / aa) * (1 + 4 * U) };
}
