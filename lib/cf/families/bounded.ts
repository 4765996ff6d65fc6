/** Laws on a bounded interval: beta on [a, b] (and PERT), triangular. */
import { rawToCumulants, type Node } from "../node";
import { betaDensityVariation, principalLogRound } from "./log-round-principal";
import { triangularDist } from "./dist";
import { checkDeadline } from "../deadline";
import { arithmeticNodes } from "./cf-quadrature";
import { betaUnit } from "./beta-unit";
import { CfError } from "../errors";

/** the most the recurrence of the batched rays (raysBatch) may add: a batch whose own bound is larger is not used */
const BETA_BATCH_ERROR = 2e-14;

/** E Y^k = prod_{j<k} (alpha + j)/(alpha + beta + j) for Y ~ Beta(alpha, beta) (JKB vol. 2, ch. 25, eq. 25.13). */
function betaRaw(alpha: number, beta: number, n: number): number[] {
  const out: number[] = [];
  let m = 1;
  for (let k = 0; k < n; k++) {
    m *= (alpha + k) / (alpha + beta + k);
    out.push(m);
  }
  return out;
}

/**
 * Beta(alpha, beta) on [a, b]: X = a + (b - a) Y (JKB vol. 2, ch. 25, the four-parameter form);
 * phi(t) = e^{i a t} phi_Y((b - a) t).
 */
export function betaLaw(alpha: number, beta: number, a: number, b: number, name = "beta"): Node {
  const w = b - a;
  // shapes whose fixed rules would need unboundedly many nodes (alpha or beta near 0 or 1e300): the law keeps its moments
  // and direct evaluation, and only a request for its characteristic function is refused, with the reason
  let unit: ReturnType<typeof betaUnit> | null = null;
  let refused: CfError | null = null;
  try {
    unit = betaUnit(alpha, beta, BETA_BATCH_ERROR);
  } catch (e) {
    if (!(e instanceof CfError)) throw e;
    refused = e;
  }
  const tmp = new Float64Array(2);
  const mean = a + (w * alpha) / (alpha + beta);
  const sd = (w * Math.sqrt((alpha * beta) / (alpha + beta + 1))) / (alpha + beta);
  // the claim-law rounding of the principal log, phi = e^{i a t} psi, E|X - a| = w alpha / (alpha + beta)
  const logRound = principalLogRound((w * alpha) / (alpha + beta), a, betaDensityVariation(alpha, beta, w));
  return {
    ...logRound,
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [unit ? `${name} CF computed by series and quadrature (absolute error <= ${unit.cfError.toPrecision(2)})` : `${name} CF not available for these shapes: ${refused!.message}`],
    cfAbsError: unit ? unit.cfError : Infinity,
    location: mean,
    scale: sd,
    support: [a, b],
    logCf(t, re, im) {
      if (!unit) throw refused!;
      // equispaced t: from the first frequency on the rays' route every later one is on it too (contourLog falls with
      // tau); the rays are summed across t (raysBatch) from where the shortcuts' bound is within BETA_BATCH_ERROR
      checkDeadline("beta-cf");
      let k0 = t.length;
      if (arithmeticNodes(t, 16)) {
        let kr = 0;
        while (kr < t.length && !unit.useRays(t[kr] * w)) kr++;
        if (t.length - kr >= 16) {
          const K = t.length - kr;
          const d = ((t[t.length - 1] - t[kr]) / (K - 1)) * w;
          const br = new Float64Array(K);
          const bi = new Float64Array(K);
          const kb = unit.raysBatch(t[kr] * w, d, K, br, bi);
          if (kb >= 0 && kb < K) {
            k0 = kr + kb;
            for (let k = kb; k < K; k++) {
              re[kr + k] = Math.log(Math.hypot(br[k], bi[k]));
              im[kr + k] = Math.atan2(bi[k], br[k]);
            }
          }
        }
      }
      for (let k = 0; k < k0; k++) {
        // a series or a quadrature per frequency: the deadline is checked every 64 of them
        if ((k & 63) === 0) checkDeadline("beta-cf");
        const x = t[k];
        if (x === 0) {
          re[k] = 0;
          im[k] = 0;
          continue;
        }
        unit.at(Math.abs(x) * w, tmp);
        re[k] = Math.log(Math.hypot(tmp[0], tmp[1]));
        im[k] = (x < 0 ? -1 : 1) * Math.atan2(tmp[1], tmp[0]);
      }
      // the principal argument, no unwrap: its size is then bounded whatever the grid (./log-round-principal.ts)
      for (let k = 0; k < t.length; k++) im[k] += a * t[k];
    },
    cumulants: (n) => {
      const k = rawToCumulants(betaRaw(alpha, beta, n)).map((v, i) => (v === null ? null : v * w ** (i + 1)));
      if (n > 0 && k[0] !== null) k[0] = mean;
      return k;
    },
  };
}

/**
 * Triangular(a, c, b): phi(t) = 2 f[a, c, b] / (i t)^2 with f = e^{i t x} and f[.] its divided difference (the
 * density is the B-spline with knots a, c, b; Hermite-Genocchi formula, de Boor, A Practical Guide to Splines,
 * ch. IX). For |t| (b - a) <= 2 the moment series about a is used: E(X - a)^k = 2 sum_{j<=k} (c-a)^j (b-a)^{k-j} /
 * ((k+1)(k+2)), a sum of positive terms.
 */
