// The pieces of a compound's endpoint-kernels remainder bound (./compound-remainder.ts): the series' terms, their
// products and comparisons, each piece a plain power of sigma.
import { KERNEL_ORDER, type GammaKernel } from "./damped-kernels";
import { SAME_EXPONENT, keptTerms, type EndpointRemainder } from "./endpoint-remainder";

const EPS = Number.EPSILON;

/** c (sigma / r)^{-e}, c >= 0: the bound's pieces that are plain powers of sigma in the unit of the kernels' rate r (valid for sigma >= r, where each falls) */
export type Power = [c: number, e: number];
/** a term c s^{-x} of a series, its exponent within unc of x and its coefficient within err of c */
export interface Term {
  x: number;
  unc: number;
  c: number;
  err: number;
}

/**
 * |sum_i c_i s^{-x_i}| for exponents within a cluster [x0, x0 + D] (D: the spread plus the exponents' uncertainty), for
 * sigma = |s| >= 1 and Re s >= 0 (s in the unit of the kernels' rate: ofOrder): at most |sum c_i| sigma^{-x0} + sum |c_i| |s^{-d_i} - 1| sigma^{-x0}, |s^{-d} - 1| <=
 * d |log s| e^{d |log s|} with |log s| <= log sigma + pi/2 (logPowers): plain powers, each falling in sigma
 */
export function clusterPowers(ts: Term[], out: Power[]) {
  let x0 = Infinity;
  let x1 = -Infinity;
  let sum = 0;
  let abs = 0;
  let err = 0;
  for (const t of ts) {
    x0 = Math.min(x0, t.x - t.unc);
    x1 = Math.max(x1, t.x + t.unc);
    sum += t.c;
    abs += Math.abs(t.c);
    err += t.err;
  }
  // the sum's own rounding: one ulp of the running sum per term
  err += ts.length * EPS * abs;
  out.push([Math.abs(sum) + err, x0]);
  if (abs > 0) logPowers(abs, x1 - x0, x0, out);
}

/**
 * c |s^{-x - d} - s^{-x}| over 0 <= d <= D, sigma >= 1: at most c D |log s| e^{D |log s|} sigma^{-x} with |log s| <=
 * log sigma + pi/2 and e^{D log sigma} = sigma^D, so c D e^{D pi/2} (log sigma + pi/2) sigma^{-y}, y = x - D; and
 * log sigma <= sigma^{nu} / (e nu) (nu = y/8): plain powers of exponents 7y/8 and y
 */
export function logPowers(c: number, D: number, x: number, out: Power[]) {
  if (!(D > 0)) return;
  const y = x - D;
  const k = c * D * Math.exp((D * Math.PI) / 2);
  out.push([(k * 8) / (Math.E * y), (7 * y) / 8], [(k * Math.PI) / 2, y]);
}

/** |(a + b) - fl(a + b)|, exactly (Knuth's TwoSum): 0 where the sum is exact, as for integer exponents */
export function sumError(a: number, b: number, s: number): number {
  const bb = s - a;
  return Math.abs(a - (s - bb) + (b - bb));
}

/** the terms of cur times base with every exponent (no truncation), coefficients with their rounding */
export function times(cur: Term[], base: Term[]): Term[] {
  const next: Term[] = [];
  for (const a of cur)
    for (const b of base) {
      const x = a.x + b.x;
      const c = a.c * b.c;
      // |a c + da||b c + db| - |a c b c| <= |a| db + |b| da + da db, plus the product's and the exponent sum's rounding
      next.push({ x, unc: a.unc + b.unc + sumError(a.x, b.x, x), c, err: Math.abs(a.c) * b.err + Math.abs(b.c) * a.err + a.err * b.err + EPS * Math.abs(c) });
    }
  // terms of the same exponents (within their rounding) merged: a power of J terms keeps at most n J of them
  next.sort((p, q) => p.x - q.x);
  const out: Term[] = [];
  for (const t of next) {
    const last = out[out.length - 1];
    if (last && t.x - last.x <= 4 * EPS * t.x) {
      const c = last.c + t.c;
      out[out.length - 1] = { x: last.x, unc: Math.max(last.unc, t.unc) + (t.x - last.x), c, err: last.err + t.err + EPS * Math.abs(c) };
    } else out.push(t);
  }
  return out;
}

