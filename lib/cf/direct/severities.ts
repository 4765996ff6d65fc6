import erfc from "@stdlib/math-base-special-erfc";
import erfcx from "@stdlib/math-base-special-erfcx";
import gammaincinv from "@stdlib/math-base-special-gammaincinv";
import { lgamma, lgammaErr } from "../families/special";
import { incGammaBounded, incGammaShape, type IncGamma } from "../families/incgamma-bounded";
import type { DirectLaw } from "./types";
import { affinePowerTail, paretoPowerTail } from "./power-tail";
import { bounds, ELEM, EPS, law, logErfcxSlope, withExcess, withMode, withMonotoneTail } from "./law";
import { twoProdErr, twoSumErr } from "../moment-error";

/**
 * Direct laws of the claim-size families with closed-form or special-function distribution functions: lomax,
 * generalised pareto, burr XII, log-logistic, inverse gamma, inverse Gaussian. Formulas: Klugman, Panjer & Willmot,
 * Loss Models (5th ed.), app. A; Embrechts, Klueppelberg & Mikosch (1997), def. 3.4.9; JKB vol. 1, ch. 15.
 *
 * Error bounds are carried through each step (first-order propagation with a factor of 2 or more of margin): an
 * elementary operation adds EPS relative, log1p and exp add ELEM relative, the incomplete gamma its own derived bounds
 * (../families/incgamma-bounded.ts). For S = exp(L), an absolute error eL on L gives S eL on both S and 1 - S =
 * -expm1(L).
 */

/** S = exp(L) and F = -expm1(L) with an absolute error eL on L; the pdf f with relative error rf. */
function fromLogSf(o: { pdf: number; cdf: number; sf: number; pdfErr: number; cdfErr: number; sfErr: number }, L: number, eL: number, pdf: number, rf: number) {
  o.sf = Math.exp(L);
  o.cdf = -Math.expm1(L);
  o.pdf = pdf;
  bounds(o, ELEM, rf, 0);
  o.sfErr += o.sf * eL;
  o.cdfErr += o.sf * eL;
}

/**
 * Generalised pareto (xi, sigma, mu): S(x) = (1 + xi z)^(-1/xi), z = (x - mu)/sigma; xi = 0 the exponential S = e^-z.
 * Lomax(alpha, theta) is xi = 1/alpha, sigma = theta/alpha, mu = 0 (S = (1 + x/theta)^-alpha), computed in its own
 * parameters. Quantile q_p = mu + sigma ((1 - p)^-xi - 1)/xi (EKM def. 3.4.9).
 */
export function generalizedParetoDirect(xi: number, sigma: number, mu: number): DirectLaw {
  const hi = xi < 0 ? mu - sigma / xi : Infinity;
  const gp = withExcess(
    law(
      "closed-form",
      [mu, hi],
      mu + sigma * (xi === 0 ? Math.LN2 : Math.expm1(xi * Math.LN2) / xi),
      sigma,
      (x, o) => {
        const z = (x - mu) / sigma;
        const dz = (2 * EPS * (Math.abs(x) + Math.abs(mu))) / sigma + EPS * z;
        if (xi === 0) {
          fromLogSf(o, -z, dz + EPS * z, Math.exp(-z) / sigma, ELEM + 2 * dz + 2 * EPS * z);
          return;
        }
        // near a bounded law's upper end (1 + xi z below 1/2) the sum 1 + xi z by error-free transformations; elsewhere
        // xi z keeps its relative accuracy (t - 1 from that sum would not, for small t)
        const w1 = xi * z < -0.5 ? onePlus(xi, sigma, mu, x) : null;
        const t = w1 ? w1.w - 1 : xi * z;
        const et = w1 ? w1.e : Math.abs(xi) * dz + EPS * Math.abs(t);
        if (w1 ? w1.w <= 0 : t <= -1) {
          // the upper end of a bounded law (xi < 0)
          o.sf = 0;
          o.cdf = 1;
          o.pdf = xi > -1 ? 0 : xi === -1 ? 1 / sigma : Infinity;
          o.sfErr = o.cdfErr = o.pdfErr = 0;
          return;
        }
        const l = w1 ? Math.log(w1.w) : Math.log1p(t);
        const el = et / (1 + t) + ELEM * Math.abs(l);
        const L = -l / xi;
        const eL = el / Math.abs(xi) + 2 * EPS * Math.abs(L);
        const k = 1 / xi + 1;
        const lp = -k * l;
        const pdf = Math.exp(lp) / sigma;
        fromLogSf(o, L, eL, pdf, ELEM + Math.abs(k) * el + 4 * EPS * (1 + Math.abs(lp)));
      },
      xi === 0 ? (p) => mu - sigma * Math.log1p(-p) : (p) => mu + (sigma * Math.expm1(-xi * Math.log1p(-p))) / xi,
      "generalised pareto S = (1 + xi z)^(-1/xi) by log1p and expm1",
    ),
    mu,
    // mean excess (sigma + xi (c - mu))/(1 - xi), xi < 1 (Embrechts, Klueppelberg & Mikosch 1997, Theorem 3.4.13(e); recalled)
    (c) => (c >= hi ? 0 : (sigma + xi * (c - mu)) / (1 - xi)),
  );
  // xi < 0: S = (1 - |xi| z)^(1/|xi|) reaches 0 at the upper end, not completely monotone
  return xi >= 0 ? withMonotoneTail(gp) : gp;
}

