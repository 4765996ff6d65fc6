import type { Node } from "./node";

/**
 * Non-increasing majorants of |phi| on the half-line: log M(t) into `out` with M(t) >= sup_{s >= t} |phi(s)|
 * (t >= 0). The inversion's truncation bound integrates the envelope of |phi| beyond the cut-off; sampling |phi|
 * at a few frequencies per octave misses the peaks of an almost periodic CF (a lattice term in a sum has
 * |phi(2 pi k / step)| = 1), so where a model's tree gives one, the envelope is this function instead.
 */
export type LogMajorant = (t: Float64Array, out: Float64Array) => void;

/**
 * Families whose |phi(t)| is itself non-increasing in |t| (closed forms): normal exp(-s^2 t^2 / 2); cauchy and stable
 * exp(-|g t|^a); gamma, exponential and chi-squared (1 + t^2 / r^2)^(-k/2); laplace 1 / (1 + b^2 t^2); logistic
 * (pi s t) / sinh(pi s t); student t a scale mixture of normals, E exp(-t^2 V / 2); variance gamma
 * |1 - i th nu t + s^2 nu t^2 / 2|^(-1/nu); nig exp(-d (Re sqrt(a^2 - (b + i t)^2) - sqrt(a^2 - b^2))), whose real
 * part grows with t (Johnson, Kotz & Balakrishnan vol. 1 and 2, the CFs in each family's chapter).
 */
export const MONOTONE_ABS_CF = new Set(["normal", "cauchy", "stable", "gamma", "exponential", "chi_squared", "laplace", "logistic", "student_t", "variance_gamma", "nig"]);

/** The node's own |phi| (for the families above). */
export function selfMajorant(node: Node): LogMajorant {
  return (t, out) => {
    const im = new Float64Array(t.length);
    const at = new Float64Array(t.length);
    for (let i = 0; i < t.length; i++) at[i] = Math.abs(t[i]);
    node.logCf(at, out, im);
    // the log-CF's real part carries a relative rounding of a few eps
    for (let i = 0; i < t.length; i++) out[i] = out[i] * (1 - 4 * Number.EPSILON) + 4 * Number.EPSILON;
  };
}

/** Uniform on [a, b]: |phi(t)| = |sin(w t / 2)| / (w t / 2) <= min(1, 2 / (w t)), w = b - a. */
export function uniformMajorant(width: number): LogMajorant {
  return (t, out) => {
    for (let i = 0; i < t.length; i++) out[i] = Math.min(0, Math.log(2 / (width * Math.abs(t[i]))));
  };
}

/** Independent sum: |phi| = prod |phi_j|, each term without a majorant bounded by 1. */
export function sumMajorant(cs: Node[]): LogMajorant | undefined {
  const ms = cs.map((c) => c.logMajorant).filter((m): m is LogMajorant => !!m);
  if (ms.length === 0) return undefined;
  // bounding a continuous term's |phi| by 1 throws away its decay (a uniform + weibull + lognormal sum then needed the
  // full 2^22 terms and still missed its tolerance); where every term without a majorant is continuous, the sum's |phi|
  // has no almost-periodic peaks for the probes to miss, and the sampled envelope is kept. Terms that may not decay
  // (lattice, discrete, mixed laws) keep the product, with their factor bounded by 1.
  if (cs.every((c) => c.logMajorant || c.kind.type === "continuous") && ms.length < cs.length) return undefined;
  if (ms.length === 1) return ms[0];
  return (t, out) => {
    out.fill(0, 0, t.length);
    const tmp = new Float64Array(t.length);
    for (const m of ms) {
      m(t, tmp);
      for (let i = 0; i < t.length; i++) out[i] += tmp[i];
    }
  };
}

/** a X: M(|a| t). */
export function scaleMajorant(a: number, c: Node): LogMajorant | undefined {
  const m = c.logMajorant;
  if (!m || !(a !== 0 && Number.isFinite(a))) return undefined;
  const aa = Math.abs(a);
  return (t, out) => {
    const s = new Float64Array(t.length);
    for (let i = 0; i < t.length; i++) s[i] = aa * Math.abs(t[i]);
    m(s, out);
  };
}

/** Mixture: |phi| <= sum w_j |phi_j| (components without a majorant bounded by 1). */
export function mixMajorant(weights: number[], cs: Node[]): LogMajorant | undefined {
  if (!cs.some((c) => c.logMajorant)) return undefined;
  return (t, out) => {
    const acc = new Float64Array(t.length);
    const tmp = new Float64Array(t.length);
    cs.forEach((c, j) => {
      const w = Math.abs(weights[j]);
      if (!c.logMajorant) {
        for (let i = 0; i < t.length; i++) acc[i] += w;
        return;
      }
      c.logMajorant(t, tmp);
      for (let i = 0; i < t.length; i++) acc[i] += w * Math.exp(tmp[i]);
    });
    for (let i = 0; i < t.length; i++) out[i] = Math.log(acc[i] * (1 + 4 * cs.length * Number.EPSILON));
  };
}

/** n-fold sum: M^n. */
export function repeatMajorant(n: number, c: Node): LogMajorant | undefined {
  const m = c.logMajorant;
  if (!m) return undefined;
  return (t, out) => {
    m(t, out);
    for (let i = 0; i < t.length; i++) out[i] *= n;
  };
}