/** products of terms the bound may form (J0 terms to the powers 1..Nb: about (J0 Nb)^2 / 2): past it, no derived bound */
export const MAX_SERIES_WORK = 200 * 200;
/**
 * the same limit for a compound's own bound (./compound-remainder.ts), whose kernels go to order 8: weibull and Burr shapes
 * from 0.5 on (16 terms, 16 blocks); its build takes some 10 ms at the limit (Poisson(3)-burr(2, 0.55): 61 kernels, 16 ms)
 */
export const COMPOUND_SERIES_WORK = 260 * 260;

export interface CompoundRemainderInput {
  rem: EndpointRemainder;
  /** p_0, p_1, ... as the kernels took them (the count's table), and a bound on each one's distance from the true p_n */
  pn: ArrayLike<number>;
  pErr: (n: number) => number;
  /** the kernels subtracted from the damped transform */
  kernels: readonly GammaKernel[];
  /** log P_N(e^w) at real w <= 0, within relErr relative and absErr absolute (a steep count's P_N(s) far below its tail) */
  cgf?: (w: number) => number;
  relErr: number;
  absErr: number;
  /** the order the kernels match the blocks to (compound.ts kernelsFor; default KERNEL_ORDER) */
  order?: number;
}

/** the powers with equal exponents summed (one exp each when evaluated), largest exponent last */
export function merged(ps: Power[]): Power[] {
  const sorted = [...ps].sort((p, q) => p[1] - q[1]);
  const out: Power[] = [];
  for (const [c, e] of sorted) {
    const last = out[out.length - 1];
    if (last && last[1] === e) last[0] = (last[0] + c) * (1 + EPS);
    else out.push([c, e]);
  }
  return out;
}

/**
 * the powers with each exponent e lowered to the grid of 1/1024 below it, but not below `floor` (e' = max(floor(1024 e) /
 * 1024, floor) where e >= floor, else e), and merged: c (sigma / r)^{-e} <= c (sigma / r)^{-e'} for e' <= e and sigma >= r,
 * so the sum bounds the original's, within (sigma / r)^{1/1024} of it. The blocks' products carry exponents that differ in
 * their last bits (n e0 less the sums' rounding): a severity of shape 0.55 left some hundreds of powers, an exp each per
 * frequency
 */
export function coarseAbove(ps: Power[], floor: number): Power[] {
  return merged(ps.map(([c, e]) => [c, e >= floor ? Math.max(Math.floor(e * 1024) / 1024, floor) : e] as Power));
}

export const sumPow = (ps: Power[], ls: number) => {
  let v = 0;
  for (const [c, e] of ps) v += c * Math.exp(-e * ls);
  return v;
};

/**
 * sum_{m > M} (e)_m / m! x^m, x = r / sigma <= 1/2: term by term until the rest's geometric bound is below 1e-6 of the
 * sum, then the rest by that geometric series (the ratio (e + m) / (m + 1) x falls in m for e >= 1, so its value at m
 * bounds every later one; for e < 1 every ratio is below x): an upper bound wherever it stops, within 1e-6 of the sum
 */
export function binomRest(e: number, M: number, x: number): number {
  let term = 1;
  for (let m = 1; m <= M + 1; m++) term *= ((e + m - 1) / m) * x;
  let sum = 0;
  for (let m = M + 1; m < M + 400; m++) {
    sum += term;
    const ratio = (e >= 1 ? (e + m) / (m + 1) : 1) * x;
    const next = term * ((e + m) / (m + 1)) * x;
    if (ratio < 1) {
      const rest = next / (1 - ratio);
      if (rest <= 1e-6 * sum) return (sum + rest) * (1 + 1e-12);
    }
    term = next;
  }
  return Infinity;
}

