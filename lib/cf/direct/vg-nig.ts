import { lgamma, lgammaErr } from "../families/special";
import { besselKLogSlope, logBesselKScaledBounded } from "../families/bessel-bounded";
import { directPoint, type DirectLaw, type DirectPoint } from "./types";
import { twoSumErr } from "../moment-error";
import { EPS, law, unimodal } from "./law";
import { mixtureTail, type Mixing } from "./mixture-tail";

/**
 * Direct variance-gamma and NIG laws: the density from its Bessel-K closed form (Madan, Carr & Chang 1998, eq. 23;
 * Barndorff-Nielsen 1997, eq. 2.1) with K by logBesselKScaledBounded (derived bound), cdf and sf from the normal
 * variance-mean mixture integral of ./mixture-tail.ts (trapezoidal rule with the Trefethen-Weideman bound). The smaller
 * side is computed directly (sf from the mean up, cdf below it) and the other is its complement, so the answer is one
 * law: cdf + sf = 1 and the cdf is non-decreasing, each within its bound.
 */
const U = EPS / 2;

interface Parts {
  mean: number;
  sd: number;
  loc: number;
  /** p = (x - loc)/sp, q: the mixture's arguments; mix: its mixing law */
  sp: number;
  q: number;
  mix: Mixing;
  dPar: number;
  pdf(y: number, o: DirectPoint): void;
}

function mixtureLaw(P: Parts, note: string): DirectLaw {
  const { mean, loc, sp, q, mix, dPar } = P;
  const dq = 6 * U * Math.abs(q);
  // unimodal: normal variance-mean mixtures with a generalised inverse Gaussian mixing law (gamma, inverse Gaussian)
  // are self-decomposable (Halgreen 1979, Z. Wahrsch. 47), hence unimodal (Yamazato 1978, Ann. Probab. 6)
  return unimodal(law(
    "special-function",
    [-Infinity, Infinity],
    mean,
    P.sd,
    (x, o) => {
      const y = x - loc;
      P.pdf(y, o);
      const p = y / sp;
      // fl(x - loc) and the division: p within 3 roundings; sp within 3 more
      const dp = 6 * U * Math.abs(p);
      const upper = x >= mean;
      const r = upper ? mixtureTail(mix, p, q, dp, dq, dPar) : mixtureTail(mix, -p, -q, dp, dq, dPar);
      const v = Math.min(Math.max(r.v, 0), 1);
      const c = Math.min(Math.max(1 - v, 0), 1);
      if (upper) {
        o.sf = v;
        o.sfErr = r.e;
        o.cdf = c;
        o.cdfErr = r.e + U;
      } else {
        o.cdf = v;
        o.cdfErr = r.e;
        o.sf = c;
        o.sfErr = r.e + U;
      }
    },
    undefined,
    note,
  ));
}

/**
 * The density at y = x - loc of loc + theta V + sigma sqrt(V) W with V/nu ~ Gamma(kk, 1) (kk = 1/nu: the variance-gamma law;
 * kk = 1/nu + 1: its size-biased mixing, E[V g(X)] / E[V]): 2 e^{theta y/sigma^2} / (nu^kk sqrt(2 pi) sigma Gamma(kk))
 * (|y|/c)^lam K_lam(|y| c/sigma^2), lam = kk - 1/2, c = sqrt(2 sigma^2/nu + theta^2) (MCC 1998, eq. 23, with the shape
 * kept apart from the scale: int v^{lam - 1} e^{-beta/v - gamma v} dv = 2 (beta/gamma)^{lam/2} K_lam(2 sqrt(beta gamma)));
 * at y = 0 its limit Gamma(lam)/2 (2 sigma^2/c^2)^lam times the constant for lam > 0 (DLMF 10.30.2), +inf otherwise.
 */
