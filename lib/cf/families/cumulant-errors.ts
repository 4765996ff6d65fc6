/**
 * The named families' cumulants in running-error arithmetic (../moment-error.ts): the same closed forms as the
 * family modules, step for step, so that each reported cumulant carries a derived bound. The formulas' sources are
 * cited where the family modules state them.
 */
import {
  add, bernoulliE, cumulantsToRawE, div, log, log1p, neg, exact, estList, expm1, exp, factorialE, gammaE, lgammaE, mul, PI, powInt, pow, rawToCumulantsE, sqrt, sub,
  type Est, type EstList,
} from "../moment-error";
import { connectedGraphSumsE } from "./connected-graphs";
import { eulerianRow } from "./special";
import { normalCdfBounded } from "./normal-bounded";

const E0 = exact(0);
const x = exact;
/** a parameter: exact as given, or an estimate when the builder derived it */
const P = (a: number | Est): Est => (typeof a === "number" ? x(a) : a);

export const normalE = (mu: number, sigma: number) => (n: number): EstList =>
  Array.from({ length: n }, (_, i) => (i === 0 ? x(mu) : i === 1 ? mul(x(sigma), x(sigma)) : E0));

/** kappa_1 = (a+b)/2, kappa_n = B_n (b-a)^n / n */
export const uniformE = (a: number, b: number) => (n: number): EstList => {
  const w = sub(x(b), x(a));
  return Array.from({ length: n }, (_, i) => (i === 0 ? mul(x(0.5), add(x(a), x(b))) : div(mul(bernoulliE(i + 1), powInt(w, i + 1)), x(i + 1))));
};

/** kappa_n = shape (n-1)! / rate^n */
export const gammaE_ = (shape: number | Est, rate: number | Est) => (n: number): EstList =>
  Array.from({ length: n }, (_, i) => div(mul(P(shape), factorialE(i)), powInt(P(rate), i + 1)));

export const laplaceE = (loc: number, b: number) => (n: number): EstList =>
  Array.from({ length: n }, (_, i) => (i === 0 ? x(loc) : (i + 1) % 2 === 0 ? mul(mul(x(2), factorialE(i)), powInt(x(b), i + 1)) : E0));

export const logisticE = (loc: number, s: number) => (n: number): EstList =>
  Array.from({ length: n }, (_, i) => {
    const m = i + 1;
    if (m === 1) return x(loc);
    if (m % 2 === 1) return E0;
    const B = bernoulliE(m);
    return div(mul(mul({ v: Math.abs(B.v), e: B.e }, x(2 ** m)), powInt(mul(PI, x(s)), m)), x(m));
  });

export const varianceGammaE = (sigma: number, nu: number, theta: number, loc: number) => (n: number): EstList => {
  const e1 = mul(x(Math.abs(theta)), x(nu));
  const e2 = mul(mul(x(0.5), mul(x(sigma), x(sigma))), x(nu));
  const sign = theta < 0 ? -1 : 1;
  const out: Est[] = [];
  let pm2: Est = x(2);
  let pm1 = e1;
  for (let m = 1; m <= n; m++) {
    const pm = m === 1 ? e1 : add(mul(e1, pm1), mul(e2, pm2));
    if (m > 1) {
      pm2 = pm1;
      pm1 = pm;
    }
    const k = div(mul(mul(factorialE(m - 1), pm), x(sign ** m)), x(nu));
    out.push(m === 1 ? add(k, x(loc)) : k);
  }
  return out;
};

export const nigE = (alpha: number, beta: number, delta: number, mu: number) => (n: number): EstList => {
  const g = sqrt(sub(mul(x(alpha), x(alpha)), mul(x(beta), x(beta))));
  const h: Est[] = [mul(g, g), x(-2 * beta), x(-1)];
  const c: Est[] = [g];
  const twoG = mul(x(2), g);
  for (let m = 1; m <= n; m++) {
    let s = h[m] ?? E0;
    for (let j = 1; j < m; j++) s = sub(s, mul(c[j], c[m - j]));
    c.push(div(s, twoG));
  }
  return Array.from({ length: n }, (_, i) => sub(x(i === 0 ? mu : 0), mul(mul(x(delta), factorialE(i + 1)), c[i + 1])));
};

