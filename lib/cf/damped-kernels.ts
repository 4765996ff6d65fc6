import { incGamma, gammaPdf, gammaPdfErr } from "./invert/incgamma";
import { lgamma } from "./families/special";

/**
 * Endpoint expansion of a severity's Laplace transform, E e^{-s X} ~ e^{-s at} sum_j coefs_j s^{-exps_j} as s -> inf
 * in Re s >= 0 (Watson's lemma applied to the density's expansion at the lower end of its support; Erdelyi,
 * Asymptotic Expansions, ch. 2). Used only to choose the gamma kernels below: whatever the expansion's quality, the
 * kernels are subtracted from the transform and added back in closed form, so the inversion stays exact in law and
 * only the decay of what is left (and hence the number of frequency terms) depends on it.
 */
export interface EndpointSeries {
  at: number;
  exps: number[];
  coefs: number[];
  /**
   * the rate at which the series is one gamma kernel exactly (a gamma law's own rate): a compound's kernels at that rate
   * are its first claims' laws themselves, so what is left starts with the first claim count the kernels do not reach
   */
  rate?: number;
}

/**
 * w times the gamma(shape, rate) law shifted to `at`: Laplace transform w e^{-s at} (rate / (rate + s))^shape, cdf
 * w P(shape, rate (x - at)) (JKB vol. 1, ch. 17).
 */
export interface GammaKernel {
  at: number;
  shape: number;
  rate: number;
  w: number;
}

const SAME = 1e-9;

/** series product truncated at exponent eMax: (sum a_i s^{-e_i}) (sum b_j s^{-f_j}) */
function mul(a: Map<number, number>, b: Map<number, number>, eMax: number): Map<number, number> {
  const out = new Map<number, number>();
  for (const [ea, ca] of a)
    for (const [eb, cb] of b) {
      const e = ea + eb;
      if (e > eMax + SAME) continue;
      add(out, e, ca * cb);
    }
  return out;
}

function add(m: Map<number, number>, e: number, c: number) {
  for (const k of m.keys())
    if (Math.abs(k - e) <= SAME) {
      m.set(k, m.get(k)! + c);
      return;
    }
  m.set(e, c);
}

/** kernels matching the series sum_e c_e s^{-e} (exponents <= eMax) at one endpoint, smallest exponent first */
function toKernels(series: Map<number, number>, at: number, rate: number, eMax: number): GammaKernel[] {
  const out: GammaKernel[] = [];
  const m = new Map(series);
  for (;;) {
    let e = Infinity;
    for (const [k, c] of m) if (c !== 0 && k < e) e = k;
    if (!(e <= eMax + SAME)) break;
    const c = m.get(e)!;
    const w = c / Math.pow(rate, e);
    out.push({ at, shape: e, rate, w });
    m.delete(e);
    // (rate/(rate+s))^e = rate^e s^{-e} sum_r binom(-e, r) (rate/s)^r
    let b = 1;
    for (let r = 1; e + r <= eMax + SAME; r++) {
      b *= -(e + r - 1) / r;
      add(m, e + r, -c * b * Math.pow(rate, r));
    }
  }
  return out;
}

/** order of the endpoint expansion removed by kernels: what is left decays like |s|^{-e}, e > KERNEL_ORDER */
export const KERNEL_ORDER = 4;
/** the order to which a gamma severity's compound takes its n-claim laws as kernels (exact, no series: see compound.ts) */
export const GAMMA_ORDER = 8;

/**
 * A whole law's Laplace transform for large s (Re s >= 0) as blocks at endpoints,
 * E e^{-s X} ~ sum_blocks e^{-s at} sum_e c_e s^{-e}, exponents up to KERNEL_ORDER kept; an exponent 0 is an atom at
 * `at`. An empty list: the transform decays faster than any power (a density flat to all orders at its start).
 * Independent sums multiply the blocks, mixtures add them weighted, scale and shift move them (Watson's lemma
 * termwise; Erdelyi, Asymptotic Expansions, ch. 2).
 */