function vgDensity(sigma: number, nu: number, theta: number, kk: number): (y: number, o: DirectPoint) => void {
  const lam = kk - 0.5;
  const s2 = sigma * sigma;
  const c0 = Math.sqrt((2 * s2) / nu + theta * theta);
  const b0 = c0 / s2;
  const lg = lgamma(kk);
  const base = [Math.LN2, -kk * Math.log(nu), -0.5 * Math.log(2 * Math.PI), -Math.log(sigma), -lg];
  const logConst = base.reduce((a, b) => a + b, 0) - lam * Math.log(c0);
  const eConst = lgammaErr(kk) + 4 * U * (base.reduce((a, b) => a + Math.abs(b), 0) + Math.abs(lam * Math.log(c0)) + kk * Math.abs(Math.log(nu))) + 4 * U * Math.abs(lam);
  let atLoc = Infinity;
  let eAtLoc = 0;
  if (lam > 0) {
    const lgl = lgamma(lam);
    const l2 = lam * Math.log((2 * s2) / (c0 * c0));
    atLoc = Math.exp(logConst + lam * Math.log(c0) + lgl - Math.LN2 + l2);
    eAtLoc = atLoc * (eConst + lgammaErr(lam) + 8 * U * (Math.abs(lgl) + Math.abs(l2) + Math.abs(lam * Math.log(c0)) + 1) + 8 * U * lam);
  }
  const tS2 = theta / s2;
  return (y: number, o: DirectPoint) => {
    if (y === 0) {
      o.pdf = atLoc;
      o.pdfErr = Number.isFinite(atLoc) ? eAtLoc : 0;
      return;
    }
    const ay = Math.abs(y);
    const z = ay * b0;
    const K = logBesselKScaledBounded(lam, z);
    const ly = Math.log(ay);
    const ex = tS2 * y;
    const lf = logConst + ex + lam * ly + K.v - z;
    o.pdf = Math.exp(lf);
    // z within 6 roundings (c0, b0, the product); y within one, which moves log f along its slope
    const slopeZ = besselKLogSlope(lam, z);
    const slopeY = Math.abs(tS2) + Math.abs(lam) / ay + b0 * slopeZ;
    const e = eConst + K.e + 6 * U * z * slopeZ + U * ay * slopeY + 4 * U * (Math.abs(ex) + Math.abs(lam * ly) + Math.abs(K.v) + z + Math.abs(lf)) + 2 * U * kk * Math.abs(ly);
    o.pdfErr = o.pdf * (e < 0.5 ? e * 1.01 : Math.expm1(e));
  };
}

/**
 * Variance-gamma (sigma, nu, theta, loc) with the CF of lib/cf/families/continuous.ts, (1 - i theta nu t + sigma^2 nu
 * t^2/2)^{-1/nu}: X = loc + theta G + sigma sqrt(G) W, G ~ Gamma(shape 1/nu, scale nu). Density (MCC 1998, eq. 23):
 * 2 e^{theta y/sigma^2} / (nu^{1/nu} sqrt(2 pi) sigma Gamma(1/nu)) (|y|/c)^{lam} K_lam(|y| c / sigma^2), y = x - loc,
 * c = sqrt(2 sigma^2/nu + theta^2), lam = 1/nu - 1/2; at y = 0 its limit Gamma(lam)/2 (2 sigma^2/c^2)^lam times the
 * constant for nu < 2 (DLMF 10.30.2), +inf for nu >= 2.
 */
export function varianceGammaDirect(sigma: number, nu: number, theta: number, loc: number): DirectLaw | null {
  if (!(sigma > 0 && nu > 0 && Number.isFinite(theta) && Number.isFinite(loc)) || nu > 1e3 || nu < 1e-3) return null;
  const k = 1 / nu;
  const s2 = sigma * sigma;
  const pdfAt = vgDensity(sigma, nu, theta, k);
  const L = mixtureLaw(
    {
      mean: loc + theta,
      sd: Math.sqrt(s2 + theta * theta * nu),
      loc,
      sp: sigma * Math.sqrt(nu),
      q: (theta * Math.sqrt(nu)) / sigma,
      mix: { kind: "gamma", k },
      dPar: U,
      pdf: pdfAt,
    },
    "variance-gamma density by its Bessel-K closed form, cdf and sf by the normal variance-mean mixture integral (trapezoidal rule, Trefethen-Weideman bound)",
  );
  const withSl = vgStopLoss(L, sigma, nu, theta, loc, k);
  // nu >= 2: the density is infinite at loc
  return k > 0.5 ? withSl : { ...withSl, singular: [loc], singularPdf: (d: number, o: DirectPoint) => pdfAt(d, o) };
}

/**
 * Normal inverse Gaussian (alpha, beta, delta, mu) with the CF of lib/cf/families/continuous.ts: X = mu + beta Z +
 * sqrt(Z) W, Z inverse Gaussian with mean delta/gamma and shape delta^2, gamma = sqrt(alpha^2 - beta^2). Density
 * (Barndorff-Nielsen 1997, eq. 2.1): alpha delta K_1(alpha r) / (pi r) e^{delta gamma + beta y}, r = sqrt(delta^2 + y^2).
 */
