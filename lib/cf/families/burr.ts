/** Burr XII (and log-logistic, its alpha = 1 case): the CF by quadrature on a shifted contour. */
import { cumulantList, rawToCumulants, type Node } from "../node";
import { arithmeticNodes, contourLogCfArithmetic, contourPhi, expSumArithmetic, fromPhi, type Contour } from "./cf-quadrature";
import { lgamma } from "./special";
import { MAX_QUADRATURE_NODES, quadratureNodes, ruleRounding } from "./numeric-rule";
import { SERIES_TOLERANCE, burrExpansion, burrSeries, weibullAsymptotic } from "./asymptotic";
import { fromPhiDamped } from "../damped-cf";
import { burrDist } from "./dist";
import { KahanComplex } from "./kahan";
import { burrRemainder } from "../endpoint-remainder";
import { burrErrorAt } from "./burr-error";
import { withGgcLogRound } from "./log-round";
import { burrPhaseTail, withTabulatedLogRound } from "./log-round-table";

/**
 * Burr XII, Loss Models parameters: S(x) = (1 + (x/theta)^gamma)^(-alpha) (Klugman, Panjer & Willmot, Loss Models,
 * app. A.2.1). With x = theta e^s, L(s) = log(alpha gamma) + gamma s - (alpha+1) log(1 + e^{gamma s}), analytic for
 * |Im s| < pi/gamma; path Im s = theta0 = min(pi, pi/gamma)/2. E X^r = theta^r Gamma(1 + r/gamma) Gamma(alpha - r/gamma)
 * / Gamma(alpha) for r < alpha gamma (Loss Models app. A.2.1).
 */