/**
 * w = 1 + xi (x - mu)/sigma = (sigma + xi (x - mu))/sigma with a bound on its error: x - mu, xi times it and sigma plus
 * that each as an unevaluated sum (TwoSum, TwoProduct: Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed.,
 * sec. 4.3), the small parts summed (two roundings, 2u of their sizes), added (u |N|), divided (u |w|); 1% margin.
 * Near a bounded law's upper end (w small) the plain product xi z kept u |xi z| of error, 1/w times w's size (a relative
 * error of 1e-10 at w = 1e-6). Null where TwoProduct does not apply (the caller takes xi z).
 */
function onePlus(xi: number, sigma: number, mu: number, x: number): { w: number; e: number } | null {
  const U = EPS / 2;
  const d = x - mu;
  const ed = twoSumErr(x, -mu, d);
  const P = xi * d;
  const eP = twoProdErr(xi, d, P);
  if (eP === null) return null;
  const Nh = sigma + P;
  const eN = twoSumErr(sigma, P, Nh);
  const small = eP + eN + xi * ed;
  const N = Nh + small;
  const errN = U * Math.abs(N) + 2 * U * (Math.abs(eP) + Math.abs(eN) + 2 * Math.abs(xi * ed));
  const w = N / sigma;
  const e = 1.01 * (errN / sigma + U * Math.abs(w));
  return Number.isFinite(w) && Number.isFinite(e) ? { w, e } : null;
}

/**
 * Lomax (pareto II): S = (1 + x/theta)^-alpha (Loss Models app. A.2.3.1); q_p = theta ((1 - p)^(-1/alpha) - 1). Its density is
 * pareto(alpha, theta)'s moved by -theta (f = alpha theta^alpha (x + theta)^(-alpha-1)), so its power-law majorants are
 * pareto's at origin -theta (the power-tail route's bounds on the images it leaves: ../invert/heavy-residual2.ts).
 */
export function lomaxDirect(alpha: number, theta: number): DirectLaw {
  return { ...lomaxLaw(alpha, theta), powerTail: affinePowerTail(paretoPowerTail(alpha, theta), 1, -theta) };
}

function lomaxLaw(alpha: number, theta: number): DirectLaw {
  return withMonotoneTail(withExcess(
    law(
      "closed-form",
      [0, Infinity],
      theta * Math.expm1(Math.LN2 / alpha),
      theta,
      (x, o) => {
        const u = x / theta;
        const l = Math.log1p(u);
        const el = EPS * u / (1 + u) + ELEM * l;
        const L = -alpha * l;
        const eL = alpha * el + 2 * EPS * Math.abs(L);
        const lp = -(alpha + 1) * l;
        fromLogSf(o, L, eL, (alpha / theta) * Math.exp(lp), ELEM + (alpha + 1) * el + 4 * EPS * (1 + Math.abs(lp)));
      },
      (p) => theta * Math.expm1(-Math.log1p(-p) / alpha),
      "lomax S = (1 + x/theta)^-alpha by log1p and expm1",
    ),
    0,
    // mean excess (theta + c)/(alpha - 1) (Embrechts, Klueppelberg & Mikosch 1997, Table 3.4.7; recalled)
    (c) => (theta + c) / (alpha - 1),
  ));
}

/**
 * Burr XII (alpha, gamma, theta): S = (1 + u)^-alpha, u = (x/theta)^gamma; f = alpha gamma u / (x (1 + u)^(alpha + 1))
 * (Loss Models app. A.2.2.2); log-logistic is alpha = 1 (app. A.2.2.4). q_p = theta ((1 - p)^(-1/alpha) - 1)^(1/gamma).
 */
