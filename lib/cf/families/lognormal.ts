// Lognormal law: CF by quadrature on a shifted contour, and cumulants without cancellation.
import { lognormalKernel } from "../severity-kernel";
import { checkDeadline } from "../deadline";
import type { Node } from "../node";
import { fromPhiDamped } from "../damped-cf";
import { withGgcLogRound } from "./log-round";
import { arithmeticNodes, expSumArithmetic, fromPhi } from "./cf-quadrature";
import { COMPLEX_SHIFT_MAX_COT, SUM_MOMENT_UNITS, arithmetic, complexShiftUnits, logFromSums, quadratureNodes } from "./numeric-rule";
import { KahanComplex } from "./kahan";
import { scratch } from "../damped-scratch";
import { connectedGraphSums } from "./connected-graphs";
import { decayTable } from "./decay-table";

/**
 * Lognormal(mu, sigma): phi(t) = int N(y; mu, sigma^2) exp(i t e^y) dy. For t > 0 the integrand is entire in y and the
 * path is moved to Im y = theta (Cauchy's theorem), where exp(i t e^{y+i theta}) decays; the trapezoidal rule then
 * converges geometrically (Trefethen & Weideman 2014, SIAM Review 56(3), thm 5.1). theta = min(pi/2, 2.5 sigma) bounds the
 * Gaussian's growth on the shifted path by e^{c^2/2}, c = theta/sigma; the step is set so that the rule's derived error
 * (ruleError below) is near e^-40.
 */