/** E T^{2k} = nu^k prod (2j-1)/(nu-2j), scaled by scale^m; kappa_1 = loc */
export const studentTE = (nu: number, loc: number, scale: number) => (n: number): EstList => {
  const raw = (m: number): Est => {
    if (m % 2 === 1) return E0;
    let v = x(1);
    for (let j = 1; j <= m / 2; j++) v = mul(v, div(mul(x(nu), x(2 * j - 1)), sub(x(nu), x(2 * j))));
    return mul(v, powInt(x(scale), m));
  };
  const k = rawToCumulantsE(estList(n, nu, raw));
  if (n > 0 && k[0] !== null) k[0] = x(loc);
  return k;
};

/** raw moments E X^r = theta^r Gamma(1 + r/g) Gamma(a - r/g) / Gamma(a) (Burr XII) */
export const burrRawE = (alpha: number, gamma: number, theta: number) => (r: number): Est =>
  mul(pow(x(theta), r), exp(sub(add(lgammaE(add(x(1), div(x(r), x(gamma)))), lgammaE(sub(x(alpha), div(x(r), x(gamma))))), lgammaE(alpha))));

/** inverse gamma: E X^r = theta^r Gamma(a - r) / Gamma(a) */
export const inverseGammaRawE = (alpha: number, theta: number) => (r: number): Est =>
  mul(pow(x(theta), r), exp(sub(lgammaE(sub(x(alpha), x(r))), lgammaE(alpha))));

/** lomax: E X^n = theta^n n! Gamma(a - n) / Gamma(a) */
export const lomaxRawE = (alpha: number | Est, theta: number | Est) => (n: number): Est =>
  mul(mul(powInt(P(theta), n), factorialE(n)), exp(sub(lgammaE(sub(P(alpha), x(n))), lgammaE(P(alpha)))));


/** weibull: E X^m = lambda^m Gamma(1 + m/k) */
export const weibullRawE = (k: number, lambda: number) => (m: number): Est => {
  const arg = add(x(1), div(x(m), x(k)));
  return mul(pow(x(lambda), m), arg.e === 0 && Number.isInteger(arg.v) ? gammaE(arg.v) : exp(lgammaE(arg)));
};

/** pareto: E X^m = alpha xm^m / (alpha - m) */
export const paretoRawE = (alpha: number, xm: number) => (m: number): Est => div(mul(x(alpha), pow(x(xm), m)), sub(x(alpha), x(m)));

/** inverse Gaussian: kappa_m = (2m-3)!! mu^{2m-1} / lambda^{m-1} */
export const inverseGaussianE = (mu: number, lambda: number) => (n: number): EstList =>
  Array.from({ length: n }, (_, i) => {
    const m = i + 1;
    let df = x(1);
    for (let j = 2 * m - 3; j > 1; j -= 2) df = mul(df, x(j));
    return div(mul(df, pow(x(mu), 2 * m - 1)), pow(x(lambda), m - 1));
  });

/** lognormal: kappa_k = m1^k C_k(d), C_k the sum over connected graphs (./connected-graphs.ts, non-negative terms) */
export const lognormalE = (mu: number, sigma: number) => (n: number): EstList => {
  const s2 = mul(x(sigma), x(sigma));
  return connectedGraphSumsE(expm1(s2), exp(add(x(mu), div(s2, x(2)))), n);
};

/** beta on [a, b]: raw moments of Y by the product (alpha + k)/(alpha + beta + k), cumulants times w^n, kappa_1 = mean */
export const betaE = (alpha0: number | Est, beta0: number | Est, a0: number | Est, b0: number | Est) => (n: number): EstList => {
  const a = P(a0);
  const raws: Est[] = [];
  const alpha = P(alpha0);
  const beta = P(beta0);
  let m = x(1);
  for (let k = 0; k < n; k++) {
    m = mul(m, div(add(alpha, x(k)), add(add(alpha, beta), x(k))));
    raws.push(m);
  }
  const w = sub(P(b0), a);
  const k = rawToCumulantsE(raws).map((v, i) => (v === null ? null : mul(v, powInt(w, i + 1))));
  if (n > 0) k[0] = add(a, div(mul(w, alpha), add(alpha, beta)));
  return k;
};

