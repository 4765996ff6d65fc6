/**
 * Per-claim layer moments, with derived bounds, for laws whose shape parameters are rounded quantities: beta (and PERT,
 * whose shapes 1 + lambda (m - a)/(b - a) round), triangular (mode (c - a)/(b - a)) and generalised Pareto (1 / xi,
 * sigma / xi). The frame is ./layer-moments.ts (partial moments, the binomial expansion, the affine map); here each
 * rounded parameter's move is bounded by the moment's derivative in it over the parameter's interval.
 */
import { add, div, exact, mul, sub, type Est } from "../moment-error";
import { affineLayerMoment, gammaPartial, INF_E, layerMomentFrom, lomaxLayerMoment, type LayerMoment, type Partial } from "./layer-moments";
import { incBetaValue } from "./incbeta-bounded";

const asEst = (x: number | Est): Est => (typeof x === "number" ? exact(x) : x);
/** one ulp of slack on a bound computed in floating point */
const UP = 1 + 2 ** -40;

/** psi'(x) <= 1/x + 1/x^2 for x > 0: psi'(x) = sum_{n>=0} (x + n)^-2 <= x^-2 + int_0^inf (x + t)^-2 dt (DLMF 5.15.1) */
const trigammaMajorant = (x: number) => 1 / x + 1 / (x * x);

/**
 * beta(alpha, beta) on [0, 1]: M_j(a, b) = prod_{i<j} (alpha + i)/(alpha + beta + i) [I_b(alpha + j, beta) - I_a(alpha + j,
 * beta)] (B(alpha + j, beta)/B(alpha, beta) as the product; Loss Models app. A.6.1.1, generalized beta with tau = 1).
 * The arguments reach I as exact doubles (layerMomentFrom accounts for the rounding of d + l); I carries its derived
 * bound (./incbeta-bounded.ts incBetaValue). Where p = alpha + j or q = beta is not exact (a rounded sum, or
 * a shape that is itself rounded), I's move is bounded by its derivatives: for V ~ Beta(p, q),
 * dI_x/dp = E[(ln V - E ln V) 1{V <= x}], at most sd(ln V) = sqrt(psi'(p) - psi'(p + q)) <= sqrt(psi'(p)) in size
 * (Cauchy-Schwarz; Var ln V from JKB vol. 2, ch. 25, eq. 25.17), and likewise sqrt(psi'(q)) for q with ln(1 - V);
 * psi' decreases, so its value at the interval's lower end bounds it over the interval.
 */
export function betaPartial(alpha: number | Est, beta: number | Est): Partial {
  const al = asEst(alpha);
  const be = asEst(beta);
  const I = (x: number, p: Est, upper: boolean): Est => {
    if (x <= 0) return exact(upper ? 1 : 0);
    if (x >= 1) return exact(upper ? 0 : 1);
    const r = incBetaValue(p.v, be.v, x);
    if (!r) return INF_E;
    const v = upper ? r.c : r.v;
    let e = upper ? r.ce : r.e;
    for (const s of [p, be]) {
      if (s.e === 0) continue;
      if (!(s.v - s.e > 0)) return INF_E;
      e += s.e * Math.sqrt(trigammaMajorant(s.v - s.e));
    }
    return { v, e: e * UP };
  };
  return {
    lo: 0,
    partial(j, a, b) {
      const p = add(al, exact(j));
      const ab = add(al, be);
      let pre = exact(1);
      for (let i = 0; i < j; i++) pre = mul(pre, div(add(al, exact(i)), add(ab, exact(i))));
      // above the mean of Beta(alpha + j, beta) the upper tails' difference keeps its digits
      const upper = a > p.v / (p.v + be.v);
      const diff = upper ? sub(I(a, p, true), I(b, p, true)) : sub(I(b, p, false), I(a, p, false));
      return mul(pre, diff);
    },
    sf: (b) => I(b, al, true),
  };
}

/** beta(alpha, beta) on [lo, hi]: lo + (hi - lo) V, V on [0, 1]; hi - lo and the shapes may round */
export function betaLayerMoment(alpha: number | Est, beta: number | Est, lo: number, hi: number): LayerMoment | null {
  const w = sub(exact(hi), exact(lo));
  if (!(w.v - w.e > 0)) return null;
  return affineLayerMoment(layerMomentFrom(betaPartial(alpha, beta)), w, lo);
}