export function lognormal(mu: number, sigma: number): Node {
  const theta = Math.min(Math.PI / 2, 2.5 * sigma);
  const c = theta / sigma;
  // step rounded down to 10 significant bits and the range out to a whole number of steps: the nodes -V + j h are
  // exact (integers times one power of 2), while a smaller step and wider range only lower the rule's error
  const h0 = Math.min((2 * Math.PI * c) / (2 * c * c + 40), 0.5);
  const hExp = Math.pow(2, Math.floor(Math.log2(h0)) - 10);
  const h = Math.floor(h0 / hExp) * hExp;
  const V = Math.ceil(Math.sqrt(2 * (40 + 2.5 * c * c)) / h) * h;
  const n = quadratureNodes(Math.ceil((2 * V) / h) + 1, `the lognormal sigma ${sigma}`, "use a sigma up to 1e4.");
  const v = new Float64Array(n);
  const w = new Float64Array(n);
  const ev = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    v[j] = -V + j * h;
    w[j] = (h / Math.sqrt(2 * Math.PI)) * Math.exp(-0.5 * v[j] * v[j]);
    ev[j] = Math.exp(sigma * v[j]);
  }
  const em = Math.exp(mu);
  // E exp(i z X) at z = x + i beta (beta >= 0): on the path Im y = th/sigma, i z e^{i th} has real part
  // -|z| sin(arg z + th), largest decay at th = pi/2 - arg z; th <= theta keeps the step's error bound
  const acc = new KahanComplex();
  const phiAt = (x: number, beta: number, out: Float64Array) => {
    const th = Math.min(theta, Math.atan2(x, beta));
    const cc = th / sigma;
    const g = Math.exp(0.5 * cc * cc);
    const sn = Math.sin(th);
    const cs = Math.cos(th);
    const a = x * em;
    const b = beta * em;
    const dr = a * sn + b * cs;
    const pr = a * cs - b * sn;
    acc.reset();
    for (let j = 0; j < n; j++) {
      const damp = dr * ev[j];
      if (damp > 45) break;
      const amp = w[j] * Math.exp(-damp);
      const ph = pr * ev[j] - cc * v[j];
      acc.addPolar(amp, ph);
    }
    out[0] = g * acc.re;
    out[1] = g * acc.im;
  };
  const single = fromPhiDamped(phiAt);
  // the transform itself (rectangular) per frequency; negative t by conjugation
  const tmp = new Float64Array(2);
  const singleRect = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    for (let k = 0; k < t.length; k++) {
      if ((k & 15) === 0) checkDeadline("cf-quadrature");
      phiAt(Math.abs(t[k]), beta, tmp);
      re[k] = tmp[0];
      im[k] = t[k] < 0 ? -tmp[1] : tmp[1];
    }
  };
  // equispaced t_k = t_0 + k d (the damped inversion's nodes): for a fixed path angle each quadrature term is a
  // geometric sequence in k: evaluated directly at the start of each block of B steps, and within the block as that
  // value times the step's m-th power from a table computed directly per node (no recurrence, so no drift); the sums
  // go to sr, si
  const batchRect = (beta: number, t: Float64Array, sr: Float64Array, si: Float64Array, j0 = 0) => {
    const K = t.length;
    const d = t[1] - t[0];
    let k1 = 0;
    while (k1 < K && Math.atan2(t[k1], beta) < 0.9 * theta) k1++;
    if (k1 > 0) singleRect(beta, t.subarray(0, k1), sr.subarray(0, k1), si.subarray(0, k1));
    if (k1 >= K) return k1;
    const th = Math.min(theta, Math.atan2(t[k1], beta));
    const cc = th / sigma;
    const g = Math.exp(0.5 * cc * cc);
    const sn = Math.sin(th);
    const cs = Math.cos(th);
    sr.fill(0, k1);
    si.fill(0, k1);
    // node j's tabled powers (L_j of them) and its run state: the next frequency, the position in its current block and
    // the block's direct value. The frequencies go in tiles of TILE, every node over a tile before the next tile, so the
    // sums sr, si of a tile stay in cache (node by node over all K frequencies they are re-read from memory n times);
    // each term and each sum's order over j are as node by node, so the values are the same to the bit
    const tRe = scratchTable(n * BLOCK, 0);
    const tIm = scratchTable(n * BLOCK, 1);
    const Ls = new Int32Array(n);
    const next = new Int32Array(n);
    const pos = new Int32Array(n);
    const zRe = new Float64Array(n);
    const zIm = new Float64Array(n);
    for (let j = j0; j < n; j++) {
      const e = em * ev[j];
      const a = e * d * sn;
      const b = e * d * cs;
      // the block: B steps, fewer where the term falls below e^-45 sooner (the table is then shorter)
      const reach = Math.ceil(((45 / e - beta * cs) / sn - t[k1]) / d) + 1;
      const L = Math.max(1, Math.min(BLOCK, reach, K - k1));
      Ls[j] = L;
      next[j] = k1;
      const o = j * BLOCK;
      for (let m = 0; m < L; m++) {
        const am = Math.exp(-m * a);
        tRe[o + m] = am * Math.cos(m * b);
        tIm[o + m] = am * Math.sin(m * b);
      }
    }
    for (let k0 = k1; k0 < K; k0 += TILE) {
      checkDeadline("cf-quadrature");
      const kEnd = Math.min(K, k0 + TILE);
      for (let j = j0; j < n; j++) {
        let k = next[j];
        if (k < 0) continue;
        const e = em * ev[j];
        const L = Ls[j];
        const o = j * BLOCK;
        let m = pos[j];
        let zr = zRe[j];
        let zi = zIm[j];
        while (k < kEnd) {
          if (m === 0) {
            const damp = e * (t[k] * sn + beta * cs);
            if (damp > 45) {
              k = -1;
              break;
            }
            const amp = w[j] * g * Math.exp(-damp);
            const ph = e * (t[k] * cs - beta * sn) - cc * v[j];
            zr = amp * Math.cos(ph);
            zi = amp * Math.sin(ph);
          }
          const end = Math.min(kEnd, k + L - m);
          for (; k < end; k++, m++) {
            const wr = tRe[o + m];
            const wi = tIm[o + m];
            sr[k] += zr * wr - zi * wi;
            si[k] += zr * wi + zi * wr;
          }
          if (m === L) m = 0;
        }
        next[j] = k;
        pos[j] = m;
        zRe[j] = zr;
        zIm[j] = zi;
      }
    }
    return k1;
  };
  const batch = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    const k1 = batchRect(beta, t, re, im);
    for (let k = 0; k < t.length; k++) {
      const sr = re[k];
      const si = im[k];
      const s2 = sr * sr + si * si;
      re[k] = s2 > 1e-290 && k >= k1 ? 0.5 * Math.log(s2) : Math.log(Math.hypot(sr, si));
      im[k] = Math.atan2(si, sr);
    }
  };
  // the same rule at beta = 0 for equispaced t (the inversion's nodes): term j is w_j g e^{-i c v_j} exp(t e_j i e^{i theta}),
  // e_j = e^{mu + sigma v_j}, summed by expSumArithmetic
  const qRe = new Float64Array(n);
  const qIm = new Float64Array(n);
  const qE = new Float64Array(n);
  const g0 = Math.exp(0.5 * c * c);
  for (let j = 0; j < n; j++) {
    qRe[j] = w[j] * g0 * Math.cos(-c * v[j]);
    qIm[j] = w[j] * g0 * Math.sin(-c * v[j]);
    qE[j] = em * ev[j];
  }
  // i e^{i theta} = -sin theta + i cos theta: at theta = pi/2 exactly -1 (cos(pi/2) rounds to 6e-17, which would only
  // turn each term's phase by t e_j 6e-17 and keep the sums on the complex recurrence)
  const wIm = theta === Math.PI / 2 ? 0 : Math.cos(theta);
  // at a complex w the shifted moments too where cot theta is moderate (their rounding in roundingBound)
  const shiftComplex = wIm !== 0 && 1 / Math.tan(theta) <= COMPLEX_SHIFT_MAX_COT;
  const logCfArithmetic = (t: Float64Array, re: Float64Array, im: Float64Array) => {
    // reused buffers (../damped-scratch.ts), every entry written by expSumArithmetic
    const sr = scratch("expSr", t.length);
    const si = scratch("expSi", t.length);
    expSumArithmetic(qRe, qIm, qE, -Math.sin(theta), wIm, t, sr, si, shiftComplex);
    logFromSums(t, sr, si, re, im, 0, 0, 0);
  };
  // the bound expSumArithmetic adds (moments, recurrence), from the rule's terms: sum |c_j| = e^{c^2/2} sum w_j
  let wSum = 0;
  for (let j = 0; j < n; j++) wSum += w[j];
  const shortcutError = wSum * g0 * (2e-25 + 80 * Number.EPSILON) + n * 1e-21;
  const rb = roundingBound(w, v, n, sigma, theta, c, shortcutError / g0);
  const cfError = ruleError(c, h, V, wSum, true) + rb.all * g0;
  // the per-frequency route alone (compensated sums, no recurrence): what a short run of frequencies is charged
  const cfErrorSingle = ruleError(c, h, V, wSum, false) + rb.single * g0;
  // the rectangular batch (a compound's one-claim route) leaves out the first nodes, far left in the Gaussian: their
  // e^{mu + sigma v} is so small that they reach every frequency, yet each term is at most w_j e^{cc^2/2} <= w_j g0
  // (damp >= 0, the tabled powers at most 1), so leaving out nodes whose weights sum to DROP moves the value by at
  // most g0 times that sum, which the route's bound adds
  let jDrop = 0;
  let dropped = 0;
  while (jDrop < n && (dropped + w[jDrop]) * g0 * (1 + 1e-12) <= DROP) dropped += w[jDrop++];
  const dropBound = dropped * g0 * (1 + 1e-12);
  // per frequency: the damped transform's routes, and with the rectangular batch's dropped nodes (the one-claim kernel's)
  const errorsAt = lognormalErrorAt(w, v, ev, n, sigma, mu, theta, c);
  const errorAt = errorsAt(ruleError(c, h, V, wSum, true), cfError);
  const kernelErrorAt = errorsAt(ruleError(c, h, V, wSum, true) + dropBound, cfError + dropBound);
  const s2 = sigma * sigma;
  const d = Math.expm1(s2);
  const damped = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => (arithmetic(t) ? batch(beta, t, re, im) : single(beta, t, re, im));
  // a short run of frequencies (a few hundred quadratures, about 1 ms) takes the per-frequency route and its smaller bound
  const dampedRect = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    if (t.length > SHORT_RUN && arithmetic(t)) {
      batchRect(beta, t, re, im, jDrop);
      return cfError + dropBound;
    }
    singleRect(beta, t, re, im);
    return cfErrorSingle;
  };
  // claim-law rounding: the lognormal is a generalized gamma convolution (Thorin 1977, Scand. Actuarial J., recalled from memory; ./log-round.ts ggcLogRound)
  return withGgcLogRound({
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [`lognormal CF computed by quadrature on a shifted contour (absolute error <= ${cfError.toPrecision(2)})`],
    // the rule's own error (ruleError: step, range and cut-off) plus the rounding of every route (roundingBound) and
    // the shortcuts of the equispaced sums
    cfAbsError: cfError,
    dampedLogCf: damped,
    dampedErrorAt: { cf: damped, at: errorAt },
    // compounds take the one-claim term out of their damped transform and add it back in closed form
    severityKernel: (w: number, w2: number) => lognormalKernel(w, mu, sigma, damped, cfError + dropBound, w2, dampedRect, kernelErrorAt),
    // the density vanishes at 0 faster than any power, so every term of the endpoint expansion is 0 (Watson's lemma):
    // a compound's transform is P(N = 0) plus o(s^-n), and sums holding it build their kernels from the other terms
    laplaceExpansion: { at: 0, exps: [], coefs: [] },
    // density (JKB vol. 1, ch. 14); upper tail: P(Z > z) <= exp(-z^2/2) (Chernoff bound, common practice)
    severity: {
      name: "lognormal",
      pdf: (x) => (x > 0 ? Math.exp(-0.5 * ((Math.log(x) - mu) / sigma) ** 2) / (x * sigma * Math.sqrt(2 * Math.PI)) : 0),
      lo: 0,
      upper: (q) => Math.exp(mu + sigma * Math.sqrt(-2 * Math.log(q))),
      scale: Math.exp(mu),
      rootAtZero: 1,
      // measured on compound Poisson(20), mu 1: by its CF sigma 0.8 takes ~0.1 s (cdf error 1e-11), sigma 1 0.6 s,
      // sigma 1.3 3.5 s; Poisson(5) with sigma 2 a minute
      tailIndex: Infinity,
    },
    location: Math.exp(mu + s2 / 2),
    scale: Math.exp(mu + s2 / 2) * Math.sqrt(d),
    support: [0, Infinity],
    logCf: (t, re, im) => (arithmeticNodes(t) ? logCfArithmetic(t, re, im) : fromPhi(t, re, im, (x, out) => phiAt(x, 0, out))),
    cumulants: (m) => lognormalCumulants(mu, sigma, m),
  } as Node, Math.exp(mu + s2 / 2));
}

