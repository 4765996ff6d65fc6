import erfc from "@stdlib/math-base-special-erfc";
import erfcx from "@stdlib/math-base-special-erfcx";
import { lgamma, lgammaErr } from "../families/special";
import type { Bounded } from "../families/bessel-bounded";
import { checkDeadline } from "../deadline";
import { ELEM } from "./law";

/**
 * Tail probabilities of the normal variance-mean mixtures X = loc + theta V + sigma sqrt(V) W (W standard normal):
 * variance-gamma (V gamma; Madan, Carr & Chang 1998, sec. 2) and NIG (V inverse Gaussian; Barndorff-Nielsen 1997,
 * sec. 2). With V = s0 e^t,
 *   P(X > x) = T(p, q) = int rho(t) Qbar(p e^{-t/2} - q e^{t/2}) dt,  p = (x - loc)/(sigma sqrt s0), q = theta sqrt s0 / sigma,
 * Qbar the standard normal upper tail, and P(X <= x) = T(-p, -q). rho is the density of t = log(V/s0):
 *   gamma (V/s0 ~ Gamma(k, 1), s0 = nu): rho = exp(k t - e^t)/Gamma(k);
 *   inverse Gaussian (mean delta/gamma, shape delta^2; s0 = delta/gamma, D = delta gamma): rho = sqrt(D/2pi) e^{-t/2 - D (cosh t - 1)}.
 * T is the trapezoidal rule on the full line, whose error is at most 2M/(e^{2 pi a/h} - 1) (Trefethen & Weideman 2014,
 * Thm 5.1). M bounds int |f(t + ib)| dt for |b| < a: |rho(t + ib)| <= rho_a(t) (cos b >= cos a in the e^t terms), and
 * with w = p e^{-t/2} - q e^{t/2}, Re w(t + ib) = cos(b/2) w(t), |erfc(z)| <= e^{(Im z)^2} erfc(Re z) (integrate
 * e^{-s^2} along z + [0, inf)), so |Qbar(w)| <= [w(t) < 0] + exp(-(cos b/2)(p^2 e^{-t} + q^2 e^t) + pq) / 2 (for
 * Re w < 0 through Qbar(w) = 1 - Qbar(-w)). Both pieces integrate in closed form: int e^{nu t - P e^t - Q e^{-t}} dt
 * = 2 (Q/P)^{nu/2} K_nu(2 sqrt(PQ)) (DLMF 10.32.10), and the mass of rho_a on a half line by the incomplete gamma or
 * by bounding the e^{-t} (or e^t) factor at the end. The sum stops where the rest is below a geometric series: log rho is
 * concave, so rho(t) <= rho(t_R) e^{psi'(t_R)(t - t_R)}, and Qbar(w(t)) <= Qbar(w(t_R)) while w is monotone that way.
 */
export type Mixing = { kind: "gamma"; k: number } | { kind: "ig"; D: number };

const U = Number.EPSILON / 2;
const EPS_T = 1e-18;
/** the bound of an underflowed value (a module constant: its load needs no type feedback, so the first underflow, often
 * met only after mixtureTail is optimised, does not throw that code away) */
const TINY = Number.MIN_VALUE;

/**
 * An upper bound on log int e^{nu t - P e^t - Q e^{-t}} dt = log(2 (Q/P)^{nu/2} K_nu(2 sqrt(PQ))) (P > 0, Q >= 0, nu > 0
 * or nu = -1/2; DLMF 10.32.10). K is bounded in closed form (only the strip's M needs it, and a factor there moves the
 * step by a few per cent): K_nu(z) <= sqrt(pi/(2z)) e^{-z + nu^2/(2z)} (cosh u >= 1 + u^2/2 in DLMF 10.32.9) and
 * K_nu(z) <= Gamma(nu)/2 (2/z)^nu (drop e^{-z^2/(4s)} in DLMF 10.32.10 written in s = z^2/(4t)); K_{1/2} exactly.
 * The value is raised by its rounding (roundedUp): log within one ulp (the project's standing assumption), so each term
 * (a product of at most three rounded factors, a log of a rounded argument adding 2u plus the argument's relative error)
 * is within 8u of its magnitude plus 8u absolute, and lgamma within lgammaErr (../families/special.ts).
 */
