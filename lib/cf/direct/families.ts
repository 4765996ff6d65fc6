import gammaincinv from "@stdlib/math-base-special-gammaincinv";
import betaincinv from "@stdlib/math-base-special-betaincinv";
import normalQuantile from "@stdlib/stats-base-dists-normal-quantile";
import { lgamma, lgammaErr } from "../families/special";
import { incGammaBounded, incGammaShape, type IncGamma } from "../families/incgamma-bounded";
import { incBetaBounded, incBetaShape } from "../families/incbeta-bounded";
import { normalCdfBounded, type Bounded } from "../families/normal-bounded";
import { directPoint, type DirectLaw, type DirectPoint } from "./types";
import { oneTailSplit } from "./stable-one-tail";
import { paretoPowerTail, studentPowerTail, type PowerTail } from "./power-tail";
import { gammaStopLoss, lognormalStopLoss, normalStopLoss, symmetricStopLoss, weibullStopLoss } from "./stop-loss";
import { bounds, ELEM, EPS, law, SQRT2PI, withExactMode, withExcess, withMode, withMonotoneTail } from "./law";

const U = EPS / 2;

/**
 * Closed-form and special-function laws for the direct route. Formulas: Johnson, Kotz & Balakrishnan, Continuous
 * Univariate Distributions vols. 1-2 (chapter per family in lib/cf/families/spec.ts); cdf and sf are each computed in
 * the form that keeps relative accuracy in its own tail (Q(1/2, .), expm1, log1p, atan2, the upper incomplete functions).
 * Error bounds: ELEM relative for elementary functions; the incomplete gamma's own derived bounds
 * (../families/incgamma-bounded.ts; the normal's Phi through it, ../families/normal-bounded.ts) and incomplete beta (../families/incbeta-bounded.ts); plus the effect of rounding
 * the argument, pdf * |dx|. stdlib's inverse functions only start the quantile searches (./answer.ts brackets them with
 * the bounded cdf).
 */
/** Phi(z) and Phi(-z) into o.cdf and o.sf, each with its derived bound in PHI, PHI_UP (../families/normal-bounded.ts) */
const PHI: Bounded = { v: NaN, e: NaN };
const PHI_UP: Bounded = { v: NaN, e: NaN };
function phiBoth(z: number, o: DirectPoint) {
  o.cdf = normalCdfBounded(z, PHI).v;
  o.sf = normalCdfBounded(-z, PHI_UP).v;
}

export function normalDirect(mu: number, sigma: number): DirectLaw {
  return normalStopLoss(withExactMode(mu, law(
    "special-function",
    [-Infinity, Infinity],
    mu,
    sigma,
    (x, o) => {
      const z = (x - mu) / sigma;
      const dz = 2 * EPS * (Math.abs(x) + Math.abs(mu)) / sigma + EPS * Math.abs(z);
      o.pdf = Math.exp(-0.5 * z * z) / (sigma * SQRT2PI);
      phiBoth(z, o);
      bounds(o, 0, ELEM + (1 + z * z) * 2 * EPS + Math.abs(z) * dz, dz * sigma);
      o.cdfErr += PHI.e;
      o.sfErr += PHI_UP.e;
    },
    (p) => mu + sigma * normalQuantile(p, 0, 1),
    "normal cdf by the bounded incomplete gamma, Q(1/2, z^2/2)/2",
  )), mu, sigma);
}

