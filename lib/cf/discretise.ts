import type { Node } from "./node";
import type { LatticeTable } from "./types";
import { compoundFftRound, countSlope, fftL, logRouteError, norm2 } from "./compound-fft-round";
import { getFftPlan } from "./fftplan";
import { unwrapFrom } from "./complex";
import { gaussLegendre } from "./quadrature";
import { bennettTail, boundedCompound, isPoissonCount } from "./discretise-bounds";

export { bennettTail, isPoissonCount };

/** What a severity without a cheap CF offers for discretisation (lognormal, pareto, weibull). */
export interface SeverityLaw {
  name: string;
  pdf(x: number): number;
  /**
   * a layered claim's density at the two ends of its continuous part (start+ and the limit-), where it jumps, and its
   * slope and second derivative there (dStart, dEnd, eStart, eEnd; NaN where not formed), where those jump
   */
  edges?: { start: number; fStart: number; fEnd: number; dStart?: number; dEnd?: number; eStart?: number; eEnd?: number };
  /** lower end of the support (density zero below) */
  lo: number;
  /** an x with P(X > x) <= q (upper bound on the upper q-quantile) */
  upper(q: number): number;
  /** typical size (median or xm): the span is a fraction of it */
  scale: number;
  /** power-law tail index (P(X > x) = (xm/x)^alpha for pareto); Infinity for lighter tails */
  tailIndex: number;
  /** density unbounded or not smooth at 0 (weibull): the first cell is integrated after x = b u^m */
  rootAtZero: number;
  /** point masses beside the density (a per-claim layer's atoms at 0 and at share * limit), placed exactly */
  atoms?: { x: number; p: number }[];
  /** the law's own cdf P(X <= x) and sf P(X > x), atoms included (a per-claim layer): with them the compound is
   *  bracketed between the rounded-down and rounded-up discretisations, whose cell masses are cdf differences */
  cdf?(x: number): number;
  sf?(x: number): number;
  /** cdf and sf with bounds on their absolute errors, where the law has them (a per-claim layer) */
  cdfE?(x: number): { v: number; e: number };
  sfE?(x: number): { v: number; e: number };
  /** E[X] when it exists */
  mean?: number;
  /** E[X] with a bound on its error, where derived (a per-claim layer's closed form) */
  meanE?: { v: number; e: number };
  /** claims never exceed this (a per-claim layer with a limit) */
  bound?: number;
  /** an upper bound on E[X 1{X > x}] (derived; Infinity where none can be formed) */
  tailMean?(x: number): number;
}

/** Options that decide the lattice of a discretised compound. */
export interface DiscretiseOptions {
  /** target cdf error; the span is chosen from it, the count mean and the law's scale */
  tolerance?: number;
  /** explicit span h (overrides the choice) */
  span?: number;
  /** default route: the severities with a damped transform (lognormal, pareto, weibull, lomax, burr, log-logistic, inverse gamma)
   *  stay continuous; the others are discretised */
  auto?: boolean;
  /** largest number of lattice points kept (power of two; default 2^16, 2^18 with a tolerance) */
  maxPoints?: number;
}

const GL = gaussLegendre(10);
const GL4 = gaussLegendre(4);

/**
 * Split the severity's mass over the lattice 0, h, 2h, ..., (len-1)h. For each cell [jh, (j+1)h] the integrals
 * A_j = int ((j+1)h - x)/h f(x) dx and B_j = int (x - jh)/h f(x) dx (Gauss-Legendre: 10 nodes per panel near
 * the start of the support, 4 beyond 64 cells) give
 *  - mean-preserving masses: A_j to jh and B_j to (j+1)h (local moment matching of order 1, Gerber & Jones 1976;
 *    Loss Models, discretization of the severity distribution; recalled from memory);
 *  - rounded down: A_j + B_j to jh; rounded up: A_j + B_j to (j+1)h.
 * The mass beyond the last cell is left out (the tables then sum to less than 1).
 */
