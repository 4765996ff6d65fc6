import { gamma as gammaFn } from "./special";
import { rawToCumulants, type Node } from "../node";
import { fromPhiDamped } from "../damped-cf";
import { arithmeticNodes, expSumArithmetic, fromPhi } from "./cf-quadrature";
import { SERIES_TOLERANCE, seriesBoundEnvelope, weibullAsymptotic, weibullExpansion, weibullSeries } from "./asymptotic";
import { COMPLEX_SHIFT_MAX_COT, SUM_MOMENT_UNITS, complexShiftUnits, logFromSums, quadratureNodes, ruleRounding } from "./numeric-rule";
import { KahanComplex } from "./kahan";
import { scratch } from "../damped-scratch";
import { weibullRemainder } from "../endpoint-remainder";
import { decayTable } from "./decay-table";
import { withGgcLogRound } from "./log-round";
import { weibullPhaseTail, withTabulatedLogRound } from "./log-round-table";

export { NUMERIC_CF_ABS_ERROR, MAX_QUADRATURE_NODES } from "./numeric-rule";
export { lognormal, lognormalCumulants } from "./lognormal";

const U = Number.EPSILON / 2;

/**
 * Weibull(shape k, scale lambda): with x = lambda e^s, s has density k e^{ks} exp(-e^{ks}). For t > 0 the path is moved
 * to Im s = theta = min(pi, pi/(2k))/2, inside the sector where both exp(-e^{ks}) and exp(i t x) decay; trapezoidal rule
 * with the step set from the strip half-width 0.75 theta (Trefethen & Weideman 2014, SIAM Review 56(3), thm 5.1), its
 * error derived in weibullRuleError.
 */