/** triangular: E(X - a)^k = 2 sum_j (c-a)^j (b-a)^{k-j} / ((k+1)(k+2)); kappa_1 = (a + b + c)/3 */
export const triangularE = (a: number, c: number, b: number) => (n: number): EstList => {
  const h1 = sub(x(c), x(a));
  const w = sub(x(b), x(a));
  const momA = (k: number) => {
    let s = E0;
    for (let j = 0; j <= k; j++) s = add(s, mul(powInt(h1, j), powInt(w, k - j)));
    return div(mul(x(2), s), x((k + 1) * (k + 2)));
  };
  const k = rawToCumulantsE(Array.from({ length: n }, (_, i) => momA(i + 1)));
  if (n > 0) k[0] = div(add(add(x(a), x(b)), x(c)), x(3));
  return k;
};

/** binomial: c_1 = p, c_{j+1} = p(1-p) dc_j/dp as integer polynomials in p (exact coefficients), kappa_j = n c_j(p) */
export const binomialE = (n: number, p: number) => (m: number): EstList => {
  let poly = [0, 1];
  const out: Est[] = [];
  for (let j = 1; j <= m; j++) {
    let v = E0;
    // integer coefficients below 2^53 are exact (they are for the orders served)
    for (let i = poly.length - 1; i >= 0; i--) v = add(mul(v, x(p)), intCoef(poly[i]));
    out.push(mul(x(n), v));
    const der = poly.slice(1).map((c, i) => c * (i + 1));
    const next = new Array<number>(der.length + 2).fill(0);
    for (let i = 0; i < der.length; i++) {
      next[i + 1] += der[i];
      next[i + 2] -= der[i];
    }
    poly = next;
  }
  return out;
};

/** an integer coefficient computed in doubles: exact below 2^53, else no bound */
const intCoef = (c: number): Est => (Math.abs(c) < 2 ** 53 ? x(c) : { v: c, e: Infinity });

export const poissonE = (lambda: number) => (n: number): EstList => new Array(n).fill(x(lambda));

/** negative binomial: kappa_n = r q A_{n-1}(q) / p^n, A the Eulerian polynomial, q = 1 - p */
export const negativeBinomialE = (r: number, p: number) => (n: number): EstList => {
  const q = sub(x(1), x(p));
  return Array.from({ length: n }, (_, i) => {
    const row = eulerianRow(i);
    let v = E0;
    for (let j = row.length - 1; j >= 0; j--) v = add(mul(v, q), intCoef(row[j]));
    return div(mul(mul(x(r), q), v), powInt(x(p), i + 1));
  });
};

/** logarithmic: E N^n = p A_{n-1}(p) / ((1-p)^n (-log(1-p))) */
export const logarithmicRawE = (p: number) => (n: number): Est => {
  const row = eulerianRow(n - 1);
  let v = E0;
  for (let j = row.length - 1; j >= 0; j--) v = add(mul(v, x(p)), intCoef(row[j]));
  const ell = logOneMinus(p);
  return div(mul(x(p), v), mul(powInt(sub(x(1), x(p)), n), { v: -ell.v, e: ell.e }));
};

/** log1p(-p) with its bound */
function logOneMinus(p: number): Est {
  const v = Math.log1p(-p);
  return { v, e: Math.abs(v) * 2 ** -51 };
}

/** truncated normal raw moments by the recursion m_k = mu m_{k-1} + (k-1) s^2 m_{k-2} - s (b^{k-1} phi(be) - a^{k-1} phi(al)) / Z */
export const truncatedNormalRawE = (mu: number, sigma: number, a: number, b: number, Z: Est, phiA: Est, phiB: Est) => (n: number): EstList => {
  const raw: Est[] = [x(1)];
  const s2 = mul(x(sigma), x(sigma));
  for (let k = 1; k <= n; k++) {
    const ta = Number.isFinite(a) ? mul(powInt(x(a), k - 1), phiA) : E0;
    const tb = Number.isFinite(b) ? mul(powInt(x(b), k - 1), phiB) : E0;
    const rec = add(mul(x(mu), raw[k - 1]), k > 1 ? mul(mul(x(k - 1), s2), raw[k - 2]) : E0);
    raw.push(sub(rec, div(mul(x(sigma), sub(tb, ta)), Z)));
  }
  return raw.slice(1);
};