/**
 * triangular on [0, 1] with mode g (g treated as exact here): density 2y/g on [0, g], 2(1 - y)/(1 - g) on [g, 1], so
 * M_j(A, B) = 2 (B1^{j+2} - A^{j+2}) / ((j + 2) g) + 2/(1 - g) [(B^{j+1} - A2^{j+1})/(j + 1) - (B^{j+2} - A2^{j+2})/(j + 2)]
 * over the parts of (A, B] left and right of g; S(y) = 1 - y^2/g left of g, (1 - y)^2/(1 - g) right of it
 * (JKB vol. 2, ch. 26, sec. 9). The powers are exact doubles' powers, their rounding carried by powInt's bound.
 */
function triangularPartial(g: number): Partial {
  // y^n with its rounding bound (powInt on an exact base)
  const pw = (y: number, n: number): Est => {
    let r = exact(1);
    for (let i = 0; i < n; i++) r = mul(r, exact(y));
    return r;
  };
  const piece = (A: number, B: number, n: number) => div(sub(pw(B, n), pw(A, n)), exact(n));
  return {
    lo: 0,
    partial(j, a, b) {
      const A = Math.max(a, 0);
      const B = Math.min(b, 1);
      if (!(B > A)) return exact(0);
      let s = exact(0);
      if (A < g) s = add(s, div(mul(exact(2), piece(A, Math.min(B, g), j + 2)), exact(g)));
      if (B > g) {
        const A2 = Math.max(A, g);
        s = add(s, div(mul(exact(2), sub(piece(A2, B, j + 1), piece(A2, B, j + 2))), sub(exact(1), exact(g))));
      }
      return s;
    },
    sf(b) {
      if (b <= 0) return exact(1);
      if (b >= 1) return exact(0);
      if (b <= g) return sub(exact(1), div(mul(exact(b), exact(b)), exact(g)));
      const u = sub(exact(1), exact(b));
      return div(mul(u, u), sub(exact(1), exact(g)));
    },
  };
}

/**
 * triangular(a, c, b) = a + (b - a) Y, Y triangular on [0, 1] with mode g = (c - a)/(b - a). Where g rounds, the
 * moment of h(Y) = min((Y - d)_+, l)^k moves by at most the rounding times sup |dE h(Y)/dg|: E h(Y) = h(1) -
 * int_0^1 h'(y) F(y) dy and |dF/dg| = y^2/g^2 or (1 - y)^2/(1 - g)^2 <= 1, so |dE h/dg| <= int |h'| = h(1) - h(0) <= h(1)
 * (h is non-decreasing and non-negative).
 */
export function triangularLayerMoment(a: number, c: number, b: number): LayerMoment | null {
  const w = sub(exact(b), exact(a));
  if (!(w.v - w.e > 0)) return null;
  const g = div(sub(exact(c), exact(a)), w);
  const gv = Math.min(1, Math.max(0, g.v));
  const inner = layerMomentFrom(triangularPartial(gv));
  const moved = (k: number, d: number, l: number): Est => {
    const r = inner(k, d, l);
    const gErr = g.e + Math.abs(gv - g.v);
    if (gErr === 0) return r;
    const top = Math.max(0, Math.min(l, 1 - d)) * UP;
    return { v: r.v, e: (r.e + gErr * top ** k) * UP };
  };
  return affineLayerMoment(moved, w, a);
}

/**
 * generalised Pareto(xi, sigma, mu) without its location (the caller shifts by mu): sigma/xi Lomax(1/xi, 1) for xi > 0,
 * sigma Exp(1) for xi = 0, sigma/|xi| Beta(1, 1/|xi|) for xi < 0 (Embrechts, Klueppelberg & Mikosch 1997, sec. 3.4);
 * the rounded 1/xi and sigma/xi are estimates whose bounds the partial moments and the affine map carry.
 */
export function generalizedParetoLayerMoment(xi: number, sigma: number): LayerMoment {
  if (xi === 0) return affineLayerMoment(layerMomentFrom(gammaPartial(1, 1)), sigma, 0);
  const inv = div(exact(1), exact(Math.abs(xi)));
  const s = div(exact(sigma), exact(Math.abs(xi)));
  if (xi > 0) return affineLayerMoment(lomaxLayerMoment(inv, 1), s, 0);
  return affineLayerMoment(layerMomentFrom(betaPartial(1, inv)), s, 0);
}