const U = Number.EPSILON / 2;
/** total weight (times e^{c^2/2}) of the left-most nodes the rectangular damped batch may leave out */
const DROP = 1e-15;
/** frequencies a tile of the damped batch (a multiple of BLOCK; the tile's sums, 2 TILE doubles, stay in cache) */
const TILE = 2048;
/** the damped batch's tables of powers, reused between calls (every entry used is written first) */
const tables: Float64Array[] = [new Float64Array(0), new Float64Array(0)];
function scratchTable(n: number, i: 0 | 1): Float64Array {
  if (tables[i].length < n) tables[i] = new Float64Array(n);
  return tables[i];
}
/** steps of the damped batch between direct evaluations (within a block: the direct value times a tabled power) */
const BLOCK = 256;
/** runs of frequencies up to this length take the per-frequency route when their values' bound is returned */
const SHORT_RUN = 512;

/**
 * The rule's own error, any route, frequency z = t + i beta (t, beta >= 0). In v the integrand on the path at angle th
 * (= min(theta, pi/2 - psi), psi = arg z) is F(v) = phi(v + i cc) exp(i z e^mu e^{sigma (v + i cc)}), cc = th/sigma <= c,
 * entire. At v = s + i b: |e^{-(v + i cc)^2/2}| = e^{-s^2/2 + (cc + b)^2/2}, and the second factor has modulus
 * exp(-|z| e^{mu + sigma s} sin(psi + th + sigma b)) <= 1 while 0 <= psi + th + sigma b <= pi: for b up to
 * a+ = c (psi + th + theta <= pi/2 + theta <= pi) with int |F(s + i b)| ds <= M+ = e^{(cc + c)^2/2} <= e^{2 c^2}, and for b
 * down to -a- with psi + th >= sigma a-: a- = c where th = min(theta, pi/2 - psi) (then psi + th >= theta), 0.9 c in the
 * damped batch, `batch` (its path angle th >= 0.9 theta is that of the block's first frequency, psi only smaller after it),
 * with M- <= e^{max(cc, a- - cc)^2/2} <= e^{c^2/2}. The trapezoid sum's error is the aliased transform
 * sum_{k != 0} F^(2 pi k / h) (Poisson summation), each half bounded by moving the path to Im v = +-a (Trefethen & Weideman
 * 2014, SIAM Review 56(3), thm 5.1 and its proof, taken one half-strip at a time): M+ / (e^{2 pi a+ / h} - 1) +
 * M- / (e^{2 pi a- / h} - 1). The sum stops at |v| <= V: the terms beyond (each at most h phi(v_j) e^{cc^2/2}, the
 * modulus factor at most 1 on the path) sum to at most 2 e^{c^2/2} phi(V)/V (Mills' ratio, A&S 26.2.12); and the
 * routes leave out terms whose decay e^{-damp} is below e^-45, together at most e^{c^2/2} e^-45 sum_j w_j. The few
 * exp of this bound are taken within one ulp (the project's standing assumption), covered by the factor 1 + 16 eps.
 */
