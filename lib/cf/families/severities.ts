/** Severity laws of the trade: lomax, inverse gamma, inverse Gaussian (Burr XII and log-logistic in ./burr). */
export { burr } from "./burr";
import { cumulantList, rawToCumulants, type Node } from "../node";
import { arithmeticNodes, contourLogCfArithmetic, contourPhi, expSumArithmetic, fromPhi, type Contour } from "./cf-quadrature";
import { lgamma, factorial } from "./special";
import { pareto } from "./numeric";
import { MAX_QUADRATURE_NODES, logFromSums, quadratureNodes, ruleRounding } from "./numeric-rule";
import { shiftDamped, shiftDampedCf } from "../damped-cf";
import { paretoExpansion } from "./asymptotic";
import { fromPhiDamped } from "../damped-cf";
import { convexDensityModulus, withGgcLogRound } from "./log-round";
import { inverseGammaDist, inverseGaussianDist, type DirectLaw } from "./dist";
import { KahanComplex } from "./kahan";

/**
 * The inverse gamma rule's own error at z = t + i beta (t, beta >= 0), every route: a trapezoidal rule of step h on a
 * path Im s = p <= th with the strip |Im s - p| < a = 0.75 th about it. At s = v + i phi in the strip
 * |exp(i z theta e^s)| <= 1 (psi + phi in (0, pi), see the paths) and int |exp(-alpha s - e^{-s})| dv / Gamma(alpha) =
 * int e^{alpha w - e^w cos phi} dw / Gamma(alpha) = cos(phi)^-alpha (y = e^w cos phi; |phi| <= 1.75 th < pi/2): the
 * aliasing error is at most 2M/(e^{2 pi a/h} - 1), M = cos(1.75 th)^-alpha (Trefethen & Weideman 2014, SIAM Review
 * 56(3), thm 5.1). The ends: on the left (w = -v past w_c, e^{w_c} c = 44 + |lg| + alpha w_c' with w_c' the previous
 * iterate, c = cos p in [cos th, 1]) the exponent alpha w - e^w c - lg is at most -44 + alpha (w_c - w_c') there and
 * falls at rate at least e^{w_c} c - alpha >= 44 + |lg| - alpha (1 - w_c'); the terms beyond sum to at most e^{that
 * exponent} / rate. Both extreme c are worked out (the ends move monotonically with c). On the right either the density
 * e^{-alpha v - lg} is e^-44 there and its terms sum to at most e^-44 / alpha, or the decay is e^-44 and the terms (density
 * at most its peak e^logM, decay exponent growing like 44 e^{jh}) sum to at most e^{logM - 44} / 44. exp within one ulp
 * (the project's standing assumption), 1 + 16 eps.
 */
function inverseGammaRuleError(alpha: number, th: number, a: number, h: number, lg: number, c1: number): number {
  const q = (2 * Math.PI * a) / h;
  const alias = (2 * Math.exp(-alpha * Math.log(Math.cos(th + a)) - q)) / -Math.expm1(-q);
  let left = 0;
  for (const c of [c1, 1]) {
    let w = 1;
    let prev = 1;
    for (let i = 0; i < 30; i++) {
      prev = w;
      w = Math.log((44 + Math.abs(lg) + alpha * Math.max(w, 0)) / c);
    }
    const rate = 44 + Math.abs(lg) + alpha * Math.max(prev, 0) - alpha;
    left = Math.max(left, rate > 1 ? Math.exp(-44 + alpha * Math.abs(w - prev)) / rate : Infinity);
  }
  const peak = alpha * Math.log(alpha / Math.cos(th)) - alpha - lg;
  const right = Math.max(Math.exp(-44) / alpha, Math.exp(peak - 44) / 44);
  return (alias + left + right) * (1 + 16 * Number.EPSILON);
}

/**
 * Inverse gamma: X = theta / G, G ~ Gamma(alpha, 1); F(x) = Q(alpha, theta/x) (Loss Models app. A.2.3). With
 * x = theta e^s, L(s) = -alpha s - e^{-s} - log Gamma(alpha); path Im s = pi/4 (both factors decay there).
 * E X^r = theta^r Gamma(alpha - r)/Gamma(alpha), r < alpha.
 */
