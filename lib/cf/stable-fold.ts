/**
 * Sums of stable terms with one index alpha are stable (Nolan, Univariate Stable Distributions, 2020, Prop. 1.3, in
 * S1): gamma^alpha = sum gamma_j^alpha, beta = sum beta_j gamma_j^alpha / gamma^alpha, delta = sum delta_j. A sum whose
 * every term is such a law (stable, cauchy = S(1, 0, s, loc; 1), normal = S(2, ., sigma / sqrt 2, mu; 1), each possibly
 * scaled or shifted) of one alpha gets the direct evaluation of that one law: two Cauchy or two stable(1.5) terms no
 * longer go through the period-doubling inversion. The sum keeps its own CF (the product of the terms' CFs) for the cf
 * and moments endpoints; only pdf, cdf, sf, quantiles and ES come from the folded law.
 *
 * Folded only where the folded beta is exact: every beta equal (it is then that beta, with no arithmetic), or alpha = 2
 * (beta plays no part). alpha = 1 only with every beta 0: with beta != 0 the S1 scale also moves the location.
 *
 * The folded gamma and delta carry roundings. The folded law is a location-scale family in them: with gamma = gamma*
 * (1 + theta), |theta| <= e, and |delta - delta*| <= D, the true law at x is the computed law at
 *   x' = delta + (x - delta*) gamma / gamma*,  |x' - x| <= w(x) = D (1 + e) + e |x - delta|,
 * so per point, with the computed law's values and bounds at x -/+ w (the same direct evaluation):
 *   F*(x) in [F(x - w) - e_F, F(x + w) + e_F]  (F increasing), and likewise sf;
 *   f*(x) = (1 + theta) f(x'), f(x') between min(f(x -/+ w)) and max(f(x -/+ w)) + [mode in the box] L 2w, as stable
 *   laws are unimodal (Yamazato 1978, Ann. Probab. 6: class L laws are unimodal), with L = sup |f'| <=
 *   (1/pi) int_0^inf t e^{-(gamma t)^alpha} dt = Gamma(2/alpha) / (alpha pi gamma^2);
 *   the stop-loss transform int_c^inf S*(y) dy = int_{c'}^inf S(y) dy / (1 + theta), between its values at c -/+ w.
 * The answer is the mean of the values at the box's ends (moved into the interval), its bound the larger distance to the
 * interval's ends: it shrinks with the tail (a relative bound where the direct law's is relative), unlike a uniform
 * bound on the change of F.
 */
import type { Model } from "./schema";
import { lgamma } from "./families/special";
import { cauchyDirect, normalDirect } from "./direct/families";
import { stableDirect } from "./direct/stable";
import { tanHalfPi } from "./direct/stable-kernel";
import { directPoint, type DirectLaw, type DirectPoint } from "./direct/types";
import { modeRange } from "./direct/shortfall-mode";

const U = Number.EPSILON / 2;
/** Math.pow within 2 ulps (fdlibm's e_pow.c, which V8 ships as ieee754::pow, is within 1) */
const POW = 4 * U;

/** A term as S1 stable parameters: scale gamma (at alpha = 2: the normal's sigma) within relative sErr, d1 within dErr. */
interface StableTerm {
  alpha: number;
  beta: number;
  scale: number;
  sErr: number;
  d1: number;
  dErr: number;
}