export function discretiseSeverity(sev: SeverityLaw, h: number, len: number): { mp: Float64Array; down: Float64Array; up: Float64Array } {
  const mp = new Float64Array(len);
  const down = new Float64Array(len);
  const up = new Float64Array(len);
  const { x: gx, w: gw } = GL;
  const G = gx.length;
  const { x: fx, w: fw4 } = GL4;
  const first = Math.max(0, Math.floor(sev.lo / h));
  for (let j = first; j < len - 1; j++) {
    const a = j * h;
    const b = a + h;
    const a0 = Math.max(a, sev.lo);
    if (b <= a0) continue;
    let A = 0;
    let B = 0;
    if (j === 0 && sev.rootAtZero > 1) {
      // x = b u^m: the singular factor x^(k-1) becomes a smooth power of u
      const m = sev.rootAtZero;
      const panels = 8;
      for (let q = 0; q < panels; q++) {
        for (let g = 0; g < G; g++) {
          const u = (q + gx[g]) / panels;
          const x = b * u ** m;
          const jac = (m * b * u ** (m - 1)) / panels;
          const fw = gw[g] * jac * sev.pdf(x);
          A += fw * (b - x);
          B += fw * (x - a);
        }
      }
    } else if (j - first >= 64 && a0 === a) {
      // far from the start the density varies on the scale x >> h: 4 nodes (error ~ (h/x)^8 relative)
      for (let g = 0; g < 4; g++) {
        const x = a + fx[g] * h;
        const f = fw4[g] * h * sev.pdf(x);
        A += f * (b - x);
        B += f * (x - a);
      }
    } else {
      // more panels where the density changes fast relative to h (near the support's start and near 0)
      const panels = j - first < 16 || a0 > a ? 8 : 1;
      const d = (b - a0) / panels;
      for (let q = 0; q < panels; q++) {
        const lo = a0 + q * d;
        for (let g = 0; g < G; g++) {
          const x = lo + gx[g] * d;
          const fw = gw[g] * d * sev.pdf(x);
          A += fw * (b - x);
          B += fw * (x - a);
        }
      }
    }
    A /= h;
    B /= h;
    mp[j] += A;
    mp[j + 1] += B;
    down[j] += A + B;
    up[j + 1] += A + B;
  }
  // atoms: on a lattice point exactly; between two points split mean-preserving, rounded down and up
  for (const at of sev.atoms ?? []) {
    const r = at.x / h;
    const j = Math.floor(r + 1e-9);
    if (j >= len - 1) continue;
    const frac = Math.abs(r - Math.round(r)) < 1e-9 ? 0 : r - j;
    mp[j] += at.p * (1 - frac);
    if (frac > 0) mp[j + 1] += at.p * frac;
    down[j] += at.p;
    up[frac > 0 ? j + 1 : j] += at.p;
  }
  return { mp, down, up };
}

/** Scratch for one compound transform of size M. */
export interface Scratch {
  wr: Float64Array;
  wi: Float64Array;
  re: Float64Array;
  im: Float64Array;
}

/**
 * pmf of the compound sum of a lattice severity f (on 0, h, 2h, ...) by the discrete Fourier transform:
 * p = IDFT( P_N(DFT f) ) on M points (Loss Models, aggregate losses by FFT; recalled from memory). Mass of S beyond
 * (M-1)h wraps round to the low indices (aliasing).
 */
export function compoundByFft(N: Node, f: Float64Array, M: number, s: Scratch): { p: Float64Array; round: number } {
  const plan = getFftPlan(M);
  // the rounding bound (./compound-fft-round.ts): each transform value within dZ, the generating function's slope
  // (E N, where the masses sum past 1 a little more), each value's own evaluation error
  const fin = norm2(f);
  const slope = countSlope(N, Math.max(0, fin.sum - 1));
  const dZ = fftL(M) * fin.sum * (1 + 2 * Number.EPSILON);
  const ulps = 8 * Math.max(1, N.nodes);
  let local2 = 0;
  let out2 = 0;
  const a = plan.a;
  const b = plan.b;
  a.fill(0);
  for (let k = 0; k < f.length; k++) a[2 * (k % M)] += f[k];
  plan.forward(a, b);
  // b_j = conj phi_X(t_j), t_j = 2 pi j / (M h); phi at M - j is the conjugate of phi at j (real severity), so only
  // j <= M/2 is evaluated and the rest mirrored
  const H = M / 2;
  for (let j = 0; j <= H; j++) {
    const x = b[2 * j];
    const y = b[2 * j + 1];
    const r2 = x * x + y * y;
    s.wr[j] = r2 > 0 ? Math.min(0, 0.5 * Math.log(r2)) : -745;
    s.wi[j] = -Math.atan2(y, x);
  }
  unwrapFrom(s.wi, 0, H + 1);
  const wr = s.wr.subarray(0, H + 1);
  const wi = s.wi.subarray(0, H + 1);
  N.countCgf!(wr, wi, s.re.subarray(0, H + 1), s.im.subarray(0, H + 1));
  for (let j = 0; j <= H; j++) {
    const m = Math.exp(s.re[j]);
    const c = m * Math.cos(s.im[j]);
    const d = m * Math.sin(s.im[j]);
    a[2 * j] = c;
    a[2 * j + 1] = d;
    const e = logRouteError(s.wr[j], s.wi[j], s.re[j], s.im[j], m, ulps, dZ, slope, N.cgfSlope);
    const w = j > 0 && j < H ? 2 : 1;
    local2 += w * e * e;
    out2 += w * (c * c + d * d);
    if (j > 0 && j < H) {
      a[2 * (M - j)] = c;
      a[2 * (M - j) + 1] = -d;
    }
  }
  plan.forward(a, b);
  const p = new Float64Array(M);
  for (let k = 0; k < M; k++) p[k] = b[2 * k] / M;
  return { p, round: compoundFftRound(M, local2, out2 * (1 + 4 * M * Number.EPSILON)) };
}

