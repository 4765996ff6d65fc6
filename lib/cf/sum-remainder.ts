// A derived bound on what an independent sum's damped transform leaves after its gamma kernels, from its terms' endpoint
// expansions with their Watson remainders (./endpoint-remainder.ts), so the sum's truncation needs no sampled sizes.
import { KERNEL_ORDER, type GammaKernel } from "./damped-kernels";
import { SAME_EXPONENT, keptTerms, type EndpointRemainder } from "./endpoint-remainder";
import { kernelRest, kernelTerms, matchedPowers, merged, sumError, sumPow, termsOf, times, type Power, type Rest, type Term } from "./compound-remainder-terms";
import { gammaEndpointRemainder } from "./gamma-remainder";
import type { Node } from "./node";

const EPS = Number.EPSILON;
/** terms of the product series at most (the product of the kept terms' counts): past it, no derived bound */
const MAX_PRODUCT_TERMS = 4096;
/** past FAR times the kernels' rate the bound is extrapolated by its decay power from there (every piece a power by then) */
const FAR = 1e6;

/** one term of the sum: its expansion with remainder, and a bound on |E e^{-s (X - a)}| where it has one (else 1) */
interface Factor {
  rem: EndpointRemainder;
  size?: (beta: number, t: number) => number;
}

/**
 * The sum's transform relative to its lower end lo = sum a_i is prod_i (A_i + R_i), A_i the first J_i terms of term i's
 * endpoint expansion (true coefficients), |R_i| <= rho_i; Ah_i as the floats give it, |A_i - Ah_i| <= rhoH_i, so with
 * B_i = A_i + R_i - Ah_i, |B_i| <= rb_i = rho_i + rhoH_i. Then (telescoped, |a b - a0 b0| <= |a - a0| |b| + |a0| |b - b0|):
 *   prod (Ah_i + B_i) - prod Ah_i = sum_i (prod_{j < i} Ah_j) B_i prod_{j > i} (Ah_j + B_j),
 * with |Ah_j| <= min(alpha_j, 1 + rb_j) (alpha_j >= |Ah_j| from its absolute coefficients) and |Ah_j + B_j| =
 * |E e^{-s (X_j - a_j)}| <= min(1, alpha_j + rb_j) (X_j >= a_j, Re s >= 0); and prod Ah_i less the kernels K (which
 * match its terms up to KERNEL_ORDER, ./damped-kernels.ts kernelsOfSeries) is, up to an order L, the floats' terms against
 * the kernels' binomial series cluster by cluster (their rounding bounded, ./compound-remainder-terms.ts), plus the product's
 * terms past L in absolute value and the kernels' binomial rests past L. All plain powers of sigma / r (r the kernels'
 * rate), valid for sigma = |s| >= 2 r; below, and wherever smaller, the crude prod_i min(1, size_i) + sum |w| (r / |r + s|)^e.
 * J_i keeps term i's exponents up to L less the other terms' first exponents, so each telescoped term falls at least like
 * the first product power past L. The least over L = 4, 6, 8. Every piece is non-increasing in beta and t (sigma grows
 * with both, the weibull ray's g too), so the value at beta = 0 bounds every damping and serves every probe of a plan; at
 * beta = 0 each piece is a sum of powers of t (rho's closing terms too, each candidate of its least), so past FAR r the
 * value there times (FAR r / t)^decay bounds it.
 * Needs the terms' lower ends to add exactly to lo, where every kernel sits.
 */
export function sumRemainderBound(fs: Factor[], kernels: readonly GammaKernel[], lo: number): { bound: (beta: number, t: number) => number; decay: number } | null {
  if (fs.length < 2 || kernels.length === 0) return null;
  const r = kernels[0].rate;
  if (!(r > 0) || !kernels.every((k) => k.rate === r && k.at === lo)) return null;
  let at = 0;
  for (const f of fs) {
    const s = at + f.rem.series.at;
    if (sumError(at, f.rem.series.at, s) !== 0) return null;
    at = s;
  }
  if (at !== lo || fs.some((f) => !(f.rem.series.exps.length > 0 && f.rem.series.exps[0] > 0))) return null;
  const orders = [KERNEL_ORDER, KERNEL_ORDER + 2, KERNEL_ORDER + 4].map((L) => ofSumOrder(fs, kernels, r, L)).filter((o) => o !== null);
  if (orders.length === 0) return null;
  // at beta = 0 (sigma = t): every piece below is then a sum of powers of t, each with an exponent at least its order's decay
  const crudeAt = (t: number) => {
    let crude = 1;
    for (const f of fs) crude *= f.size ? Math.min(1, f.size(0, t)) : 1;
    for (const k of kernels) crude += Math.abs(k.w) * Math.min(1, Math.pow(k.rate / Math.hypot(k.rate, t), k.shape));
    return crude * (1 + 1e-12);
  };
  // past FAR r, each order's value without the telescoped factors' caps at 1 (a plain sum of powers) extrapolated by its own
  // decay: S(t) <= S(t*) (t* / t)^q for t >= t*, at one evaluation instead of one per probe
  const tStar = FAR * r;
  let star: { v: number; q: number }[] | null = null;
  const at0 = (t: number) => {
    const crude = crudeAt(t);
    if (!(t >= 2 * r)) return crude;
    let best = crude;
    if (t > tStar) {
      star ??= orders.map((o) => ({ v: o.bound(0, tStar, tStar, Math.log(FAR), false), q: o.decay }));
      for (const o of star) best = Math.min(best, o.v * Math.pow(tStar / t, o.q) * (1 + 1e-10));
      return best;
    }
    const ls = Math.log(t / r);
    for (const o of orders) best = Math.min(best, o.bound(0, t, t, ls, true) * (1 + 1e-10));
    return best;
  };
  const cache = new Map<number, number>();
  const bound = (beta: number, t: number) => {
    if (!(beta >= 0)) return Infinity;
    let v = cache.get(t);
    if (v === undefined) {
      if (cache.size > 4096) cache.clear();
      cache.set(t, (v = at0(t)));
    }
    return v;
  };
  return { bound, decay: Math.min(...orders.map((o) => o.decay)) };
}