/**
 * The kernels' binomial series up to L, w (r/(r + s))^e = w (r/s)^e sum_m binom(-e, m) (r/s)^m (|r/s| < 1), each term
 * negated into its endpoint's list of `series`; returns their rests past L
 */
export function kernelTerms(kernels: readonly GammaKernel[], L: number, series: Map<number, Term[]>): Rest[] {
  const rests: Rest[] = [];
  for (const k of kernels) {
    let list = series.get(k.at);
    if (!list) series.set(k.at, (list = []));
    let b = 1;
    let m = 0;
    for (; k.shape + m <= L + SAME_EXPONENT; m++) {
      if (m > 0) b *= -(k.shape + m - 1) / m;
      const x = k.shape + m;
      // w (r/s)^x binom(-e, m) = w binom(-e, m) (s/r)^{-x}: the binomial coefficient's 2 m roundings and the product's
      const c = -k.w * b;
      list.push({ x, unc: sumError(k.shape, m, x), c, err: Math.abs(c) * EPS * (2 * m + 2) });
    }
    rests.push({ w: Math.abs(k.w), at: k.at, e: k.shape, r: k.rate, M: m - 1 });
  }
  return rests;
}

/** every endpoint's series against its kernels' series, cluster by cluster (their endpoints' damping e^{-beta at} <= 1), merged */
export function matchedPowers(series: Map<number, Term[]>): Power[] {
  const matched: Power[] = [];
  for (const list of series.values()) {
    list.sort((p, q) => p.x - q.x);
    let i = 0;
    while (i < list.length) {
      let j = i + 1;
      while (j < list.length && list[j].x - list[j - 1].x <= 2 * SAME_EXPONENT) j++;
      clusterPowers(list.slice(i, j), matched);
      i = j;
    }
  }
  return merged(matched);
}

/** |w| (r / sigma)^e sum_{m > M} (e)_m / m! (r / sigma)^m: a kernel's binomial series past its kept terms (sigma >= 2 r) */
export function kernelRest(k: Rest, sigma: number): number {
  return k.w * Math.pow(k.r / sigma, k.e) * binomRest(k.e, k.M, k.r / sigma);
}

/**
 * The series' first J0 terms in the unit of the kernels' rate r (e^{logR}): everything as c s^{-x} = (c r^{-x}) (s/r)^{-x}, so
 * the powers are of sigma / r and hold from sigma = r on, whatever the law's scale (claims in millions); a kernel's binomial
 * terms are then w times the binomial coefficient alone. r^{-x} within (2 + 2 |x log r|) eps. Returns the terms (base),
 * rho_h >= |A_true - Ah| and alpha >= |Ah|, plain powers of sigma / r.
 */
export function termsOf(rem: EndpointRemainder, J0: number, logR: number): { base: Term[]; rhoH: Power[]; alphaP: Power[] } {
  const s = rem.series;
  const scaled = (c: number, x: number) => c * Math.exp(-x * logR);
  const scaleErr = (x: number) => EPS * (2 + 2 * Math.abs(x * logR));
  const base: Term[] = [];
  for (let j = 0; j < J0; j++) {
    const c = scaled(s.coefs[j], s.exps[j]);
    base.push({ x: s.exps[j], unc: 0, c, err: Math.abs(c) * scaleErr(s.exps[j]) });
  }
  // rho_h (Ah against A_true) and alpha >= |Ah|, plain powers of sigma / r
  const rhoH: Power[] = [];
  for (let j = 0; j < J0; j++) {
    const d = rem.expErr[j];
    const x = s.exps[j] - d;
    // (c - c_h) s^{-p}, the true p within d of p_h: r^{-p} <= r^{-p_h} e^{|log r| d}
    const grow = Math.exp(Math.abs(logR) * d) * (1 + scaleErr(s.exps[j]));
    rhoH.push([scaled(rem.coefErr[j], s.exps[j]) * grow, x]);
    // c_h (s^{-p} - s^{-p_h}) = c_h r^{-p_h} ((r^{-(p - p_h)} - 1) (s/r)^{-p} + (s/r)^{-p} - (s/r)^{-p_h}): the first at most
    // |log r| d e^{|log r| d} (s/r)^{-x}, the second as logPowers over the spread 2 d from x
    const ch = Math.abs(scaled(s.coefs[j], s.exps[j])) * (1 + scaleErr(s.exps[j]));
    if (d > 0) rhoH.push([ch * Math.abs(logR) * d * grow, x]);
    logPowers(2 * ch, 2 * d, x, rhoH);
  }
  const alphaP: Power[] = base.map((b) => [Math.abs(b.c) + b.err, b.x]);
  return { base, rhoH, alphaP };
}

