// The pareto severity's CF by quadrature on a rotated contour, per frequency and for equispaced frequencies at once.
import { lgamma } from "./special";
import { cumulantList, rawToCumulants, type Node } from "../node";
import { fromPhiDamped } from "../damped-cf";
import { convexDensityModulus, withGgcLogRound } from "./log-round";
import { arithmeticNodes, expSumArithmetic, fromPhi } from "./cf-quadrature";
import { paretoExpansion, paretoSeries } from "./asymptotic";
import { MAX_QUADRATURE_NODES, logFromSums, quadratureNodes, ruleRounding } from "./numeric-rule";
import { KahanComplex } from "./kahan";
import { checkDeadline } from "../deadline";
import { scratch } from "../damped-scratch";
import { paretoRemainder } from "../endpoint-remainder";

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

/** t strictly ascending and positive (the per-frequency Laplace sums take their nodes from the smallest) */
function ascending(t: Float64Array): boolean {
  if (!(t.length > 0 && t[0] > 0)) return false;
  for (let k = 1; k < t.length; k++) if (!(t[k] > t[k - 1])) return false;
  return true;
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
  // the fixed nodes r_j and weights c_j of that rule for frequencies from tauMin = xm t_min on; null where the range is
  // empty or too long (extreme tail indices: the rule per frequency instead)
  const laplaceNodes = (tauMin: number, beta: number) => {
    const rLo = 1e-19 / alpha;
    const rHi = Math.max(1, Math.min((Math.log(alpha / tauMin) + 19 * Math.LN10) / tauMin, Math.pow(1e19, 1 / alpha)));
    const v0 = Math.log(rLo);
    const m = Math.ceil((Math.log(rHi) - v0) / h) + 1;
    if (!(m >= 2 && m <= MAX_QUADRATURE_NODES)) return null;
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
    return { cRe, cIm, e };
  };
  // times i alpha e^{i tau}: log phi (the phase unwrapped along t) or, `rect`, phi itself
  const fromSums = (t: Float64Array, sr: Float64Array, si: Float64Array, re: Float64Array, im: Float64Array, beta: number, rect: boolean) => {
    if (!rect) return logFromSums(t, sr, si, re, im, Math.log(alpha) - xm * beta, Math.PI / 2, xm);
    const g = alpha * Math.exp(-xm * beta);
    for (let k = 0; k < t.length; k++) {
      const c = Math.cos(xm * t[k]);
      const s = Math.sin(xm * t[k]);
      // i (sr + i si) = -si + i sr
      re[k] = g * (-si[k] * c - sr[k] * s);
      im[k] = g * (-si[k] * s + sr[k] * c);
    }
  };
  // `rect`: phi itself into re, im (no log: a Poisson compound takes it as it is)
  const logCfArithmetic = (t: Float64Array, re: Float64Array, im: Float64Array, beta = 0, rect = false) => {
    const K = t.length;
    const nodes = laplaceNodes(xm * t[0], beta);
    if (!nodes) return rect ? rectPhi(beta, t, re, im) : fromPhi(t, re, im, (x, out) => phiAt(x, beta, out));
    const { cRe, cIm, e } = nodes;
    // reused buffers (../damped-scratch.ts), read before this returns
    const sr = scratch("expSr", K);
    const si = scratch("expSi", K);
    expSumArithmetic(cRe, cIm, e, -xm, 0, t, sr, si);
    fromSums(t, sr, si, re, im, beta, rect);
  };
  // t >= beta > 0 ascending but not equispaced (a plan's geometric probe): below the series' reach the same nodes and
  // weights summed at each frequency on its own (compensated, every node: no recurrence and no shortcut, so within the
  // equispaced route's bound; exp(-xm t r_j) from its argument as the recurrence's restarts take it), one exp a node in
  // place of the u-rule's log, atan2, exp, cos and sin; the series' frequencies (tau > 40 + 3 alpha) by phiAt as before
  const laplaceEach = (t: Float64Array, re: Float64Array, im: Float64Array, beta: number, rect: boolean): boolean => {
    const K = t.length;
    let kEnd = 0;
    while (kEnd < K && xm * t[kEnd] <= 40 + 3 * alpha) kEnd++;
    const nodes = kEnd > 0 ? laplaceNodes(xm * t[0], beta) : null;
    if (!nodes) return false;
    const { cRe, cIm, e } = nodes;
    const sr = scratch("expSr", kEnd);
    const si = scratch("expSi", kEnd);
    for (let k = 0; k < kEnd; k++) {
      if ((k & 15) === 0) checkDeadline("cf-quadrature");
      const w = -xm * t[k];
      let ar = 0;
      let ai = 0;
      let cr = 0;
      let ci = 0;
      for (let j = 0; j < e.length; j++) {
        const x = Math.exp(w * e[j]);
        const yr = cRe[j] * x - cr;
        const tr = ar + yr;
        cr = tr - ar - yr;
        ar = tr;
        const yi = cIm[j] * x - ci;
        const ti = ai + yi;
        ci = ti - ai - yi;
        ai = ti;
      }
      sr[k] = ar;
      si[k] = ai;
    }
    fromSums(t.subarray(0, kEnd), sr, si, re.subarray(0, kEnd), im.subarray(0, kEnd), beta, rect);
    if (kEnd < K) (rect ? rectPhi : perFrequency)(beta, t.subarray(kEnd), re.subarray(kEnd), im.subarray(kEnd));
    return true;
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
    const each = beta >= 0 && !arithmeticNodes(tail) && ascending(tail);
    if (!(beta >= 0) || (!arithmeticNodes(tail) && !each)) return perFrequency(beta, t, re, im);
    if (k0 > 0) perFrequency(beta, t.subarray(0, k0), re.subarray(0, k0), im.subarray(0, k0));
    if (!each) logCfArithmetic(tail, re.subarray(k0), im.subarray(k0), beta);
    else if (!laplaceEach(tail, re.subarray(k0), im.subarray(k0), beta, false)) perFrequency(beta, tail, re.subarray(k0), im.subarray(k0));
  };
  // the same routes, phi rectangular (the prefactor's phase tau = xm t taken by cos and sin: within u tau, covered as above)
  const dampedCf = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    let k0 = 0;
    while (k0 < t.length && !(t[k0] > 0 && t[k0] >= beta)) k0++;
    const tail = t.subarray(k0);
    const each = beta >= 0 && !arithmeticNodes(tail) && ascending(tail);
    if (!(beta >= 0) || (!arithmeticNodes(tail) && !each)) return rectPhi(beta, t, re, im);
    if (k0 > 0) rectPhi(beta, t.subarray(0, k0), re.subarray(0, k0), im.subarray(0, k0));
    if (!each) logCfArithmetic(tail, re.subarray(k0), im.subarray(k0), beta, true);
    else if (!laplaceEach(tail, re.subarray(k0), im.subarray(k0), beta, true)) rectPhi(beta, tail, re.subarray(k0), im.subarray(k0));
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
  // Per frequency (Node.dampedErrorAt): every rounding above is relative to the moduli of the terms summed, and those fall
  // like 1 / (xm t). Laplace route: |c_j| <= h r_j, so the terms' moduli sum to at most sum_j h r_j e^{-xm t r_j}, the
  // trapezoidal rule for int_0^inf e^{-tau r} dr = 1 / tau (tau = xm t) in v = log r, within 2 sqrt(2) / tau over
  // e^{pi^2 / (2 h)} - 1 (< 1e-13 for h <= 0.15) on the strip |Im v| < pi/4 (there |e^{v - tau e^v}| <= e^{x - tau e^x / sqrt 2},
  // whose integral is sqrt(2) / tau; the same theorem); expSumArithmetic's shortcut errors are relative to |c_j| e^{-D} with
  // D within 1 of xm t r_j (moment nodes: t_end e_j |w| <= 1; shifted blocks: SHIFT_BLOCK d e_j |w| <= 1; the recurrence:
  // relative to the current term), a factor e at most; the damped phase folded into c_j rounds within u xm beta r_j of
  // each term, summing to u xm beta / tau^2 <= u / tau (t >= beta). The u-rule: |1 + i u / tau| >= 1 and sum_j w_j is the
  // same rule for int e^{v - e^v} dv = 1, so the moduli times alpha / |tau| are at most alpha (1 + 1e-13) / (xm t). The
  // series (tau > 40 + 3 alpha): terms (alpha + 1)_j / |tau|^j, non-increasing, at most 2^-j while the ratio is below 1/2
  // and at most 2^-18 for the |tau| or fewer beyond, summing to below 2.001. All times e^{-xm beta} (|e^{i tau}|). So the
  // rounding part, per unit of aSum, is charged on min(aSum, e alpha e^{-xm beta} (1 + 1e-13) / (xm t)); the rule's
  // aliasing and range, the series' remainder, the phase tau's alpha u and the dropped terms (expSumArithmetic: each below
  // 1e-21 times g <= alpha, at most mMax of them, the Laplace range's node count at any tau) stay constant.
  const roundPart = aSum * (2e-25 + 97 * Number.EPSILON) + ruleRounding(n + Math.ceil(710 / h), aSum, aSum * (16 + (2 + Math.PI) * q));
  const mMax = Math.min(MAX_QUADRATURE_NODES, Math.ceil((Math.max(0, (19 * Math.LN10) / alpha) + 19 * Math.LN10 + Math.max(0, Math.log(alpha))) / h) + 2);
  const constPart = paretoRuleError(alpha, h) + 1e-16 / 3 + alpha * mMax * 1e-21;
  /** the error at frequency t (damping beta) of the damped transform moved by `shift` (its factor e^{-beta shift}) */
  // (the two exponents in one exp: lomax's cancel exactly, where e^{-xm beta} alone could underflow; a numerator below 1e-290,
  // perhaps underflowed, is taken as 1e-290, and a denominator below it, t = 0 included, takes the constant)
  const errorAt = (shift: number) => (beta: number, t: number) => {
    const g = Math.exp(-beta * shift);
    const num = Math.E * alpha * Math.exp(-xm * beta - beta * shift) * (1 + 1e-13);
    const den = xm * Math.abs(t);
    const f = den >= 1e-290 ? Math.min(aSum * g, Math.max(num, 1e-290) / den) : aSum * g;
    // the phase tau = xm t within u tau: alpha eps (the constant's), or per frequency u tau |phi~| <= u (alpha + 2 alpha
    // (alpha + 1) / (xm t)) e^{-xm beta} (convexDensityModulus below: |w| >= t), half of it far out
    const far = den >= 1e-290 ? 0.5 * Number.EPSILON * (alpha + (2 * alpha * (alpha + 1)) / den) * Math.exp(-xm * beta - beta * shift) * (1 + 1e-13) : Infinity;
    const phase = Math.min(alpha * Number.EPSILON * g, far);
    return Math.min(cfError, (constPart * g + phase + (roundPart / aSum) * f) * (1 + 8 * Number.EPSILON));
  };
  // |E e^{(i t - beta) X}| <= e^{-beta xm} (X >= xm), and by parts with the density falling from alpha / xm to 0 at most
  // 2 (alpha / xm) e^{-beta xm} / |i t - beta| (decreasingDensityModulus); the density is convex with f'(xm) =
  // -alpha (alpha + 1) / xm^2, so also (alpha / xm) e^{-beta xm} / |w| + 2 alpha (alpha + 1) e^{-beta xm} / (xm^2 |w|^2)
  // (convexDensityModulus)
  const byParts = convexDensityModulus(xm, alpha / xm, (alpha * (alpha + 1)) / (xm * xm));
  const modulus = (beta: number, t: number) => Math.min(Math.exp(-beta * xm) * (1 + 4 * Number.EPSILON), byParts(beta, t));
  const raw = (m: number) => (alpha * xm ** m) / (alpha - m);
  const expansion = paretoExpansion(alpha, xm);
  const node: Node = {
    kind: { type: "continuous" },
    momentIndex: alpha,
    tails: { left: Infinity, right: alpha },
    nodes: 1,
    notes: [`pareto CF computed by quadrature on a rotated contour (absolute error <= ${cfError.toPrecision(2)})`],
    cfAbsError: cfError,
    dampedLogCf,
    dampedCf,
    dampedErrorAt: { cf: dampedLogCf, rect: dampedCf, at: errorAt(0), shifted: errorAt, modulus },
    laplaceExpansion: expansion,
    // the expansion's Watson remainder, bounded (../endpoint-remainder.ts): a compound's kernels leave a derived remainder
    endpointRemainder: paretoRemainder(alpha, xm, expansion),
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
  // claim-law rounding: xm (1 + Y), Y Lomax, a generalized gamma convolution moved right (Thorin 1977, Scand. Actuarial J., recalled from memory; ./log-round.ts
  // ggcLogRound), for a finite mean; its density alpha xm^alpha x^(-alpha-1) decreases from alpha / xm; drift xm (the
  // support's start), Thorin mass at most 1 (the Lomax's density at 0, alpha / xm, is finite and positive). Its damped log
  // rounds within u (6 |Re L| + 3 |Im L| + 3 |log alpha| + 7 pi + 4): per frequency log|phi| (hypot 2u relative, log u |.|)
  // and atan2 (4u pi); on the rule's sums (logFromSums) log alpha - xm beta + log|S| (xm beta <= |Re L|, as |phi~| <=
  // e^{-xm beta}) and the phase a + pi/2 + xm t, a in [-pi/2, 0] (the Lomax part's, so no unwrap), three roundings of
  // at most |Im L| + pi/2 each; fromPhi's unwrap one product and one difference (fl(2 pi) 0.36u relative) of |Im L| + pi
  const units = { re: 6, im: 3, c: 3 * Math.abs(Math.log(alpha)) + 7 * Math.PI + 4 };
  return alpha > 1 ? withGgcLogRound(node, raw(1), byParts, 0, { drift: xm, mass: 1 }, units) : node;
}