export function lognormalDirect(mu: number, sigma: number): DirectLaw {
  const med = Math.exp(mu);
  return lognormalStopLoss(withMode(Math.exp(mu - sigma * sigma), law(
    "special-function",
    [0, Infinity],
    med,
    med * Math.max(sigma, 0.1),
    (x, o) => {
      if (x === 0) {
        o.pdf = o.cdf = o.pdfErr = o.cdfErr = o.sfErr = 0;
        o.sf = 1;
        return;
      }
      const lx = Math.log(x);
      const z = (lx - mu) / sigma;
      const dz = (EPS * (1 + Math.abs(lx)) + 2 * EPS * Math.abs(mu)) / sigma + EPS * Math.abs(z);
      o.pdf = Math.exp(-0.5 * z * z) / (x * sigma * SQRT2PI);
      phiBoth(z, o);
      // dF = phi(z) dz with phi(z) = x sigma f(x)
      bounds(o, 0, ELEM + (1 + z * z) * 2 * EPS + Math.abs(z) * dz, dz * x * sigma);
      o.cdfErr += PHI.e;
      o.sfErr += PHI_UP.e;
    },
    (p) => Math.exp(mu + sigma * normalQuantile(p, 0, 1)),
    "lognormal cdf by the bounded incomplete gamma of log x",
  )), mu, sigma);
}

/**
 * Gamma(shape, rate): F = P(shape, rate x), S = Q(shape, rate x) by ../families/incgamma-bounded.ts, each with its
 * bound; f = exp(shape log rate - log Gamma(shape) + (shape - 1) log x - rate x), whose exponent's error is summed
 * term by term (log within 2u relative, each product and sum u, log Gamma by lgammaErr).
 */
export function gammaDirect(shape: number, rate: number): DirectLaw {
  const lr = shape * Math.log(rate);
  const lgs = lgamma(shape);
  const lognorm = lr - lgs;
  const eNorm = 1.01 * U * (3 * Math.abs(lr) + Math.abs(lognorm)) + lgammaErr(shape);
  const ig = incGammaShape(shape);
  const r: IncGamma = { p: 0, q: 0, pErr: 0, qErr: 0 };
  const mean = shape / rate;
  const exp1 = shape === 1;
  return gammaStopLoss(withMode(shape > 1 ? (shape - 1) / rate : 0, law(
    exp1 ? "closed-form" : "special-function",
    [0, Infinity],
    mean,
    Math.sqrt(shape) / rate,
    (x, o) => {
      const y = rate * x;
      const dx = 2 * EPS * x;
      if (exp1) {
        o.pdf = rate * Math.exp(-y);
        o.cdf = -Math.expm1(-y);
        o.sf = Math.exp(-y);
        // u = eps / 2: y = fl(rate x) within u y moves e^{-y} by (e^{u y} - 1) of it, exp and expm1 one ulp (2u), the
        // product u; so sf within (2 + y) u, pdf (3 + y) u, cdf 3u (its move e^{-y} u y <= u (1 - e^{-y}) of it)
        const r = 1.01 * (3 + y) * (EPS / 2);
        bounds(o, r, r, dx);
        return;
      }
      const lx = (shape - 1) * Math.log(x || 1);
      const s1 = lognorm + lx;
      const arg = s1 - y;
      o.pdf = x === 0 ? (shape < 1 ? Infinity : shape === 1 ? rate : 0) : Math.exp(arg);
      incGammaBounded(ig, y, r);
      o.cdf = r.p;
      o.sf = r.q;
      // the exponent: lognorm's error, (shape - 1) log x within 4u (the difference, the log, the product), y within u,
      // the two sums u each; exp 2u
      const eArg = eNorm + U * (4 * Math.abs(lx) + y + Math.abs(s1) + Math.abs(arg));
      bounds(o, 0, 1.01 * (Math.expm1(eArg) + 2 * U), Number.isFinite(o.pdf) ? dx : 0);
      o.cdfErr += r.pErr;
      o.sfErr += r.qErr;
    },
    exp1 ? (p) => -Math.log1p(-p) / rate : (p) => (p > 0.5 ? gammaincinv(1 - p, shape, true) : gammaincinv(p, shape, false)) / rate,
    exp1 ? "exponential cdf by expm1" : "gamma cdf by the regularised incomplete gamma function (series and continued fraction with derived bounds)",
  )), shape, rate);
}