export function weibull(k: number, lambda: number): Node {
  const thetaMax = Math.min(Math.PI, Math.PI / (2 * k));
  const theta = thetaMax / 2;
  const h = (2 * Math.PI * 0.75 * theta) / 42;
  const cosK = Math.cos(k * theta);
  const sLo = -40 / k;
  const sHi = Math.log(45 / cosK) / k;
  const n = quadratureNodes(Math.ceil((sHi - sLo) / h) + 1, `the weibull shape ${k}`, "use a shape between 3e-4 and 1e307.");
  const es = new Float64Array(n);
  const amp0 = new Float64Array(n);
  const ph0 = new Float64Array(n);
  const sinK = Math.sin(k * theta);
  const eksA = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const s = sLo + j * h;
    const eks = Math.exp(k * s);
    eksA[j] = eks;
    es[j] = Math.exp(s);
    amp0[j] = h * k * eks * Math.exp(-eks * cosK);
    ph0[j] = k * theta - eks * sinK;
  }
  const ser = weibullSeries(k);
  const amp1 = new Float64Array(n);
  const ph1 = new Float64Array(n);
  // at z = x + i beta the rotated path gives i z x e^{i theta} real part -(x sin theta + beta cos theta) x <= 0
  const acc = new KahanComplex();
  const phiAt = (x: number, beta: number, out: Float64Array) => {
    const a = Math.hypot(x, beta) * lambda;
    // -i z lambda = a e^{-i phi}, phi = atan2(x, beta): the series terms turn by p (phi - pi/2) against beta = 0
    if (a > 4 && weibullAsymptotic(ser, a, out, Math.atan2(x, beta) - Math.PI / 2)) return;
    // the path angle: theta, or less where arg z is large (damped transform near t = 0), as for the lognormal
    const th = Math.min(theta, Math.atan2(x, beta));
    let A = amp0;
    let P = ph0;
    if (th < theta) {
      const ck = Math.cos(k * th);
      const sk = Math.sin(k * th);
      for (let j = 0; j < n; j++) {
        amp1[j] = h * k * eksA[j] * Math.exp(-eksA[j] * ck);
        ph1[j] = k * th - eksA[j] * sk;
      }
      A = amp1;
      P = ph1;
    }
    const sn = Math.sin(th);
    const cs = Math.cos(th);
    const dr = (x * sn + beta * cs) * lambda;
    const pr = (x * cs - beta * sn) * lambda;
    acc.reset();
    for (let j = 0; j < n; j++) {
      const damp = dr * es[j];
      if (damp > 45) break;
      const amp = A[j] * Math.exp(-damp);
      const ph = P[j] + pr * es[j];
      acc.addPolar(amp, ph);
    }
    out[0] = acc.re;
    out[1] = acc.im;
  };
  // the same rule for equispaced t (the inversion's nodes), valid at every t (the series above is not needed):
  // term j is amp0_j e^{i ph0_j} exp(t e_j i e^{i theta}), e_j = lambda e^{s_j}, summed by expSumArithmetic (with its
  // shifted moments at the complex w = i e^{i theta}, their rounding in complexShiftUnits)
  const qRe = new Float64Array(n);
  const qIm = new Float64Array(n);
  const qE = new Float64Array(n);
  let aSum = 0;
  for (let j = 0; j < n; j++) {
    qRe[j] = amp0[j] * Math.cos(ph0[j]);
    qIm[j] = amp0[j] * Math.sin(ph0[j]);
    qE[j] = lambda * es[j];
    aSum += amp0[j];
  }
  // From the top frequency down, as long as the large-t series holds there with its bound (phiAt's own route, within the
  // same stated error), the series answers; the rule's sums run only over the frequencies below (their cost is per node
  // and frequency, the series' a few terms per frequency). Below shape 0.75 the series needs more terms near a = 4 than
  // the rule costs (measured: shape 0.5 took twice the rule's time, shapes 0.8 to 2.1 1.2 to 2.3 times less)
  const seriesTop = k >= 0.75;
  // the complex shifted moments (their rounding grows with cot theta: shapes up to about 3.2)
  const shiftComplex = 1 / Math.tan(theta) <= COMPLEX_SHIFT_MAX_COT;
  const one = new Float64Array(2);
  const logCfArithmetic = (t: Float64Array, re: Float64Array, im: Float64Array) => {
    const K = t.length;
    // reused buffers (../damped-scratch.ts), every entry written below before it is read
    const sr = scratch("expSr", K);
    const si = scratch("expSi", K);
    let cut = K;
    while (seriesTop && cut > 0 && t[cut - 1] * lambda > 4 && weibullAsymptotic(ser, t[cut - 1] * lambda, one, 0)) {
      cut--;
      sr[cut] = one[0];
      si[cut] = one[1];
    }
    if (cut >= 2) expSumArithmetic(qRe, qIm, qE, -Math.sin(theta), Math.cos(theta), t.subarray(0, cut), sr.subarray(0, cut), si.subarray(0, cut), shiftComplex);
    else if (cut === 1) {
      phiAt(t[0], 0, one);
      sr[0] = one[0];
      si[0] = one[1];
    }
    logFromSums(t, sr, si, re, im, 0, 0, 0);
  };
  // sum |c_j| ~ 1 / cos(k theta) <= sqrt 2: the shortcuts add ~ 4e-14. Rounding of the terms, relative, in units of u:
  // e^{ks} within 2 (1 + k|s|) (also on the shallower paths of the damped transform), carried into the weight's decay
  // e^{ks} cos(k th) and phase e^{ks} sin(k th); e^s within 2 (1 + |s|), carried into the decay and phase of
  // exp(i z x), which the decay bounds by (1 + cot theta) / e (as for the lognormal); 8 for the products and the
  // library functions; then the sum (ruleRounding)
  const cot = 1 / Math.tan(theta);
  let termErrors = 0;
  for (let j = 0; j < n; j++) {
    const s = sLo + j * h;
    const kap = 8 + 2 * (1 + k * Math.abs(s)) * (1 + 2 * eksA[j]) + (2 * (2 + Math.abs(s)) * (1 + cot)) / Math.E;
    termErrors += amp0[j] * kap;
  }
  // the large-t series answers only where its own bound (remainder and rounding) is below SERIES_TOLERANCE
  const cfError = Math.max(
    SERIES_TOLERANCE,
    weibullRuleError(k, theta, h, cosK) + aSum * (2e-25 + 96 * Number.EPSILON) + n * 1e-21 + ruleRounding(n, aSum, termErrors, shiftComplex ? complexShiftUnits(cot) : SUM_MOMENT_UNITS),
  );
  // Per frequency (Node.dampedErrorAt, the damped transform phiAt gives): where the series may answer, the larger of a
  // bound on its own bound (seriesBoundEnvelope) and the rule's; the rule's error (weibullRuleError) and its rounding,
  // each part of which is relative to the terms' moduli at that
  // frequency, A_j e^{-D_j}, A_j <= amp0_j (the path angle th <= theta: cos(k th) >= cos(k theta)), D_j = dr e^{s_j} with
  // dr >= lambda x sin(theta) (th = theta, or th = arg-complement of z and then dr = lambda |z|): the units of termErrors,
  // with the e^s part (2 (2 + |s|) u (D + |phase|) <= 2 (2 + |s|) (1 + cot theta) u D, as the phase's part is at most
  // cot(theta) D on every path) taken through D e^{-D} <= (2/e) e^{-D/2}, plus the compensated sum's 2 sqrt 2 + 8 n u, all
  // against e^{-D_j / 2} (decayTable); exp, log within one ulp, the table's own rounding in decayTable
  const perTerm = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const s = sLo + j * h;
    const kap = 8 + 2 * (1 + k * Math.abs(s)) * (1 + 2 * eksA[j]) + (4 * (2 + Math.abs(s)) * (1 + cot)) / Math.E + 2 * Math.SQRT2 + 8 * n * U;
    perTerm[j] = amp0[j] * kap;
  }
  const roundAt = decayTable(perTerm, es);
  const ruleAt = weibullRuleError(k, theta, h, cosK);
  const sinT = Math.sin(theta);
  const series = seriesBoundEnvelope(ser);
  const errorAt = (beta: number, t: number) => {
    const x = Math.abs(t);
    if (!(x > 0)) return cfError;
    const a = Math.hypot(x, beta) * lambda;
    const rule = (ruleAt + U * roundAt((lambda * x * sinT) / 2)) * (1 + 16 * Number.EPSILON);
    return Math.min(cfError, Math.max(rule, series(a)));
  };
  const dampedLogCf = fromPhiDamped(phiAt);
  const raw = (m: number) => lambda ** m * gammaFn(1 + m / k);
  const mean = raw(1);
  const expansion = weibullExpansion(k, lambda);
  const node: Node = {
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [`weibull CF computed by quadrature on a rotated contour (absolute error <= ${cfError.toPrecision(2)})`],
    cfAbsError: cfError,
    dampedLogCf,
    dampedErrorAt: { cf: dampedLogCf, at: errorAt },
    laplaceExpansion: expansion,
    // the expansion's Watson remainder, bounded on a rotated ray (../endpoint-remainder.ts)
    ...(expansion ? { endpointRemainder: weibullRemainder(k, lambda, expansion) } : {}),
    // density (k/lambda)(x/lambda)^(k-1) e^{-(x/lambda)^k}, sf e^{-(x/lambda)^k} (JKB vol. 1, ch. 21)
    severity: {
      name: "weibull",
      pdf: (x) => (x > 0 ? (k / lambda) * (x / lambda) ** (k - 1) * Math.exp(-((x / lambda) ** k)) : 0),
      lo: 0,
      upper: (q) => lambda * (-Math.log(q)) ** (1 / k),
      scale: lambda,
      rootAtZero: Number.isInteger(k) ? 1 : Math.ceil(4 / k),
      tailIndex: Infinity,
    },
    location: mean,
    scale: Math.sqrt(Math.max(raw(2) - mean * mean, 0)) || lambda,
    support: [0, Infinity],
    logCf: (t, re, im) => (arithmeticNodes(t) ? logCfArithmetic(t, re, im) : fromPhi(t, re, im, (x, out) => phiAt(x, 0, out))),
    // E X^n = lambda^n Gamma(1 + n/k) (JKB vol. 1, ch. 21)
    cumulants: (m) => rawToCumulants(Array.from({ length: m }, (_, i) => raw(i + 1))),
  };
  // claim-law rounding: shape <= 1 is E^{1/k}, E exponential, hyperbolically completely monotone (HCM is closed under
  // powers |q| >= 1, Bondesson 1992), so a generalized gamma convolution (./log-round.ts ggcLogRound); above, by the
  // phase table from phiAt and its per-frequency error (./log-round-table.ts)
  if (k <= 1) return withGgcLogRound(node, mean);
  const tail = weibullPhaseTail(k, lambda);
  return tail ? withTabulatedLogRound(node, { mean, logCf: node.logCf, err: cfError, slope: tail.slope, tail, budget: 2048 }) : node;
}