/**
 * The bound's pieces for the blocks n <= Nb at order L (sigma >= max(1, 2 r)): A = the series' terms up to L, the blocks'
 * A^n and the kernels' binomial series compared up to L, what is past L bounded. Returns the sum and m >= |phi|.
 */
export function ofOrder(inp: CompoundRemainderInput, L: number, Nb: number) {
  const { rem, pn, pErr, kernels } = inp;
  const s = rem.series;
  const a = s.at;
  const e0 = s.exps[0];
  const J0 = keptTerms(s, L);
  const logR = Math.log(kernels[0].rate);
  const { base, rhoH, alphaP } = termsOf(rem, J0, logR);
  // per block n: its terms past L (absolute), its terms up to L (signed, to compare with the kernels), its endpoint
  const blocks: Block[] = [];
  const series = new Map<number, Term[]>();
  let pw: Term[] = [{ x: 0, unc: 0, c: 1, err: 0 }];
  for (let n = 1; n <= Nb; n++) {
    pw = times(pw, base);
    const q = pn[n];
    if (!(q > 0)) continue;
    const at = n * a;
    const dropped: Power[] = [];
    const kept: Term[] = [];
    for (const t of pw) {
      if (t.x <= L + SAME_EXPONENT) kept.push({ x: t.x, unc: t.unc, c: q * t.c, err: q * t.err + EPS * Math.abs(q * t.c) });
      else dropped.push([q * (Math.abs(t.c) + t.err) * (1 + 2 * EPS), t.x - t.unc]);
    }
    if (!series.has(at)) series.set(at, []);
    series.get(at)!.push(...kept);
    // n a rounds within half an ulp (exact for n = 1, 2, 4)
    blocks.push({ n, dropped: merged(dropped), atErr: n === 1 || n === 2 || n === 4 ? 0 : EPS * Math.abs(at) });
  }
  const rests = kernelTerms(kernels, L, series);
  const matchedM = matchedPowers(series);
  const rhoHM = merged(rhoH);
  const jump = jumpSplit(inp, { J0, Nb, matchedM, rhoH, alphaP, blocks, rests });
  // every block's terms past L together (each block's damping e^{-beta n a} <= 1 left out) and the kernels' rests as powers:
  // a few exps per frequency instead of one per block's term and a series per kernel
  // (each list's exponents lowered to a grid, not below e0, the bound's declared decay: coarseAbove)
  const droppedAll = coarseAbove(blocks.flatMap((b) => b.dropped), e0);
  const restP = restPowers(rests);
  const rhoHC = coarseAbove(rhoHM, e0);
  const matchedC = coarseAbove(matchedM, e0);
  const bound = (beta: number, t: number, sigma: number, ls: number) => {
    const rho = rem.rho(beta, t, J0) + sumPow(rhoHC, ls);
    const alpha = sumPow(alphaP, ls);
    const m0 = Math.min(1, alpha + rho);
    const m = Math.exp(-beta * a) * m0;
    let v = sumPow(matchedC, ls) + sumPow(droppedAll, ls) + restAt(restP, ls);
    for (let n = 1; n <= Nb; n++) v += pErr(n) * Math.pow(m, n);
    for (const b of blocks) {
      const q = pn[b.n];
      const damp = Math.exp(-beta * b.n * a);
      v += q * damp * b.n * rho * Math.pow(Math.max(m0, alpha), b.n - 1);
      // sigma (alpha + rho)^n falls where n times the least exponent of its powers is at least 1
      if (b.atErr > 0) v += b.n * e0 >= 1 ? 2 * q * sigma * b.atErr * Math.exp(Math.max(beta * b.atErr, 0.5)) * Math.pow(alpha + rho, b.n) : Infinity;
    }
    return { v, m };
  };
  return { bound, jump };
}