function ruleError(c: number, h: number, V: number, wSum: number, batch: boolean): number {
  const g0 = Math.exp(0.5 * c * c);
  const aliasUp = Math.exp(2 * c * c) / Math.expm1((2 * Math.PI * c) / h);
  const aliasDown = g0 / Math.expm1((2 * Math.PI * (batch ? 0.9 : 1) * c) / h);
  const beyond = (2 * g0 * Math.exp(-0.5 * V * V)) / (Math.sqrt(2 * Math.PI) * V);
  // (the computed sum of the weights within n eps of itself, n < 2^16 nodes)
  const cut = g0 * Math.exp(-45) * wSum * (1 + 65536 * Number.EPSILON);
  return (aliasUp + aliasDown + beyond + cut) * (1 + 16 * Number.EPSILON);
}

/**
 * Rounding of the lognormal rule's sums, divided by e^{c^2/2}, over every route (per frequency, the damped batch, the
 * equispaced sums), with u = 2^-53, +-*\/ within u and exp, cos, sin within 2u (one ulp). Term j is
 * w_j exp(-D_j) e^{i P_j}, D_j = d e_j, P_j = p e_j - c v_j, e_j = e^{sigma v_j}; relative to it:
 *  - the weight (exp of -v^2/2): (v_j^2 + 8) u with the products and the final factor e^{c^2/2};
 *  - the node v_j is exact (the step has 10 significant bits, j < 2^16);
 *  - e_j within 2 (1 + sigma |v_j|) u, which D_j and P_j carry times (D_j + |p e_j|); on every path
 *    |p| <= d cot(theta) (the path angle is theta or leaves p = 0), and e^{-D} (D + |p| e_j) <= (1 + cot theta) / e;
 *  - c v_j: 2 c |v_j| u;
 *  - the damped batch's terms inside a block: the direct value times the tabled power e^{-m a} e^{i m b} (a = d e_j sin th,
 *    b = d e_j cos th, th >= 0.9 theta): exp and cos/sin within 2u each and their product u (5u), the complex product
 *    3u, and the arguments m a, m b within 3u of themselves (e_j's own error is in D_j, P_j above), that is 3u (m a +
 *    m b) <= 3u D (1 + cot(0.9 theta)), bounded through the decay by e^{-D} D <= 1/e as above;
 *  - the compensated sum of n terms per frequency and in the equispaced sums: 2 sqrt 2 u + 8 n u^2 of the moduli
 *    (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 4.3), with the equispaced sums' moments
 *    (SUM_MOMENT_UNITS, numeric-rule.ts; complexShiftUnits, at least as large, for the shifted moments at a complex w);
 *    the damped batch's plain sum: sqrt 2 gamma_{n-1} (Higham sec. 4.2);
 *  - a value comes from one route, so the bound takes the largest route's part, not their sum; `single` is the
 *    per-frequency route's alone (its compensated sum, no recurrence or shortcuts).
 * The weights sum these with the rule's own weights w_j (sum w_j v_j^2 ~ 1), not with the largest |v_j|.
 */