export type TransformSeries = { at: number; series: Map<number, number> }[];

function sameAt(a: number, b: number) {
  return Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(a), Math.abs(b));
}

function addBlock(out: TransformSeries, at: number, series: Map<number, number>, w = 1) {
  let b = out.find((x) => sameAt(x.at, at));
  if (!b) out.push((b = { at, series: new Map() }));
  for (const [e, c] of series) add(b.series, e, w * c);
}

/** a severity's endpoint series as a transform series */
export function seriesOfExpansion(sev: EndpointSeries): TransformSeries {
  const m = new Map<number, number>();
  sev.exps.forEach((e, j) => {
    if (e <= KERNEL_ORDER + SAME) add(m, e, sev.coefs[j]);
  });
  return [{ at: sev.at, series: m }];
}

export const pointSeries = (x: number): TransformSeries => [{ at: x, series: new Map([[0, 1]]) }];

export function productSeries(a: TransformSeries, b: TransformSeries): TransformSeries {
  const out: TransformSeries = [];
  for (const x of a) for (const y of b) addBlock(out, x.at + y.at, mul(x.series, y.series, KERNEL_ORDER));
  return out;
}

export function mixSeries(ws: number[], ss: TransformSeries[]): TransformSeries {
  const out: TransformSeries = [];
  ss.forEach((s, j) => {
    for (const x of s) addBlock(out, x.at, x.series, ws[j]);
  });
  return out;
}

/** aX, a > 0: E e^{-s a X} at s -> a s: c s^{-e} -> c a^{-e} s^{-e} */
export function scaleSeries(a: number, s: TransformSeries): TransformSeries {
  return s.map((x) => ({ at: a * x.at, series: new Map([...x.series].map(([e, c]) => [e, c * Math.pow(a, -e)])) }));
}

export const shiftSeries = (b: number, s: TransformSeries): TransformSeries => s.map((x) => ({ at: x.at + b, series: x.series }));

/**
 * The compound's transform P_N(phi(s)) = p_0 + sum_{n >= 1} p_n phi(s)^n: the atom p_0 at 0 and, up to s^{-eMax},
 * the blocks of phi^n (endpoints n at, series G^n with G the severity's).
 */
export function compoundSeries(pn: ArrayLike<number>, sev: EndpointSeries): TransformSeries {
  const G = seriesOfExpansion(sev)[0].series;
  const e0 = Math.min(...sev.exps);
  const out: TransformSeries = [{ at: 0, series: new Map([[0, pn[0]]]) }];
  if (!(e0 > 0) || G.size === 0) return out;
  let pow = new Map<number, number>([[0, 1]]);
  for (let n = 1; n < pn.length && n * e0 <= KERNEL_ORDER + SAME; n++) {
    pow = mul(pow, G, KERNEL_ORDER);
    addBlock(out, n * sev.at, pow, pn[n]);
  }
  return out;
}

/** gamma kernels (one rate) matching every term of a transform series except the atoms (exponent 0) */
export function kernelsOfSeries(s: TransformSeries, rate: number): GammaKernel[] {
  const out: GammaKernel[] = [];
  for (const b of s) {
    const m = new Map([...b.series].filter(([e]) => e > SAME));
    out.push(...toKernels(m, b.at, rate, KERNEL_ORDER));
  }
  return out.filter((k) => k.w !== 0 && Number.isFinite(k.w));
}

/**
 * Gamma kernels for the compound's continuous part psi(s) = sum_{n >= 1} p_n phi(s)^n: the terms of its endpoint
 * expansion up to s^{-KERNEL_ORDER} (endpoints n at, series G^n with G the severity's), each matched by a kernel. After
 * subtraction the transform decays like |s|^{-e} with e > KERNEL_ORDER instead of the severity's slow power.
 */