/**
 * the powers with each exponent lowered to the grid of quarters below it and merged: c (sigma / r)^{-e} <= c (sigma / r)^{-e'}
 * for e' <= e where sigma >= r, so the sum bounds the original's; for lists of rounding-sized coefficients (the floats'
 * errors and the clusters' residuals), whose many exponents would cost one exp each per frequency for nothing
 */
function coarse(ps: Power[]): Power[] {
  return merged(ps.map(([c, e]) => [c, Math.floor(e * 4) / 4] as Power));
}

/** the least exponent of a list of powers (Infinity for none) */
const least = (ps: Power[]) => ps.reduce((m, p) => Math.min(m, p[1]), Infinity);

function ofSumOrder(fs: Factor[], kernels: readonly GammaKernel[], r: number, L: number) {
  const logR = Math.log(r);
  const E = fs.reduce((s, f) => s + f.rem.series.exps[0], 0);
  let count = 1;
  const parts = fs.map((f) => {
    const J = Math.max(1, keptTerms(f.rem.series, L - (E - f.rem.series.exps[0])));
    count *= J;
    const { base, rhoH, alphaP } = termsOf(f.rem, J, logR);
    // the closing terms of rho_i fall at least like its first dropped exponent (./endpoint-remainder.ts leastClosing)
    const rhoExp = J < f.rem.series.exps.length ? f.rem.series.exps[J] * (1 - 1e-12) : f.rem.series.exps[f.rem.series.exps.length - 1];
    return { rem: f.rem, J, base, rhoH: coarse(rhoH), alphaP: merged(alphaP), e0: f.rem.series.exps[0], rbExp: Math.min(rhoExp, least(coarse(rhoH))) };
  });
  if (count > MAX_PRODUCT_TERMS) return null;
  let pw: Term[] = [{ x: 0, unc: 0, c: 1, err: 0 }];
  for (const p of parts) pw = times(pw, p.base);
  const dropped: Power[] = [];
  const kept: Term[] = [];
  for (const t of pw) {
    if (t.x <= L + SAME_EXPONENT) kept.push(t);
    else dropped.push([(Math.abs(t.c) + t.err) * (1 + 2 * EPS), t.x - t.unc]);
  }
  const series = new Map<number, Term[]>([[kernels[0].at, kept]]);
  const rests: Rest[] = kernelTerms(kernels, L, series);
  const matchedM = coarse(matchedPowers(series));
  const droppedM = merged(dropped);
  // the powers' least exponent: the telescoped term i falls like rb_i's times every other factor's
  let decay = Math.min(least(matchedM), least(droppedM), ...rests.map((k) => k.e + k.M + 1));
  parts.forEach((p, i) => {
    let e = p.rbExp;
    parts.forEach((q, j) => {
      if (j < i) e += q.e0;
      else if (j > i) e += Math.min(q.e0, q.rbExp);
    });
    decay = Math.min(decay, e);
  });
  const n = parts.length;
  const rb = new Float64Array(n);
  const al = new Float64Array(n);
  // capped: the telescoped factors at min(alpha_j, 1 + rb_j) and min(1, alpha_j + rb_j); without, a plain sum of powers
  const bound = (beta: number, t: number, sigma: number, ls: number, capped: boolean) => {
    for (let i = 0; i < n; i++) {
      rb[i] = parts[i].rem.rho(beta, t, parts[i].J) + sumPow(parts[i].rhoH, ls);
      al[i] = sumPow(parts[i].alphaP, ls);
    }
    let v = sumPow(matchedM, ls) + sumPow(droppedM, ls);
    for (const k of rests) v += kernelRest(k, sigma);
    for (let i = 0; i < n; i++) {
      let term = rb[i];
      for (let j = 0; j < n; j++) {
        if (j < i) term *= capped ? Math.min(al[j], 1 + rb[j]) : al[j];
        else if (j > i) term *= capped ? Math.min(1, al[j] + rb[j]) : al[j] + rb[j];
      }
      v += term;
    }
    return v * (1 + 4 * (n + 2) * EPS);
  };
  return { bound, decay };
}