function logKInt(nu: number, P: number, Q: number): number {
  if (Q === 0) {
    const a = lgamma(nu);
    const b = nu * Math.log(P);
    return roundedUp(a - b, Math.abs(a) + Math.abs(b) + Math.abs(nu), lgammaErr(nu));
  }
  if (nu === -0.5) {
    const a = 0.5 * Math.log(Math.PI / Q);
    const b = 2 * Math.sqrt(P * Q);
    return roundedUp(a - b, Math.abs(a) + b, 0);
  }
  const z = 2 * Math.sqrt(P * Q);
  const a1 = 0.5 * Math.log(Math.PI / (2 * z));
  const a2 = (nu * nu) / (2 * z);
  const lg = lgamma(nu);
  const b1 = nu * Math.log(2 / z);
  const A = a1 - z + a2;
  const B = lg - Math.LN2 + b1;
  // the smaller of two upper bounds: each raised by its own rounding (z's 3u relative moves them by 3u (z + a2 + 1/2)
  // and 3u |nu|, inside the terms' 8u)
  const logK = Math.min(roundedUp(A, Math.abs(a1) + z + a2, 0), roundedUp(B, Math.abs(lg) + Math.LN2 + Math.abs(b1) + Math.abs(nu), lgammaErr(nu)));
  const c = (nu / 2) * Math.log(Q / P);
  return roundedUp(Math.LN2 + c + logK, Math.LN2 + Math.abs(c) + Math.abs(logK) + Math.abs(nu), 0);
}

/** v raised past its rounding: 8u of the magnitude of its terms, 8u absolute and `extra` (a special function's bound) */
const roundedUp = (v: number, mag: number, extra: number) => v + 8 * U * (mag + 1) + extra;

const lse = (a: number, b: number) => (a === -Infinity ? b : b === -Infinity ? a : Math.max(a, b) + Math.log1p(Math.exp(-Math.abs(a - b))));

/** log M for the strip |Im t| < a (c = cos a); c = 1 gives an upper bound on T itself */
export function logStripBound(mix: Mixing, p: number, q: number, c: number): number {
  let m1: number;
  let m2 = -Infinity;
  const pq = p * q;
  if (mix.kind === "gamma") {
    const k = mix.k;
    const lg = lgamma(k);
    const lk = logKInt(k, c * (1 + (q * q) / 2), (c * p * p) / 2);
    m1 = roundedUp(-Math.LN2 - lg + pq + lk, Math.LN2 + Math.abs(lg) + Math.abs(pq) + Math.abs(lk), lgammaErr(k));
  } else {
    const D = mix.D;
    const ld = 0.5 * Math.log(D / (2 * Math.PI));
    const lk = logKInt(-0.5, (c * (D + q * q)) / 2, (c * (D + p * p)) / 2);
    m1 = roundedUp(-Math.LN2 + ld + D + pq + lk, Math.LN2 + Math.abs(ld) + D + Math.abs(pq) + Math.abs(lk), 0);
  }
  // the region w(t) < 0, i.e. p < q e^t: all t, t > t0 or t < t0 with e^{t0} = p/q
  const side = q > 0 ? (p <= 0 ? "all" : "right") : p >= 0 ? "none" : q === 0 ? "all" : "left";
  if (side !== "none") {
    const E0 = side === "all" ? 0 : p / q;
    if (mix.kind === "gamma") {
      const k = mix.k;
      // the regularised incomplete gamma at x = c E0, bounded in closed form: Gamma(k, x) <= x^{k-1} e^{-x} (k <= 1) or
      // x^{k-1} e^{-x} / (1 - (k-1)/x) (k > 1, x > k - 1), from t^{k-1} <= x^{k-1} e^{(k-1)(t-x)/x}; gamma(k, x) <= x^k / k
      const x = c * E0;
      const lx = Math.log(x);
      const lf =
        side === "all"
          ? 0
          : side === "left"
            ? roundedUp(k * lx - lgamma(k + 1), Math.abs(k * lx) + Math.abs(lgamma(k + 1)) + k, lgammaErr(k + 1))
            : k <= 1 || x > 2 * (k - 1)
              ? roundedUp((k - 1) * lx - x - lgamma(k) + (k <= 1 ? 0 : Math.LN2), Math.abs((k - 1) * lx) + x + Math.abs(lgamma(k)) + 1 + k, lgammaErr(k))
              : 0;
      const lck = k * Math.log(c);
      m2 = roundedUp(Math.min(0, lf) - lck, Math.abs(lck), 0);
    } else {
      const D = mix.D;
      const all = D * (1 - c) - 0.5 * Math.log(c);
      const l1 = 0.5 * Math.log(D / (2 * Math.PI));
      const l2 = Math.log(2 / (D * c));
      const lc = l1 + D + l2;
      // t > t0: e^{-t/2} e^{-D c e^t / 2} integrated from E0 (dropping e^{-t}); t < t0 likewise in e^{-t}
      const half = side === "right" ? lc - 1.5 * Math.log(E0) - (D * c * E0) / 2 : side === "left" ? lc + 0.5 * Math.log(E0) - (D * c) / (2 * E0) : Infinity;
      // each raised by its rounding (the magnitudes of its terms)
      const magAll = 2 * D + 0.5 * Math.abs(Math.log(c));
      const magHalf = Math.abs(l1) + D + Math.abs(l2) + (side === "right" ? 1.5 * Math.abs(Math.log(E0)) + (D * c * E0) / 2 : 0.5 * Math.abs(Math.log(E0)) + (D * c) / (2 * E0));
      m2 = Math.min(roundedUp(all, magAll, 0), side === "all" ? Infinity : roundedUp(half, magHalf, 0));
    }
  }
  // the log-sum-exp: log1p and exp within one ulp, the sum u
  const m = lse(m1, m2);
  return roundedUp(m, Math.abs(m), 0);
}

