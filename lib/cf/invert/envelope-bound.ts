import type { LogMajorant } from "../majorant";
import { cfRelError, cfUlps, type ContinuousPart } from "./part";
import type { Envelope } from "./nodes";

const EPS = Number.EPSILON;

/**
 * The envelope of |phi_part| from the model's derived majorant M (../majorant.ts), for a part with nothing subtracted
 * (phi_part = phi e^{-i t c}), or with the law's atoms taken out where M bounds the continuous part alone
 * (../layer-majorant.ts; phi_part = (phi - sum p_j e^{i t x_j}) e^{-i t c} / w). On each probe interval [t_i, t_{i+1}] |phi_part| is at most M(t_i) (M non-increasing) and,
 * where the tree derives a non-increasing majorant S of |d/dt phi_part| (its slope about its own centre c0, plus
 * |c - c0| M for the recentring), at most max over the interval of the two lines a_i + S(t_i)(s - t_i) and
 * a_{i+1} + S(t_i)(t_{i+1} - s) (mean value theorem), i.e. (a_i + a_{i+1} + S(t_i) dt) / 2, a_i the computed |phi(t_i)|
 * raised by its error bound. Past the last probe the tails integrate M's derived power (LogMajorant.tail):
 * M(s) <= v (t_n / s)^q gives int_{t_n}^inf M = v t_n / (q - 1) and int M / s = v / q (infinite where q is too small
 * and v > 0). `evaluated`: the probes whose values were computed (past it only M).
 */
export function majorantEnvelope(
  part: ContinuousPart,
  maj: LogMajorant,
  t: Float64Array,
  mag: Float64Array,
  logRe: Float64Array,
  logIm: Float64Array,
  evaluated: number,
  sampled: Envelope,
  nf: (t: number) => number,
): Envelope {
  const n = t.length;
  const w = part.weight;
  const lm = new Float64Array(n);
  maj(t, lm);
  const a = new Float64Array(n);
  const ulps = cfUlps(part.model);
  const extra = part.model.logCfExtraError;
  // with the heaviest term's CF taken out (part.tail): its values' rounding, relative to |phi_G| (a few operations on
  // log phi_G and the phase t shift, as cfRelError counts them for the model's), joins each value's bound
  const gSize = part.tail ? tailCfRounding(part, t, evaluated) : null;
  for (let i = 0; i < n; i++) {
    if (i >= evaluated || !Number.isFinite(mag[i])) {
      a[i] = Infinity;
      continue;
    }
    const rel = cfRelError(ulps, logRe[i], logIm[i], t[i], part.center) + (extra ? extra(t[i]) : 0);
    // with atoms taken out, phi's error is relative to |phi| (not to the part's value), and the subtraction's rounding
    // is the noise floor's allowance
    // with atoms or the tail term taken out, phi's error is relative to |phi| (not to the part's value), and the
    // subtraction's rounding is the noise floor's allowance
    a[i] =
      part.atoms.length === 0 && !gSize
        ? (mag[i] * (1 + rel) + part.cfAbsError / w) * (1 + 4 * EPS)
        : (mag[i] + (Math.exp(logRe[i]) * rel + (gSize ? gSize[i] : 0) + part.cfAbsError) / w + nf(t[i])) * (1 + 4 * EPS);
  }
  let sl: Float64Array | null = null;
  let dc = 0;
  if (maj.slope) {
    sl = new Float64Array(n);
    maj.slope.at(t, sl);
    dc = Math.abs(part.center - maj.slope.center) * (1 + 4 * EPS) + 4 * EPS * Math.abs(part.center);
  }
  const env = new Float64Array(n);
  let run = 0;
  for (let i = n - 1; i >= 0; i--) {
    const M = (Math.exp(lm[i]) / w) * (1 + 4 * EPS);
    let b = M;
    if (sl && i + 1 < n && Number.isFinite(a[i]) && Number.isFinite(a[i + 1])) {
      const L = ((sl[i] + dc * Math.exp(lm[i])) / w) * (1 + 4 * EPS);
      const dt = t[i + 1] - t[i];
      const lip = Math.max(a[i], a[i + 1], 0.5 * (a[i] + a[i + 1] + L * dt)) * (1 + 4 * EPS);
      if (lip < b) b = lip;
    }
    if (!(b <= Infinity)) b = Infinity;
    if (b > run) run = b;
    env[i] = run;
  }
  const tn = t[n - 1];
  let sp = 0;
  let sc = 0;
  const tail = maj.tail?.(tn);
  const v = tail ? Math.exp(tail.log) / w : Math.min(env[n - 1], 1 / w);
  if (v > 0) {
    const q = tail ? tail.q : 0;
    sp = q > 1 ? (v * tn) / (q - 1) : Infinity;
    sc = q > 0 ? v / q : Infinity;
  }
  const tailPdf = new Float64Array(n);
  const tailCdf = new Float64Array(n);
  const g = 1 + 2 * n * EPS;
  tailPdf[n - 1] = (sp * g + nf(tn) * tn) / Math.PI;
  tailCdf[n - 1] = (sc * g + nf(tn)) / Math.PI;
  // plus the sampled envelope's allowance for values below the rounding floor (nodes.ts envelopeOf): not needed for the
  // bound here, which keeps those values, but it stops the cut-off where the sums' own rounding (which grows with the
  // number of terms) takes over, as the sampled envelope does
  for (let i = n - 2; i >= 0; i--) {
    sp += env[i] * (t[i + 1] - t[i]);
    sc += env[i] * Math.log(t[i + 1] / t[i]);
    const floor = nf(t[i]);
    tailPdf[i] = ((sp * g) + floor * t[i]) / Math.PI;
    tailCdf[i] = ((sc * g) + floor) / Math.PI;
  }
  return { t, env, tailPdf, tailCdf, decay: sampled.decay, decayClean: sampled.decayClean, derived: true };
}

/** |phi_G(t_i)| times the relative rounding of its value (cfRelError with 8 units for D's log-CF), at the evaluated probes */
function tailCfRounding(part: ContinuousPart, t: Float64Array, evaluated: number): Float64Array {
  const G = part.tail!;
  const n = Math.min(evaluated, t.length);
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  G.logCf(t.subarray(0, n), re, im);
  const out = new Float64Array(t.length);
  for (let i = 0; i < n; i++) {
    const phase = im[i] + t[i] * G.shift;
    out[i] = Math.exp(re[i]) * (cfRelError(8, re[i], phase, t[i], part.center) + 2 * EPS * Math.abs(t[i] * G.shift));
  }
  return out;
}
