// The compound's CF errors: what its count does to its claim law's errors (compoundErrors, per frequency
// dampedRelErrorAt) and the claim law's own rounding as the compound forms phi_X = exp(L_X) (valueRounding,
// severityRounding); see ./compound.ts.
import type { Node } from "./node";

/**
 * The severity's value phi_X = exp(L_X) as the compound forms it: L_X within 8 units of rounding per node of its tree
 * relative to 1 + |L_X| (./invert/part.ts cfUlps), and exp one more, so phi_X is off by up to (8 nodes + 1) u |phi_X| plus
 * 8 nodes u |phi_X| |L_X|. The second part is the severity's logRound (severityRounding below); this is the first, which
 * the count multiplies by up to E N (Poisson(1e4)-gamma(2, 0.5) at t = 1e-7: 1.5e-13 against the compound's own allowance
 * of 6.2e-15, tests/cf/arg-rounding.test.ts). |phi_X| <= 1, so it is an absolute bound on phi_X.
 */
function valueRounding(X: Node): number {
  return (8 * Math.max(1, X.nodes) + 1) * Number.EPSILON;
}

/** `unlisted`: atom mass the compound's kind leaves out (it stays in the CF the continuous part is taken from) */
export function compoundErrors(N: Node, X: Node, unlisted: number): { cfAbsError: number; cfRelError: number } {
  const eX = (X.cfAbsError ?? 0) + (X.cfRelError ?? 0) + valueRounding(X);
  const nAbs = (N.cfAbsError ?? 0) + unlisted;
  if (N.cgfSlope !== undefined && Number.isFinite(N.cgfSlope)) return { cfAbsError: nAbs, cfRelError: N.cgfSlope * eX + (N.cfRelError ?? 0) };
  return { cfAbsError: (N.cumulants(1)[0] ?? Infinity) * eX + nAbs, cfRelError: N.cfRelError ?? 0 };
}

/**
 * compoundErrors' relative error at frequency t, damping beta, where the severity bounds its damped transform's error per
 * frequency (Node.dampedErrorAt, for the transforms compoundDamped takes) and the count's cumulant function has a slope
 */
export function dampedRelErrorAt(N: Node, X: Node): ((beta: number, t: number) => number) | null {
  const e = X.dampedErrorAt;
  const s = N.cgfSlope;
  if (!e || e.cf !== X.dampedLogCf || e.rect !== X.dampedCf || s === undefined || !Number.isFinite(s)) return null;
  const xRel = X.cfRelError ?? 0;
  const nRel = N.cfRelError ?? 0;
  const whole = compoundErrors(N, X, 0).cfRelError;
  const own = valueRounding(X);
  // the value rounding is relative to |phi_X|: where the severity bounds its modulus per frequency, scaled by it
  const mod = e.modulus;
  // where |phi_X| <= m and P(N = 0) = p0 > 0: |P_N(z + d) - P_N(z)| <= |d| countSlopeBound(m + |d|), and |P_N(z)| >= p0 -
  // sum_{n >= 1} p_n |z|^n = 2 p0 - P_N(m), so the count's factor is also that bound over 2 p0 - P_N(m) where positive
  // (NB(3, 0.4) far out: about P(N = 1) / P(N = 0) = 1.8 against cgfSlope 4.5)
  const mean = N.cumulants(1)[0];
  const p0 = mod && N.countCgf && mean !== null && Number.isFinite(mean) ? pgfBounds(N, 1e-300, mean)[0] - 1e-300 * mean : 0;
  const gain = (m: number, d: number) => {
    if (!(p0 > 0 && m < 1)) return s;
    const floor = 2 * p0 - pgfBounds(N, Math.max(m, 1e-300), mean as number)[1];
    if (!(floor > 0)) return s;
    return Math.min(s, (countSlopeBound(N, Math.max(m * (1 + 4 * Number.EPSILON) + d, 1e-300), mean) / floor) * (1 + 4 * Number.EPSILON));
  };
  return (beta, t) => {
    const m = mod ? mod(beta, t) : 1;
    const eX = e.at(beta, t) + xRel + own * Math.min(1, m);
    return Math.min(whole, gain(m, eX) * eX + nRel);
  };
}