export function inverseGamma(alpha: number, theta: number): Node {
  // the path's density factor has modulus up to (1 / cos th)^alpha times the law's own: with th = pi/4 that is 2^(alpha/2),
  // and the sum cancels to |phi| <= 1 (for alpha = 80 the CF was off by 1e-2, for alpha = 150 by 1e8, within its stated
  // bound but useless); th <= 1.5 / sqrt(alpha) keeps the factor below e^1.2
  const th = Math.min(Math.PI / 4, 1.5 / Math.sqrt(alpha));
  const strip = 0.75 * th;
  const lg = lgamma(alpha);
  const c1 = Math.cos(th);
  const s1 = Math.sin(th);
  // |exp(-alpha s - e^{-s})| <= max_w exp(alpha w - e^w cos(th + strip)) = (alpha / c)^alpha e^{-alpha}
  const cEdge = Math.cos(th + strip);
  const logM = alpha * Math.log(alpha / cEdge) - alpha - lg;
  const contour: Contour = {
    theta: th,
    strip,
    logM,
    what: "inverse_gamma",
    advice: "use a shape alpha nearer 1",
    L(v, out) {
      const e = Math.exp(-v);
      out[0] = -alpha * v - e * c1 - lg;
      out[1] = -alpha * th + e * s1;
    },
    range(a) {
      // left end: e^w cos th - alpha w > 42 + |log Gamma| with w = -v
      let w = 1;
      for (let i = 0; i < 30; i++) w = Math.log((44 + Math.abs(lg) + alpha * Math.max(w, 0)) / c1);
      const right = Math.min((44 - lg) / alpha, Math.log(44 / (a * s1)));
      return [Math.min(-w, right - 45 / alpha), right];
    },
  };
  const phi = contourPhi(contour);
  // E exp(i z X) at z = x + i beta (x, beta >= 0), arg z = psi, as burr's: on the path Im s = p = min(th, pi/2 - psi)
  // the factor exp(i z theta e^s) has modulus exp(-|z| theta e^v sin(psi + p)) with psi + p in [pi/4, pi/2]; the strip
  // of half-width `strip` about the path keeps sin(psi + Im s) > 0 and cos(Im s) >= cos(th + strip) (where logM bounds
  // the density factor), so the trapezoid step and its error e^-40 relative to e^logM hold on every path
  const hD = (2 * Math.PI * strip) / (40 + Math.max(0, logM));
  const acc = new KahanComplex();
  const phiDamped = (x: number, beta: number, out: Float64Array) => {
    const a = Math.hypot(x, beta) * theta;
    const psi = Math.atan2(beta, x);
    const p = Math.min(th, Math.PI / 2 - psi);
    const dec = Math.sin(psi + p);
    const cp = Math.cos(psi + p);
    const cs = Math.cos(p);
    const ss = Math.sin(p);
    // ends as contour.range, with the path's own decay rates
    let w = 1;
    for (let i = 0; i < 30; i++) w = Math.log((44 + Math.abs(lg) + alpha * Math.max(w, 0)) / cs);
    const right = Math.min((44 - lg) / alpha, a > 0 ? Math.log(44 / (a * dec)) : Infinity);
    const left = Math.min(-w, right - 45 / alpha);
    const n = Math.ceil((right - left) / hD);
    quadratureNodes(n, "inverse_gamma", "use a shape alpha nearer 1");
    acc.reset();
    for (let j = 0; j <= n; j++) {
      const v = left + j * hD;
      const e = Math.exp(-v);
      const ev = a * Math.exp(v);
      const mr = -alpha * v - e * cs - lg - ev * dec;
      if (mr < -800) continue;
      const mag = Math.exp(mr);
      const ph = -alpha * p + e * ss + ev * cp;
      acc.addPolar(mag, ph);
    }
    out[0] = acc.re * hD;
    out[1] = acc.im * hD;
  };
  // Equispaced t >= 0 at one beta (the inversion's nodes): one path p = th serves every z = t + i beta (psi + p lies in
  // [pi/4, 3pi/4] and the strip about it keeps sin(psi + Im s) > 0 and cos(Im s) >= cos(th + strip): the same step and
  // error), so term j is c_j exp(t e_j i e^{i th}) with e_j = theta e^{v_j} and c_j holding the density factor and
  // exp(-beta e_j e^{i th}); expSumArithmetic sums it across t by recurrence. The range is the one of the smallest |z|.
  const batch = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => {
    const aMin = Math.hypot(t[0], beta) * theta;
    let w = 1;
    for (let i = 0; i < 30; i++) w = Math.log((44 + Math.abs(lg) + alpha * Math.max(w, 0)) / c1);
    // sin(psi + th) >= sin(th) for psi in [0, pi/2]
    const right = Math.min((44 - lg) / alpha, aMin > 0 ? Math.log(44 / (aMin * s1)) : Infinity);
    const left = Math.min(-w, right - 45 / alpha);
    const n = quadratureNodes(Math.ceil((right - left) / hD) + 1, "inverse_gamma", "use a shape alpha nearer 1");
    const cRe = new Float64Array(n);
    const cIm = new Float64Array(n);
    const e = new Float64Array(n);
    for (let j = 0; j < n; j++) {
      const v = left + j * hD;
      const ex = Math.exp(-v);
      e[j] = theta * Math.exp(v);
      const mr = -alpha * v - ex * c1 - lg - beta * e[j] * c1;
      if (mr < -800) continue;
      const mag = hD * Math.exp(mr);
      const ph = -alpha * th + ex * s1 - beta * e[j] * s1;
      cRe[j] = mag * Math.cos(ph);
      cIm[j] = mag * Math.sin(ph);
    }
    const sr = new Float64Array(t.length);
    const si = new Float64Array(t.length);
    expSumArithmetic(cRe, cIm, e, -s1, c1, t, sr, si);
    logFromSums(t, sr, si, re, im, 0, 0, 0);
  };
  // the bound the batch's shortcuts add (expSumArithmetic): sum_j |c_j| <= the path density's integral (1/cos th)^alpha
  // (with beta >= 0 only lowering it), times (e/25! + 80 eps), plus 1e-21 per node
  const batchError = Math.pow(1 / c1, alpha) * 1.01 * (2e-25 + 80 * Number.EPSILON) + 1e-21 * 4096;
  // Rounding of the rule per frequency (and of the batch's terms), relative to each term in units of u: the log-density
  // -alpha v - e^{-v} cos p - log Gamma(alpha) and its phase (alpha |v| + |lg| + 2 (1 + |v|) e^{-v} (cos th + sin th)),
  // e^v within 2 (1 + |v|) carried into the decay and phase of exp(i z x), bounded through the decay by (1 + cot th) / e
  // (every path has psi + p >= th), 8 for exp, cos, sin and the products; weighted by the modulus
  // exp(-alpha v - e^{-v} cos th - lg) (cos p >= cos th) over the widest range a rule uses (the smallest |z|, or 45 /
  // alpha), whose sum is the batch's (1 / cos th)^alpha; then the sum of its nodes (ruleRounding)
  let wIG = 1;
  for (let i = 0; i < 30; i++) wIG = Math.log((44 + Math.abs(lg) + alpha * Math.max(wIG, 0)) / c1);
  const vLoIG = Math.min(-wIG, (44 - lg) / alpha - 45 / alpha);
  const nMaxIG = Math.ceil(Math.max(45 / alpha, (44 - lg) / alpha - vLoIG) / hD) + 2;
  const cotTh = 1 / Math.tan(th);
  let termErrors = 0;
  // a range wider than the node limit (alpha near 0) has no rule within it (quadratureNodes refuses): no loop over it
  if (!(nMaxIG <= MAX_QUADRATURE_NODES)) termErrors = Infinity;
  else for (let j = 0; j <= nMaxIG; j++) {
    const v = vLoIG + j * hD;
    const ex = Math.exp(-v);
    const mod = hD * Math.exp(-alpha * v - ex * c1 - lg);
    const av = Math.abs(v);
    termErrors += mod * (8 + alpha * av + Math.abs(lg) + 2 * (1 + av) * ex * (c1 + s1) + (2 * (2 + av) * (1 + cotTh)) / Math.E);
  }
  const ruleError = inverseGammaRuleError(alpha, th, strip, hD, lg, c1) + ruleRounding(nMaxIG, Math.pow(1 / c1, alpha) * 1.01, termErrors);
  const dampedSingle = fromPhiDamped(phiDamped);
  const damped = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => (arithmeticNodes(t) ? batch(beta, t, re, im) : dampedSingle(beta, t, re, im));
  const raw = (r: number) => theta ** r * Math.exp(lgamma(alpha - r) - lg);
  const dist = inverseGammaDist(alpha, theta);
  const node: Node = {
    kind: { type: "continuous" },
    momentIndex: alpha,
    tails: { left: Infinity, right: alpha },
    nodes: 1,
    notes: [`inverse_gamma CF computed by quadrature on a shifted contour (absolute error <= ${(ruleError + batchError).toPrecision(2)})`],
    cfAbsError: ruleError + batchError,
    dampedLogCf: damped,
    // the density theta^alpha x^(-alpha-1) e^(-theta/x)/Gamma(alpha) is flat to every order at 0: every term is 0
    laplaceExpansion: { at: 0, exps: [], coefs: [] },
    severity: {
      name: "inverse_gamma",
      pdf: dist.pdf,
      lo: 0,
      // P(X > x) = P(alpha, theta/x) <= (theta/x)^alpha / Gamma(alpha + 1) (series' first term bound, A&S 6.5.29)
      upper: (q) => theta * Math.exp(-(Math.log(q) + lgamma(alpha + 1)) / alpha),
      scale: theta / Math.max(alpha, 1),
      rootAtZero: 1,
        tailIndex: alpha,
    },
    dist,
    location: alpha > 1 ? raw(1) : theta,
    scale: alpha > 2 ? Math.sqrt(raw(2) - raw(1) ** 2) : theta,
    support: [0, Infinity],
    // equispaced t: the real-t path summed across t as the batch above does at beta = 0 (the same terms and bound)
    logCf: (t, re, im) => {
      if (!arithmeticNodes(t) || contourLogCfArithmetic(contour, theta, t, re, im) > batchError) fromPhi(t, re, im, (x, out) => phi(x * theta, out));
    },
    cumulants: (m) => rawToCumulants(cumulantList(m, alpha, raw)),
  };
  // claim-law rounding: 1 / Gamma, hyperbolically completely monotone (Bondesson 1992), a generalized gamma convolution
  // (./log-round.ts ggcLogRound), for a finite mean
  return alpha > 1 ? withGgcLogRound(node, raw(1)) : node;
}