/** the endpoint remainders of scaled and shifted terms (carryScaleRemainder, carryShiftRemainder), by node */
const MOVED = new WeakMap<Node, EndpointRemainder>();

/**
 * A term's endpoint expansion with its derived remainder: the family's own (pareto, lomax, weibull, Burr: the expansion the
 * node declares), an exact gamma term's binomial series, or a scaled or shifted one's; else null
 */
function remainderOf(c: Node): EndpointRemainder | null {
  if (c.kind.type !== "continuous" || !c.dampedLogCf) return null;
  const er = c.endpointRemainder;
  if (er && er.series === c.laplaceExpansion) return er;
  const m = c.dampedMajorant && c.dampedMajorant.cf === c.dampedLogCf ? c.dampedMajorant : undefined;
  if (m?.gamma && c.laplaceExpansion) return gammaEndpointRemainder(m.gamma.shape, m.gamma.rate, c.laplaceExpansion);
  return MOVED.get(c) ?? null;
}

/**
 * a X (a > 0): E e^{-s a X} = phi_X(a s) = e^{-s a at} (sum_j c_j a^{-p_j} s^{-p_j} + R_X(a s)), so the coefficients c_j
 * a^{-p_j} (exp(-p_j log a): within (3 + 2 |p_j log a|) eps, the child's coefficient error and its exponent's within
 * |log a| d, a^{-p} moving by e^{|log a| d}) and rho(beta, t) = rho_X(a beta, a t), taken below the rounded arguments (rho_X
 * is non-increasing in both). Only where fl(a at) is the node's lower end and exact (at = 0, or a a power of 2).
 */
export function carryScaleRemainder(node: Node, a: number, c: Node) {
  const er = remainderOf(c);
  if (!er || !(a > 0) || !Number.isFinite(a) || !node.dampedLogCf) return;
  const s = er.series;
  if (!(s.at === 0 || Number.isInteger(Math.log2(a))) || a * s.at !== node.support[0]) return;
  const la = Math.log(a);
  const coefs = s.coefs.map((v, j) => v * Math.exp(-s.exps[j] * la));
  const coefErr = coefs.map((v, j) => {
    const grow = Math.exp(Math.abs(la) * er.expErr[j]);
    const pa = Math.exp(-s.exps[j] * la) * (1 + 4 * EPS);
    return (er.coefErr[j] * grow + Math.abs(s.coefs[j]) * Math.expm1(Math.abs(la) * er.expErr[j] * (1 + 4 * EPS))) * pa + Math.abs(v) * (3 + 2 * Math.abs(s.exps[j] * la)) * EPS;
  });
  const down = a * (1 - 2 * EPS);
  MOVED.set(node, { series: { at: a * s.at, exps: s.exps, coefs }, coefErr, expErr: er.expErr, rho: (beta, t, J) => er.rho(down * beta, down * t, J) });
}

/** X + b: e^{-s b} phi_X(s), the same expansion from at + b, where that sum is exact and the node's lower end */
export function carryShiftRemainder(node: Node, b: number, c: Node) {
  const er = remainderOf(c);
  if (!er || !node.dampedLogCf) return;
  const at = er.series.at + b;
  if (sumError(er.series.at, b, at) !== 0 || at !== node.support[0]) return;
  MOVED.set(node, { ...er, series: { ...er.series, at } });
}

/**
 * A sum's node.dampedRemainder where every term is a law with a derived endpoint remainder (remainderOf) and the sum has
 * kernels; else null
 */
export function sumDampedRemainder(node: Node, cs: Node[]): Node["dampedRemainder"] | null {
  const k = node.dampedKernels;
  if (!node.dampedLogCf || !k || k.cf !== node.dampedLogCf || node.kind.type !== "continuous") return null;
  const fs: Factor[] = [];
  for (const c of cs) {
    const rem = remainderOf(c);
    if (!rem) return null;
    const m = c.dampedMajorant && c.dampedMajorant.cf === c.dampedLogCf ? c.dampedMajorant : undefined;
    fs.push(m ? { rem, size: (beta: number, t: number) => m.rest(beta, t) } : { rem });
  }
  const b = sumRemainderBound(fs, k.kernels, node.support[0]);
  return b ? { cf: node.dampedLogCf, bound: b.bound, decay: b.decay } : null;
}
