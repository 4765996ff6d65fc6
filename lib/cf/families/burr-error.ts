/** The Burr XII damped transform's error per frequency (Node.dampedErrorAt): burr.ts's rounding, taken at each frequency. */
import { decayTable } from "./decay-table";
import { MAX_QUADRATURE_NODES, SUM_MOMENT_UNITS } from "./numeric-rule";
import { seriesBoundEnvelope, type WeibullSeries } from "./asymptotic";

const U = Number.EPSILON / 2;

/**
 * The error at z = t + i beta of every damped route of burr.ts (per frequency: the series or the rule; the equispaced
 * batch), at most `whole` (cfError). Every rounding part there is relative to the terms' moduli at that frequency,
 * h |exp L(v_j + i p)| e^{-D_j}, and:
 *  - |exp L(v + i p)| <= alpha gamma min(e^{gamma v}, e^{-alpha gamma v}) (|1 + w| >= max(1, |w|) where cos(arg w) >= 0:
 *    gamma p <= gamma th <= pi/2), each piece monotone in v;
 *  - D_j >= t theta e^{v_j} sin(0.75 th): per frequency the decay is |z| theta e^v sin(psi + p) >= t theta e^v sin(th)
 *    (psi + p = min(psi + th, pi/2)); the batch's path has p >= 0.75 th (its first frequency's arg-complement is at least
 *    the strip) and decay e^v theta (t sin p + beta cos p);
 *  - the routes' nodes are on grids of step h with any offset: each lies in one cell [u_i, u_i + h) of a fixed grid, where
 *    the modulus is at most alpha gamma min(e^{gamma u_{i+1}}, e^{-alpha gamma u_i}) and the decay at least that at u_i;
 *    the units (burr.ts's termErrors, linear in |v|) at most their value at the cell's larger |v|. Cells run from
 *    vMin = vLo (burr.ts's widest range) to the right end (42 + lag) / (alpha gamma); nodes below vMin (a rule's left end
 *    moves below it at large theta |z|) (terms at most h alpha gamma e^{gamma v} times units K0 + K1 |v|, increasing in v there) sum to at most
 *    the integral up to vMin + h, alpha gamma e^{gamma w} (K0 / gamma + K1 (|w| / gamma + 1 / gamma^2)), w = vMin + h;
 *  - the parts carried by D (e^v's rounding into the decay and phase, at most (1 + cot(th / 2)) D) through
 *    D e^{-D} <= (2/e) e^{-D/2}; the sums' rounding (compensated: 2 sqrt 2 + 8 n u; the batch's moments SUM_MOMENT_UNITS
 *    of |c_j| <= e |term| for its moment nodes, D <= 1 there; the recurrence's drift and Taylor remainder 80 eps + 2e-25
 *    of |c_j|, relative to the current term, times e); the batch's dropped terms (each below 1e-21 and below its modulus,
 *    at most nMax of them: its range is at most burr.ts's span) at most min(nMax 1e-21, the moduli's sum, which is at most
 *    the units' sum over K0, as each term carries at least K0); all against
 *    e^{-D_j / 2} (decayTable);
 *  - the series (|z| theta > 4, per frequency only): an upper bound on its own bound wherever it may answer
 *    (seriesBoundEnvelope), taken with the rule's, as the batch may have taken the rule there.
 * The rule's own error (burrRuleError) does not fall with t. Null where the cells would pass the node limit.
 */
export function burrErrorAt(
  alpha: number,
  gamma: number,
  theta: number,
  th: number,
  h: number,
  lag: number,
  vLo: number,
  cotH: number,
  nMax: number,
  whole: number,
  rule: number,
  ser: WeibullSeries,
): ((beta: number, t: number) => number) | null {
  const ag = alpha * gamma;
  const vMin = vLo;
  const vTop = (42 + lag) / ag + h;
  const cells = Math.ceil((vTop - vMin) / h) + 1;
  // (extreme shapes: a range past the node limit, or none a rule could use)
  if (!(cells >= 2 && cells <= MAX_QUADRATURE_NODES)) return null;
  // units per term, relative (in u), against e^{-D/2}: K0 + K1 |v|
  const sumUnits = 2 * Math.SQRT2 + 8 * MAX_QUADRATURE_NODES * U + Math.E * (SUM_MOMENT_UNITS + (80 * Number.EPSILON + 2e-25) / U);
  const K0 = (alpha + 1) * 8 + Math.abs(lag) + 8 + (8 * (1 + cotH)) / Math.E + sumUnits;
  const K1 = (alpha + 1) * 2 * gamma + 2 * gamma + (4 * (1 + cotH)) / Math.E;
  const cu = new Float64Array(cells);
  const e = new Float64Array(cells);
  for (let i = 0; i < cells; i++) {
    const u0 = vMin + i * h;
    const u1 = u0 + h;
    const mod = h * ag * Math.min(Math.exp(gamma * u1), Math.exp(-ag * u0)) * (1 + 8 * Number.EPSILON);
    cu[i] = mod * (K0 + K1 * Math.max(Math.abs(u0), Math.abs(u1)));
    e[i] = theta * Math.exp(u0) * (1 - 4 * Number.EPSILON);
  }
  const units = decayTable(cu, e);
  const w = vMin + h;
  const below = ag * Math.exp(gamma * w) * (K0 / gamma + K1 * (Math.abs(w) / gamma + 1 / (gamma * gamma)));
  const rate = theta * Math.sin(0.75 * th) * (1 - 4 * Number.EPSILON);
  const series = seriesBoundEnvelope(ser);
  return (beta, t) => {
    const x = Math.abs(t);
    if (!(x > 0)) return whole;
    const b = (rate * x) / 2;
    // the moduli's sum is at most the units' over K0 (every term carries at least K0 units)
    const sum = units(b) + below;
    const drop = Math.min((nMax + 1) * 1e-21, sum / K0);
    let e = (rule + U * sum + drop) * (1 + 16 * Number.EPSILON);
    const a = Math.hypot(x, beta) * theta;
    e = Math.max(e, series(a));
    return Math.min(whole, e);
  };
}