/**
 * Lomax (Pareto type II): F(x) = 1 - (theta/(x + theta))^alpha, x >= 0 (Loss Models app. A.2.3, "Pareto"); X + theta is
 * Pareto type I with xm = theta, so phi(t) = e^{-i theta t} phi_Pareto(t). E X^n = theta^n n! Gamma(alpha - n)/Gamma(alpha), n < alpha.
 */
export function lomax(alpha: number, theta: number): Node {
  const p = pareto(alpha, theta);
  const expansion = { ...paretoExpansion(alpha, theta), at: 0 };
  const raw = (n: number) => theta ** n * factorial(n) * Math.exp(lgamma(alpha - n) - lgamma(alpha));
  const dist: DirectLaw = {
    pdf: (x) => (x >= 0 ? (alpha / theta) * Math.exp(-(alpha + 1) * Math.log1p(x / theta)) : 0),
    cdf: (x) => (x > 0 ? -Math.expm1(-alpha * Math.log1p(x / theta)) : 0),
    sf: (x) => (x > 0 ? Math.exp(-alpha * Math.log1p(x / theta)) : 1),
    lo: 0,
    hi: Infinity,
  };
  const dampedLogCf = shiftDamped(-theta, p);
  const dampedCf = shiftDampedCf(-theta, p);
  const pe = p.dampedErrorAt;
  const node: Node = {
    ...p,
    logRoundSlope: undefined,
    logRoundAt: undefined,
    logRoundNote: undefined,
    logRoundDampedAt: undefined,
    logRoundModulus: undefined,
    notes: [`lomax CF computed by quadrature on a rotated contour (absolute error <= ${p.cfAbsError!.toPrecision(2)})`],
    // X = P - theta with P pareto(alpha, theta): the damped transform and the endpoint expansion move with the shift
    dampedLogCf,
    dampedCf,
    // the pareto's per-frequency bound times the shift's factor e^{beta theta}
    // (and its modulus bound likewise: |e^{(i t - beta)(-theta)}| = e^{beta theta})
    ...(pe?.shifted && dampedLogCf
      ? {
          dampedErrorAt: {
            cf: dampedLogCf,
            rect: dampedCf,
            at: pe.shifted(-theta),
            ...(pe.modulus ? { modulus: (beta: number, t: number) => Math.min(1, Math.exp(beta * theta) * pe.modulus!(beta, t) * (1 + 4 * Number.EPSILON)) } : {}),
          },
        }
      : { dampedErrorAt: undefined }),
    laplaceExpansion: expansion,
    // e^{s 0} E e^{-s X} = e^{s theta} E e^{-s P}: the pareto's own remainder, its series moved to 0
    ...(p.endpointRemainder ? { endpointRemainder: { ...p.endpointRemainder, series: expansion } } : {}),
    severity: {
      ...p.severity!,
      name: "lomax",
      pdf: dist.pdf,
      lo: 0,
      upper: (q) => theta * Math.expm1(-Math.log(q) / alpha),
      scale: theta,
    },
    dist,
    location: alpha > 1 ? raw(1) : theta * (2 ** (1 / alpha) - 1),
    scale: alpha > 2 ? Math.sqrt(raw(2) - raw(1) ** 2) : theta,
    support: [0, Infinity],
    logCf(t, re, im) {
      p.logCf(t, re, im);
      for (let k = 0; k < t.length; k++) im[k] -= theta * t[k];
    },
    cumulants: (m) => rawToCumulants(cumulantList(m, alpha, raw)),
  };
  // claim-law rounding (./log-round.ts ggcLogRound): the pareto's log (X + theta) less i theta t, a shift of theta; the
  // density decreases from alpha / theta, convex with f'(0) = -alpha (alpha + 1) / theta^2 (convexDensityModulus); drift 0,
  // Thorin mass at most 1 (its density at 0 is finite and positive)
  return alpha > 1 ? withGgcLogRound(node, raw(1), convexDensityModulus(0, alpha / theta, (alpha * (alpha + 1)) / (theta * theta)), theta, { drift: 0, mass: 1 }) : node;
}