/**
 * The Weibull rule's own error at z = t + i beta (t, beta >= 0), any route. The path's angle th = min(theta, pi/2 - psi),
 * psi = arg z; in the strip |Im| < a = 0.75 theta about it the integrand k e^{k v} exp(-e^{k v}) exp(i z lambda e^v) has,
 * at angle phi = th + b, |.| = k e^{k Re v} exp(-e^{k Re v} cos(k phi)) exp(-|z| lambda e^{Re v} sin(psi + phi)): the last
 * factor is at most 1 while 0 <= psi + phi <= pi (psi + th - a >= min(theta, pi/2) - 0.75 theta > 0, and
 * psi + th + a <= pi/2 + 0.75 pi/2), and k |phi| <= 1.75 k theta <= 7 pi/16 < pi/2, so int |.| <= M = 1/cos(1.75 k theta):
 * the aliasing error is at most 2M/(e^{2 pi a/h} - 1) (Trefethen & Weideman 2014, SIAM Review 56(3), thm 5.1). The sum
 * runs over s in [-40/k, log(45/cos(k theta))/k]: below, the terms (each at most h k e^{ks}, increasing) sum to at most
 * e^{-40}; above, to at most int k e^{ks} exp(-e^{ks} cos k theta) = e^-45 / cos(k theta); and the terms a route drops
 * for a decay e^-damp below e^-45 to at most e^-45 (1 + h k / e) / cos(k theta) (their weights' sum). exp and cos within
 * one ulp (the project's standing assumption), covered by 1 + 16 eps.
 */
function weibullRuleError(k: number, theta: number, h: number, cosK: number): number {
  const M = 1 / Math.cos(1.75 * k * theta);
  const alias = (2 * M) / Math.expm1((2 * Math.PI * 0.75 * theta) / h);
  const ends = Math.exp(-40) + Math.exp(-45) / cosK + (Math.exp(-45) * (1 + (h * k) / Math.E)) / cosK;
  return (alias + ends) * (1 + 16 * Number.EPSILON);
}

export { pareto } from "./pareto";
