import { incGamma, gammaPdf } from "./invert/incgamma";
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

/**
 * Gamma kernels for the compound's continuous part psi(s) = sum_{n >= 1} p_n phi(s)^n: the terms of its endpoint
 * expansion up to s^{-eMax} (endpoints n at, series G^n with G the severity's), each matched by a kernel. After
 * subtraction the transform decays like |s|^{-e} with e > eMax instead of the severity's slow power.
 */
export function compoundKernels(pn: ArrayLike<number>, sev: EndpointSeries, rate: number, eMax: number): GammaKernel[] {
  const G = new Map<number, number>();
  sev.exps.forEach((e, j) => {
    if (e <= eMax + SAME) add(G, e, sev.coefs[j]);
  });
  const e0 = Math.min(...sev.exps);
  if (!(e0 > 0) || G.size === 0) return [];
  const perEnd = new Map<number, Map<number, number>>();
  let pow = new Map<number, number>([[0, 1]]);
  for (let n = 1; n < pn.length && n * e0 <= eMax + SAME; n++) {
    pow = mul(pow, G, eMax);
    const key = sev.at === 0 ? 0 : n;
    const acc = perEnd.get(key) ?? new Map<number, number>();
    for (const [e, c] of pow) add(acc, e, pn[n] * c);
    perEnd.set(key, acc);
  }
  const out: GammaKernel[] = [];
  for (const [key, series] of perEnd) out.push(...toKernels(series, key * sev.at, rate, eMax));
  return out.filter((k) => k.w !== 0 && Number.isFinite(k.w));
}

/** sum_k w_k e^{-s (at_k - lo)} (rate_k/(rate_k + s))^shape_k at s = beta - i t, subtracted from (re, im) */
export function subtractKernels(ks: readonly GammaKernel[], lo: number, beta: number, t: Float64Array, re: Float64Array, im: Float64Array) {
  // by rate, then endpoint, then shape: a shape one above the previous one multiplies its power by z = rate/(rate + s)
  const sorted = [...ks].sort((a, b) => a.rate - b.rate || a.at - b.at || a.shape - b.shape);
  for (let j = 0; j < t.length; j++) {
    let rate = NaN;
    let lzr = 0;
    let lzi = 0;
    let zr = 0;
    let zi = 0;
    let prev: GammaKernel | null = null;
    let pr = 0;
    let pi = 0;
    for (const k of sorted) {
      if (k.rate !== rate) {
        rate = k.rate;
        // z = 1 / (1 + s / rate), s = beta - i t
        const ur = 1 + beta / rate;
        const ui = -t[j] / rate;
        const d2 = ur * ur + ui * ui;
        zr = ur / d2;
        zi = -ui / d2;
        lzr = -0.5 * Math.log(d2);
        lzi = -Math.atan2(ui, ur);
        prev = null;
      }
      if (prev && prev.at === k.at && Math.abs(k.shape - prev.shape - 1) < 1e-12) {
        const nr = pr * zr - pi * zi;
        pi = pr * zi + pi * zr;
        pr = nr;
      } else {
        const d = k.at - lo;
        const m = Math.exp(k.shape * lzr - beta * d);
        const a = k.shape * lzi + t[j] * d;
        pr = m * Math.cos(a);
        pi = m * Math.sin(a);
      }
      prev = k;
      re[j] -= k.w * pr;
      im[j] -= k.w * pi;
    }
  }
}

/** the kernels' cdf, density and integrated cdf (int_{-inf}^x F) at x, with a bound on their rounding */
export function kernelsAt(ks: readonly GammaKernel[], x: number): { F: number; f: number; I: number; err: number; errf: number; errI: number } {
  let F = 0;
  let f = 0;
  let I = 0;
  let scale = 0;
  let scaleI = 0;
  let scaleF = 0;
  for (const k of ks) {
    const y = x - k.at;
    if (!(y > 0)) continue;
    const z = k.rate * y;
    const P = incGamma(k.shape, z).P;
    const P1 = incGamma(k.shape + 1, z).P;
    F += k.w * P;
    const g = gammaPdf(k.shape, k.rate, y);
    f += k.w * g;
    scaleF += Math.abs(k.w * g);
    // int_0^y P(a, r u) du = y P(a, r y) - (a / r) P(a + 1, r y)
    I += k.w * (y * P - (k.shape / k.rate) * P1);
    scale += Math.abs(k.w);
    scaleI += Math.abs(k.w) * (y + k.shape / k.rate);
  }
  // incomplete gamma to ~1e-14 relative (series / continued fraction to 1e-16-1e-17, lgamma's own error) and the sum
  return { F, f, I, err: 1e-13 * scale, errf: 1e-13 * scaleF, errI: 1e-13 * scaleI };
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