/**
 * Inverse Gaussian (mu, lambda): log phi = (lambda/mu)(1 - sqrt(1 - 2 i mu^2 t / lambda)) (JKB vol. 1, ch. 15,
 * eq. 15.5); 1 - s is formed as (1 - s^2)/(1 + s) against cancellation; Re(1 - 2 i mu^2 t/lambda) = 1 keeps the
 * principal root continuous. kappa_n = (2n - 3)!! mu^{2n-1} / lambda^{n-1} (JKB vol. 1, ch. 15).
 */
export function inverseGaussian(mu: number, lambda: number): Node {
  const c = (2 * mu * mu) / lambda;
  const f = lambda / mu;
  return {
    kind: { type: "continuous" },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
    dist: inverseGaussianDist(mu, lambda),
    ...inverseGaussianLogRound(mu, lambda),
    location: mu,
    scale: Math.sqrt((mu * mu * mu) / lambda),
    support: [0, Infinity],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        // s = sqrt(1 - i c t)
        const zi = -c * t[k];
        const m = Math.hypot(1, zi);
        const sr = Math.sqrt(0.5 * (m + 1));
        const si = zi / (2 * sr);
        // (1 - s) = (i c t) / (1 + s)
        const nr = 0;
        const ni = c * t[k];
        const dr = 1 + sr;
        const di = si;
        const d2 = dr * dr + di * di;
        re[k] = (f * (nr * dr + ni * di)) / d2;
        im[k] = (f * (ni * dr - nr * di)) / d2;
      }
    },
    cumulants: (n) =>
      Array.from({ length: n }, (_, i) => {
        const m = i + 1;
        let df = 1;
        for (let j = 2 * m - 3; j > 1; j -= 2) df *= j;
        return (df * mu ** (2 * m - 1)) / lambda ** (m - 1);
      }),
  };
}

