// A derived bound on what a compound's damped transform leaves after its atom at 0 and its endpoint gamma kernels.
import { realCgf } from "./count-pgf";
import { KERNEL_ORDER, type GammaKernel } from "./damped-kernels";
import type { Node } from "./node";
import { SAME_EXPONENT, keptTerms, type EndpointRemainder } from "./endpoint-remainder";

const EPS = Number.EPSILON;

/** c (sigma / r)^{-e}, c >= 0: the bound's pieces that are plain powers of sigma in the unit of the kernels' rate r (valid for sigma >= r, where each falls) */
type Power = [c: number, e: number];
/** a term c s^{-x} of a series, its exponent within unc of x and its coefficient within err of c */
interface Term {
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
function clusterPowers(ts: Term[], out: Power[]) {
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
function logPowers(c: number, D: number, x: number, out: Power[]) {
  if (!(D > 0)) return;
  const y = x - D;
  const k = c * D * Math.exp((D * Math.PI) / 2);
  out.push([(k * 8) / (Math.E * y), (7 * y) / 8], [(k * Math.PI) / 2, y]);
}

/** |(a + b) - fl(a + b)|, exactly (Knuth's TwoSum): 0 where the sum is exact, as for integer exponents */
function sumError(a: number, b: number, s: number): number {
  const bb = s - a;
  return Math.abs(a - (s - bb) + (b - bb));
}

/** the terms of cur times base with every exponent (no truncation), coefficients with their rounding */
function times(cur: Term[], base: Term[]): Term[] {
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
}

/**
 * |psi_c(beta - i t) - K(s)| for a compound psi_c = sum_{n >= 1} p_n phi^n whose gamma kernels K match the endpoint
 * expansion phi = e^{-s a} (A + R) (./endpoint-remainder.ts) block by block, blocks n = 1..Nb at n a (compoundSeries in
 * ./damped-kernels.ts: n e0 <= KERNEL_ORDER), non-increasing in t. With q_n the table's p_n (the kernels' weights),
 * Ah = A as the floats give it and |A_true - Ah| <= rho_h (coefficients and exponents within their errors), m0 >= |e^{s a} phi|
 * (<= 1 as X >= a, and <= |Ah| + rho + rho_h) and alpha >= |Ah|:
 *   p_n phi^n - q_n phi^n                        <= |p_n - q_n| (e^{-beta a} m0)^n
 *   q_n e^{-s n a} ((A + R)^n - Ah^n)             <= q_n e^{-beta n a} n (rho + rho_h) max(m0, alpha)^{n-1}
 *   q_n Ah^n's terms past the order L              <= q_n e^{-beta n a} sum |.| sigma^{-x} (from the absolute coefficients)
 *   e^{-s n a} against e^{-s fl(n a)} (the block's floating endpoint, within d of it): |1 - e^{-s d}| <= |1 - e^{-beta d}| +
 *   |1 - e^{i t d}| <= 2 sigma |d| e^{beta |d|}, times q_n |e^{s a} phi|^n <= q_n (alpha + rho + rho_h)^n
 *   sum_{n > Nb} p_n phi^n                         <= min(P(N > Nb) m^{Nb+1}, P_N(m)), m = e^{-beta a} m0,
 *   P(N > Nb) = 1 - sum_{n <= Nb} p_n <= 1 - sum q_n + sum |p_n - q_n|
 * and the kernels against the blocks' series: each kernel w (r / (r + s))^e = w (r/s)^e (1 + r/s)^{-e} is its binomial
 * series (|r/s| < 1), whose terms up to an order L are compared with the blocks' terms up to L exactly, cluster by cluster
 * of exponents (clusterPowers: the floats' cancellation is bounded, not assumed; up to KERNEL_ORDER they cancel but for
 * rounding, as toKernels built them so), and whose rest is at most |w| (r/sigma)^e sum_{m > M} (e)_m / m! (r/sigma)^m,
 * falling in sigma; A then holds the series' terms up to L and Ah^n's terms past L are the dropped ones. The least over
 * L = 4, 6, 8, each valid for sigma >= 2 r (in powers of sigma / r: ofOrder); below, and wherever smaller, the crude bound
 * 1 - p_0 + sum |w| (r / |r + s|)^e. A sum of bounds each non-increasing in t, and the least of such sums.
 */
export function compoundRemainderBound(inp: CompoundRemainderInput): (beta: number, t: number) => number {
  const { rem, pn, pErr, kernels } = inp;
  const s = rem.series;
  const a = s.at;
  const e0 = s.exps[0];
  let Nb = 0;
  while (Nb + 1 < pn.length && (Nb + 1) * e0 <= KERNEL_ORDER + SAME_EXPONENT) Nb++;
  // the kernels share one rate (compound.ts kernelsFor), the unit of ofOrder's powers
  const r = kernels.length > 0 && kernels.every((k) => k.rate === kernels[0].rate) ? kernels[0].rate : NaN;
  let head = 0;
  let headErr = 0;
  for (let n = 0; n <= Nb; n++) {
    head += pn[n];
    headErr += pErr(n);
  }
  const tailP = Math.min(1, Math.max(0, 1 - head) + headErr + (Nb + 4) * EPS * Math.max(1, head));
  const p0 = pn[0] - pErr(0);
  const pgf = (x: number) => {
    if (!inp.cgf || !(x > 0 && x < 1)) return Infinity;
    const c = inp.cgf(Math.log(x));
    return Math.exp(c) * (1 + inp.relErr + 64 * EPS * (1 + Math.abs(c))) + inp.absErr;
  };
  // the same bound with the comparison carried to each order L: past KERNEL_ORDER the blocks' and the kernels' terms of
  // the same exponent cancel in part, which the least of the orders keeps (Poisson(2)-pareto(1.5) at t = 1 024: order 4
  // alone gave 3.2 times the bound of order 8); a higher order pays with larger coefficients at small sigma
  // the orders whose series work stays within MAX_SERIES_WORK (shape 0.3 weibull claims: order 4 alone), built on first use
  const orders = [KERNEL_ORDER, KERNEL_ORDER + 2, KERNEL_ORDER + 4].filter((L) => (keptTerms(s, L) * Nb) ** 2 <= MAX_SERIES_WORK);
  let fineBuilt: ReturnType<typeof ofOrder>[] | null = null;
  const at = (beta: number, t: number) => {
    const sigma = Math.hypot(beta, t);
    // crude: sum_n p_n |phi|^n <= 1 - p_0, and each kernel |w| (r / |r + s|)^e, |r + s| >= hypot(r + beta, t)
    let crude = 1 - p0;
    for (const k of kernels) crude += Math.abs(k.w) * Math.exp(-beta * k.at) * Math.min(1, Math.pow(k.rate / Math.hypot(k.rate + beta, t), k.shape));
    crude *= 1 + 1e-12;
    if (!(sigma >= 2 * r)) return crude;
    const ls = Math.log(sigma / r);
    // the claims past the kernels' blocks, with m >= |phi| from the first order's A (all orders bound the same phi)
    let best = crude;
    for (const f of (fineBuilt ??= orders.map((L) => ofOrder(inp, L, Nb)))) {
      const { v, m } = f(beta, t, sigma, ls);
      const all = (v + Math.min(tailP * Math.pow(m, Nb + 1), pgf(m))) * (1 + 1e-10);
      if (all < best) best = all;
    }
    return best;
  };
  // every piece is non-increasing in beta (sigma grows with it, the dampings e^{-beta x} fall, the weibull ray's g grows) but
  // the endpoints' rounding factor e^{beta d}, which ofOrder takes at its largest, e^{1/2}, for beta d <= 1/2: so the value at
  // beta = 0 bounds every damping up to there, and one evaluation per frequency serves every probe of a plan (the probes of
  // all dampings share their frequencies)
  const dMax = Math.max(...kernels.map((k) => EPS * Math.abs(k.at)), 0);
  const cache = new Map<number, number>();
  return (beta, t) => {
    if (!(beta >= 0 && beta * dMax <= 0.5)) return at(beta, t);
    let v = cache.get(t);
    if (v === undefined) {
      if (cache.size > 4096) cache.clear();
      cache.set(t, (v = at(0, t)));
    }
    return v;
  };
}

/** the powers with equal exponents summed (one exp each when evaluated), largest exponent last */
function merged(ps: Power[]): Power[] {
  const sorted = [...ps].sort((p, q) => p[1] - q[1]);
  const out: Power[] = [];
  for (const [c, e] of sorted) {
    const last = out[out.length - 1];
    if (last && last[1] === e) last[0] = (last[0] + c) * (1 + EPS);
    else out.push([c, e]);
  }
  return out;
}

const sumPow = (ps: Power[], ls: number) => {
  let v = 0;
  for (const [c, e] of ps) v += c * Math.exp(-e * ls);
  return v;
};

/**
 * sum_{m > M} (e)_m / m! x^m, x = r / sigma <= 1/2: term by term until the rest is below 1e-17 of the sum, then the rest
 * by a geometric series (the ratio (e + m) / (m + 1) x falls in m for e >= 1; for e < 1 it is below x)
 */
function binomRest(e: number, M: number, x: number): number {
  let term = 1;
  for (let m = 1; m <= M + 1; m++) term *= ((e + m - 1) / m) * x;
  let sum = 0;
  for (let m = M + 1; m < M + 400; m++) {
    sum += term;
    const ratio = (e >= 1 ? (e + m) / (m + 1) : 1) * x;
    const next = term * ((e + m) / (m + 1)) * x;
    if (next < 1e-17 * sum && ratio < 1) return (sum + next / (1 - ratio)) * (1 + 1e-12);
    term = next;
  }
  return Infinity;
}

/**
 * The bound's pieces for the blocks n <= Nb at order L (sigma >= max(1, 2 r)): A = the series' terms up to L, the blocks'
 * A^n and the kernels' binomial series compared up to L, what is past L bounded. Returns the sum and m >= |phi|.
 */
function ofOrder(inp: CompoundRemainderInput, L: number, Nb: number) {
  const { rem, pn, pErr, kernels } = inp;
  const s = rem.series;
  const a = s.at;
  const e0 = s.exps[0];
  const J0 = keptTerms(s, L);
  // everything in the unit of the kernels' rate r: c s^{-x} = (c r^{-x}) (s/r)^{-x}, so the powers are of sigma / r and hold
  // from sigma = r on, whatever the law's scale (claims in millions); a kernel's binomial terms are then w times the
  // binomial coefficient alone. r^{-x} within (2 + 2 |x log r|) eps
  const logR = Math.log(kernels[0].rate);
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
  // per block n: its terms past L (absolute), its terms up to L (signed, to compare with the kernels), its endpoint
  const blocks: { n: number; dropped: Power[]; atErr: number }[] = [];
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
  // the kernels' binomial series up to L, each term negated, into their block's list; and their rests past it
  const rests: { w: number; at: number; e: number; r: number; M: number }[] = [];
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
  // every block's series against its kernels' series, cluster by cluster (their endpoints' damping e^{-beta at} <= 1)
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
  const matchedM = merged(matched);
  const rhoHM = merged(rhoH);
  return (beta: number, t: number, sigma: number, ls: number) => {
    const rho = rem.rho(beta, t, J0) + sumPow(rhoHM, ls);
    const alpha = sumPow(alphaP, ls);
    const m0 = Math.min(1, alpha + rho);
    const m = Math.exp(-beta * a) * m0;
    let v = sumPow(matchedM, ls);
    for (let n = 1; n <= Nb; n++) v += pErr(n) * Math.pow(m, n);
    for (const b of blocks) {
      const q = pn[b.n];
      const damp = Math.exp(-beta * b.n * a);
      v += q * damp * b.n * rho * Math.pow(Math.max(m0, alpha), b.n - 1);
      v += damp * sumPow(b.dropped, ls);
      // sigma (alpha + rho)^n falls where n times the least exponent of its powers is at least 1
      if (b.atErr > 0) v += b.n * e0 >= 1 ? 2 * q * sigma * b.atErr * Math.exp(Math.max(beta * b.atErr, 0.5)) * Math.pow(alpha + rho, b.n) : Infinity;
    }
    for (const k of rests) v += k.w * Math.exp(-beta * k.at) * Math.pow(k.r / sigma, k.e) * binomRest(k.e, k.M, k.r / sigma);
    return { v, m };
  };
}

/**
 * The bound above for a compound of N and a severity with a derived endpoint remainder, its kernels `kernels` (chosen by
 * compound.ts from the count's table of the same length, so its p_n are the kernels' weights); null where the count has
 * no table. The table's p_n are taken within its pointRel where it states one, else within 16 (n + 1) u, as the gamma
 * compounds' bound takes them (compound.ts gammaRemainderBound).
 */
export function endpointKernelsRemainder(N: Node, rem: EndpointRemainder, kernels: readonly GammaKernel[]): ((beta: number, t: number) => number) | null {
  const e0 = rem.series.exps[0];
  if (!(e0 > 0) || !N.table) return null;
  const nMax = Math.floor(KERNEL_ORDER / e0) + 1;
  const t = N.table(nMax + 1);
  if (!t || t.step !== 1 || t.origin !== 0) return null;
  const pn = new Float64Array(nMax + 1);
  for (let n = 0; n < pn.length; n++) pn[n] = n < t.p.length ? t.p[n] : 0;
  // past the table's end its p_n are 0 while the count's may not be (but past the count's support, binomial(3)): only with
  // the table's own bound there
  const top = N.support[1];
  if (t.p.length < pn.length && !t.beyond && top >= t.p.length) return null;
  const rel = t.pointRel;
  const beyond = t.beyond;
  // a p_n past the table's end is 0 to the kernels: its own bound there (beyond) is its distance from the truth
  const pErr = (n: number) => (n < t.p.length ? 1.01 * (rel ? rel(n) : 16 * (n + 1) * EPS) * pn[n] : n > top ? 0 : beyond!(n));
  const cgf = N.countCgf ? realCgf(N.countCgf) : undefined;
  // a severity with so many terms below KERNEL_ORDER (weibull shape below 0.28) that even order 4 passes the work limit: none
  if ((keptTerms(rem.series) * (nMax - 1)) ** 2 > MAX_SERIES_WORK) return null;
  return compoundRemainderBound({ rem, pn, pErr, kernels, ...(cgf ? { cgf } : {}), relErr: N.cfRelError ?? 0, absErr: N.cfAbsError ?? 0 });
}