export function burr(alpha: number, gamma: number, theta: number, name = "burr"): Node {
  const th = Math.min(Math.PI, Math.PI / gamma) / 2;
  const strip = 0.75 * th;
  // on the strip |1 + e^{gamma s}| >= sin(gamma (th + strip)) for the phase below pi; the density factor is at most
  // alpha gamma / sin^{alpha+1}
  const edge = Math.sin(Math.min(Math.PI - 1e-3, gamma * (th + strip)));
  const logM = Math.log(alpha * gamma) - (alpha + 1) * Math.log(Math.max(edge, 1e-3));
  const lag = Math.log(alpha * gamma);
  const gi = gamma * th;
  const cgi = Math.cos(gi);
  const sgi = Math.sin(gi);
  // log of the density factor exp(L(s)) at s = v + i p (g = gamma p, cg = cos g, sg = sin g)
  const logDensity = (v: number, cg: number, sg: number, g: number, out: Float64Array) => {
    const e = Math.exp(gamma * v);
    let lr: number;
    let li: number;
    if (gamma * v < 30) {
      const zr = 1 + e * cg;
      const zi = e * sg;
      lr = 0.5 * Math.log(zr * zr + zi * zi);
      li = Math.atan2(zi, zr);
    } else {
      // log(e^{gamma s}(1 + e^{-gamma s}))
      const f = 1 / e;
      lr = gamma * v + 0.5 * Math.log1p(2 * f * cg + f * f);
      li = g + Math.atan2(-f * sg, 1 + f * cg);
    }
    out[0] = lag + gamma * v - (alpha + 1) * lr;
    out[1] = g - (alpha + 1) * li;
  };
  const contour: Contour = {
    theta: th,
    strip,
    logM,
    what: name === "burr" ? `the burr with alpha = ${alpha}, gamma = ${gamma}` : `the ${name} with gamma = ${gamma}`,
    advice: "use a shape gamma (and alpha gamma) nearer 1",
    L: (v, out) => logDensity(v, cgi, sgi, gi, out),
    range(a) {
      // left: |L| ~ alpha gamma e^{gamma v}; right: e^{-alpha gamma v} and exp(-a e^v sin th)
      const right = Math.min((42 + Math.log(alpha * gamma)) / (alpha * gamma), Math.log(44 / (a * Math.sin(th))));
      const left = Math.min((-42 - Math.log(alpha * gamma)) / gamma, right - 45 / gamma);
      return [left, right];
    },
  };
  const phi = contourPhi(contour);
  // E exp(i z X) at z = x + i beta (beta >= 0), arg z = psi: on the path Im s = p the factor exp(i z theta e^s) has
  // modulus exp(-|z| theta e^v sin(psi + p)); p = min(th, pi/2 - psi) keeps psi + p and the strip of half-width
  // `strip` about the path inside (0, pi), so the step and the bound e^logM of the rule on the real-t path hold
  const hD = (2 * Math.PI * strip) / (40 + Math.max(0, logM));
  const ser = burrSeries(alpha, gamma);
  const ld = new Float64Array(2);
  const acc = new KahanComplex();
  const phiDamped = (x: number, beta: number, out: Float64Array) => {
    const a = Math.hypot(x, beta) * theta;
    if (a > 4 && weibullAsymptotic(ser, a, out, Math.atan2(x, beta) - Math.PI / 2)) return;
    const p = Math.min(th, Math.atan2(x, beta));
    const psi = Math.atan2(beta, x);
    const dec = Math.sin(psi + p);
    const g = gamma * p;
    const cg = Math.cos(g);
    const sg = Math.sin(g);
    const right = Math.min((42 + Math.log(alpha * gamma)) / (alpha * gamma), Math.log(44 / (a * dec)));
    const left = Math.min((-42 - Math.log(alpha * gamma)) / gamma, right - 45 / gamma);
    const n = quadratureNodes(Math.ceil((right - left) / hD), contour.what, contour.advice);
    const cp = Math.cos(psi + p);
    acc.reset();
    for (let j = 0; j <= n; j++) {
      const v = left + j * hD;
      logDensity(v, cg, sg, g, ld);
      const ev = a * Math.exp(v);
      const mr = ld[0] - ev * dec;
      if (mr < -800) continue;
      const mag = Math.exp(mr);
      const ph = ld[1] + ev * cp;
      acc.addPolar(mag, ph);
    }
    out[0] = acc.re * hD;
    out[1] = acc.im * hD;
  };
  // equispaced t (the inversion's nodes): the same rule summed across t (contourLogCfArithmetic). Its shortcuts add
  // sum_j |c_j| (e/25! + 80 eps) + n 1e-21, and sum_j |c_j| is the rule for int |exp L(v + i th)| dv: as cos(gamma th) >= 0,
  // |1 + e^{gamma s}|^2 >= 1 + e^{2 gamma v}, so with u = e^{gamma v} the integral is at most
  // alpha int_0^inf (1 + u^2)^{-(alpha+1)/2} du = alpha (sqrt(pi)/2) Gamma(alpha/2) / Gamma((alpha+1)/2) (DLMF 5.12.1);
  // the rule's sum exceeds the integral by at most h times the integrand's peak (it is unimodal in v: in u its log's
  // derivative has the sign of 1 + (1 - alpha) cos(gamma p) u - alpha u^2), which is at most alpha gamma (|1 + w| >=
  // max(1, |w|) when cos(arg w) >= 0); 1% for lgamma's and the products' rounding. A batch whose own bound comes out
  // larger goes back to the rule per t
  const absInt = 0.5 * Math.sqrt(Math.PI) * Math.exp(Math.log(alpha) + lgamma(alpha / 2) - lgamma((alpha + 1) / 2));
  const absSum = 1.01 * (absInt + hD * alpha * gamma);
  const batchError = absSum * (2e-25 + 80 * Number.EPSILON) + MAX_QUADRATURE_NODES * 1e-21;
  // Rounding of the rule per frequency (and of the batch's terms before they are summed), relative to each term in
  // units of u: the log-density lag + gamma v - (alpha + 1) log|1 + e^{gamma s}| and its phase ((alpha + 1)(2 gamma |v|
  // + 8) + |lag| + 2 gamma |v|), e^v within 2 (1 + |v|) carried into the decay and phase of exp(i z x), which the decay
  // bounds by (1 + cot(th / 2)) / e (every path has p >= th / 2), 8 for exp, cos, sin and the products; weighted by the
  // modulus bound alpha gamma e^{gamma v} (1 + e^{2 gamma v})^{-(alpha+1)/2} over the widest range a rule uses; then the
  // sum of its nodes (ruleRounding)
  const span = Math.max(45 / gamma, Math.max(0, 42 + lag) * (1 / (alpha * gamma) + 1 / gamma));
  const nMax = Math.ceil(span / hD) + 2;
  const cotH = 1 / Math.tan(th / 2);
  const vLo = Math.min((-42 - lag) / gamma, -span);
  let termErrors = 0;
  // a range wider than the node limit (gamma near 0) has no rule within it: no finite bound, and no loop over it
  if (!(nMax <= MAX_QUADRATURE_NODES)) termErrors = Infinity;
  else for (let j = 0; j <= nMax; j++) {
    const v = vLo + j * hD;
    const gv = gamma * v;
    const mod = hD * Math.exp(lag + gv - 0.5 * (alpha + 1) * (gv > 0 ? 2 * gv + Math.log1p(Math.exp(-2 * gv)) : Math.log1p(Math.exp(2 * gv))));
    termErrors += mod * ((alpha + 1) * (2 * Math.abs(gv) + 8) + Math.abs(lag) + 2 * Math.abs(gv) + (2 * (2 + Math.abs(v)) * (1 + cotH)) / Math.E + 8);
  }
  // the rules' own error (burrRuleError) and rounding, plus the batches' shortcuts; the damped transform's series
  // (a > 4, a route of its own) within SERIES_TOLERANCE when taken
  const cfError = Math.max(SERIES_TOLERANCE, burrRuleError(alpha, gamma, th, strip, hD, absInt) + ruleRounding(nMax, absSum, termErrors) + batchError);
  const perT = (t: Float64Array, re: Float64Array, im: Float64Array) => fromPhi(t, re, im, (x, out) => phi(x * theta, out));
  // Damped transform on equispaced t > 0 at one beta: one path Im s = p serves every z = t + i beta from the first t on
  // when p = min(th, pi/2 - arg z_0) (arg z falls as t grows, so psi + p stays in [p, pi/2] as on phiDamped's paths, and
  // |z| sin(psi + p) = t sin p + beta cos p grows with t, so the first t's ends serve all). Term j is
  // c_j exp(t e_j i e^{ip}), c_j = hD exp(L(v_j + ip) - beta e_j e^{ip}), e_j = theta e^{v_j}: summed across t by
  // recurrence; |c_j| <= hD |exp L(v_j + ip)|, so the bound above holds (gamma p <= pi/2). The first frequencies, where
  // arg z is near pi/2 and p would be small (slow decay for the later t), stay per point.
  const dampedSingle = fromPhiDamped(phiDamped);
  const lp = new Float64Array(2);
  const dampedBatch = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array): boolean => {
    const K = t.length;
    let i0 = 0;
    while (i0 < K && Math.PI / 2 - Math.atan2(beta, t[i0]) < strip) i0++;
    if (K - i0 < 64) return false;
    const z0 = Math.hypot(t[i0], beta) * theta;
    const p = Math.min(th, Math.PI / 2 - Math.atan2(beta, t[i0]));
    const dec = Math.sin(Math.atan2(beta, t[i0]) + p);
    const g = gamma * p;
    const cg = Math.cos(g);
    const sg = Math.sin(g);
    const right = Math.min((42 + Math.log(alpha * gamma)) / (alpha * gamma), Math.log(44 / (z0 * dec)));
    const left = Math.min((-42 - Math.log(alpha * gamma)) / gamma, right - 45 / gamma);
    const n = Math.ceil((right - left) / hD) + 1;
    if (!(n >= 2 && n <= MAX_QUADRATURE_NODES)) return false;
    const cRe = new Float64Array(n);
    const cIm = new Float64Array(n);
    const e = new Float64Array(n);
    const cp = Math.cos(p);
    const sp = Math.sin(p);
    for (let j = 0; j < n; j++) {
      const v = left + j * hD;
      e[j] = theta * Math.exp(v);
      logDensity(v, cg, sg, g, lp);
      const mr = lp[0] - beta * e[j] * cp;
      if (mr < -800) continue;
      const mag = hD * Math.exp(mr);
      const ph = lp[1] - beta * e[j] * sp;
      cRe[j] = mag * Math.cos(ph);
      cIm[j] = mag * Math.sin(ph);
    }
    const tb = t.subarray(i0);
    const sr = new Float64Array(K - i0);
    const si = new Float64Array(K - i0);
    if (expSumArithmetic(cRe, cIm, e, -sp, cp, tb, sr, si) > batchError) return false;
    if (i0 > 0) dampedSingle(beta, t.subarray(0, i0), re.subarray(0, i0), im.subarray(0, i0));
    for (let k = 0; k < K - i0; k++) {
      re[i0 + k] = Math.log(Math.hypot(sr[k], si[k]));
      im[i0 + k] = Math.atan2(si[k], sr[k]);
    }
    return true;
  };
  const damped = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    if (!(arithmeticNodes(t) && dampedBatch(beta, t, re, im))) dampedSingle(beta, t, re, im);
  };
  const errorAt = burrErrorAt(alpha, gamma, theta, th, hD, lag, vLo, cotH, nMax, cfError, burrRuleError(alpha, gamma, th, strip, hD, absInt), ser);
  const raw = (r: number) => theta ** r * Math.exp(lgamma(1 + r / gamma) + lgamma(alpha - r / gamma) - lgamma(alpha));
  const tail = alpha * gamma;
  const dist = burrDist(alpha, gamma, theta);
  const mean = tail > 1 ? raw(1) : theta * (2 ** (1 / alpha) - 1) ** (1 / gamma);
  const expansion = burrExpansion(alpha, gamma, theta);
  const node: Node = {
    kind: { type: "continuous" },
    momentIndex: tail,
    tails: { left: Infinity, right: tail },
    nodes: 1,
    notes: [`${name} CF computed by quadrature on a shifted contour (absolute error <= ${cfError.toPrecision(2)})`],
    cfAbsError: cfError,
    dampedLogCf: damped,
    ...(errorAt ? { dampedErrorAt: { cf: damped, at: errorAt } } : {}),
    laplaceExpansion: expansion,
    // the expansion's Watson remainder, bounded on a rotated ray (../endpoint-remainder.ts)
    ...(expansion ? { endpointRemainder: burrRemainder(alpha, gamma, theta, expansion) } : {}),
    severity: {
      name,
      pdf: dist.pdf,
      lo: 0,
      upper: (q) => theta * Math.expm1(-Math.log(q) / alpha) ** (1 / gamma),
      scale: theta,
      rootAtZero: gamma >= 1 ? 1 : Math.ceil(4 / gamma),
        tailIndex: tail,
    },
    dist,
    location: mean,
    scale: tail > 2 ? Math.sqrt(Math.max(raw(2) - raw(1) ** 2, 0)) : theta,
    support: [0, Infinity],
    logCf: (t, re, im) => {
      if (!arithmeticNodes(t) || contourLogCfArithmetic(contour, theta, t, re, im) > batchError) perT(t, re, im);
    },
    cumulants: (m) => rawToCumulants(cumulantList(m, tail, raw)),
  };
  // claim-law rounding: theta Y^{1/gamma}, Y Lomax (beta prime (1, alpha), hyperbolically completely monotone); HCM is closed
  // under powers |q| >= 1 (Bondesson 1992), so for gamma <= 1 a generalized gamma convolution (./log-round.ts ggcLogRound),
  // where the mean is finite (alpha gamma > 1); above, by the phase table (./log-round-table.ts)
  if (!(tail > 1)) return node;
  if (gamma <= 1) return withGgcLogRound(node, raw(1));
  const phase = burrPhaseTail(alpha, gamma, theta);
  return phase ? withTabulatedLogRound(node, { mean: raw(1), logCf: node.logCf, err: cfError, slope: phase.slope, tail: phase, budget: 2048 }) : node;
}

