import { checkDeadline } from "./deadline";

export interface PanjerCount {
  /** (a, b, 0) class: P(N=k) = (a + b/k) P(N=k-1) */
  a: number;
  b: number;
  /** (a, b, 1) class: P(N=k) = (a + b/k) P(N=k-1) from k = 2 on; c1 = P(N=1) - (a + b) P(N=0) (0 or absent for (a, b, 0)) */
  c1?: number;
  /** P_N(z) at real z in [0, 1] */
  pgf(z: number): number;
}

/**
 * How far the stored inputs of a recursion may be from the exact ones: a and b within aRel and bRel of themselves
 * (relative), c1 within c1Abs, g_0 = P_N(f_0) within g0Abs, every severity entry f_j within fRel[j] f_j (relative to the
 * stored value).
 */
export interface PanjerInputErrors {
  aRel: number;
  bRel: number;
  c1Abs: number;
  g0Abs: number;
  fRel: Float64Array;
}

const U = Number.EPSILON / 2;
/** the spacing of the subnormal numbers: a product that underflows errs by at most half of it */
const ETA = 2 ** -1075;

/**
 * Panjer recursion for a compound sum S = X_1 + ... + X_N with N in the (a, b, 0) class and X on 0, h, 2h, ...:
 * g_0 = P_N(f_0), g_k = (1/(1 - a f_0)) sum_{j=1}^{k} (a + b j/k) f_j g_{k-j} (Klugman, Panjer & Willmot, Loss Models,
 * chapter on aggregate loss models, recalled from memory). Runs to `length` entries; cost length * len(f).
 * For the (a, b, 1) class the term c1 f_k joins the sum (Loss Models, (a, b, 1) recursion, recalled from memory).
 * Returns null when g_0 underflows (very large expected counts), where the recursion cannot start; g_0 = 0 is
 * exact (not an underflow) for an (a, b, 1) count with P(N = 0) = 0 and f_0 = 0.
 */
export function panjer(count: PanjerCount, f: Float64Array, length: number): Float64Array | null {
  return panjerRun(count, f, length, null)?.g ?? null;
}

/**
 * The recursion with a running error bound (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 3.3
 * running error analysis, sec. 4.2 recursive summation), for a >= 0 and a + b >= 0, where every coefficient a + b j/k
 * (0 < j <= k) is non-negative: err[k] >= |g^_k - g_k| against the recursion in exact arithmetic from the exact inputs
 * (`inputs`; fRel non-decreasing in j). Each coefficient is formed from non-negative parts (for b < 0 as (a + b) + |b|
 * (k - j)/k, k - j an exact integer), so x_j = fl(coef_j f_j) is within e_x = max(rel a or a + b, rel b) + 4u of the
 * exact coef_j times the stored f_j, and the stored f_j within fRel[k] of the exact one for every j <= k. With the m
 * products t_j = fl(x_j g^_{k-j}) summed to s (non-negative terms, gamma_{m-1} s; each product u):
 *   |s - S| <= (gamma_m + e_x + u + fRel[k]) s (1 + gamma_m) + sum_j x_j (1 + e_x + fRel[k]) err[k - j] + the c1 term's,
 * the second sum formed beside s in the same loop (its rounding gamma_{m+1}); g^_k = fl(c s) adds c's own error
 * (1/(1 - a f_0): the product with a's and f_0's errors, the difference, the division) and one rounding. Products that
 * underflow err by at most 2^-1075 each (absolute), three per term. The extra sum costs about a fifth more time.
 * Returns null where g_0 underflows (as panjer); err null where the conditions above do not hold.
 */