/**
 * The severity's own rounding, which scales with its |L_X| (the compound's allowance is relative to 1 + |L| of the
 * compound's log only): |P_N'| <= E N on the unit disc, so phi moves by at most E N R |s| (Node.logRoundSlope R), carried as
 * an argument slope (the CF values' absolute error per unit |t|) on top of the scaled children's. Where the severity declares
 * no R (./families/log-round.ts and the families beside it), or the count no finite mean, nothing is added and
 * severityRoundingNote says so in the compound's notes.
 */
export function severityRoundingNote(meanN: number | null, X: Node): string[] {
  const R = X.logRoundSlope;
  if (R === undefined || !Number.isFinite(R))
    return [
      "the claim law's rounding that grows with |log phi_X| (about E N u |phi_X| |log phi_X| in the CF) is not derived for this claim law and is left out of the error bounds: they are estimates where the claims' log-CF is large (a claim law with a large location and a small spread)",
    ];
  if (R > 0 && !(meanN !== null && Number.isFinite(meanN)))
    return ["the claim law's rounding that grows with |log phi_X| is not bounded for a count without a finite mean and is left out of the error bounds"];
  return X.logRoundNote ? [X.logRoundNote] : [];
}

const PT = new Float64Array(1);
const PZ = new Float64Array(1);
const PR = new Float64Array(1);
const PI = new Float64Array(1);

/** P_N(m), 0 < m <= 1, from the count's cumulant function K at log m: [lower, upper] within its stated errors, 1e-9 relative
 *  for the move of z and 64 ulps of K's scale 1 + |K| + E N (`mean`; |K(log m)| <= E N |log m|, K convex) for its roundings */
function pgfBounds(N: Node, m: number, mean = 0): [number, number] {
  PT[0] = Math.log(m);
  PZ[0] = 0;
  N.countCgf!(PT, PZ, PR, PI);
  const p = Math.exp(PR[0]);
  const a = (N.cfAbsError ?? 0) + (N.cfRelError ?? 0);
  const r = 1e-9 + 64 * Number.EPSILON * (1 + Math.abs(PR[0]) + mean);
  return [p * (1 - r) - a, p * (1 + r) + a];
}

/**
 * A bound on |P_N'(z)| for |z| <= m < 1: P_N'(|z|) <= P_N'(m) (non-negative coefficients), at most the chord
 * (P_N(m2) - P_N(m)) / (m2 - m), m2 = min(1, 2 m + 1e-3) (P_N' does not decrease on [0, 1]); near P(N = 1) where m is small
 * (NB(3, 0.4): 0.12 against c P_N(0) = 0.29, c the log-derivative's bound). Infinity without the count's cumulant function.
 */
export function countSlopeBound(N: Node, m: number, mean: number | null = N.cumulants(1)[0]): number {
  if (!N.countCgf || !(m > 0 && m < 1) || mean === null || !Number.isFinite(mean)) return Infinity;
  const m2 = Math.min(1, 2 * m + 1e-3);
  const lo = pgfBounds(N, m, mean)[0];
  const up = m2 < 1 ? pgfBounds(N, m2, mean)[1] : 1 + (N.cfAbsError ?? 0) + (N.cfRelError ?? 0);
  const v = ((up - lo) / ((m2 - m) * (1 - 2 * Number.EPSILON))) * (1 + 4 * Number.EPSILON);
  return v >= 0 ? v : Infinity;
}