export interface DiscretisedCompound {
  table: LatticeTable;
  /** bound on |F_table(x) - F(x)| over the table (discretisation between rounded-down/up laws, plus aliasing) */
  cdfError: number;
  /** the pieces of cdfError */
  bracket: number;
  aliasing: number;
  span: number;
  points: number;
  /** the two bounding compounds (claims rounded down and up onto the lattice), when the claim law has a cdf */
  bounds?: CompoundBracket;
}

/**
 * Bounding pair of a discretised compound: with every claim rounded down (X_down = h floor(X/h)) and up
 * (X_up = h ceil(X/h)), X_down <= X <= X_up pointwise, so S_down <= S <= S_up in the usual stochastic order and every
 * cdf value, quantile, stop-loss, limited and layer mean and expected shortfall of S lies between those of S_down and
 * S_up (Kaas, Goovaerts, Dhaene & Denuit, Modern Actuarial Risk Theory, ordering of risks; common practice).
 */
export interface CompoundBracket {
  step: number;
  /** pmf on 0, h, ..., (K-1)h of S_down and S_up as computed */
  down: Float64Array;
  up: Float64Array;
  /** a lower bound on E[S_down] and an upper bound on E[S_up]; null when the mean does not exist */
  meanLow: number | null;
  meanHigh: number | null;
  /** bound on |computed cdf - cdf| of either bounding law at every x: wrapped mass, claim mass beyond the table,
   *  accuracy of the claim law's cdf carried through the count, rounding */
  slack: number;
}

/** Span and lattice size for a compound with count mean `nMean` and severity `sev`. */
export function chooseSpan(sev: SeverityLaw, nMean: number, sMean: number | null, sSd: number | null, o: DiscretiseOptions = {}, poisson = false): { h: number; K: number } {
  const tol = o.tolerance && o.tolerance > 0 ? o.tolerance : 0;
  // a requested tolerance may use up to 2^18 points (~0.5 s); otherwise 2^16 keeps a request near 0.1 s
  const Kmax = o.maxPoints ?? (tol ? 2 ** 18 : 2 ** 16);
  // where the compound's tail falls below ~1e-10: the severity's tail bound scaled by the count (subexponential
  // laws: P(S > x) ~ E N P(X > x)) and mean + 20 sd where the variance exists
  let R = sev.upper(1e-10 / Math.max(1, nMean));
  if (poisson && sev.bound !== undefined && Number.isFinite(sev.bound) && sMean !== null && sSd !== null && sSd > 0) {
    // Poisson count of bounded claims: where Bennett's bound on the tail falls below 1e-18
    let x = sSd;
    while (bennettTail(x, sSd * sSd, sev.bound) > 1e-18) x *= 1.25;
    R = Math.max(R, sMean + x);
  } else if (sMean !== null && sSd !== null && Number.isFinite(sSd)) R = Math.max(R, sMean + 20 * sSd);
  const fit = (h: number) => Math.min(Kmax, Math.max(16, 2 ** Math.ceil(Math.log2(R / h))));
  if (o.span && o.span > 0) return { h: o.span, K: fit(o.span) };
  let h = R / Kmax;
  // resolution: at most scale/16; at least scale/4096 (finer buys nothing at this table size)
  h = Math.min(Math.max(h, sev.scale / 4096), sev.scale / 16);
  // the bracket is about E N h sup f_X <~ E N h / scale: no finer than the tolerance needs
  if (tol) h = Math.max(h, Math.min((tol * sev.scale) / (2 * Math.max(1, nMean)), sev.scale / 16));
  // a binary fraction of the scale (rounded up, so the K points still reach R), so that round numbers sit on the
  // lattice when the scale is round
  h = sev.scale * 2 ** Math.ceil(Math.log2(h / sev.scale) - 1e-12);
  return { h, K: fit(h) };
}

/**
 * Compound of a count N (with countCgf) and a discretised severity: mean-preserving table on span h with K points,
 * plus an honest cdf error: the true cdf lies between the cdfs of the compounds with rounded-up and rounded-down
 * severities (stochastic order: X_down <= X <= X_up and X_down <= X_h <= X_up pointwise), so
 * |F_h - F| <= max_k max(F_down - F_h, F_h - F_up)(kh), and the same between lattice points (all are flat there); the wrapped mass is bounded by the mass in the window's upper half
 * (valid for tails no heavier than x^-1).
 */
