import { lgamma, lgammaErr } from "../families/special";
import { incGammaBounded, incGammaShape, type IncGammaShape } from "../families/incgamma-bounded";

/**
 * Regularized incomplete gamma P(a, z) and Q(a, z) = 1 - P, each computed directly where it is the smaller, with
 * derived bounds eP and eQ on their absolute errors (../families/incgamma-bounded.ts: power series, the positive terms
 * of DLMF 8.8.2 and a bracketing continued fraction). z <= 0 gives P = 0, Q = 1 exactly. The shapes' pieces are kept
 * (callers ask a few shapes at many arguments).
 */
const shapes = new Map<number, IncGammaShape>();
export function incGamma(a: number, z: number): { P: number; Q: number; eP: number; eQ: number } {
  if (!(z > 0)) return { P: 0, Q: 1, eP: 0, eQ: 0 };
  let s = shapes.get(a);
  if (!s) {
    if (shapes.size >= 256) shapes.clear();
    shapes.set(a, (s = incGammaShape(a)));
  }
  const r = incGammaBounded(s, z);
  return { P: r.p, Q: r.q, eP: r.pErr, eQ: r.qErr };
}

/** log Gamma(a) and its bound per shape (the kernels ask a few shapes at every point of a grid) */
const logGammas = new Map<number, { lg: number; err: number }>();
function logGammaOf(a: number): { lg: number; err: number } {
  let v = logGammas.get(a);
  if (!v) {
    if (logGammas.size >= 256) logGammas.clear();
    logGammas.set(a, (v = { lg: lgamma(a), err: lgammaErr(a) }));
  }
  return v;
}

/**
 * A bound on the relative error of gammaPdf(a, rate, y) at y > 0: the exponent a log rate + (a - 1) log y - rate y -
 * log Gamma(a) term by term (log within 2u relative, a - 1, each product and sum u, log Gamma by lgammaErr), then exp
 * (2u).
 */
export function gammaPdfErr(a: number, rate: number, y: number): number {
  if (!(y > 0)) return 0;
  const u = Number.EPSILON / 2;
  const t1 = a * Math.log(rate);
  const t2 = (a - 1) * Math.log(y);
  const t3 = rate * y;
  const s1 = t1 + t2;
  const s2 = s1 - t3;
  const lg = logGammaOf(a);
  const arg = s2 - lg.lg;
  const e = 1.01 * u * (3 * Math.abs(t1) + 4 * Math.abs(t2) + t3 + Math.abs(s1) + Math.abs(s2) + Math.abs(arg)) + lg.err;
  return 1.01 * (Math.expm1(e) + 2 * u);
}

/** Gamma(a, rate) density at y > 0. */
export function gammaPdf(a: number, rate: number, y: number): number {
  if (!(y > 0)) return a === 1 && y === 0 ? rate : 0;
  return Math.exp(a * Math.log(rate) + (a - 1) * Math.log(y) - rate * y - logGammaOf(a).lg);
}