/** log Qbar(w) by erfc, or erfcx beyond w = 1 (keeps it finite far out) */
function logQbar(w: number): number {
  if (w > 1) return Math.log(0.5 * erfcx(w / Math.SQRT2)) - 0.5 * w * w;
  return Math.log(0.5 * erfc(w / Math.SQRT2));
}

/** the sum's state: the law's arguments, log f at the start (G), the last term's e^t, psi, psi' and w, the terms' errors */
type TermState = { p: number; q: number; k: number; D: number; gammaMix: boolean; dp: number; dq: number; dPar: number; G: number; lastEt: number; lastPs: number; lastDpsi: number; lastW: number; terr: number };

/**
 * The term f(t)/e^G of the sum, its error added to o.terr (a module-level function with its state in one object, not a
 * closure per mixtureTail call: no set-up per call).
 */
function termAt(o: TermState, t: number): number {
  const { p, q, k, D, gammaMix, dp, dq, dPar, G } = o;
  const eq = Math.exp(0.5 * t);
  const ep = 1 / eq;
  const et = eq * eq;
  const w = p * ep - q * eq;
  let ps: number;
  let dPs: number;
  if (gammaMix) {
    ps = k * t - et;
    o.lastDpsi = k - et;
    dPs = 4 * U * (Math.abs(k * t) + et) * (1 + Math.abs(t)) + dPar * k * Math.abs(t);
  } else {
    const sh = 0.5 * (eq - ep);
    const ch = 0.5 * (eq + ep);
    const cm1 = 2 * sh * sh; // cosh t - 1
    ps = -0.5 * t - D * cm1;
    o.lastDpsi = -0.5 - 2 * D * sh * ch;
    dPs = 8 * U * (0.5 * Math.abs(t) + D * (1 + cm1)) * (1 + Math.abs(t)) + dPar * D * cm1;
  }
  o.lastEt = et;
  o.lastPs = ps;
  o.lastW = w;
  const lq = logQbar(w);
  const v = Math.exp(ps + lq - G);
  // errors in log f: psi's rounding (and k's or D's), Qbar's ELEM, w's rounding (with p's and q's) times the Mills
  // ratio bound, the node's rounding times |d log f/dt|, the sum ps + lq - G and exp.
  // |d log Qbar/dw| = phi(w)/Qbar(w): below w + 1 for w > 0, below 2 phi(w) <= 0.8 e^{-w^2/2} for w <= 0 (Qbar >= 1/2)
  const mills = w > 0 ? w + 1 : w > -8 ? 0.8 : 0.8 * Math.exp(-0.5 * w * w);
  const wAbs = Math.abs(p) * ep + Math.abs(q) * eq;
  const dw = 5 * U * wAbs + dp * ep + dq * eq;
  const slope = Math.abs(o.lastDpsi) + mills * 0.5 * wAbs;
  const d = dPs + ELEM + mills * dw + U * 2 * Math.abs(t) * slope + 2 * U * (Math.abs(ps) + Math.abs(lq) + Math.abs(G)) + U + (w > 1 ? U * w * w : 0);
  o.terr += v * (d < 0.01 ? d * 1.01 : Math.expm1(d));
  return v;
}

