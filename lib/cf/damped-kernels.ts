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
/**
 * the order to which a compound of claims with a derived endpoint remainder (pareto, lomax, weibull, Burr) takes its kernels
 * (../compound.ts compoundOrder): its claims' expansion to that order, each block's kernels at a rate that keeps their
 * weights small; sums and mixtures keep KERNEL_ORDER
 */
export const COMPOUND_ORDER = 8;
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
export function seriesOfExpansion(sev: EndpointSeries, order = KERNEL_ORDER): TransformSeries {
  const m = new Map<number, number>();
  sev.exps.forEach((e, j) => {
    if (e <= order + SAME) add(m, e, sev.coefs[j]);
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
export function compoundSeries(pn: ArrayLike<number>, sev: EndpointSeries, order = KERNEL_ORDER): TransformSeries {
  const G = seriesOfExpansion(sev, order)[0].series;
  const e0 = Math.min(...sev.exps);
  const out: TransformSeries = [{ at: 0, series: new Map([[0, pn[0]]]) }];
  if (!(e0 > 0) || G.size === 0) return out;
  let pow = new Map<number, number>([[0, 1]]);
  for (let n = 1; n < pn.length && n * e0 <= order + SAME; n++) {
    pow = mul(pow, G, order);
    addBlock(out, n * sev.at, pow, pn[n]);
  }
  return out;
}

/** gamma kernels (one rate) matching every term of a transform series except the atoms (exponent 0) */
export function kernelsOfSeries(s: TransformSeries, rate: number, order = KERNEL_ORDER): GammaKernel[] {
  const out: GammaKernel[] = [];
  for (const b of s) {
    const m = new Map([...b.series].filter(([e]) => e > SAME));
    out.push(...toKernels(m, b.at, rate, order));
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