export function panjerRun(count: PanjerCount, f: Float64Array, length: number, inputs: PanjerInputErrors | null): { g: Float64Array; err: Float64Array | null } | null {
  const { a, b } = count;
  const f0 = f[0];
  const g = new Float64Array(length);
  g[0] = count.pgf(f0);
  const c1 = count.c1 ?? 0;
  if (!(g[0] > 1e-280) && !(c1 !== 0 && g[0] === 0 && f0 === 0)) return null;
  const c = 1 / (1 - a * f0);
  const Lf = f.length;
  const st = inputs && a >= 0 && a + b >= 0 && Number.isFinite(inputs.g0Abs) ? errorState(count, f0, inputs) : null;
  if (!st) {
    for (let k = 1; k < length; k++) {
      // O(length * support) work: the deadline is checked every 1024 entries
      if ((k & 1023) === 0) checkDeadline("panjer");
      let s = 0;
      const jmax = Math.min(k, Lf - 1);
      if (b >= 0) {
        const bk = b / k;
        for (let j = 1; j <= jmax; j++) s += (a + bk * j) * f[j] * g[k - j];
      } else {
        // the coefficient from non-negative parts, (a + b) + |b| (k - j)/k, as in the bounded loop below
        const nbk = -b / k;
        for (let j = 1; j <= jmax; j++) s += (a + b + nbk * (k - j)) * f[j] * g[k - j];
      }
      if (c1 !== 0 && k < Lf) s += c1 * f[k];
      g[k] = c * s;
    }
    return { g, err: null };
  }
  const err = new Float64Array(length);
  err[0] = inputs!.g0Abs;
  const fr = inputs!.fRel;
  const apb = a + b;
  let jf: Float64Array | null = null;
  if (a === 0 && b >= 0) {
    jf = new Float64Array(Lf);
    for (let j = 1; j < Lf; j++) jf[j] = j * f[j];
  }
  for (let k = 1; k < length; k++) {
    if ((k & 1023) === 0) checkDeadline("panjer");
    let s = 0;
    let r = 0;
    const m = Math.min(k, Lf - 1);
    if (b >= 0) {
      // the same products as the unbounded loop, and the earlier errors carried by the same weights
      const bk = b / k;
      if (jf) {
        // a = 0 (Poisson): x = (b/k) (j f_j), three roundings as below, one product fewer
        for (let j = 1; j <= m; j++) {
          const x = bk * jf[j];
          s += x * g[k - j];
          r += x * err[k - j];
        }
      } else {
        for (let j = 1; j <= m; j++) {
          const x = (a + bk * j) * f[j];
          s += x * g[k - j];
          r += x * err[k - j];
        }
      }
    } else {
      // b < 0 (a + b >= 0): the coefficient (a + b) + |b| (k - j)/k from non-negative parts
      const nbk = -b / k;
      for (let j = 1; j <= m; j++) {
        const x = (apb + nbk * (k - j)) * f[j];
        s += x * g[k - j];
        r += x * err[k - j];
      }
    }
    const G = gamma(m);
    const ex = st.ex;
    // every f_j used here (j <= k) within fr[k] of itself: fRel is non-decreasing
    const fk = fr[Math.min(k, Lf - 1)];
    let e = (G + ex + U + fk * 1.01) * s * (1 + G) * (1 + 2 * U) + r * (1 + ex + fk) * 1.01 * (1 + gamma(m + 1)) + 3 * m * ETA;
    let sAbs = s;
    if (c1 !== 0 && k < Lf) {
      const x = c1 * f[k];
      s += x;
      sAbs += Math.abs(x);
      // the product's rounding and f_k's, c1's own error, and the sum's rounding
      e += (Math.abs(x) * (U + fr[k]) * (1 + U) + inputs!.c1Abs * f[k] * (1 + fr[k]) + U * Math.abs(s) + ETA) * (1 + 2 * U);
    }
    g[k] = c * s;
    // |c^ s^ - c S| <= c^ |s^ - S| + |c^ - c| |S| and the product's rounding
    err[k] = (c * e + st.relC * c * (sAbs + e) + U * Math.abs(g[k]) + ETA) * (1 + 4 * U);
  }
  return { g, err };
}

const gamma = (n: number) => (n * U) / (1 - n * U);

/**
 * e_x, the relative error of x_j = fl(coef_j f_j) against the exact coef_j f_j, and relC, that of c = 1/(1 - a f_0); null
 * where a + b (b < 0) is not known to be positive or exactly 0.
 */
function errorState(count: PanjerCount, f0: number, inp: PanjerInputErrors): { ex: number; relC: number; frMax: number } | null {
  const { a, b } = count;
  let frMax = 0;
  for (let j = 0; j < inp.fRel.length; j++) if (!(inp.fRel[j] <= frMax)) frMax = inp.fRel[j];
  if (!(frMax < 1e-3)) return null;
  let ec: number;
  if (b >= 0) ec = Math.max(inp.aRel, inp.bRel) + 3 * U;
  else {
    const apb = a + b;
    const e = U * Math.abs(apb) + inp.aRel * a + inp.bRel * -b;
    let rel: number;
    if (apb === 0 && e === 0) rel = 0;
    else if (apb - e > 0) rel = e / (apb - e);
    else return null;
    ec = Math.max(rel, inp.bRel + U) + 3 * U;
  }
  const ex = (ec + U) * 1.01;
  if (!(ex < 1e-3)) return null;
  let relC = 0;
  if (a !== 0) {
    const d = 1 - a * f0;
    // fl(1 - fl(a f0)): the product (with a's and f0's errors) and the difference; then the division
    const dErr = U * Math.abs(d) + a * f0 * (U + inp.aRel + inp.fRel[0]) * 1.01;
    if (!(dErr < 1e-3 * d)) return null;
    relC = (U + dErr / d) * 1.01;
  }
  return { ex, relC, frMax };
}