/** sum_{j>=1} e^{m (t - jh) - G} = e^{mt - G} z/(1 - z), z = e^{-mh} */
function geo(m: number, h: number, t: number, G: number): number {
  const z = Math.exp(-m * h);
  return (Math.exp(m * t - G) * z) / (1 - z);
}

/**
 * T(p, q) with an absolute error bound. dp, dq: bounds on the rounding of p and q (the law's exact arguments move T by
 * at most E[phi(w) (|dp| e^{-t/2} + |dq| e^{t/2})], counted term by term with phi(w)/Qbar(w) <= w + 1 for w > 0
 * (A&S 7.1.13, as in ./law.ts logErfcxSlope) and <= 2 phi(w) for w <= 0); dPar: relative rounding of k or D.
 */
export function mixtureTail(mix: Mixing, p: number, q: number, dp: number, dq: number, dPar: number): Bounded {
  const gammaMix = mix.kind === "gamma";
  const k = gammaMix ? mix.k : 0;
  const D = gammaMix ? 0 : mix.D;
  const logC = gammaMix ? -lgamma(k) : 0.5 * Math.log(D / (2 * Math.PI));
  // constants' errors: lgamma(k) and its move with k's rounding (|psi(k)| <= |log k| + 1/k), or log C
  const eC = gammaMix ? lgammaErr(k) + 2 * U * Math.abs(logC) + dPar * k * (Math.abs(Math.log(k)) + 1 / k) : 4 * U * (1 + Math.abs(logC)) + dPar;
  // the scale of T and the strip: log M(a) - log M(0) is about (1 - cos a) Z + (gamma) k log(1/cos a), Z = 2 sqrt(PQ) of
  // the Chernoff piece, so h = 2 pi a / (L + a^2 Z / 2) is widest near a = sqrt(2L/Z); the exact M is taken there
  const logEst = logStripBound(mix, p, q, 1);
  const Z = gammaMix ? 2 * Math.sqrt((1 + (q * q) / 2) * ((p * p) / 2)) + k : Math.sqrt((D + q * q) * (D + p * p)) + D;
  const aStar = Math.min(1.4, Math.sqrt((2 * 42) / Math.max(Z, 1e-300)));
  let h = 0;
  let logM = 0;
  let aBest = 0;
  {
    const a = aStar;
    const lm = logStripBound(mix, p, q, Math.cos(a));
    const L = Math.LN2 + lm - logEst - Math.log(EPS_T);
    const hh = (2 * Math.PI * a) / Math.max(L, 1);
    if (hh > h) {
      h = hh;
      logM = lm;
      aBest = a;
    }
  }
  // a strip bound that cannot be formed (parameters beyond the doubles' range): the probability is only known to be in [0, 1]
  if (!(h > 0 && Number.isFinite(h) && Number.isFinite(logM))) return { v: 0.5, e: 0.5 };
  // start at the peak of rho e^{-w^2/2} (the saddle of the Chernoff form), rounded to a multiple of h
  const E = gammaMix
    ? (k + Math.sqrt(k * k + 2 * p * p * (1 + (q * q) / 2))) / (2 + q * q)
    : (-0.5 + Math.sqrt(0.25 + (D + q * q) * (D + p * p))) / (D + q * q);
  const t0 = Math.round(Math.log(E) / h) * h;
  // log f(t0) = psi(t0) + log Qbar(w(t0))
  const psi0 = gammaMix ? k * t0 - Math.exp(t0) : -0.5 * t0 - 2 * D * Math.sinh(0.5 * t0) ** 2;
  const G = psi0 + logQbar(p * Math.exp(-0.5 * t0) - q * Math.exp(0.5 * t0));
  let s = 0;
  let run = 0;
  let tailR = Infinity;
  let tailL = Infinity;
  const o: TermState = { p, q, k, D, gammaMix, dp, dq, dPar, G, lastEt: 0, lastPs: 0, lastDpsi: 0, lastW: 0, terr: 0 };
  // right of t0
  for (let j = 0; j < 200000; j++) {
    if ((j & 4095) === 4095) checkDeadline("mixture tail sum");
    const t = t0 + j * h;
    const v = termAt(o, t);
    s += v;
    run += U * s;
    const r = -o.lastDpsi;
    if (r > 0) {
      // w nondecreasing from t on when q <= 0 and w'(t) >= 0 (-q e^t >= p)
      const mono = q <= 0 && -q * o.lastEt >= p;
      const base = mono ? v : Math.exp(o.lastPs - G);
      const z = Math.exp(-r * h);
      tailR = (base * 1.01 * z) / (1 - z);
      if (tailR <= 2 ** -60 * s || (base === 0 && j > 0)) break;
    }
  }
  for (let j = 1; j < 200000; j++) {
    if ((j & 4095) === 4095) checkDeadline("mixture tail sum");
    const t = t0 - j * h;
    const v = termAt(o, t);
    s += v;
    run += U * s;
    const r = o.lastDpsi;
    // gamma mixing decays only as e^{kt} to the left: the rest of the nodes t_j = t - jh is summed in closed form with
    // 1 - x <= e^{-x} <= 1 - x + x^2/2 on e^{-e^{t_j}}: sum e^{m t_j} = e^{mt} z/(1 - z), z = e^{-mh}, m = k, k+1, k+2;
    // Qbar(w_j) lies between its limit (1, 1/2 or 0 as p < 0, = 0, > 0) and Qbar(w(t)) while w is monotone there (p + q e^s
    // keeps the sign of p); the mid-point is added, half the width (and 8 roundings of the sums) is the error
    if (gammaMix && r > 0 && o.lastEt < 1e-3 && (p === 0 || Math.sign(p + q * o.lastEt) === Math.sign(p))) {
      const lim = p < 0 ? 1 : p === 0 ? 0.5 : 0;
      const qt = 0.5 * erfc(o.lastW / Math.SQRT2);
      const g1 = geo(k + 1, h, t, G);
      const loSum = geo(k, h, t, G) - g1;
      const hiSum = loSum + 0.5 * geo(k + 2, h, t, G);
      const hi = hiSum * Math.max(lim, qt);
      const lo = loSum * Math.min(lim, qt);
      const width = 0.5 * (hi - lo) + 8 * U * (hi + g1);
      if (width <= 1e-17 * s) {
        s += 0.5 * (hi + lo);
        run += U * s;
        tailL = width;
        break;
      }
    }
    if (r > 0) {
      // w nonincreasing up to t when p >= 0 and p + q e^t >= 0
      const mono = p >= 0 && p + q * o.lastEt >= 0;
      const base = mono ? v : Math.exp(o.lastPs - G);
      const z = Math.exp(-r * h);
      tailL = (base * 1.01 * z) / (1 - z);
      if (tailL <= 2 ** -60 * s || (base === 0 && j > 1)) break;
    }
  }
  const logV = G + logC + Math.log(s * h);
  const value = Math.exp(logV);
  const disc = (2 * Math.exp(logM - logV)) / Math.expm1((2 * Math.PI * aBest) / h);
  const rel = (tailR + tailL + o.terr + run) / s + disc + eC * 1.01 + 2 * U * (Math.abs(G) + Math.abs(logC) + Math.abs(Math.log(s * h)) + Math.abs(logV)) + 3 * U;
  const e = value * (rel < 0.5 ? rel * 1.01 : Math.expm1(rel));
  return { v: value, e: value === 0 ? TINY : e };
}
