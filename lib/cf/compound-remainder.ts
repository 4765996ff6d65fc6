// A derived bound on what a compound's damped transform leaves after its atom at 0 and its endpoint gamma kernels.
import { realCgf } from "./count-pgf";
import { KERNEL_ORDER, type GammaKernel } from "./damped-kernels";
import type { Node } from "./node";
import type { RemainderJump } from "./types";
import { SAME_EXPONENT, keptTerms, type EndpointRemainder } from "./endpoint-remainder";
import { COMPOUND_SERIES_WORK, ofOrder, type CompoundRemainderInput } from "./compound-remainder-terms";

const EPS = Number.EPSILON;

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
export function compoundRemainderBound(inp: CompoundRemainderInput): { bound: (beta: number, t: number) => number; jump: RemainderJump } {
  const { rem, pn, pErr, kernels } = inp;
  const s = rem.series;
  const a = s.at;
  const e0 = s.exps[0];
  const order = inp.order ?? KERNEL_ORDER;
  let Nb = 0;
  while (Nb + 1 < pn.length && (Nb + 1) * e0 <= order + SAME_EXPONENT) Nb++;
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
  // the orders whose series work stays within COMPOUND_SERIES_WORK (shape 0.3 weibull claims: order 4 alone), built on first use
  const orders = [order, order + 2, order + 4].filter((L) => (keptTerms(s, L) * Nb) ** 2 <= COMPOUND_SERIES_WORK);
  let fineBuilt: ReturnType<typeof ofOrder>[] | null = null;
  const built = () => (fineBuilt ??= orders.map((L) => ofOrder(inp, L, Nb)));
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
    for (const f of built()) {
      const { v, m } = f.bound(beta, t, sigma, ls);
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
  const bound = atZeroDamping(at, dMax);
  // claims whose expansion starts at s^-1 (pareto, lomax): the bound's 1 / sigma part as the transform of a function of
  // bounded variation, the rest falling faster (./compound-remainder-terms.ts jumpSplit); every order splits the same part
  // of the remainder (its s^-1 coefficient), so the least fast bound and the least D1 hold together
  const splits = () => built().map((f) => f.jump);
  // the fast part's pieces are the bound's, each non-increasing in beta as above: its value at beta = 0 serves every
  // damping up to beta d = 1/2, once per frequency (a plan's probes share their frequencies)
  const fastAt = (beta: number, t: number) => {
    const sigma = Math.hypot(beta, t);
    if (!(sigma >= 2 * r)) return Infinity;
    const ls = Math.log(sigma / r);
    let best = Infinity;
    for (const j of splits()) best = Math.min(best, j ? j.fast(beta, t, sigma, ls, tailP) : Infinity);
    return best;
  };
  const jump: RemainderJump = {
    get decay() {
      const js = splits();
      return js.length > 0 && js.every((j) => j !== null) ? Math.min(...js.map((j) => j!.decay)) : NaN;
    },
    fast: atZeroDamping(fastAt, dMax),
    tv() {
      const js = splits();
      if (!(js.length > 0 && js.every((j) => j !== null))) return Infinity;
      return 2 * r * Math.min(...js.map((j) => j!.D1)) * (1 + 4 * EPS);
    },
  };
  return { bound, jump };
}

/**
 * The bound above for a compound of N and a severity with a derived endpoint remainder, its kernels `kernels` (chosen by
 * compound.ts from the count's table of the same length, so its p_n are the kernels' weights); null where the count has
 * no table. The table's p_n are taken within its pointRel where it states one, else within 16 (n + 1) u, as the gamma
 * compounds' bound takes them (compound.ts gammaRemainderBound).
 */
export function endpointKernelsRemainder(N: Node, rem: EndpointRemainder, kernels: readonly GammaKernel[], order = KERNEL_ORDER): ReturnType<typeof compoundRemainderBound> | null {
  const e0 = rem.series.exps[0];
  if (!(e0 > 0) || !N.table) return null;
  const nMax = Math.floor(order / e0) + 1;
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
  if ((keptTerms(rem.series, order) * (nMax - 1)) ** 2 > COMPOUND_SERIES_WORK) return null;
  return compoundRemainderBound({ rem, pn, pErr, kernels, ...(cgf ? { cgf } : {}), relErr: N.cfRelError ?? 0, absErr: N.cfAbsError ?? 0, order });
}

/**
 * A bound non-increasing in the damping beta, taken at beta = 0 for every beta with beta dMax <= 1/2 (the kernels' phases
 * stay within their allowance there) and kept per frequency (a plan's probes of all dampings share their frequencies;
 * the store is emptied past 4096 entries); other beta evaluate afresh.
 */
function atZeroDamping(at: (beta: number, t: number) => number, dMax: number): (beta: number, t: number) => number {
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