function roundingBound(w: Float64Array, v: Float64Array, n: number, sigma: number, theta: number, c: number, shortcut: number): { all: number; single: number } {
  const cot = 1 / Math.tan(theta);
  const cot9 = 1 / Math.tan(0.9 * theta);
  const kahan = 2 * Math.SQRT2 + 8 * n * U;
  let base = 0;
  let wSum = 0;
  for (let j = 0; j < n; j++) {
    const a = Math.abs(v[j]);
    base += w[j] * (v[j] * v[j] + 8 + 2 * c * a + (2 * (1 + sigma * a) * (1 + cot)) / Math.E);
    wSum += w[j];
  }
  // the routes are alternatives: per frequency (the sum alone), the damped batch (its tabled powers and the sum), the
  // equispaced sums (their moments and the sum, and their shortcuts `shortcut`, already divided by e^{c^2/2})
  // the damped batch sums its nodes plainly (its inner loop is the hot one): gamma_{n-1} of each part's moduli
  const damped = 8 + (3 * (1 + cot9)) / Math.E + (Math.SQRT2 * (n - 1)) / (1 - (n - 1) * U);
  const equispaced = kahan + (theta !== Math.PI / 2 && cot <= COMPLEX_SHIFT_MAX_COT ? complexShiftUnits(cot) : SUM_MOMENT_UNITS);
  return { all: U * base + Math.max(U * wSum * damped, U * wSum * equispaced + shortcut), single: U * base + U * wSum * kahan };
}