export function paretoDirect(alpha: number, xm: number): DirectLaw {
  return withPowerTail(paretoPowerTail(alpha, xm), withMonotoneTail(withExcess(
    law(
      "closed-form",
      [xm, Infinity],
      xm * Math.pow(2, 1 / alpha),
      xm,
      (x, o) => {
        // log(xm / x) = -log1p((x - xm)/xm): x - xm is exact near xm (Sterbenz), which keeps the cdf's relative accuracy there
        const l = x < 2 * xm ? -Math.log1p((x - xm) / xm) : Math.log(xm / x);
        const dl = 4 * EPS * (1 + Math.abs(l)) * alpha;
        o.sf = Math.exp(alpha * l);
        o.cdf = -Math.expm1(alpha * l);
        o.pdf = (alpha / x) * o.sf;
        bounds(o, ELEM, ELEM + dl, 0);
        // rounding of alpha log(xm / x) moves sf by sf dl
        o.sfErr += o.sf * dl;
        o.cdfErr += o.sf * dl;
      },
      (p) => xm * Math.exp(-Math.log1p(-p) / alpha),
    ),
    xm,
    // mean excess c/(alpha - 1) (Embrechts, Klueppelberg & Mikosch 1997, Table 3.4.7; recalled)
    (c) => c / (alpha - 1),
  )));
}

function withPowerTail(powerTail: PowerTail, law: DirectLaw): DirectLaw {
  return { ...law, powerTail };
}

export function weibullDirect(shape: number, scale: number): DirectLaw {
  return weibullStopLoss(withMode(shape > 1 ? scale * Math.pow((shape - 1) / shape, 1 / shape) : 0, law(
    "closed-form",
    [0, Infinity],
    scale * Math.pow(Math.LN2, 1 / shape),
    scale,
    (x, o) => {
      const u = x / scale;
      const lu = Math.log(u);
      const t = Math.exp(shape * lu);
      const dt = t > 0 ? t * 4 * EPS * (1 + Math.abs(shape * lu)) : 0; // t = 0 at x = 0 (0 * Infinity there)
      o.sf = Math.exp(-t);
      o.cdf = -Math.expm1(-t);
      o.pdf = x === 0 ? (shape < 1 ? Infinity : shape === 1 ? 1 / scale : 0) : ((shape / x) * t) * o.sf;
      bounds(o, ELEM, ELEM + 4 * EPS * (1 + t + Math.abs(shape * lu)), 0);
      o.sfErr += o.sf * dt;
      o.cdfErr += o.sf * dt;
      if (!Number.isFinite(o.pdf)) o.pdfErr = 0;
    },
    (p) => scale * Math.exp(Math.log(-Math.log1p(-p)) / shape),
  )), shape, scale);
}

export function uniformDirect(a: number, b: number): DirectLaw {
  const w = b - a;
  // the density is flat on [a, b]: any point of it is a mode
  return withExactMode(a, law(
    "closed-form",
    [a, b],
    0.5 * (a + b),
    w / 2,
    (x, o) => {
      o.pdf = 1 / w;
      o.cdf = (x - a) / w;
      o.sf = (b - x) / w;
      const dx = 2 * EPS * (Math.abs(x) + Math.abs(a) + Math.abs(b));
      bounds(o, ELEM, ELEM, dx);
    },
    (p) => (p <= 0.5 ? a + p * w : b - (1 - p) * w),
  ));
}

export function cauchyDirect(loc: number, scale: number): DirectLaw {
  // the tail split of the alpha = 1 law with b = 0 (../direct/stable-one-tail.ts), z taken inward by its rounding
  const split = (y: number, side: 1 | -1, step: number, stopLoss: boolean) => {
    const z = ((side * (y - loc)) / scale - (2 * EPS * (Math.abs(y) + Math.abs(loc))) / scale) * (1 - 2 * EPS);
    const r = stopLoss ? null : oneTailSplit(0, z, (step / scale) * (1 - 4 * EPS));
    return r && { ...r, pdf: (r.pdf / scale) * (1 + 4 * EPS), restPdf: (r.restPdf / scale) * (1 + 4 * EPS) };
  };
  // symmetric and unimodal about loc (its density falls with |z|)
  return withExactMode(loc, { ...cauchyLaw(loc, scale), monotoneSplit: split });
}

