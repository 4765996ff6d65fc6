// Noise floors of the light route's sampled envelopes (./nodes.ts probeEnvelope): below them a sampled |phi| is
// rounding noise, treated as 0, and the truncation bounds carry an allowance for it.
import { cfRelError, cfUlps, type ContinuousPart } from "./part";

/**
 * Values below `floor` are rounding noise of the atom subtraction (|phi - sum p e^{itx}| cannot be resolved
 * below eps * sum p / w); they are treated as zero, and the truncation bounds carry an allowance for them.
 */
export function noiseFloor(part: ContinuousPart): (t: number) => number {
  let pa = 0;
  let px = 0;
  for (const a of part.atoms) {
    pa += a.p;
    px += a.p * Math.abs(a.x);
  }
  // the atoms' phases t x carry absolute errors ~ eps t |x| each, weighed by the atom's mass (shared.ts roundingOf): the
  // allowance grows at the atoms' mean distance px / pa, not at the farthest one's (a compound of layered claims, 15 atoms
  // out to 56 of which the last weighs 1e-18: its floor was 2e-8 by t = 1 000, where its remainder past the kinks' kernels
  // is 3e-11 and its computed values' noise 1e-14); the CF's own noise keeps growing at that rate too (a numerical CF's
  // phases: a floor growing slower sends unattainable cut-offs further out, layer(0, 3) of weibull(1.5, 2) 4x the terms)
  const base = (pa > 0 ? (16 * Number.EPSILON * (1 + pa)) / part.weight : 0) + (2 * part.cfAbsError) / part.weight;
  const slope = pa > 0 ? (base * px) / pa : 0;
  const ks = part.kernels.map((k) => ({
    amp: 16 * Number.EPSILON * k.b.reduce((s, b) => s + Math.abs(b), 0),
    rate: k.rate,
    power: k.power,
    at: Math.abs(k.at),
  }));
  return (t: number) => {
    let f = base + slope * t;
    for (const k of ks) f += k.amp * Math.min(1, Math.pow(k.rate / t, k.power)) * (1 + t * k.at);
    return f;
  };
}

/**
 * A bound on the computed part's own error at probe i (t the probe's frequency): the model's CF from its log (evalPart's
 * cfRelError: the log's units of rounding relative to 1 + |L|, exp, cos and sin, the recentring phase) on its modulus
 * e^{Re L}, its declared absolute error, the atom subtraction atom by atom (shared.ts roundingOf: (n + 4)(1 + pa) eps and
 * each atom's phase eps t |x_j| p_j, doubled as there) and the kernels' rounding (noiseFloor's term), all over w and
 * doubled (both parts of the difference a sample may carry); probes past the evaluated ones take the log-CF's bound at 1
 */
export function valuesFloor(part: ContinuousPart, lr: Float64Array, li: Float64Array, done: number): (t: number, i: number) => number {
  let pa = 0;
  let px = 0;
  for (const a of part.atoms) {
    pa += a.p;
    px += a.p * Math.abs(a.x);
  }
  const w = part.weight;
  const n = part.atoms.length;
  const ulps = cfUlps(part.model);
  const extra = part.model.logCfExtraError;
  const atomA = 2 * Number.EPSILON * (n + 4) * (1 + pa);
  const atomB = 2 * Number.EPSILON * px;
  const kernels = noiseFloor({ ...part, atoms: [], cfAbsError: 0 });
  return (t: number, i: number) => {
    const m = i < done ? Math.exp(lr[i]) : 1;
    const rel = i < done ? cfRelError(ulps, lr[i], li[i], t, part.center) + (extra ? extra(t) : 0) : 1;
    return (2 * (Math.min(rel, 1) * m + part.cfAbsError + atomA + atomB * t)) / w + kernels(t);
  };
}