export type Rest = { w: number; at: number; e: number; r: number; M: number };

/**
 * The kernels' binomial series past their kept terms, sum_k |w_k| sum_{m > M_k} (e_k)_m / m! x^{e_k + m}, x = r / sigma
 * (the kernels' one rate r; each damping e^{-beta at} <= 1 left out), as plain powers of sigma / r and one geometric
 * closing: the terms m = M_k + 1, ... while the ratio (e + m) / (m + 1) of the next to the current is above 3/2 as powers
 * (`ps`), the rest from the first m* past them at most b_{m*} x^{e + m*} / (1 - q x) (`close`, to be divided by 1 - q x) with q
 * the largest such ratio (e >= 1: (e + m) / (m + 1) falls in m, so its value at m* bounds every later one; e < 1: every
 * ratio is below 1, q = 1). For sigma >= 2 r, q x <= 3/4. The binomial coefficients by their recurrence, 2 roundings a
 * step, covered by (1 + 4 (m + 1) u).
 */
export function restPowers(rests: readonly Rest[]): { ps: Power[]; close: Power[]; q: number } {
  const ps: Power[] = [];
  const close: Power[] = [];
  let q = 1;
  for (const k of rests) {
    // b_m = (e)_m / m!, from b_{M+1} on
    let b = 1;
    for (let i = 1; i <= k.M + 1; i++) b *= (k.e + i - 1) / i;
    for (let m = k.M + 1; ; m++) {
      if (m > k.M + 1) b *= (k.e + m - 1) / m;
      const ratio = (k.e + m) / (m + 1);
      const c = k.w * b * (1 + 4 * (m + 1) * EPS);
      if (k.e < 1 || ratio <= 1.5) {
        close.push([c, k.e + m]);
        q = Math.max(q, k.e < 1 ? 1 : ratio);
        break;
      }
      ps.push([c, k.e + m]);
    }
  }
  return { ps: merged(ps), close: merged(close), q };
}

/** restPowers' bound at ls = log(sigma / r) (Infinity where q r / sigma >= 1) */
export function restAt(rp: { ps: Power[]; close: Power[]; q: number }, ls: number): number {
  const qx = rp.q * Math.exp(-ls);
  if (!(qx < 1)) return Infinity;
  return (sumPow(rp.ps, ls) + sumPow(rp.close, ls) / (1 - qx)) * (1 + 1e-12);
}
type Block = { n: number; dropped: Power[]; atErr: number };

/**
 * Claims whose expansion starts at s^-1 exactly (pareto, lomax, Burr with gamma 1): the bound above falls only like 1 / sigma,
 * from three pieces of order s^-1, all multiples of e^{-s a} (s / r)^-1: the first cluster (q_1 c_0 against the shape-1
 * kernel's weight), the table's p_1 against q_1 times c_0, and q_1 times c_0's own error. Together they are kappa e^{-s a}
 * (s / r)^-1 with |kappa| <= D1, the coefficient of s^-1 in what the inversion is given. Write that part as G = kappa e^{-s a}
 * r / (r + s), the damped transform of kappa r e^{-r (y - a)} e^{-beta y} on y > a (total variation 2 |kappa| r e^{-beta a});
 * the difference |kappa e^{-s a} (r/s - r/(r + s))| <= D1 e^{-beta a} (r / sigma)^2 (|r + s| >= sigma) joins the rest F,
 * every piece of which falls at least like sigma^-decay, decay > 1: the powers' exponents past 1, the Watson remainder's
 * (rho with J0 terms kept falls like sigma^-p_{J0 - 1} at least: ./endpoint-remainder.ts, its closing terms), n e0 for
 * the blocks n >= 2 and their table errors, (Nb + 1) e0 for the claims past the blocks (P(N > Nb) m^{Nb + 1}, not P_N(m)).
 * Null where the expansion does not start at exactly 1, or a piece falls no faster than 1 / sigma.
 */