export { exp, mul, x as exactE };

/** tan of an estimate: |tan y - tan y'| <= (1 + max tan^2) |y - y'| on the interval (no pole inside), plus 2 ulp */
function tanE(y: Est): Est {
  const v = Math.tan(y.v);
  const lo = Math.tan(y.v - y.e);
  const hi = Math.tan(y.v + y.e);
  if (!Number.isFinite(v) || Math.abs(Math.cos(y.v)) <= y.e * 2 || Math.sign(lo) * Math.sign(hi) < 0 && Math.abs(v) > 1) return { v, e: Infinity };
  const m = Math.max(Math.abs(lo), Math.abs(hi), Math.abs(v)) * (1 + 2 ** -50);
  return { v, e: ((1 + m * m) * y.e + Math.abs(v) * 2 ** -51) * (1 + 2 ** -48) };
}

/** stable: variance 2 g^2 at alpha = 2, the mean (the S1 location) for 1 < alpha < 2, nothing else exists */
export const stableE = (a: number, beta: number, g: number, loc: number, param: "S0" | "S1") => (n: number): EstList => {
  const out: EstList = new Array(n).fill(null);
  if (a === 2) {
    if (n > 0) out[0] = x(loc);
    if (n > 1) out[1] = mul(x(2), mul(x(g), x(g)));
    for (let k = 2; k < n; k++) out[k] = E0;
  } else if (a > 1 && n > 0) {
    if (param === "S1") out[0] = x(loc);
    else out[0] = sub(x(loc), mul(mul(x(beta), x(g)), tanE(div(mul(PI, x(a)), x(2)))));
  }
  return out;
};

/** zero-modified count: raw moments of the base times beta = (1 - p0M) / (1 - p0) */
export const zeroModifiedE = (base: (n: number) => EstList, p0M: number, oneMinusP0: Est) => (n: number): EstList => {
  const beta = div(sub(x(1), x(p0M)), oneMinusP0);
  return rawToCumulantsE(cumulantsToRawE(base(n)).map((v) => (v === null ? null : mul(beta, v))));
};

/** 1 - P(N = 0) as the count builders compute it: -expm1(log P(N = 0)) */
export const oneMinusP0E = {
  poisson: (lambda: number) => neg(expm1(x(-lambda))),
  negativeBinomial: (r: number, p: number) => neg(expm1(mul(x(r), log(x(p))))),
  binomial: (n: number, p: number) => neg(expm1(mul(x(n), log1p(x(-p))))),
};

/**
 * truncated normal on [a, b]: the raw-moment recursion with Z = Phi(be) - Phi(al) and the end densities as the
 * family computes them; Phi carries its derived bound (./normal-bounded.ts) plus its slope (at most 1/sqrt(2 pi)) times
 * the error of its rounded argument
 */
export function truncatedNormalE(mu: number, sigma: number, a: number, b: number): (n: number) => EstList {
  const z = (t: number): Est | null => (Number.isFinite(t) ? div(sub(x(t), x(mu)), x(sigma)) : null);
  const al = z(a);
  const be = z(b);
  const PHI_SLOPE = 0.3989422804014328; // 1/sqrt(2 pi), rounded up
  const Phi = (t: Est | null, sign: number, inf: number): Est => {
    if (t === null) return x(inf);
    const b = normalCdfBounded(sign * t.v);
    return { v: b.v, e: (b.e + PHI_SLOPE * t.e) * (1 + 2 ** -40) };
  };
  const upper = al !== null && al.v > 0;
  const Z = upper ? sub(Phi(al, -1, 0), Phi(be, -1, 0)) : sub(Phi(be, 1, 1), Phi(al, 1, 0));
  const sqrt2pi = sqrt(mul(x(2), PI));
  const pdf = (t: Est | null): Est => (t === null ? E0 : div(exp(mul(x(-0.5), mul(t, t))), sqrt2pi));
  const raw = truncatedNormalRawE(mu, sigma, a, b, Z, pdf(al), pdf(be));
  return (n) => rawToCumulantsE(raw(n));
}