export function nigDirect(alpha: number, beta: number, delta: number, mu: number): DirectLaw | null {
  if (!(alpha > 0 && Math.abs(beta) < alpha && delta > 0 && Number.isFinite(mu))) return null;
  const g = Math.sqrt((alpha - beta) * (alpha + beta));
  const D = delta * g;
  if (!(D > 1e-6 && D < 1e6)) return null;
  const lc = Math.log((alpha * delta) / Math.PI) + D;
  const eC = 8 * U * (Math.abs(lc) + 2 * D + 1);
  return nigStopLoss(alpha, beta, delta, mu, g, mixtureLaw(
    {
      mean: mu + (delta * beta) / g,
      sd: Math.sqrt((delta * alpha * alpha) / (g * g * g)),
      loc: mu,
      sp: Math.sqrt(delta / g),
      q: beta * Math.sqrt(delta / g),
      mix: { kind: "ig", D },
      dPar: 4 * U,
      pdf(y, o) {
        const r = Math.hypot(delta, y);
        const z = alpha * r;
        const K = logBesselKScaledBounded(1, z);
        const lr = Math.log(r);
        const by = beta * y;
        const lf = lc + by + K.v - z - lr;
        o.pdf = Math.exp(lf);
        const slopeZ = besselKLogSlope(1, z);
        const slopeY = Math.abs(beta) + alpha * slopeZ + 1 / r;
        const e = eC + K.e + 3 * U * z * slopeZ + 2 * U * (Math.abs(y) * slopeY + 1) + 4 * U * (Math.abs(by) + Math.abs(K.v) + z + Math.abs(lr) + Math.abs(lf));
        o.pdfErr = o.pdf * (e < 0.5 ? e * 1.01 : Math.expm1(e));
      },
    },
    "NIG density by its Bessel-K closed form, cdf and sf by the normal variance-mean mixture integral (trapezoidal rule, Trefethen-Weideman bound)",
  ));
}

/**
 * NIG's upper stop-loss transform as variance-gamma's (vgStopLoss): E[(X - c)^+] = (mu - c) S(c) + E Z (beta S~(c) +
 * f~(c)), Z's law size-biased. With t = log(Z/s0), s0 = delta/gamma = E Z, the size-biased density of t is e^t rho(t) =
 * rho(-t) (rho even in cosh t, times e^{-t/2}), so S~(c) = T(-q, -p) of the same mixture integral (./mixture-tail.ts:
 * t -> -t turns p e^{-t/2} - q e^{t/2} into -q e^{-t/2} + p e^{t/2}), and f~ is the generalised hyperbolic density with
 * lambda = 1/2 (Barndorff-Nielsen 1977; GIG(1/2) mixing): (gamma/pi) e^{delta gamma + beta y} K_0(alpha r), r =
 * sqrt(delta^2 + y^2) (checked against the mixture integral with mpmath to 1e-31), bounded as nigDirect's density (K_0 by
 * logBesselKScaledBounded). E Z within 6u. Upper side only (the lower levels use it too, ./shortfall.ts).
 */
function nigStopLoss(alpha: number, beta: number, delta: number, mu: number, g: number, L: DirectLaw): DirectLaw {
  const D = delta * g;
  const s0 = delta / g;
  const sp = Math.sqrt(s0);
  const q = beta * sp;
  const dq = 6 * U * Math.abs(q);
  const mix: Mixing = { kind: "ig", D };
  const lc = Math.log(g / Math.PI) + D;
  const eC = 8 * U * (Math.abs(lc) + 2 * D + 1);
  const pt = directPoint();
  return {
    ...L,
    stopLoss(c: number, side: 1 | -1) {
      if (side !== 1 || !Number.isFinite(c)) return null;
      L.at(c, pt);
      const y = c - mu;
      const p = y / sp;
      const St = mixtureTail(mix, -q, -p, dq, 6 * U * Math.abs(p), 4 * U);
      const r = Math.hypot(delta, y);
      const z = alpha * r;
      const K = logBesselKScaledBounded(0, z);
      const by = beta * y;
      const lf = lc + by + K.v - z;
      const f = Math.exp(lf);
      const slopeZ = besselKLogSlope(0, z);
      const ef = eC + K.e + 3 * U * z * slopeZ + 2 * U * (Math.abs(y) * (Math.abs(beta) + alpha * slopeZ) + 1) + 4 * U * (Math.abs(by) + Math.abs(K.v) + z + Math.abs(lf));
      const eF = f * (ef < 0.5 ? ef * 1.01 : Math.expm1(ef));
      const t1 = (mu - c) * pt.sf;
      const t2 = s0 * beta * St.v;
      const t3 = s0 * f;
      const v = t1 + t2 + t3;
      const e = Math.abs(mu - c) * pt.sfErr + s0 * (Math.abs(beta) * St.e + eF) + 6 * U * (Math.abs(t2) + Math.abs(t3)) + 16 * U * (Math.abs(t1) + Math.abs(t2) + Math.abs(t3));
      if (!(Number.isFinite(v) && Number.isFinite(e))) return null;
      return { v: Math.max(v, 0), e };
    },
  };
}