export function burrDirect(alpha: number, gamma: number, theta: number, name = "burr XII"): DirectLaw {
  return withBurrSplit(alpha, gamma, theta, withMode(gamma > 1 ? theta * Math.pow((gamma - 1) / (alpha * gamma + 1), 1 / gamma) : 0, law(
    "closed-form",
    [0, Infinity],
    theta * Math.exp(Math.log(Math.expm1(Math.LN2 / alpha)) / gamma),
    theta,
    (x, o) => {
      if (x === 0) {
        o.sf = 1;
        o.cdf = 0;
        o.pdf = gamma < 1 ? Infinity : gamma === 1 ? alpha / theta : 0;
        o.sfErr = o.cdfErr = o.pdfErr = 0;
        return;
      }
      const lu0 = Math.log(x / theta);
      const glu = gamma * lu0;
      const u = Math.exp(glu);
      // relative error of u: the rounding of x/theta and its log, gamma times that, and exp
      const eu = 4 * EPS * (1 + Math.abs(glu)) + 2 * EPS * gamma;
      const l = Math.log1p(u);
      const el = (eu * u) / (1 + u) + ELEM * l;
      const L = -alpha * l;
      const eL = alpha * el + 2 * EPS * Math.abs(L);
      const lp = glu - (alpha + 1) * l;
      fromLogSf(o, L, eL, ((alpha * gamma) / x) * Math.exp(lp), ELEM + eu + (alpha + 1) * el + 4 * EPS * (1 + Math.abs(lp)));
    },
    (p) => theta * Math.exp(Math.log(Math.expm1(-Math.log1p(-p) / alpha)) / gamma),
    `${name} S = (1 + (x/theta)^gamma)^-alpha by log1p and expm1`,
  )));
}

/**
 * Burr XII's tail split (DirectLaw.monotoneSplit): for u = (y/theta)^gamma > 1, S = u^-alpha (1 + 1/u)^-alpha =
 * sum_j binom(-alpha, j) (y/theta)^(-gamma (alpha + j)), powers of y (completely monotone); with |binom(-alpha, j)| the sum
 * is (u - 1)^-alpha, and its derivative's alpha gamma (u / y) (u - 1)^(-alpha - 1) bounds the density's split. u is
 * taken low (high in the density's factor) by its rounding as in `at` (4 eps (1 + gamma |log(y/theta)|) + 2 eps gamma);
 * the stop-loss transform's split is not given (Infinity). Left of 0 no mass.
 */
function withBurrSplit(alpha: number, gamma: number, theta: number, l: DirectLaw): DirectLaw {
  const none = { tail: Infinity, pdf: Infinity, stopLoss: Infinity, restTail: 0, restPdf: 0, restStopLoss: 0 };
  return {
    ...l,
    monotoneSplit(y: number, side: 1 | -1, _step: number, stopLoss: boolean) {
      if (side === -1) return y < 0 ? { tail: 0, pdf: 0, stopLoss: 0, restTail: 0, restPdf: 0, restStopLoss: 0 } : null;
      if (stopLoss || !(y > 0)) return stopLoss && y > 0 ? none : null;
      const glu = gamma * Math.log(y / theta);
      const u = Math.exp(glu);
      const eu = 4 * EPS * (1 + Math.abs(glu)) + 2 * EPS * gamma + 4 * EPS;
      const uLo = u * (1 - eu);
      if (!(uLo > 1 + 1e-9)) return null;
      const d = uLo - 1;
      const ld = Math.log(d);
      const up = 1 + 8 * EPS * (2 + (alpha + 1) * Math.abs(ld));
      return { tail: Math.exp(-alpha * ld) * up, pdf: ((alpha * gamma * u * (1 + eu)) / y) * Math.exp(-(alpha + 1) * ld) * up, stopLoss: Infinity, restTail: 0, restPdf: 0, restStopLoss: 0 };
    },
  };
}

/**
 * Inverse gamma (alpha, theta): F(x) = Q(alpha, theta/x), S(x) = P(alpha, theta/x), f = y^alpha e^-y / (x Gamma(alpha)),
 * y = theta/x (Loss Models app. A.2.3.3), by ../families/incgamma-bounded.ts with its bounds; q_p = theta / Q^{-1}(alpha, p).
 */