/** The term as S1 stable parameters with the bounds on their rounding, or null when it is not a stable law. */
function asStable(m: Model): StableTerm | null {
  if (!("family" in m) && "scale" in m) {
    const t = asStable(m.of);
    const a = m.scale;
    if (!t || !(a !== 0 && Number.isFinite(a))) return null;
    const d1 = a * t.d1;
    return { alpha: t.alpha, beta: a < 0 ? -t.beta : t.beta, scale: Math.abs(a) * t.scale, sErr: t.sErr * (1 + U) + U, d1, dErr: Math.abs(a) * t.dErr + U * Math.abs(d1) };
  }
  if (!("family" in m) && "shift" in m) {
    const t = asStable(m.of);
    if (!t || !Number.isFinite(m.shift)) return null;
    const d1 = t.d1 + m.shift;
    return { ...t, d1, dErr: t.dErr + U * Math.abs(d1) };
  }
  if (!("family" in m)) return null;
  const p = m as unknown as Record<string, number | string | undefined>;
  if (m.family === "normal") return { alpha: 2, beta: 0, scale: p.sigma as number, sErr: 0, d1: p.mu as number, dErr: 0 };
  if (m.family === "cauchy") return { alpha: 1, beta: 0, scale: p.scale as number, sErr: 0, d1: p.loc as number, dErr: 0 };
  if (m.family !== "stable") return null;
  const alpha = p.alpha as number;
  const beta = p.beta as number;
  const g = (p.scale as number | undefined) ?? 1;
  const loc = (p.loc as number | undefined) ?? 0;
  // alpha = 2: the normal with sigma = sqrt 2 gamma (one rounding)
  if (alpha === 2) return { alpha, beta: 0, scale: Math.SQRT2 * g, sErr: 2 * U, d1: loc, dErr: 0 };
  if (alpha === 1 && beta !== 0) return null;
  if ((p.param ?? "S1") === "S1" || beta === 0) return { alpha, beta, scale: g, sErr: 0, d1: loc, dErr: 0 };
  // S0 -> S1 (alpha != 1): d1 = d0 - beta gamma tan(pi alpha / 2). tanHalfPi takes tan of a (or -1/tan of b = pi (alpha
  // - 1)/2 within [-pi/4, pi/4]) whose argument is within 1.1 u; tan's condition number is 2a / sin 2a, tan within 1 ulp
  const arg = alpha >= 0.5 && alpha <= 1.5 ? (Math.PI / 2) * (alpha - 1) : (Math.PI / 2) * alpha;
  const cond = arg === 0 ? 1 : Math.abs((2 * arg) / Math.sin(2 * arg));
  const tanRel = (1.1 * cond + 4) * U * 1.01;
  const shift = beta * g * tanHalfPi(alpha);
  const d1 = loc - shift;
  return { alpha, beta, scale: g, sErr: 0, d1, dErr: Math.abs(shift) * (tanRel + 3 * U) + U * Math.abs(d1) };
}

/** The terms of a sum, nested sums opened. */
function flatTerms(ms: Model[]): Model[] {
  return ms.flatMap((m) => (!("family" in m) && "sum" in m ? flatTerms(m.sum) : [m]));
}

interface Folded {
  law: DirectLaw;
  alpha: number;
  gamma: number;
  delta: number;
  /** relative bound on gamma (at alpha = 2: on sigma), absolute bound on delta */
  e: number;
  D: number;
  n: number;
}

/** The one law of a sum of stable terms of one alpha (see the header), or null where it does not apply. */
export function foldStableSum(terms: Model[]): DirectLaw | null {
  const ms = flatTerms(terms);
  if (ms.length < 2) return null;
  const ts: StableTerm[] = [];
  for (const m of ms) {
    const t = asStable(m);
    if (!t || !(t.scale > 0 && Number.isFinite(t.scale)) || !Number.isFinite(t.d1)) return null;
    ts.push(t);
  }
  const alpha = ts[0].alpha;
  if (!ts.every((t) => t.alpha === alpha)) return null;
  if (alpha !== 2 && !ts.every((t) => t.beta === ts[0].beta)) return null;
  const f = fold(ts);
  return f ? widened(f) : null;
}