function jumpSplit(
  inp: CompoundRemainderInput,
  o: { J0: number; Nb: number; matchedM: Power[]; rhoH: Power[]; alphaP: Power[]; blocks: Block[]; rests: Rest[] },
): { fast: (beta: number, t: number, sigma: number, ls: number, tailP: number) => number; decay: number; D1: number } | null {
  const { rem, pn, pErr } = inp;
  const s = rem.series;
  const a = s.at;
  const e0 = s.exps[0];
  if (e0 !== 1 || rem.expErr[0] !== 0 || o.J0 < 2 || !(pn[1] > 0)) return null;
  // rhoH's first push is c_0's coefficient error at exponent 1 exactly (expErr[0] = 0: no spread pieces for j = 0)
  const rh0 = o.rhoH[0];
  if (!rh0 || rh0[1] !== 1) return null;
  const rhoRest = merged(o.rhoH.slice(1));
  const alpha0 = o.alphaP[0][0];
  const alphaRest = o.alphaP.slice(1);
  const slow = o.matchedM.filter((p) => p[1] <= 1);
  if (slow.some((p) => p[1] !== 1)) return null;
  const fastMatched = o.matchedM.filter((p) => p[1] > 1);
  const q1 = pn[1];
  const D1 = (slow.reduce((v, p) => v + p[0], 0) + pErr(1) * (alpha0 + rh0[0]) + q1 * rh0[0]) * (1 + 8 * EPS);
  const exps = [
    ...fastMatched.map((p) => p[1]),
    ...rhoRest.map((p) => p[1]),
    ...alphaRest.map((p) => p[1]),
    ...o.blocks.flatMap((b) => b.dropped.map((p) => p[1])),
    ...o.rests.map((k) => k.e + k.M + 1),
    ...o.blocks.filter((b) => b.atErr > 0).map((b) => b.n * e0 - 1),
    s.exps[o.J0 - 1],
    2 * e0,
    (o.Nb + 1) * e0,
    2,
  ];
  const decay = Math.min(...exps);
  if (!(decay > 1)) return null;
  const droppedAll = merged(o.blocks.flatMap((b) => b.dropped));
  const restP = restPowers(o.rests);
  const fast = (beta: number, t: number, sigma: number, ls: number, tailP: number) => {
    const rhoF = rem.rho(beta, t, o.J0) + sumPow(rhoRest, ls);
    const rho = rhoF + rh0[0] * Math.exp(-ls);
    const alpha = sumPow(o.alphaP, ls);
    const m0 = Math.min(1, alpha + rho);
    const m = Math.exp(-beta * a) * m0;
    let v = sumPow(fastMatched, ls);
    v += pErr(1) * Math.exp(-beta * a) * (sumPow(alphaRest, ls) + rhoF);
    for (let n = 2; n <= o.Nb; n++) v += pErr(n) * Math.pow(m, n);
    for (const b of o.blocks) {
      const q = pn[b.n];
      const damp = Math.exp(-beta * b.n * a);
      v += b.n === 1 ? q * damp * rhoF : q * damp * b.n * rho * Math.pow(Math.max(m0, alpha), b.n - 1);
      if (b.atErr > 0) v += 2 * q * sigma * b.atErr * Math.exp(Math.max(beta * b.atErr, 0.5)) * Math.pow(alpha + rho, b.n);
    }
    // the blocks' dropped terms and the kernels' rests as in ofOrder's bound (dampings <= 1 left out)
    v += sumPow(droppedAll, ls) + restAt(restP, ls);
    v += tailP * Math.pow(m, o.Nb + 1);
    v += D1 * Math.exp(-2 * ls);
    return v * (1 + 1e-10);
  };
  return { fast, decay, D1 };
}
