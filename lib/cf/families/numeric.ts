import { gamma as gammaFn, lgamma } from "./special";
import { cumulantList, rawToCumulants, type Node } from "../node";
import { fromPhiDamped } from "../damped-cf";
import { arithmeticNodes, expSumArithmetic, fromPhi } from "./cf-quadrature";
import { SERIES_TOLERANCE, paretoExpansion, paretoSeries, weibullAsymptotic, weibullExpansion, weibullSeries } from "./asymptotic";
import { MAX_QUADRATURE_NODES, logFromSums, quadratureNodes, ruleRounding } from "./numeric-rule";
import { KahanComplex } from "./kahan";
import { checkDeadline } from "../deadline";
import { scratch } from "../damped-scratch";

export { NUMERIC_CF_ABS_ERROR, MAX_QUADRATURE_NODES } from "./numeric-rule";
export { lognormal, lognormalCumulants } from "./lognormal";

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
  // term j is amp0_j e^{i ph0_j} exp(t e_j i e^{i theta}), e_j = lambda e^{s_j}, summed by expSumArithmetic
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
  const one = new Float64Array(2);
  const logCfArithmetic = (t: Float64Array, re: Float64Array, im: Float64Array) => {
    const K = t.length;
    const sr = new Float64Array(K);
    const si = new Float64Array(K);
    let cut = K;
    while (seriesTop && cut > 0 && t[cut - 1] * lambda > 4 && weibullAsymptotic(ser, t[cut - 1] * lambda, one, 0)) {
      cut--;
      sr[cut] = one[0];
      si[cut] = one[1];
    }
    if (cut >= 2) expSumArithmetic(qRe, qIm, qE, -Math.sin(theta), Math.cos(theta), t.subarray(0, cut), sr.subarray(0, cut), si.subarray(0, cut));
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
  const cfError = Math.max(SERIES_TOLERANCE, weibullRuleError(k, theta, h, cosK) + aSum * (2e-25 + 96 * Number.EPSILON) + n * 1e-21 + ruleRounding(n, aSum, termErrors));
  const raw = (m: number) => lambda ** m * gammaFn(1 + m / k);
  const mean = raw(1);
  return {
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [`weibull CF computed by quadrature on a rotated contour (absolute error <= ${cfError.toPrecision(2)})`],
    cfAbsError: cfError,
    dampedLogCf: fromPhiDamped(phiAt),
    laplaceExpansion: weibullExpansion(k, lambda),
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

/**
 * Pareto(alpha, xm): phi(t) = e^{i t xm} int_0^inf e^{i t s} alpha xm^alpha (xm + s)^{-alpha-1} ds. For t > 0 the path is
 * rotated to s = i r (Jordan's lemma), giving phi(t) = e^{i t xm} (i alpha / tau) int_0^inf e^{-u} (1 + i u/tau)^{-alpha-1} du,
 * tau = xm t; computed with u = e^v by the trapezoidal rule (strip |Im v| < pi/4), its error derived in paretoRuleError.
 * The nodes run from v = -40, and further down to log |tau| - 40 - log max(alpha, 1) for small |tau| (an extension built
 * on demand): the terms below the range sum to at most e^{v_lo} (each at most h e^v, as |1 + i u / tau| >= 1), which the
 * prefactor alpha / |tau| would otherwise lift past any fixed bound (at t = 1e-12 the fixed range was off by 1e-5).
 */
/**
 * The Pareto rule's own error on phi, every route and every tau (u = e^v, or u = tau r on the equispaced route, with the
 * same step h and strip |Im v| < a = pi/4). On the strip |e^{v - e^v}| <= e^{Re v} and |1 + i rho e^{i gamma}| >=
 * max(1/sqrt 2, rho - 1) (gamma within pi/4 of the right half-plane's directions), so int |f| <= |tau| sqrt(2)^q
 * (1 + 1/sqrt 2 + 1/(sqrt 2 alpha)) (in rho = e^{Re v} / |tau|), which the prefactor alpha / |tau| turns into
 * sqrt(2)^q (1.7072 alpha + 0.7072): the aliasing error is at most twice that over e^{2 pi a/h} - 1 (Trefethen & Weideman
 * 2014, SIAM Review 56(3), thm 5.1). Below the range: e^{v_lo} alpha / |tau| <= e^-40 (v_lo chosen so, see pareto);
 * above u = 45: alpha / |tau| int_45^inf e^{-u} min(1, (|tau| / u)^q) du <= alpha e^-45 / 45. exp within one ulp (the
 * project's standing assumption), 1 + 16 eps.
 */
function paretoRuleError(alpha: number, h: number): number {
  const q = alpha + 1;
  // sqrt(2)^q / (e^{pi^2/(2h)} - 1) in logs (sqrt(2)^q overflows for large alpha; the step keeps the ratio small)
  const alias = 2 * (1.7072 * alpha + 0.7072) * Math.exp(0.5 * q * Math.LN2 - (Math.PI * Math.PI) / (2 * h)) / -Math.expm1(-(Math.PI * Math.PI) / (2 * h));
  return (alias + Math.exp(-40) + (alpha * Math.exp(-45)) / 45) * (1 + 16 * Number.EPSILON);
}

export function pareto(alpha: number, xm: number): Node {
  // log(2 M), M = sqrt(2)^(alpha + 2), without forming M (it overflows past alpha ~ 2044)
  const log2M = Math.LN2 + (alpha + 2) * 0.5 * Math.LN2;
  const h = Math.min(0.15, (Math.PI * Math.PI) / 2 / (40 + log2M));
  const vLo = -40;
  const vHi = Math.log(45);
  const n = quadratureNodes(Math.ceil((vHi - vLo) / h) + 1, `the tail index alpha = ${alpha}`, "use a tail index up to 3e5 (a larger one is a point mass at the minimum to double precision).");
  const ev = new Float64Array(n);
  const wv = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const vv = vLo + j * h;
    ev[j] = Math.exp(vv);
    wv[j] = h * Math.exp(vv - ev[j]);
  }
  const q = alpha + 1;
  // the nodes below v = -40, v = -40 - k h (k = 1, 2, ...), built as far down as a call has needed
  const lowU: number[] = [];
  const lowW: number[] = [];
  const lowFor = (tau: number) => {
    const vNeed = Math.log(tau) - 40 - Math.log(Math.max(alpha, 1));
    if (!(vNeed < vLo)) return 0;
    const k = quadratureNodes(n + Math.ceil((vLo - vNeed) / h), `the pareto CF at t = ${tau / xm}`, "use a larger t.") - n;
    for (let j = lowU.length + 1; j <= k; j++) {
      const vv = vLo - j * h;
      const u = Math.exp(vv);
      lowU.push(u);
      lowW.push(h * Math.exp(vv - u));
    }
    return k;
  };
  // at complex tau = xm (x + i beta) the same rotated integral holds (the path direction i / tau stays in the
  // right half-plane); (1 + i u / tau) and the factor (i alpha / tau) e^{i tau} in complex arithmetic, with tau's
  // direction (cr, ci) = (tr, ti) / |tau| so that nothing squares a small |tau|
  const acc = new KahanComplex();
  const phiAt = (x: number, beta: number, out: Float64Array) => {
    const tr = xm * x;
    const ti = xm * beta;
    const tau = Math.hypot(tr, ti);
    const cr = tr / tau;
    const ci = ti / tau;
    acc.reset();
    if (!(tau > 40 + 3 * alpha && paretoSeries(alpha, tau, Math.atan2(ti, tr), out))) {
      const term = (u: number, w: number) => {
        const ut = u / tau;
        const wr = 1 + ut * ci;
        const wi = ut * cr;
        const mag = w * Math.exp(-0.5 * q * Math.log(wr * wr + wi * wi));
        const ph = -q * Math.atan2(wi, wr);
        acc.addPolar(mag, ph);
      };
      for (let j = lowFor(tau) - 1; j >= 0; j--) term(lowU[j], lowW[j]);
      for (let j = 0; j < n; j++) term(ev[j], wv[j]);
      out[0] = acc.re;
      out[1] = acc.im;
    }
    // multiply by i alpha conj(tau) / |tau|^2 = alpha (ti + i tr) / |tau|^2, then by e^{i tau} = e^{-ti} e^{i tr}
    const fr = (alpha * ci) / tau;
    const fi = (alpha * cr) / tau;
    const ar = out[0] * fr - out[1] * fi;
    const ai = out[0] * fi + out[1] * fr;
    const e = Math.exp(-ti);
    const c = Math.cos(tr) * e;
    const sn = Math.sin(tr) * e;
    out[0] = ar * c - ai * sn;
    out[1] = ar * sn + ai * c;
  };
  // equispaced t (the inversion's nodes): with u = tau r the same integral is a Laplace transform,
  // phi(t) = e^{i tau} i alpha int_0^inf e^{-tau r} (1 + i r)^{-alpha-1} dr, and with r = e^v the trapezoidal rule
  // of the same step h (the same strip and bound, on a shifted grid) has nodes that do not depend on tau: the sum
  // over j of h r_j (1 + i r_j)^{-alpha-1} exp(-tau r_j) goes to expSumArithmetic. Range: the part r < r_lo is below
  // alpha r_lo <= 1e-19; beyond r_hi, below alpha min(e^{-tau r_hi}/tau, r_hi^{-alpha}/alpha) <= 1e-19 at the
  // smallest tau.
  // damped (beta > 0): at tau = xm (t + i beta) the same Laplace form holds while Re(tau r) >= 0 on the rule's strip
  // |arg r| < pi/4, i.e. arg tau <= pi/4 (t >= beta), where |exp(-tau r)| <= 1 as at real tau: the same step and bound.
  // exp(-tau r_j) = exp(-xm t r_j) exp(-i xm beta r_j), the second factor folded into the weights (its phase rounds within
  // u xm beta r_j of a term of size exp(-xm t r_j) <= exp(-xm beta r_j): below u / e of |c_j|), and the prefactor
  // e^{i tau} = e^{i xm t} e^{-xm beta}.
  // `rect`: phi itself into re, im (no log: a Poisson compound takes it as it is)
  const logCfArithmetic = (t: Float64Array, re: Float64Array, im: Float64Array, beta = 0, rect = false) => {
    const K = t.length;
    const tauMin = xm * t[0];
    const rLo = 1e-19 / alpha;
    const rHi = Math.max(1, Math.min((Math.log(alpha / tauMin) + 19 * Math.LN10) / tauMin, Math.pow(1e19, 1 / alpha)));
    const v0 = Math.log(rLo);
    const m = Math.ceil((Math.log(rHi) - v0) / h) + 1;
    // extreme tail indices (range empty or too long): the rule per frequency
    if (!(m >= 2 && m <= MAX_QUADRATURE_NODES)) return rect ? rectPhi(beta, t, re, im) : fromPhi(t, re, im, (x, out) => phiAt(x, beta, out));
    const cRe = new Float64Array(m);
    const cIm = new Float64Array(m);
    const e = new Float64Array(m);
    for (let j = 0; j < m; j++) {
      const r = Math.exp(v0 + j * h);
      // (1 + i r)^{-q} = (1 + r^2)^{-q/2} e^{-i q atan r}, times e^{-i xm beta r}
      const mag = h * r * Math.exp(-0.5 * q * Math.log1p(r * r));
      const ph = -q * Math.atan(r) - xm * beta * r;
      cRe[j] = mag * Math.cos(ph);
      cIm[j] = mag * Math.sin(ph);
      e[j] = r;
    }
    // reused buffers (../damped-scratch.ts), read before this returns
    const sr = scratch("expSr", K);
    const si = scratch("expSi", K);
    expSumArithmetic(cRe, cIm, e, -xm, 0, t, sr, si);
    // times i alpha e^{i tau}
    if (!rect) return logFromSums(t, sr, si, re, im, Math.log(alpha) - xm * beta, Math.PI / 2, xm);
    const g = alpha * Math.exp(-xm * beta);
    for (let k = 0; k < K; k++) {
      const c = Math.cos(xm * t[k]);
      const s = Math.sin(xm * t[k]);
      // i (sr + i si) = -si + i sr
      re[k] = g * (-si[k] * c - sr[k] * s);
      im[k] = g * (-si[k] * s + sr[k] * c);
    }
  };
  const perFrequency = fromPhiDamped(phiAt);
  // phi at each t by its own rule (t < 0 by conjugation), rectangular
  const tmp = new Float64Array(2);
  const rectPhi = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    for (let k = 0; k < t.length; k++) {
      if ((k & 15) === 0) checkDeadline("cf-quadrature");
      phiAt(Math.abs(t[k]), beta, tmp);
      re[k] = tmp[0];
      im[k] = t[k] < 0 ? -tmp[1] : tmp[1];
    }
  };
  // the damped route's equispaced frequencies: those below beta (and t <= 0) per frequency, the rest by the fixed nodes
  const dampedLogCf = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    let k0 = 0;
    while (k0 < t.length && !(t[k0] > 0 && t[k0] >= beta)) k0++;
    const tail = t.subarray(k0);
    if (!(beta >= 0) || !arithmeticNodes(tail)) return perFrequency(beta, t, re, im);
    if (k0 > 0) perFrequency(beta, t.subarray(0, k0), re.subarray(0, k0), im.subarray(0, k0));
    logCfArithmetic(tail, re.subarray(k0), im.subarray(k0), beta);
  };
  // the same routes, phi rectangular (the prefactor's phase tau = xm t taken by cos and sin: within u tau, covered as above)
  const dampedCf = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    let k0 = 0;
    while (k0 < t.length && !(t[k0] > 0 && t[k0] >= beta)) k0++;
    const tail = t.subarray(k0);
    if (!(beta >= 0) || !arithmeticNodes(tail)) return rectPhi(beta, t, re, im);
    if (k0 > 0) rectPhi(beta, t.subarray(0, k0), re.subarray(0, k0), im.subarray(0, k0));
    logCfArithmetic(tail, re.subarray(k0), im.subarray(k0), beta, true);
  };
  // sum_j |c_j| ~ int_0^inf (1 + r^2)^{-q/2} dr = (sqrt(pi)/2) Gamma(alpha/2) / Gamma((alpha+1)/2) (DLMF 5.12.1 with
  // r^2 = s / (1 - s)), 1% added for the rule; times alpha for the prefactor, in logs (Gamma(alpha/2) ~ 2/alpha overflows
  // for alpha near the smallest doubles while alpha Gamma(alpha/2) stays near 2)
  const aSum = 1.01 * 0.5 * Math.sqrt(Math.PI) * Math.exp(Math.log(alpha) + lgamma(alpha / 2) - lgamma((alpha + 1) / 2));
  // Rounding (units of u, relative to each term): |1 + i u/tau|^2 and its log times q/2 (2 q + 4), the phase q atan2
  // (2 q pi/2), exp, cos, sin and the products (8); the prefactor and e^{i tau} (8, and the phase tau within u tau, which
  // |phi| <= alpha / tau turns into alpha u); then the sum of n terms, whose moduli times alpha / |tau| sum to at most
  // aSum as the integral does (ruleRounding); the fixed nodes' shortcuts (expSumArithmetic: 80 eps and e/25! of aSum) and,
  // damped, their folded phase (below u / e of each weight: one eps more)
  // the large-t series answers where its remainder (below its first omitted term, each factor (1 + i u/tau)^{-q-j} of
  // Watson's remainder at most 1 in modulus) is below 1e-16 of its sum times alpha / tau < 1/3
  const cfError =
    paretoRuleError(alpha, h) + 1e-16 / 3 + aSum * (2e-25 + 97 * Number.EPSILON) + ruleRounding(n + Math.ceil(710 / h), aSum, aSum * (16 + (2 + Math.PI) * q)) + alpha * Number.EPSILON;
  const raw = (m: number) => (alpha * xm ** m) / (alpha - m);
  return {
    kind: { type: "continuous" },
    momentIndex: alpha,
    tails: { left: Infinity, right: alpha },
    nodes: 1,
    notes: [`pareto CF computed by quadrature on a rotated contour (absolute error <= ${cfError.toPrecision(2)})`],
    cfAbsError: cfError,
    dampedLogCf,
    dampedCf,
    laplaceExpansion: paretoExpansion(alpha, xm),
    // density alpha xm^alpha x^(-alpha-1) on [xm, inf), sf (xm/x)^alpha (JKB vol. 1, ch. 20)
    severity: {
      name: "pareto",
      pdf: (x) => (x >= xm ? (alpha / xm) * Math.exp(-(alpha + 1) * Math.log(x / xm)) : 0),
      lo: xm,
      upper: (q) => xm * q ** (-1 / alpha),
      scale: xm,
      rootAtZero: 1,
      tailIndex: alpha,
    },
    location: alpha > 1 ? raw(1) : xm * 2 ** (1 / alpha),
    scale: alpha > 2 ? Math.sqrt(raw(2) - raw(1) ** 2) : xm,
    support: [xm, Infinity],
    logCf: (t, re, im) => (arithmeticNodes(t) ? logCfArithmetic(t, re, im) : fromPhi(t, re, im, (x, out) => phiAt(x, 0, out))),
    // E X^n = alpha xm^n / (alpha - n), n < alpha (JKB vol. 1, ch. 20)
    cumulants: (m) => rawToCumulants(cumulantList(m, alpha, raw)),
  };
}