export function triangular(a: number, c: number, b: number): Node {
  const h1 = c - a;
  const w = b - a;
  const momA = (k: number) => {
    let s = 0;
    for (let j = 0; j <= k; j++) s += h1 ** j * w ** (k - j);
    return (2 * s) / ((k + 1) * (k + 2));
  };
  const MOM = Array.from({ length: 60 }, (_, k) => momA(k));
  // f[u, v] for f = e^{i t x}: i t e^{i t u} E1(i t (v - u)), E1(iy) = sin y / y + i (1 - cos y)/y
  const dd = (u: number, v: number, t: number, out: Float64Array) => {
    const y = t * (v - u);
    let er: number;
    let ei: number;
    if (Math.abs(y) < 1e-4) {
      er = 1 - (y * y) / 6;
      ei = y / 2 - (y * y * y) / 24;
    } else {
      er = Math.sin(y) / y;
      ei = (2 * Math.sin(y / 2) ** 2) / y;
    }
    // i t e^{i t u} (er + i ei)
    const cr = Math.cos(t * u);
    const ci = Math.sin(t * u);
    const pr = cr * er - ci * ei;
    const pi = cr * ei + ci * er;
    out[0] = -t * pi;
    out[1] = t * pr;
  };
  const d1 = new Float64Array(2);
  const d2 = new Float64Array(2);
  const phi = (t: number, out: Float64Array) => {
    if (Math.abs(t) * w <= 2) {
      // e^{i t a} sum_k (i t)^k m_k / k!
      let sr = 0;
      let si = 0;
      let f = 1;
      for (let k = 0; k < 60; k++) {
        if (k > 0) f *= t / k;
        const v = f * MOM[k];
        const m = k % 4;
        if (m === 0) sr += v;
        else if (m === 1) si += v;
        else if (m === 2) sr -= v;
        else si -= v;
        if (Math.abs(v) < 1e-18 && k > 4) break;
      }
      const cr = Math.cos(t * a);
      const ci = Math.sin(t * a);
      out[0] = sr * cr - si * ci;
      out[1] = sr * ci + si * cr;
      return;
    }
    dd(a, c, t, d1);
    dd(c, b, t, d2);
    // f[a,c,b] = (f[c,b] - f[a,c]) / (b - a); phi = 2 f[a,c,b] / (i t)^2 = -2 f[a,c,b] / t^2
    const s = -2 / (w * t * t);
    out[0] = s * (d2[0] - d1[0]);
    out[1] = s * (d2[1] - d1[1]);
  };
  const tmp = new Float64Array(2);
  return {
    // the principal log's rounding: E|X| <= the mean for a >= 0, else max(|a|, |b|); the density's variation 2 f_max = 4 / w
    ...principalLogRound(a >= 0 ? ((a + b + c) / 3) * (1 + 4 * Number.EPSILON) : Math.max(Math.abs(a), Math.abs(b)), 0, 4 / w),
    cfAbsError: triangularCfError(a, c, w),
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
    dist: triangularDist(a, c, b),
    // E e^{-sX} = 2 (e^{-s a} / (c - a) - e^{-s c} (b - a) / ((c - a)(b - c)) + e^{-s b} / (b - c)) / ((b - a) s^2) exactly: the
    // density's three slope steps (the CF above at s = -i t); a mode at an end is a jump there instead (not listed)
    ...(a < c && c < b
      ? {
          transformSeries: [
            { at: a, series: new Map([[2, 2 / (w * h1)]]) },
            { at: c, series: new Map([[2, -2 / (h1 * (b - c))]]) },
            { at: b, series: new Map([[2, 2 / (w * (b - c))]]) },
          ],
        }
      : {}),
    location: (a + b + c) / 3,
    scale: Math.sqrt((a * a + b * b + c * c - a * b - a * c - b * c) / 18),
    support: [a, b],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        phi(t[k], tmp);
        re[k] = Math.log(Math.hypot(tmp[0], tmp[1]));
        // the principal argument, no unwrap: its size is then bounded whatever the grid (./log-round-principal.ts)
        im[k] = Math.atan2(tmp[1], tmp[0]);
      }
    },
    cumulants: (n) => {
      const k = rawToCumulants(Array.from({ length: n }, (_, i) => momA(i + 1)));
      if (n > 0 && k[0] !== null) k[0] = (a + b + c) / 3;
      return k;
    },
  };
}

/**
 * A bound on the triangular CF's absolute error as computed above (u = eps / 2, |phi| <= 1). Series (|t| w <= 2): the terms'
 * moduli sum to at most e^2, each within (4 k + 10) u (the running factor t^k / k! and the moment's positive sum), so
 * u sum (4 k + 10) 2^k / k! = 18 e^2 u < 134 u, the cut after a term below 1e-18 (ratio at most 2/5) under 2e-18, and e^{i t a}
 * at the rounded angle fl(t a): u |a t| <= 2 u |a| / w, with its own and the product's roundings 8 u. Divided differences
 * (|t| w > 2): in f[u, v] = i t e^{i t u} E1(i y), y = t (v - u) within 2 u |y|, |E1| <= 1, |dE1 / dy| <= 1 / 2, sin / cos and
 * the products 12 u, and the angle t u within u |t u|: |t| u (|t u| + |y| + 12) each; phi = -2 (f[c, b] - f[a, c]) / (w t^2),
 * so 2 u (|a| + |c| + w) / w + 48 u / (w |t|) + 5 u <= 2 u (|a| + |c|) / w + 31 u (w |t| > 2). Doubled for the roundings
 * taken one ulp at a time above: (4 (|a| + |c|) / w + 300) u.
 */
function triangularCfError(a: number, c: number, w: number): number {
  return ((4 * (Math.abs(a) + Math.abs(c))) / w + 300) * (Number.EPSILON / 2) * (1 + 8 * Number.EPSILON);
}