export function inverseGammaDirect(alpha: number, theta: number): DirectLaw {
  const lg = lgamma(alpha);
  const eLg = lgammaErr(alpha);
  const ig = incGammaShape(alpha);
  const r: IncGamma = { p: 0, q: 0, pErr: 0, qErr: 0 };
  const u = EPS / 2;
  return withInverseGammaSplit(alpha, theta, lg, eLg, withMode(theta / (alpha + 1), law(
    "special-function",
    [0, Infinity],
    alpha > 1 ? theta / (alpha - 1) : theta / Math.max(alpha, 0.1),
    theta / Math.max(alpha, 0.5),
    (x, o) => {
      if (x === 0) {
        o.pdf = o.cdf = o.pdfErr = o.cdfErr = o.sfErr = 0;
        o.sf = 1;
        return;
      }
      const y = theta / x;
      const ly = Math.log(y);
      const al = alpha * ly;
      const s1 = al - y;
      const s2 = s1 - lg;
      const lx = Math.log(x);
      const lp = s2 - lx;
      o.pdf = Math.exp(lp);
      incGammaBounded(ig, y, r);
      o.cdf = r.q;
      o.sf = r.p;
      // the exponent: y within u relative moves log y by u and y by u y; log within 2u relative, the product and the
      // three subtractions u each, log Gamma by lgammaErr; exp 2u. For F and S, y within u relative is x moved by u x
      const eLp = alpha * u * (1 + 2 * Math.abs(ly)) + u * (Math.abs(al) + y + Math.abs(s1) + Math.abs(s2) + 2 * Math.abs(lx) + Math.abs(lp)) + eLg;
      bounds(o, 0, 1.01 * (Math.expm1(eLp) + 2 * u), 2 * EPS * x);
      o.cdfErr += r.qErr;
      o.sfErr += r.pErr;
    },
    (p) => theta / (p < 0.5 ? gammaincinv(p, alpha, true) : gammaincinv(1 - p, alpha, false)),
    "inverse gamma cdf by the regularised incomplete gamma function of theta/x (series and continued fraction with derived bounds)",
  )));
}

/**
 * Inverse gamma's tail split (DirectLaw.monotoneSplit): with x = theta/y, S = P(alpha, x) = x^alpha sum_k (-x)^k /
 * (k! (alpha + k) Gamma(alpha)) (A&S 6.5.29) and f = x^alpha e^-x / (y Gamma(alpha)), series in powers y^(-alpha - k)
 * (completely monotone) for every y > 0; with the terms' sizes they sum to at most x^alpha e^x / Gamma(alpha + 1) and
 * x^alpha e^x / (y Gamma(alpha)), and the stop-loss transform's (each power integrated outward, 1/(alpha + k - 1) <=
 * 1/(alpha - 1)) to y/(alpha - 1) times the first. The exponent within eps times its parts' sizes plus lgamma's bound.
 */
function withInverseGammaSplit(alpha: number, theta: number, lg: number, eLg: number, l: DirectLaw): DirectLaw {
  return {
    ...l,
    monotoneSplit(y: number, side: 1 | -1, _step: number, stopLoss: boolean) {
      if (side === -1) return y < 0 ? { tail: 0, pdf: 0, stopLoss: 0, restTail: 0, restPdf: 0, restStopLoss: 0 } : null;
      if (!(y > 0)) return null;
      const x = theta / y;
      const lx = Math.log(x);
      const la = Math.log(alpha);
      const E = alpha * lx + x - lg - la;
      const up = Math.exp(eLg + 4 * EPS * (1 + 2 * alpha * Math.abs(lx) + 2 * x + Math.abs(lg) + 2 * Math.abs(la) + Math.abs(E))) * (1 + 4 * EPS);
      const tail = Math.exp(E) * up;
      if (stopLoss) return { tail: Infinity, pdf: Infinity, stopLoss: alpha > 1 ? ((tail * y) / (alpha - 1)) * (1 + 4 * EPS) : Infinity, restTail: 0, restPdf: 0, restStopLoss: 0 };
      return { tail, pdf: ((tail * alpha) / y) * (1 + 4 * EPS), stopLoss: Infinity, restTail: 0, restPdf: 0, restStopLoss: 0 };
    },
  };
}