export function compoundKernels(pn: ArrayLike<number>, sev: EndpointSeries, rate: number): GammaKernel[] {
  return kernelsOfSeries(compoundSeries(pn, sev), rate);
}

/** the largest integer shape and end multiple taken by complex products in subtractKernels */
const MAX_POWER = 16;

/** how subtractKernels forms each kernel's factor z^shape e^{-s (at - lo)}: from the previous one, by products, or by exp */
interface KernelStep {
  k: GammaKernel;
  /** a new rate: z (and its powers) are formed afresh */
  newRate: boolean;
  /** the previous kernel's factor times z (same end, shape one above) */
  chained: boolean;
  /** shape and end multiple for the product route (z^shape E^mult, E = e^{-s base}); 0: exp, cos and sin */
  shape: number;
  mult: number;
  base: number;
}

/**
 * the order of work for subtractKernels: by rate, then endpoint, then shape. An integer shape (<= MAX_POWER) at an end
 * that is an integer multiple of the rate group's smallest positive end, exactly in floating point (a compound's n-claim
 * ends n at), takes z^shape and e^{-s d} as powers of z and of one E = e^{-s base}, so a node costs one exp, cos and sin
 * in all instead of one each per end (Poisson(2)-pareto: 4 ends, 10 kernels)
 */
function kernelSteps(ks: readonly GammaKernel[], lo: number): KernelStep[] {
  const sorted = [...ks].sort((a, b) => a.rate - b.rate || a.at - b.at || a.shape - b.shape);
  const out: KernelStep[] = [];
  let rate = NaN;
  let base = 0;
  let prev: GammaKernel | null = null;
  for (const k of sorted) {
    const newRate = k.rate !== rate;
    if (newRate) {
      rate = k.rate;
      base = Infinity;
      for (const x of sorted) if (x.rate === rate && x.at - lo > 0) base = Math.min(base, x.at - lo);
      prev = null;
    }
    const chained = !!prev && prev.at === k.at && Math.abs(k.shape - prev.shape - 1) < 1e-12;
    const d = k.at - lo;
    const m = d === 0 ? 0 : Math.round(d / base);
    const exact = Number.isInteger(k.shape) && k.shape >= 1 && k.shape <= MAX_POWER && m >= 0 && m <= MAX_POWER && (m === 0 ? d === 0 : m * base === d);
    out.push({ k, newRate, chained, shape: exact ? k.shape : 0, mult: m, base: exact && m > 0 ? base : 0 });
    prev = k;
  }
  return out;
}

/**
 * a bound, at any t and beta >= 0, on the per-node rounding subtractKernels adds to `noise` (see there), for psi_c of size
 * at most `size` before the kernels are subtracted: with |z| <= 1 and
 * t |z|^shape <= rate for shape >= 1 (|z| <= rate / |t|), and e^{-beta d} beta d <= 1/e, a kernel at end d adds at most
 * |w| eps (8 shape + 4 mult + 11 + rate d + 1/e), where |z|^shape |log |z|| shape <= 1/e bounds the exp route's
 * magnitude error; a shape below 1 away from lo has no such bound (t |z|^shape grows): Infinity
 */
export function kernelsRounding(ks: readonly GammaKernel[], lo: number, size: number): number {
  // each subtraction: eps / 2 of at most (size + the kernels' mass) per part, two parts
  let s = ks.length * Number.EPSILON * (size + kernelsMass(ks));
  for (const st of kernelSteps(ks, lo)) {
    const d = Math.max(st.k.at - lo, 0);
    const mult = st.shape > 0 ? st.mult : 1;
    if (st.k.shape < 1 && d > 0) return Infinity;
    s += Math.abs(st.k.w) * Number.EPSILON * (8 * Math.max(st.k.shape, 1) + 4 * mult + 11 + st.k.rate * d + 1 / Math.E);
  }
  return s;
}

const STEPS = new WeakMap<readonly GammaKernel[], { lo: number; steps: KernelStep[] }>();