/**
 * Node.logRoundSlope of the inverse Gaussian (mu, lambda): its log L = f (1 - s), f = lambda / mu, s = sqrt(1 - i c t),
 * c = 2 mu^2 / lambda, is computed within 8 ulps relative to |L| (the tree's allowance per node, ../invert/part.ts cfUlps).
 * 1 - s = i c t / (1 + s) with Re s >= 1, so |L| <= f c |t| / 2 = mu |t| and, with |phi| <= 1, R = 8 u mu. Per frequency:
 * |phi| = e^{Re L}, Re L = -f (m - 1) / (2 (1 + Re s)), m = |1 - i c t| = hypot(1, c t), m - 1 = (c t)^2 / (m + 1) (no
 * cancellation), |L| = f c |t| / |1 + s|; e^{Re L} is off by about 10 u (1 + |Re L|) relative, covered by 64 u (1 + |Re L|).
 * No damped transform is declared for the family, so no damped form either.
 */
function inverseGaussianLogRound(mu: number, lambda: number): Pick<Node, "logRoundSlope" | "logRoundAt"> {
  const c = (2 * mu * mu) / lambda;
  const f = lambda / mu;
  const slope = 8 * Number.EPSILON * mu * (1 + 8 * Number.EPSILON);
  return {
    logRoundSlope: slope,
    logRoundAt: (t) => {
      const ct = c * Math.abs(t);
      const m = Math.hypot(1, ct);
      const sr = Math.sqrt(0.5 * (m + 1));
      const si = ct / (2 * sr);
      const reL = (-f * ((ct * ct) / (m + 1))) / (2 * (1 + sr));
      const absL = (f * ct) / Math.hypot(1 + sr, si);
      const v = Math.exp(reL) * absL;
      return Math.min(slope * Math.abs(t), 8 * Number.EPSILON * v * (1 + 64 * Number.EPSILON * (1 - reL)));
    },
  };
}