function fold(ts: StableTerm[]): Folded | null {
  const n = ts.length;
  const alpha = ts[0].alpha;
  const beta = alpha === 2 ? 0 : ts[0].beta;
  let delta = 0;
  let dAbs = 0;
  let D = 0;
  let eMax = 0;
  for (const t of ts) {
    delta += t.d1;
    dAbs += Math.abs(t.d1);
    D += t.dErr;
    eMax = Math.max(eMax, t.sErr);
  }
  // n - 1 additions: each within u of the partial sum, which is at most sum |d_j| (second order in the 1.01)
  D = (D + (n - 1) * U * dAbs) * 1.01;
  let gamma: number;
  let e: number;
  if (alpha === 1) {
    // a sum of n positive numbers: within (n - 1) u of the sum of the stored scales
    gamma = ts.reduce((s, t) => s + t.scale, 0);
    e = (eMax + (n - 1) * U) * 1.01;
  } else if (alpha === 2) {
    // sigma^2 = sum sigma_j^2: each square within 2 e_j + u, the sum (n - 1) u more, the root halves it and adds u/2
    gamma = Math.sqrt(ts.reduce((s, t) => s + t.scale * t.scale, 0));
    e = ((2 * eMax + U + (n - 1) * U) / 2 + U / 2) * 1.01;
  } else {
    // gamma_j^alpha within alpha e_j + POW, the sum (n - 1) u more; the root's exponent 1/alpha within u/2 relative adds
    // |log S| u / (2 alpha), and the root POW
    const S = ts.reduce((s, t) => s + Math.pow(t.scale, alpha), 0);
    if (!(S > 0 && Number.isFinite(S))) return null;
    gamma = Math.pow(S, 1 / alpha);
    e = ((alpha * eMax + POW + (n - 1) * U) / alpha + (Math.abs(Math.log(S)) * U) / (2 * alpha) + POW) * 1.01;
  }
  if (!(gamma > 0 && Number.isFinite(gamma) && Number.isFinite(delta)) || !(e < 1e-6)) return null;
  const law =
    alpha === 2 ? normalDirect(delta, gamma) : alpha === 1 ? cauchyDirect(delta, gamma) : stableDirect(alpha, beta, gamma, delta, "S1");
  if (!law) return null;
  return { law, alpha, gamma, delta, e, D, n };
}

/** The folded law with the parameters' rounding in every value's bound (see the header). */
function widened(f: Folded): DirectLaw {
  const { law, alpha, delta, e, D, n } = f;
  // the S1 scale of the folded law, smallest in its box (at alpha = 2 gamma = sigma / sqrt 2)
  const g = (alpha === 2 ? f.gamma / Math.SQRT2 : f.gamma) / (1 + e);
  const lip = (1.01 * Math.exp(lgamma(2 / alpha))) / (alpha * Math.PI * g * g);
  const lo = directPoint();
  const hi = directPoint();
  const box = (x: number) => {
    const w = D * (1 + e) + e * Math.abs(x - delta);
    // so that the rounded x -/+ wf still lie beyond x -/+ w
    return w * (1 + 4 * U) + 2 * U * Math.abs(x) + Number.MIN_VALUE;
  };
  let mode: readonly [number, number] | null = null;
  // the computed law's mode (closed form, or the interval derived from its bounded densities: ./direct/shortfall-mode.ts)
  // moved by the box: the true law at x is the computed one at x' within box(x) of x, so its mode lies within the box of
  // the computed one's
  const modeBox = () => {
    if (mode) return mode;
    const [a, b] = modeRange(law);
    mode = Number.isFinite(a) && Number.isFinite(b) ? [a - box(a), b + box(b)] : modeBracket(law);
    return mode;
  };
  const at = (x: number, out: DirectPoint) => {
    const wf = box(x);
    const xl = x - wf;
    const xh = x + wf;
    law.at(xl, lo);
    law.at(xh, hi);
    // F* in [F(xl) - e, F(xh) + e]; sf* in [S(xh) - e, S(xl) + e]; both clipped to [0, 1]
    const cL = Math.max(0, lo.cdf - lo.cdfErr);
    const cH = Math.min(1, hi.cdf + hi.cdfErr);
    const sL = Math.max(0, hi.sf - hi.sfErr);
    const sH = Math.min(1, lo.sf + lo.sfErr);
    set(out, "cdf", "cdfErr", 0.5 * (lo.cdf + hi.cdf), cL, cH);
    set(out, "sf", "sfErr", 0.5 * (lo.sf + hi.sf), sL, sH);
    const [mLo, mHi] = modeBox();
    const peak = xh >= mLo && xl <= mHi ? lip * 2 * wf : 0;
    const fL = (1 - e) * Math.max(0, Math.min(lo.pdf - lo.pdfErr, hi.pdf - hi.pdfErr));
    const fH = (1 + e) * (Math.max(lo.pdf + lo.pdfErr, hi.pdf + hi.pdfErr) + peak);
    set(out, "pdf", "pdfErr", 0.5 * (lo.pdf + hi.pdf), fL, fH);
  };
  const sl = law.stopLoss;
  const what = alpha === 2 ? "normal" : alpha === 1 ? "Cauchy" : `stable (alpha = ${alpha})`;
  return {
    method: law.method,
    support: [law.support[0] - (D + 1e-300) * 2, law.support[1] + (D + 1e-300) * 2],
    center: law.center,
    spread: law.spread,
    // stable laws are unimodal (Yamazato 1978, above): the interval holding the mode, for the shortfall's brackets
    unimodal: true,
    get modeRange() {
      return modeBox();
    },
    at,
    ...(law.quantile ? { quantile: law.quantile } : {}),
    ...(sl
      ? {
          // int_c^inf S* = pi(c') / (1 + theta) with c' within w of c, pi falling in c (rising for the left side)
          stopLoss: (c: number, side: 1 | -1) => {
            const wf = box(c);
            const a = sl(c - side * wf, side);
            const b = sl(c + side * wf, side);
            if (!a || !b) return null;
            const top = (a.v + a.e) / (1 - e);
            const bot = Math.max(0, (b.v - b.e) / (1 + e));
            const v = 0.5 * (top + bot);
            return { v, e: Math.max(0, 0.5 * (top - bot)) * (1 + 2 * U) + 2 * U * v };
          },
        }
      : {}),
    notes: [
      ...law.notes,
      `${n} ${what} terms of the sum evaluated as one ${what} law (Nolan 2020, Prop. 1.3: scale^alpha and locations add, in ` +
        `S1); its folded scale (within ${e.toPrecision(2)} relative) and location (within ${D.toPrecision(2)}) are in every bound`,
    ],
  };
}