/**
 * The variance-gamma law with its upper stop-loss transform: with X = loc + theta V + sigma sqrt(V) W,
 * E[(X - c)^+] = (loc - c) S(c) + theta E[V 1{X > c}] + sigma E[sqrt(V) W 1{X > c}], and E[V 1{X > c}] = E V S~(c),
 * sigma E[sqrt(V) phi(w)] = sigma^2 E V f~(c) (w = (c - loc - theta V)/(sigma sqrt V); E[W 1{W > w}] = phi(w)), where S~
 * and f~ are the tail and density of the same mixture with V size-biased, V/nu ~ Gamma(k + 1, 1) (common practice for
 * normal variance-mean mixtures): S~ by the mixture integral (./mixture-tail.ts, its own bound), f~ by vgDensity. E V =
 * k nu within u. Each term within its bound, plus 16u of the terms' sizes. Only where k + 1 is exact in doubles (the
 * size-biased shape is then the law's own k plus one); else, and on the lower side, null (the sweep answers).
 * k = fl(1/nu) is off the law's shape by d <= u k, which f~ (at the shape k + 1) does not see: the mixing density moves by
 * the factor (v/nu)^d Gamma(k + 1)/Gamma(k + 1 + d), within 1.01 d (100 + max(log(k + 1), 1)) of 1 for |log(v/nu)| <= 100
 * (|psi(x)| <= max(log x, 1) for x >= 1), and the mixture's part from v < nu e^-100 is at most e^{-50 (2k + 1)} /
 * (Gamma(k + 1) (k + 1/2) sigma sqrt(2 pi nu)) per law (the kernel below (2 pi sigma^2 v)^-1/2), from v > nu e^100 below
 * e^{-e^100 / 2} (0 in doubles).
 */
function vgStopLoss(L: DirectLaw, sigma: number, nu: number, theta: number, loc: number, k: number): DirectLaw {
  const k1 = k + 1;
  if (twoSumErr(k, 1, k1) !== 0) return L;
  const biased = vgDensity(sigma, nu, theta, k1);
  const mix: Mixing = { kind: "gamma", k: k1 };
  const sp = sigma * Math.sqrt(nu);
  const q = (theta * Math.sqrt(nu)) / sigma;
  const dq = 6 * U * Math.abs(q);
  const EV = k * nu;
  const s2 = sigma * sigma;
  const shapeRel = 1.01 * U * k * (100 + Math.max(Math.log(k1), 1));
  const lowV = (2 * Math.exp(-50 * (2 * k + 1) - lgamma(k1))) / ((k + 0.5) * sigma * Math.sqrt(2 * Math.PI * nu));
  const pt = directPoint();
  const fb = directPoint();
  return {
    ...L,
    stopLoss(c: number, side: 1 | -1) {
      if (side !== 1 || !Number.isFinite(c)) return null;
      L.at(c, pt);
      const y = c - loc;
      const p = y / sp;
      const St = mixtureTail(mix, p, q, 6 * U * Math.abs(p), dq, U);
      biased(y, fb);
      const t1 = (loc - c) * pt.sf;
      const t2 = EV * theta * St.v;
      const t3 = EV * s2 * fb.pdf;
      const v = t1 + t2 + t3;
      const e = Math.abs(loc - c) * pt.sfErr + EV * (Math.abs(theta) * St.e + s2 * (fb.pdfErr + shapeRel * fb.pdf + lowV)) + 16 * U * (Math.abs(t1) + Math.abs(t2) + Math.abs(t3));
      if (!(Number.isFinite(v) && Number.isFinite(e))) return null;
      return { v: Math.max(v, 0), e };
    },
  };
}