export function severityRounding(
  meanN: number | null,
  X: Node,
  slope: number,
  errAt: ((t: number) => number) | undefined,
  rectDamped = false,
  count?: { cgfSlope: number | undefined; self: () => Node; N: Node },
) {
  const R = X.logRoundSlope;
  const add = R === undefined ? NaN : meanN !== null && Number.isFinite(meanN) ? meanN * R * (1 + 2 * Number.EPSILON) : Infinity;
  if (!(add > 0)) return { argSlope: slope, argErrAt: errAt };
  const at = X.logRoundAt;
  const child = errAt ?? ((t: number) => slope * t);
  // |P_N'(z)| <= E N, and <= c |P_N(z)| where the count's log-derivative is bounded by c (Node.cgfSlope): |P_N(phi_X)| is
  // the compound's |phi| (its majorants, read from the compound at the call, times 1 + 1e-9 for the move of z)
  const n = meanN as number;
  const c = count?.cgfSlope;
  const gain = (m: number) => (c !== undefined && Number.isFinite(c) ? Math.min(n, c * Math.min(1, m) * (1 + 1e-9)) : n);
  const T = new Float64Array(1);
  const M = new Float64Array(1);
  // where the compound has no majorant: |P_N(z)| <= P_N(|z|) (non-negative coefficients), |z| <= the claim law's own
  // modulus bound m (Node.logRoundModulus), so the gain is at most c P_N(m), and at most countSlopeBound's P_N'(m) bound
  const byClaim = (beta: number, t: number) => {
    const mod = X.logRoundModulus;
    const N = count?.N;
    if (!mod || !N?.countCgf) return n;
    // (a bound m below 1e-300 raised to it: P_N and P_N' do not decrease)
    const m = Math.max(mod(beta, Math.abs(t)), 1e-300);
    if (!(m < 1)) return n;
    return Math.min(gain(pgfBounds(N, m, n)[1]), countSlopeBound(N, m));
  };
  const undampedGain = (t: number) => {
    const self = count?.self();
    if (!self || c === undefined) return n;
    T[0] = Math.abs(t) * (1 - 2 * Number.EPSILON);
    if (self.logMajorant) {
      self.logMajorant(T, M);
      return gain(Math.exp(M[0]) * (1 + 4 * Number.EPSILON));
    }
    const cm = self.continuousMajorant;
    if (!cm) return byClaim(0, t);
    cm.maj(T, M);
    let p = 0;
    for (const a of cm.atoms) p += a.p;
    return gain((p + Math.exp(M[0])) * (1 + 4 * Number.EPSILON));
  };
  const dampedGain = (beta: number, t: number) => {
    const self = count?.self();
    const dm = self?.dampedMajorant;
    if (!self || c === undefined) return n;
    if (!dm || dm.cf !== self.dampedLogCf || !(self.support[0] >= 0)) return byClaim(beta, t);
    return Math.min(gain((dm.atom + dm.rest(beta, Math.abs(t))) * (1 + 4 * Number.EPSILON)), byClaim(beta, t));
  };
  // per frequency where the severity derives it (E N, or the count's slope times |phi|, times its R(t)), else the slope
  const own = at && meanN !== null ? (t: number) => undampedGain(t) * at(t, X) * (1 + 2 * Number.EPSILON) : (t: number) => add * t;
  const dAt = X.logRoundDampedAt;
  // damped: the children's slope (t + beta) plus E N R~(beta, t) where the severity derives it; nothing where the damped
  // transform takes the claim law's transform itself, no log between (`rectDamped`: ./damped-cf.ts compoundDamped's
  // dampedCf and the count's log-pgf)
  // over a run [t0, t1] of frequencies: the gain at t0 (the majorant's rest and the claim law's modulus bound |phi| from their
  // frequency on, and the gain does not decrease with that bound), the slope's t + beta and the claim law's rounding over the run
  const dOn = X.logRoundDampedOn;
  const damped = rectDamped
    ? {
        argErrDampedAt: (beta: number, t: number) => slope * (t + beta) * (1 + 4 * Number.EPSILON),
        argErrDampedOn: (beta: number, t0: number, t1: number) => slope * (Math.max(t0, t1) + beta) * (1 + 4 * Number.EPSILON),
      }
    : dAt && meanN !== null
      ? {
          argErrDampedAt: (beta: number, t: number) => (slope * (t + beta) + dampedGain(beta, t) * dAt(beta, t, X)) * (1 + 4 * Number.EPSILON),
          ...(dOn
            ? {
                argErrDampedOn: (beta: number, t0: number, t1: number) =>
                  (slope * (Math.max(t0, t1) + beta) + dampedGain(beta, t0) * dOn(beta, t0, t1, X)) * (1 + 4 * Number.EPSILON),
              }
            : {}),
        }
      : {};
  return { argSlope: (slope + add) * (1 + Number.EPSILON), argErrAt: (t: number) => (Math.min(child(t), slope * t) + own(t)) * (1 + 2 * Number.EPSILON), ...damped };
}