/**
 * Inverse Gaussian (mu, lambda): F = Phi(a) + e^{2 lambda/mu} Phi(-b), a = r (x/mu - 1), b = r (x/mu + 1),
 * r = sqrt(lambda/x) (JKB vol. 1, ch. 15, eq. 15.6). Since b^2 - a^2 = 4 lambda/mu, the second term is
 * erfcx(b/sqrt2) e^{-a^2/2}/2 (no overflow of e^{2 lambda/mu}); above the mean S = e^{-a^2/2} (erfcx(a/sqrt2) -
 * erfcx(b/sqrt2))/2, where the difference may cancel: its bound is ELEM times the sum of the terms. The quantile has no
 * closed form: the bracketed search of ./answer.ts.
 */
/**
 * The pieces shared by the inverse Gaussian's direct law and its layer moments (../families/layer-moments-ig.ts) at
 * x > 0: r = sqrt(lambda/x), A and its bound, e^{-A^2/2} and its relative bound, erfcx(B/sqrt2) and its relative bound,
 * and T = e^{2 lambda/mu} Phi(-B) = erfcx(B/sqrt2) e^{-A^2/2}/2 (the docs of inverseGaussianDirect below).
 */
export function inverseGaussianTerms(mu: number, lambda: number, x: number) {
  const r = Math.sqrt(lambda / x);
  const a = ((x - mu) / mu) * r;
  const b = ((x + mu) / mu) * r;
  const ea = 6 * EPS * Math.abs(a) + (2 * EPS * (x + mu) * r) / mu;
  const eb = 6 * EPS * b;
  const ga = Math.exp(-0.5 * a * a);
  const rga = Math.abs(a) * ea + 2 * EPS;
  const yb = b / Math.SQRT2;
  const xb = erfcx(yb);
  // log erfcx's slope over the argument's interval (./law.ts logErfcxSlope, A&S 7.1.13: below sqrt 2)
  const rxb = ELEM + logErfcxSlope(yb - eb / Math.SQRT2) * (eb / Math.SQRT2) * 1.01;
  return { r, a, ea, ga, rga, xb, rxb, T: 0.5 * xb * ga };
}

/** erfcx(A/sqrt2) for A >= 0 with its bound (ELEM plus the argument's move by log erfcx's slope) */
export function inverseGaussianUpper(a: number, ea: number) {
  const ya = a / Math.SQRT2;
  const xa = erfcx(ya);
  return { xa, exa: xa * (ELEM + logErfcxSlope(ya - ea / Math.SQRT2) * (ea / Math.SQRT2) * 1.01) };
}

export function inverseGaussianDirect(mu: number, lambda: number): DirectLaw {
  const SQ2PI = Math.sqrt(2 * Math.PI);
  return withMode(mu * (Math.sqrt(1 + (9 * mu * mu) / (4 * lambda * lambda)) - (3 * mu) / (2 * lambda)), law(
    "special-function",
    [0, Infinity],
    mu,
    Math.sqrt((mu * mu * mu) / lambda),
    (x, o) => {
      if (x === 0) {
        o.pdf = o.cdf = o.pdfErr = o.cdfErr = o.sfErr = 0;
        o.sf = 1;
        return;
      }
      const { r, a, ea, ga, rga, xb, rxb, T } = inverseGaussianTerms(mu, lambda, x);
      const eT = T * (rxb + rga + EPS);
      o.pdf = (r / (x * SQ2PI)) * ga;
      const rPdf = rga + 6 * EPS;
      if (a >= 0) {
        const { xa, exa } = inverseGaussianUpper(a, ea);
        o.sf = Math.max(0.5 * ga * (xa - xb), 0);
        o.sfErr = 0.5 * ga * (exa + xb * rxb) + o.sf * (rga + 2 * EPS) + EPS * T;
        const lowA = 0.5 * erfc(a / Math.SQRT2); // Phi(-a)
        o.cdf = Math.min(1, 1 - lowA + T);
        o.cdfErr = ELEM * lowA + (ga / SQ2PI) * ea + eT + 2 * EPS;
        o.cdfErr = Math.max(o.cdfErr, o.sfErr);
      } else {
        const pa = 0.5 * erfc(-a / Math.SQRT2); // Phi(a), a < 0
        const epa = ELEM * pa + (ga / SQ2PI) * ea;
        o.cdf = Math.min(1, pa + T);
        o.cdfErr = epa + eT + 2 * EPS * o.cdf;
        o.sf = Math.max(0, 1 - pa - T);
        o.sfErr = epa + eT + 2 * EPS;
      }
      o.pdfErr = o.pdf * rPdf;
    },
    undefined,
    "inverse Gaussian cdf by erfc and the scaled erfcx (stdlib)",
  ));
}