/**
 * sum_k w_k e^{-s (at_k - lo)} (rate_k/(rate_k + s))^shape_k at s = beta - i t, subtracted from (re, im); with `noise`,
 * each node's rounding of these factors added to it, |w| |factor| eps times: by products, (6 shape + 4 mult + 4) for z's
 * rectangular form (4 eps), each complex product (2 eps >= sqrt(5) u, Higham, Accuracy and Stability, sec. 3.6), exp,
 * cos and sin (1 eps each per power of E), plus the phase t d and the damping beta d rounded (eps / 2 each); by exp,
 * shape (|log |z|| + 5) for the log and atan2, t d and beta d for the phase and magnitude, 10 for the rest.
 * The product by w and each subtraction round by eps / 2 of their parts' sizes, added too (noiseOf's 16 eps per unit of
 * weight leaves the kernels out)
 */
export function subtractKernels(ks: readonly GammaKernel[], lo: number, beta: number, t: Float64Array, re: Float64Array, im: Float64Array, noise?: Float64Array) {
  let memo = STEPS.get(ks);
  if (!memo || memo.lo !== lo) STEPS.set(ks, (memo = { lo, steps: kernelSteps(ks, lo) }));
  const steps = memo.steps;
  // powers z^1..z^n and E^1..E^n per node (index p - 1), filled up to what the current rate group needs
  const zr = new Float64Array(MAX_POWER);
  const zi = new Float64Array(MAX_POWER);
  const er = new Float64Array(MAX_POWER);
  const ei = new Float64Array(MAX_POWER);
  for (let j = 0; j < t.length; j++) {
    const tj = t[j];
    let lzr = 0;
    let lzi = 0;
    let logs = false;
    let nz = 0;
    let ne = 0;
    let base = 0;
    let pr = 0;
    let pi = 0;
    let rel = 0;
    let err = 0;
    let r = re[j];
    let i = im[j];
    for (const st of steps) {
      const k = st.k;
      if (st.newRate) {
        // z = 1 / (1 + s / rate), s = beta - i t
        const ur = 1 + beta / k.rate;
        const ui = -tj / k.rate;
        const d2 = ur * ur + ui * ui;
        zr[0] = ur / d2;
        zi[0] = -ui / d2;
        nz = 1;
        ne = 0;
        logs = false;
      }
      const d = k.at - lo;
      if (st.chained) {
        const nr = pr * zr[0] - pi * zi[0];
        pi = pr * zi[0] + pi * zr[0];
        pr = nr;
        rel += 6;
      } else if (st.shape > 0) {
        const s = st.shape;
        for (; nz < s; nz++) {
          zr[nz] = zr[nz - 1] * zr[0] - zi[nz - 1] * zi[0];
          zi[nz] = zr[nz - 1] * zi[0] + zi[nz - 1] * zr[0];
        }
        pr = zr[s - 1];
        pi = zi[s - 1];
        const m = st.mult;
        if (m > 0) {
          if (ne === 0 || base !== st.base) {
            base = st.base;
            const a = Math.exp(-beta * base);
            er[0] = a * Math.cos(tj * base);
            ei[0] = a * Math.sin(tj * base);
            ne = 1;
          }
          for (; ne < m; ne++) {
            er[ne] = er[ne - 1] * er[0] - ei[ne - 1] * ei[0];
            ei[ne] = er[ne - 1] * ei[0] + ei[ne - 1] * er[0];
          }
          const nr = pr * er[m - 1] - pi * ei[m - 1];
          pi = pr * ei[m - 1] + pi * er[m - 1];
          pr = nr;
        }
        rel = 6 * s + 4 * m + 4 + 0.5 * (tj * d + beta * d);
      } else {
        if (!logs) {
          const ur = 1 + beta / k.rate;
          const ui = -tj / k.rate;
          lzr = -0.5 * Math.log(ur * ur + ui * ui);
          lzi = -Math.atan2(ui, ur);
          logs = true;
        }
        const m = Math.exp(k.shape * lzr - beta * d);
        const a = k.shape * lzi + tj * d;
        pr = m * Math.cos(a);
        pi = m * Math.sin(a);
        rel = k.shape * (Math.abs(lzr) + 5) + tj * d + beta * d + 10;
      }
      r -= k.w * pr;
      i -= k.w * pi;
      // the factor's rounding, the product by w's and the subtraction's (eps / 2 of each part)
      err += Math.abs(k.w) * (Math.abs(pr) + Math.abs(pi)) * (rel + 0.5) + 0.5 * (Math.abs(r) + Math.abs(i));
    }
    re[j] = r;
    im[j] = i;
    if (noise) noise[j] += err * Number.EPSILON * (1 + 1e-10);
  }
}