export function discretisedCompound(N: Node, sev: SeverityLaw, h: number, K: number): DiscretisedCompound {
  if (sev.cdf && sev.sf) return boundedCompound(N, sev, h, K);
  const M = 2 * K;
  const { mp, down, up } = discretiseSeverity(sev, h, K + 1);
  const s: Scratch = { wr: new Float64Array(M), wi: new Float64Array(M), re: new Float64Array(M), im: new Float64Array(M) };
  const { p, round: rp } = compoundByFft(N, mp, M, s);
  const { p: pd, round: rd } = compoundByFft(N, down, M, s);
  const { p: pu, round: ru } = compoundByFft(N, up, M, s);
  // wrapped mass P(S >= M h): bounded by the mass in the window's upper half when the tail is no heavier than
  // x^-1; for pareto tails with alpha <= 1, P(S >= x) <= sum_n P(N=n) n P(X >= x/n) = E[N^(1+alpha)] (xm/x)^alpha
  // <= E[N^2]^((1+alpha)/2) (xm/x)^alpha (Jensen)
  let aliasing = 0;
  for (let k = K; k < M; k++) aliasing += Math.abs(p[k]);
  if (sev.tailIndex <= 1) {
    const kn = N.cumulants(2);
    const en2 = kn[0] !== null && kn[1] !== null ? kn[1] + kn[0] * kn[0] : Infinity;
    aliasing = Math.max(aliasing, Math.min(1, en2 ** ((1 + sev.tailIndex) / 2) * (sev.lo / (M * h)) ** sev.tailIndex));
  }
  let cd = 0;
  let cu = 0;
  let kept = 0;
  let bracket = 0;
  const out = new Float64Array(K);
  for (let k = 0; k < K; k++) {
    out[k] = Math.max(p[k], 0);
    kept += p[k];
    cd += pd[k];
    cu += pu[k];
    // F and F_h both lie in [F_up, F_down]: |F_h - F| <= max(F_down - F_h, F_h - F_up)
    bracket = Math.max(bracket, cd - kept, kept - cu);
  }
  // the rounding (./compound-fft-round.ts): the table's entries (clipped at 0) within sqrt(K) ||dp||_2 in sum, once
  // for the table and once in the bracket, the bracket's bounding compounds within theirs; the three running sums of K terms
  // within gamma_K of the sums of |p| (at most 1 + their own bounds each)
  const gK = (K * Number.EPSILON) / (2 - K * Number.EPSILON);
  const round = (Math.sqrt(K) * (2 * rp + Math.max(rd, ru)) + 3 * gK * (1 + Math.sqrt(K) * (rp + rd + ru))) * (1 + 4 * Number.EPSILON);
  return {
    // (its rounding is in cdfError: no further bound on the table itself)
    table: { origin: 0, step: h, p: out, tailMass: Math.max(0, 1 - kept), round: { pmf: 0, l1: 0 } },
    cdfError: bracket + 2 * aliasing + round,
    bracket,
    aliasing,
    span: h,
    points: K,
  };
}


/** What the discretised route did, for the notes. */
export function methodNote(sev: SeverityLaw, h: number, K: number): string {
  const how = sev.cdf && sev.sf
    ? `${sev.name} severity rounded down and rounded up onto the lattice (atoms placed exactly) on span h = ${h}, ${K} lattice points; ` +
      `both compounds by FFT of the count's generating function; the table is their even mixture, and risk measures are bracketed between them.`
    : `${sev.name} severity discretised mean-preserving (local moment matching) on span h = ${h}, ${K} lattice points; ` +
      `compound pmf by FFT of the count's generating function.`;
  return `${how} The law is treated as a lattice law: pmf values are probabilities of span cells, and cdf values differ from the continuous law's by the discretisation error below.`;
}

/** The bound once the table is built, for the notes. */
export function builtNote(b: DiscretisedCompound): string {
  const gap = b.bounds ? `half the gap between the rounded-down and rounded-up compounds: ${b.bracket.toExponential(2)}` : `between the rounded-down and rounded-up discretisations: ${b.bracket.toExponential(2)}`;
  return (
    `discretisation error: |cdf - cdf of the continuous law| <= ${b.cdfError.toExponential(2)} ` +
    `(${gap}; wrapped mass <= ${b.aliasing.toExponential(2)}); mass beyond ${(b.points - 1) * b.span}: ${b.table.tailMass.toExponential(2)}`
  );
}