/**
 * The Burr rule's own error at z = t + i beta (t > 0, beta >= 0), every route (per t, per z, the equispaced batches),
 * each a trapezoidal rule of step h on a path Im s = p <= th with the strip |Im s - p| < a = 0.75 th about it. At
 * s = v + i phi in the strip, |exp(i z theta e^s)| = exp(-|z| theta e^v sin(psi + phi)) <= 1 (psi + phi stays in (0, pi),
 * see burr's paths), and with u = e^{gamma v}, chi = gamma phi, int |exp L(s)| dv = int_0^inf alpha |1 + u e^{i chi}|^{-alpha-1}
 * du: at most absInt where cos chi >= 0 (|1 + u e^{i chi}|^2 >= 1 + u^2), and where cos chi < 0 at most
 * (alpha + 1) / sin(chi)^{alpha+1} (|1 + u e^{i chi}| >= sin(chi) max(1, u)); chi <= 1.75 gamma th < pi. So the aliasing
 * error is at most 2M/(e^{2 pi a/h} - 1) (Trefethen & Weideman 2014, SIAM Review 56(3), thm 5.1). The ends: below the
 * left one (v <= (-42 - log(alpha gamma))/gamma) the terms are at most h alpha gamma e^{gamma v} (|1 + w| >= 1) and sum to
 * at most alpha e^{gamma v_lo} <= e^-42 / gamma; beyond the right one either the density's terms h alpha gamma
 * e^{-alpha gamma v} (|1 + w| >= |w|) sum to at most e^-42 (1 + alpha gamma h) / (alpha gamma), or the decay there is
 * e^-44 and the terms (density at most alpha gamma, decay exponent growing like 44 e^{jh} >= 44 (1 + jh)) sum to at most
 * alpha gamma e^-44 / 44. Terms dropped below e^-800 add nothing in double. exp within one ulp (the project's standing
 * assumption), 1 + 16 eps.
 */
function burrRuleError(alpha: number, gamma: number, th: number, a: number, h: number, absInt: number): number {
  const chi = gamma * (th + a);
  const logM = chi <= Math.PI / 2 ? Math.log(absInt) : Math.max(Math.log(absInt), Math.log(alpha + 1) - (alpha + 1) * Math.log(Math.sin(chi)));
  const q = (2 * Math.PI * a) / h;
  const alias = (2 * Math.exp(logM - q)) / -Math.expm1(-q);
  const ag = alpha * gamma;
  const ends = Math.exp(-42) / gamma + Math.max((Math.exp(-42) * (1 + ag * h)) / ag, (ag * Math.exp(-44)) / 44);
  return (alias + ends) * (1 + 16 * Number.EPSILON);
}