/**
 * The value v (the mean of the two ends' values, as accurate as the direct law) moved into the interval [a, b] that holds
 * the true one, and its bound: the larger distance to the interval's ends, plus the rounding of v and of a, b (4 u of v).
 */
function set(out: DirectPoint, key: "cdf" | "sf" | "pdf", errKey: "cdfErr" | "sfErr" | "pdfErr", v: number, a: number, b: number) {
  const x = Math.min(Math.max(v, a), b);
  out[key] = x;
  out[errKey] = Math.max(0, x - a, b - x) * (1 + 2 * U) + 4 * U * Math.abs(x);
}

/**
 * An interval [mLo, mHi] holding the mode of the unimodal density: where the certified density at y_i exceeds the one
 * at y_j > y_i the mode lies below y_j (the density cannot rise after falling), and where it is below, above y_i.
 */
function modeBracket(law: DirectLaw): [number, number] {
  const K = 48;
  const ys: number[] = [];
  const lo: number[] = [];
  const hi: number[] = [];
  const pt = directPoint();
  for (let i = 0; i <= K; i++) {
    const y = law.center + law.spread * (i - K / 2) * 0.5;
    law.at(y, pt);
    ys.push(y);
    lo.push(pt.pdf - pt.pdfErr);
    hi.push(pt.pdf + pt.pdfErr);
  }
  let mLo = -Infinity;
  let mHi = Infinity;
  let bestLo = -Infinity;
  for (let j = 0; j <= K; j++) {
    // some earlier point certainly higher: the mode is below y_j
    if (bestLo > hi[j]) {
      mHi = ys[j];
      break;
    }
    bestLo = Math.max(bestLo, lo[j]);
  }
  let bestLoR = -Infinity;
  for (let i = K; i >= 0; i--) {
    if (bestLoR > hi[i]) {
      mLo = ys[i];
      break;
    }
    bestLoR = Math.max(bestLoR, lo[i]);
  }
  return [mLo, mHi];
}