/**
 * the kernels' cdf, density and integrated cdf (int_{-inf}^x F) at x, with a bound on their rounding; without wantInt the
 * integrated cdf is not formed (its P(a + 1) costs as much as the cdf's): I is NaN and errI Infinity
 */
export function kernelsAt(ks: readonly GammaKernel[], x: number, wantInt = true): { F: number; f: number; I: number; err: number; errf: number; errI: number } {
  let F = 0;
  let f = 0;
  let I = 0;
  let scale = 0;
  let scaleI = 0;
  let scaleF = 0;
  let errP = 0;
  let errP1 = 0;
  let errIy = 0;
  let errF = 0;
  for (const k of ks) {
    const y = x - k.at;
    if (!(y > 0)) continue;
    const z = k.rate * y;
    const g0 = incGamma(k.shape, z);
    const P = g0.P;
    F += k.w * P;
    // P's derived bound (./invert/incgamma.ts)
    const eP = Math.abs(k.w) * g0.eP;
    errP += eP;
    const g = gammaPdf(k.shape, k.rate, y);
    f += k.w * g;
    scaleF += Math.abs(k.w * g);
    errF += Math.abs(k.w * g) * gammaPdfErr(k.shape, k.rate, y);
    scale += Math.abs(k.w);
    if (!wantInt) continue;
    const g1 = incGamma(k.shape + 1, z);
    const P1 = g1.P;
    errIy += eP * y;
    errP1 += (Math.abs(k.w) * k.shape * g1.eP) / k.rate;
    // int_0^y P(a, r u) du = y P(a, r y) - (a / r) P(a + 1, r y)
    I += k.w * (y * P - (k.shape / k.rate) * P1);
    scaleI += Math.abs(k.w) * y;
  }
  // the incomplete gamma's and the densities' derived bounds (./invert/incgamma.ts), plus the sums' rounding
  const sumRound = 4 * Number.EPSILON * scale;
  const errf = errF + 4 * Number.EPSILON * scaleF;
  if (!wantInt) return { F, f, I: NaN, err: errP + sumRound, errf, errI: Infinity };
  return { F, f, I, err: errP + sumRound, errf, errI: errIy + errP1 + 8 * Number.EPSILON * scaleI + sumRound * (1 + scaleI / Math.max(scale, 1e-300)) };
}

/** sup over x >= from of the kernels' total |density| (each gamma density is decreasing beyond its mode) */
export function kernelsDensityBeyond(ks: readonly GammaKernel[], from: number): number {
  let s = 0;
  for (const k of ks) {
    const mode = Math.max(0, (k.shape - 1) / k.rate);
    const y = Math.max(from - k.at, mode);
    if (y <= 0) return Infinity;
    s += Math.abs(k.w) * Math.exp(k.shape * Math.log(k.rate) + (k.shape - 1) * Math.log(y) - k.rate * y - lgamma(k.shape));
  }
  return s;
}

export const kernelsMass = (ks: readonly GammaKernel[]) => ks.reduce((s, k) => s + Math.abs(k.w), 0);