function cauchyLaw(loc: number, scale: number): DirectLaw {
  return law(
    "closed-form",
    [-Infinity, Infinity],
    loc,
    scale,
    (x, o) => {
      const z = (x - loc) / scale;
      const dz = 2 * EPS * (Math.abs(x) + Math.abs(loc)) / scale + EPS * Math.abs(z);
      o.pdf = 1 / (Math.PI * scale * (1 + z * z));
      o.cdf = Math.atan2(1, -z) / Math.PI;
      o.sf = Math.atan2(1, z) / Math.PI;
      // the pdf moves by |(1 + z^2) / (1 + (z + d)^2) - 1| <= (2 |z| d + d^2) / (1 + (|z| - d)^2) for |d| <= dz (at most
      // 2 dz / |z| far out, not 2 |z| dz), plus the rounding of 1 + z z and of the product and quotient (4 eps)
      const za = Math.max(Math.abs(z) - dz, 0);
      bounds(o, ELEM, ELEM + 4 * EPS + ((2 * Math.abs(z) * dz + dz * dz) / (1 + za * za)) * (1 + 4 * EPS), dz * scale);
    },
    (p) => (p < 0.5 ? loc - scale / Math.tan(Math.PI * p) : p === 0.5 ? loc : loc + scale / Math.tan(Math.PI * (1 - p))),
  );
}

export function logisticDirect(loc: number, scale: number): DirectLaw {
  return symmetricStopLoss(withExactMode(loc, law(
    "closed-form",
    [-Infinity, Infinity],
    loc,
    scale,
    (x, o) => {
      const z = (x - loc) / scale;
      const dz = 2 * EPS * (Math.abs(x) + Math.abs(loc)) / scale + EPS * Math.abs(z);
      const e = Math.exp(-Math.abs(z));
      o.pdf = e / (scale * (1 + e) * (1 + e));
      o.cdf = z >= 0 ? 1 / (1 + e) : e / (1 + e);
      o.sf = z >= 0 ? e / (1 + e) : 1 / (1 + e);
      bounds(o, ELEM, ELEM + 2 * dz, dz * scale);
    },
    (p) => loc + scale * (Math.log(p) - Math.log1p(-p)),
  )), loc, scale, "logistic");
}

export function laplaceDirect(loc: number, scale: number): DirectLaw {
  return symmetricStopLoss(withExactMode(loc, law(
    "closed-form",
    [-Infinity, Infinity],
    loc,
    scale,
    (x, o) => {
      const z = (x - loc) / scale;
      const dz = 2 * EPS * (Math.abs(x) + Math.abs(loc)) / scale + EPS * Math.abs(z);
      const e = 0.5 * Math.exp(-Math.abs(z));
      o.pdf = e / scale;
      o.cdf = z < 0 ? e : 1 - e;
      o.sf = z < 0 ? 1 - e : e;
      bounds(o, ELEM, ELEM + 2 * dz, dz * scale);
    },
    (p) => (p < 0.5 ? loc + scale * Math.log(2 * p) : loc - scale * Math.log(2 * (1 - p))),
  )), loc, scale, "laplace");
}