/**
 * The damped routes' error at frequency t, damping beta (every route: per frequency, the damped batch, the rectangular
 * batch), at most `whole` (their constant bound). roundingBound's parts are each relative to the moduli of the terms at
 * that frequency, w_j g e^{-D_j} with g <= e^{c^2/2} and D_j = dr e_j, dr >= e^mu t sin(0.9 theta) on every damped path (the
 * path angle th = theta: dr >= e^mu t sin theta; th = pi/2 - arg z: dr = e^mu |z|; the batch: th >= 0.9 theta); the parts
 * carried by D (e_j's rounding, the tabled powers' arguments) through D e^{-D} <= (2/e) e^{-D/2}, the cot(theta) there taken
 * as cot(0.9 theta) (the batch's phase is at most cot(th) D); the sum's rounding the larger of the compensated (2 sqrt 2 +
 * 8 n u) and the plain one (sqrt 2 gamma_{n-1}, with the batch's 8 units of its products), all against e^{-D_j / 2}
 * (decayTable). Given `fixed`, what does not fall with t (the rule's own error, the rectangular batch's dropped nodes),
 * and `whole`, the routes' constant bound.
 */
function lognormalErrorAt(
  w: Float64Array,
  v: Float64Array,
  ev: Float64Array,
  n: number,
  sigma: number,
  mu: number,
  theta: number,
  c: number,
): (fixed: number, whole: number) => (beta: number, t: number) => number {
  const cot9 = 1 / Math.tan(0.9 * theta);
  const sum = Math.max(2 * Math.SQRT2 + 8 * n * U, 8 + (Math.SQRT2 * (n - 1)) / (1 - (n - 1) * U));
  const perTerm = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const a = Math.abs(v[j]);
    perTerm[j] = w[j] * (v[j] * v[j] + 8 + 2 * c * a + (2 * (2 * (1 + sigma * a) + 3) * (1 + cot9)) / Math.E + sum);
  }
  const table = decayTable(perTerm, ev);
  const g0 = Math.exp(0.5 * c * c);
  const rate = Math.exp(mu) * Math.sin(0.9 * theta);
  return (fixed, whole) => (_beta, t) => Math.min(whole, (fixed + g0 * U * table((rate * Math.abs(t)) / 2)) * (1 + 16 * Number.EPSILON));
}

/**
 * Lognormal cumulants without cancellation: with Y = X / E X the raw moments are w^{C(n,2)}, w = e^{sigma^2}, so
 * kappa_n(Y) = sum over connected labelled graphs on n vertices of d^{edges}, d = w - 1 (non-negative terms only);
 * kappa_n(X) = (E X)^n kappa_n(Y). Raw moments E X^n = exp(n mu + n^2 sigma^2 / 2) (JKB vol. 1, ch. 14).
 */
export function lognormalCumulants(mu: number, sigma: number, n: number): number[] {
  return connectedGraphSums(Math.expm1(sigma * sigma), Math.exp(mu + (sigma * sigma) / 2), n);
}