/** Student t: F(t) = I_{nu/(nu+t^2)}(nu/2, 1/2)/2 for t < 0 (A&S 26.7.1 with 26.5.27). */
export function studentDirect(nu: number, loc: number, scale: number): DirectLaw {
  const bs = incBetaShape(nu / 2, 0.5);
  const g1 = lgamma((nu + 1) / 2);
  const g2 = lgamma(nu / 2);
  const l3 = 0.5 * Math.log(nu * Math.PI);
  const l4 = Math.log(scale);
  const lc = g1 - g2 - l3 - l4;
  // the two log Gammas (nu/2 exact; nu + 1's rounding, found exactly by TwoSum, halved and times |psi| <= max(log x,
  // 1/x + 0.6)), the logs 2u relative (nu pi within 2u), the sums u
  const n1 = nu + 1;
  const dn = Math.abs(nu - (n1 - (n1 - nu)) + (1 - (n1 - nu)));
  const h1 = n1 / 2;
  const eLc =
    lgammaErr(h1) + lgammaErr(nu / 2) + Math.max(Math.log(h1), 1 / h1 + 0.6) * dn * 0.505 + U * (2 * Math.abs(l3) + 2 + 2 * Math.abs(l4) + Math.abs(g1 - g2) + Math.abs(g1 - g2 - l3) + Math.abs(lc));
  const L = law(
    "special-function",
    [-Infinity, Infinity],
    loc,
    scale,
    (x, o) => {
      const t = (x - loc) / scale;
      const dt = 2 * EPS * (Math.abs(x) + Math.abs(loc)) / scale + EPS * Math.abs(t);
      const t2 = t * t;
      const lp = lc - ((nu + 1) / 2) * Math.log1p(t2 / nu);
      o.pdf = Math.exp(lp);
      const nt = nu + t2;
      const xb = nu / nt;
      // the pdf: lc's derived bound; log1p of w = t2/nu (w within 2u relative moves it by 2u w/(1 + w) <= 2u log1p(w)),
      // its own 2u, (nu + 1)/2 and the product 2u; the sum u; exp 2u; and t's rounding dt times |d log f/dt| =
      // (nu + 1)|t|/(nu + t2)
      const rPdf = 1.01 * (Math.expm1(eLc + U * (6 * Math.abs(lp - lc) + Math.abs(lp)) + ((nu + 1) * Math.abs(t) * dt) / (nu + t2)) + 2 * U);
      // tail: half the regularised incomplete beta I_xb(nu/2, 1/2), xb and 1 - xb = t2/(nu + t2) each within 3u
      // relative (t2, the sum, the quotient); a shift of 3u in the argument summed is a shift in t of 3u (nu + t2)/(2|t|)
      // (in xb) or 3u |t| (nu + t2)/(2 nu) (in 1 - xb)
      // (the rare point past the default budget with a larger one; past that, only what is known: a probability in [0, 1])
      const r = incBetaBounded(bs, xb, t2 / nt, 3.01 * U) ?? incBetaBounded(bs, xb, t2 / nt, 3.01 * U, 1e6);
      if (!r) {
        o.cdf = o.sf = o.cdfErr = o.sfErr = 0.5;
        o.pdfErr = rPdf * o.pdf;
        return;
      }
      const tail = 0.5 * r.v;
      const body = 0.5 + 0.5 * r.c;
      o.cdf = t < 0 ? tail : body;
      o.sf = t < 0 ? body : tail;
      const dArg = 1.01 * 3.01 * U * (r.fromY ? (Math.abs(t) * nt) / (2 * nu) : nt / (2 * Math.abs(t)));
      bounds(o, 0, rPdf, (dt + dArg) * scale);
      const eTail = 0.5 * r.e;
      const eBody = 0.5 * r.ce + U * body;
      o.cdfErr += t < 0 ? eTail : eBody;
      o.sfErr += t < 0 ? eBody : eTail;
    },
    (p) => {
      const q = Math.min(p, 1 - p);
      // two-sided level 2q: t^2 = nu (1/x - 1) with x = I^{-1}_{2q}(nu/2, 1/2)
      const xb = betaincinv(2 * q, nu / 2, 0.5);
      const t = Math.sqrt(nu * (1 / xb - 1));
      return loc + scale * (p < 0.5 ? -t : t);
    },
    "Student t cdf by the regularised incomplete beta function (positive series with derived bounds)",
  );
  const pt = directPoint();
  const stopLossT = (c: number, side: 1 | -1) => {
    L.at(c, pt);
    const d = c - loc;
    const z = d / scale;
    const k = (scale * scale * (nu + z * z)) / (nu - 1);
    const m = side === 1 ? pt.sf : pt.cdf;
    const em = side === 1 ? pt.sfErr : pt.cdfErr;
    const t1 = k * pt.pdf;
    const t2 = side * d * m;
    const v = t1 - t2;
    return { v, e: k * pt.pdfErr + Math.abs(d) * em + 16 * U * (Math.abs(t1) + Math.abs(t2)) };
  };
  const sp = directPoint();
  // the upper tail S(z) = sum_k c_k x^(nu/2 + k), x = (1 + z^2/nu)^-1, c_k > 0 (I_x(a, 1/2) = x^a 2F1(a, 1/2; a + 1; x) /
  // (a B(a, 1/2)), A&S 26.5.4 with 15.1.1), and x^s = (nu/z^2)^s (1 + nu/z^2)^-s = sum_j binom(-s, j) nu^(s + j) z^(-2s - 2j)
  // for z^2 > nu: powers of z, completely monotone. Summed with |binom(-s, j)|, x^s becomes (nu/(z^2 - nu))^s, the same
  // x at w = sqrt(z^2 - 2 nu): the split's sizes are the law's own S(w) and f(w), and int_z^inf S(sqrt(u^2 - 2 nu)) du <=
  // the stop-loss transform at w (du = w dw / u, w <= u). Left: the mirror image. Taken where z^2 > 2 nu (1 + 1e-9).
  const split = (y: number, side: 1 | -1, _step: number, wantStopLoss: boolean) => {
    const z = (y - loc) / scale;
    // |z| less its rounding (as in at), w rounded down (a few ulps of margin): the sizes fall with w
    const za = Math.abs(z) - (2 * EPS * (Math.abs(y) + Math.abs(loc))) / scale - EPS * Math.abs(z);
    if (!(side * z > 0) || !(za * za > 2 * nu * (1 + 1e-9))) return null;
    const w = Math.sqrt(za * za - 2 * nu) * (1 - 8 * EPS);
    // the point rounded inward (the law evaluates (at - loc)/scale, at most w)
    const at = loc + side * (scale * w - 4 * EPS * (Math.abs(loc) + scale * w));
    if (wantStopLoss) {
      const sl = nu > 1 ? stopLossT(at, side) : null;
      const stopLoss = sl ? (sl.v + sl.e) * (1 + 4 * EPS) : Infinity;
      return { tail: Infinity, pdf: Infinity, stopLoss, restTail: 0, restPdf: 0, restStopLoss: 0 };
    }
    L.at(at, sp);
    const tail = (side === 1 ? sp.sf + sp.sfErr : sp.cdf + sp.cdfErr) * (1 + 4 * EPS);
    return { tail, pdf: (sp.pdf + sp.pdfErr) * (1 + 4 * EPS), stopLoss: Infinity, restTail: 0, restPdf: 0, restStopLoss: 0 };
  };
  const powerTail = studentPowerTail(nu, loc, scale, lc + eLc);
  if (!(nu > 1)) return withExactMode(loc, { ...L, monotoneSplit: split, powerTail });
  return withExactMode(loc, {
    ...L,
    monotoneSplit: split,
    powerTail,
    // E[(X - c)^+] = scale^2 (nu + z^2)/(nu - 1) f(c) - (c - loc) S(c), z = (c - loc)/scale (from d/dt [(nu + t^2) f_nu(t)] =
    // -(nu - 1) t f_nu(t), McNeil, Frey & Embrechts 2015, Example 2.15), and E[(c - X)^+] with F and + (c - loc) by
    // symmetry; each term within its values' own bounds, plus 16u of their sizes for z's rounding and the arithmetic.
    // The two terms of the upper one, for z > 0, cancel to about 1/nu of their size.
    stopLoss: stopLossT,
  });
}
