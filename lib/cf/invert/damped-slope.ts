// The truncated cdf sum bounded by summation by parts: far from the period's ends the remainder's coefficient steps bound it.
import type { Atom, CompiledModel } from "../types";
import { envelopeOf, truncationFrom, type Envelope } from "./nodes";
import type { Probed } from "./damped-psi";

const EPS = Number.EPSILON;

/**
 * A slope envelope, with `far` where its steps end at the last probe t_n and no slope bound is derived past it
 * (./damped-sum-slope.ts): there sum_{k >= K} |c_k - c_{k+1}| takes, besides the steps' integral up to t_n, at most
 * 2 sum of |c_k| over the nodes from the last one at or below t_n, and (h / pi) times that is at most h step + tail for
 * h <= hMax (the proof with farNumerator there); Infinity for a larger step
 */
export type SlopeEnvelope = Envelope & { far?: { step: number; tail: number; hMax: number } };

/** the far part of the numerator at step h (0 without one) */
function farPart(slope: SlopeEnvelope, h: number): number {
  const f = slope.far;
  return !f ? 0 : h <= f.hMax ? h * f.step + f.tail : Infinity;
}

/** h times the slope envelope's density-type tail at t (interpolated as the setup does), plus its far part */
function tauAt(slope: SlopeEnvelope, h: number, t: number): number {
  // below the first probe no slope bound holds (each holds from its probe on): the steps' integral starts there
  if (slope.far && !(t >= slope.t[0])) return Infinity;
  return (h * truncationFrom(slope, t).pdf + farPart(slope, h)) * (1 + 4 * EPS);
}

/**
 * A non-increasing envelope of |c'(t)|, c = psi_c / (beta - i t) the cdf sum's coefficient function, on the probe
 * frequencies (as the envelope of |psi_c|: the samples' running maximum from the right), or null where it is not derived.
 * For a compound of a severity with a slope bound (SeverityKernel.slope) whose atoms all sit at lo = 0 (constant in t):
 * psi_c = P_N(phi) - p_0 - p_1 phi (- p_2 phi^2), so psi_c' = (P_N'(phi) - p_1 (- 2 p_2 phi)) phi' and, for |z| <= 1,
 * |P_N'(z) - p_1 - 2 p_2 z| = |sum_{n >= 3} n p_n z^{n-1}| <= (E N - p_1 - 2 p_2) |z|^2 (|z| once, without p_2: n >= 2),
 * or the series itself at s = |z| where the count bounds it (count.derivTail: 3 p_3 |z|^2 and up, far below E N |z|^2);
 * |c'| <= |psi_c'| / |beta - i t| + |psi_c| / |beta - i t|^2, with |phi| + d for phi (d its values' bound) and
 * |psi_c| + its noise (`of` = "pdf": the density sum's coefficients psi_c, |psi_c'| alone). `env` is the plan's envelope of |psi_c| at this beta, `noise` its per-probe noise and `phi` |phi| at
 * its probe frequencies (the probe's own values, within their rounding), `dphi` |phi'| there where the severity gives it
 * (SeverityKernel.slopeAt: far below the closed-form slope bound, which falls only like 1/t), else that bound.
 */
export function slopeEnvelope(
  model: CompiledModel,
  atoms: Atom[],
  beta: number,
  pairOut: boolean,
  env: Probed,
  noise: Float64Array,
  phi: Float64Array | null,
  of: "cdf" | "pdf" = "cdf",
  dphi: Float64Array | null = null,
): Envelope | null {
  const sev = model.dampedSeverity;
  if (!sev?.count || !sev.slope || !phi || model.support[0] !== 0 || !atoms.every((a) => a.x === 0)) return null;
  const tp = env.t;
  const n = tp.length;
  const w2 = pairOut ? (sev.pair?.w ?? 0) : 0;
  const W = Math.max(sev.count.mean - sev.w - 2 * w2, 0) * (1 + 8 * EPS);
  const mag = new Float64Array(n);
  // where the severity derives bounds on its damped transform and that one's slope (SeverityKernel.dampedBounds, each
  // non-increasing in t), |phi| and |phi'| are taken at least at them: every value then bounds the true |c'| at every
  // frequency past its probe, whatever the samples missed between probes (`derived` on the envelope)
  // (only with the envelope of |psi_c| derived too: the plan's sampled fallback takes samples throughout)
  const pb = env.derived ? (env.phiBound ?? null) : null;
  for (let i = 0; i < n; i++) {
    // |phi| within its values' bound, and never above the severity's closed-form bound where it has one; derived: over the
    // probe's interval (phiBounds), so the running maximum below bounds every frequency past the probe
    const sampled = phi[i] * (1 + 4 * EPS) + sev.cfAbsError;
    const z = Math.min(1, pb ? Math.max(sampled, pb.m[i]) : sampled, sev.absBound ? sev.absBound(tp[i]) : 1);
    // sum_{n >= j + 1} n p_n z^{n-1} (j = 2 with the two-claim term out) within the count's own series where it has one
    const zj = pairOut ? z * z : z;
    const series = sev.count.derivTail ? sev.count.derivTail(z, pairOut ? 3 : 2) : Infinity;
    const dp = pb ? Math.max(pb.dM[i], dphi ? dphi[i] : 0) : dphi ? dphi[i] : sev.slope(tp[i]);
    const dpsi = Math.min(W * zj, series) * dp;
    const d2 = beta * beta + tp[i] * tp[i];
    // the density sum's coefficients are psi_c itself: |psi_c'| alone
    mag[i] = (of === "pdf" ? dpsi : dpsi / Math.sqrt(d2) + (env.env[i] + noise[i]) / d2) * (1 + 8 * EPS);
    if (!Number.isFinite(mag[i])) return null;
  }
  const e0 = envelopeOf(tp, mag, () => 0);
  // (the envelope of |psi_c| is raised to its own derived floor where the severity has these bounds: ./damped-psi.ts)
  const e: Envelope = pb ? { ...e0, derived: true } : e0;
  if (sev.absBound) {
    // past the last probe the density-type tail from the closed forms, not the last octave's decay (there |phi| + d sits
    // on its floor d, so |psi_c'| looks like 1/t and its tail infinite): |phi| <= A / t and |phi'| <= S / t give
    // |psi_c'| <= W A^j S / t^{j+1}, whose integral from t_n is W A^j S / (j t_n^j); the steps below the last probe kept.
    // The cdf's |c'| <= |psi_c'| / t + |psi_c| / t^2 (|beta - i t| >= t): W A^j S / ((j + 1) t_n^{j+1}) and, |psi_c| past
    // t_n within the last probe's envelope value (with its noise), that value over t_n
    const tn = tp[n - 1];
    const A = sev.absBound(tn) * tn;
    const S = sev.slope(tn) * tn;
    const j = pairOut ? 2 : 1;
    let sp =
      (of === "pdf" ? (W * Math.pow(A, j) * S) / (j * Math.pow(tn, j)) : (W * Math.pow(A, j) * S) / ((j + 1) * Math.pow(tn, j + 1)) + (env.env[n - 1] + noise[n - 1]) / tn) *
      (1 + 16 * EPS);
    if (!Number.isFinite(sp)) return e;
    const tailPdf = new Float64Array(n);
    tailPdf[n - 1] = sp / Math.PI;
    for (let i = n - 2; i >= 0; i--) {
      sp += e.env[i] * (tp[i + 1] - tp[i]);
      tailPdf[i] = (sp / Math.PI) * (1 + 4 * EPS);
    }
    return { ...e, tailPdf };
  }
  return e;
}

/**
 * The truncation numerator tau at the cut-off tK: (h/pi) sum_{k >= K} |c_k - c_{k+1}| <= (h/pi) int_{tK}^inf |c'| = h times
 * the slope envelope's density-type tail. By summation by parts (Abel), with partial sums of e^{-i t_k y} at most
 * 1 / |sin(h y / 2)|, the truncated sum at y is at most tau / |sin(h y / 2)|.
 */
export function slopeNumerator(slope: SlopeEnvelope, h: number, tK: number): number {
  return tauAt(slope, h, tK);
}

/** the cdf sum's truncation bound at y = x - lo: the smaller of the envelope's (uniform) and tau / |sin(h y / 2)| */
export function truncationAtY(uniform: number, tau: number, h: number, y: number): number {
  if (!(tau < uniform)) return uniform;
  // the argument h y / 2 rounds within eps of itself and sin within an ulp
  const arg = 0.5 * h * y;
  const s = Math.abs(Math.sin(arg)) - 4 * EPS * (1 + arg);
  return s > 0 ? Math.min(uniform, tau / s) : uniform;
}

/**
 * sup over y in [yMin, Y] of e^{beta y} truncationAtY(y), 0 <= yMin <= Y < T = 2 pi / h. With s(y) the sine less its
 * rounding allowance (concave on (0, pi), so f(y) = e^{beta y} tau / s(y) is log-convex where s > 0) and y0 the smallest y
 * with sin(h y / 2) = tau / uniform: below y0 the bound is the uniform one, at most e^{beta y0} uniform; on
 * [max(y0, yMin), min(Y, T/2)] it is at most f, so at most f at that interval's ends (the smaller of f and e^{beta y}
 * uniform, both non-decreasing up to there); past T / 2 both increase up to Y. Never above e^{beta Y} uniform. yMin > 0
 * (every point answered lies at or past it) leaves out the frequencies' uniform tail near lo, where the sine is small.
 */
export function truncationSup(uniform: number, tau: number, h: number, beta: number, Y: number, yMin = 0): number {
  const T = (2 * Math.PI) / h;
  const g = (y: number) => Math.exp(beta * y) * (1 + 8 * EPS * (1 + beta * y));
  const whole = g(Y) * uniform;
  if (!(tau < uniform)) return whole;
  const y0 = (2 / h) * Math.asin(Math.min(1, tau / uniform));
  if (!(y0 < Y)) return whole;
  const mid = Math.min(Y, T / 2);
  let sup: number;
  const y1 = Math.min(Math.max(yMin, 0), Y);
  if (y1 > y0) {
    // the range starts past y0: f at its left end (or, past T / 2, the values increase up to Y)
    sup = g(y1) * truncationAtY(uniform, tau, h, y1);
    if (y1 < mid) sup = Math.max(sup, g(mid) * truncationAtY(uniform, tau, h, mid));
  } else {
    const a0 = 0.5 * h * y0;
    const s0 = Math.abs(Math.sin(a0)) - 4 * EPS * (1 + a0);
    if (!(s0 > 0)) return whole;
    sup = Math.max(g(y0) * uniform, (g(y0) * tau) / s0);
    sup = Math.max(sup, g(mid) * truncationAtY(uniform, tau, h, mid));
  }
  if (Y > mid) sup = Math.max(sup, g(Y) * truncationAtY(uniform, tau, h, Y));
  return Math.min(whole, sup * (1 + 16 * EPS));
}

/** the cdf truncation at y = span for a cut-off at probe i of the plan's envelopes: the envelope's, or tau / sin(h span / 2) */
function truncationEnd(env: Envelope, slope: SlopeEnvelope, i: number, T: number, span: number): number {
  const u = env.tailCdf[i];
  const h = (2 * Math.PI) / T;
  const sn = Math.abs(Math.sin(0.5 * h * span)) - 4 * EPS * (1 + h * span);
  return sn > 0 ? Math.min(u, (h * slope.tailPdf[i] + farPart(slope, h)) / sn) : u;
}

/** the smallest probe frequency where the truncation at the range's end reaches the target (undefined if none) */
export function slopeCutoff(env: Envelope, slope: SlopeEnvelope, T: number, span: number, target: number): number | undefined {
  for (let i = 0; i < env.t.length; i++) if (truncationEnd(env, slope, i, T, span) <= target) return env.t[i];
  return undefined;
}

/** the truncation at the range's end for a cut-off tmax (the probe on its left: an over-estimate) */
export function slopeTruncationAt(env: Envelope, slope: SlopeEnvelope, tmax: number, T: number, span: number): number {
  let i = 0;
  while (i + 1 < env.t.length && env.t[i + 1] <= tmax) i++;
  return truncationEnd(env, slope, i, T, span);
}

/**
 * The truncation over the range [yMin, span] after undamping, for a cut-off t: sup_y e^{beta y} times the smaller of
 * the envelope's uniform tail (the cdf's or the density's, `of`) and tau / |sin(h y / 2)| (truncationSup), with tau from
 * the slope envelope's tail, both interpolated to t as the setup does (truncationFrom); for sums answered at every point
 * of the range (grids, points; yMin the nearest to lo of them)
 */
function truncationRange(env: Envelope, of: "cdf" | "pdf", slope: SlopeEnvelope, t: number, T: number, beta: number, span: number, yMin = 0): number {
  const h = (2 * Math.PI) / T;
  return truncationSup(truncationFrom(env, t)[of], tauAt(slope, h, t), h, beta, span, yMin);
}

/**
 * a small cut-off where truncationRange reaches `target` (after undamping; undefined if none): an octave of probes at a
 * time, back probe by probe to the first one of that octave that reaches it (the density's uniform tail carries a noise
 * allowance that grows with t, so the bound is not monotone along all the probes; any cut-off that reaches the target
 * is valid, the setup bounds the sums it keeps), from the first probe whose uniform tail is within the target (the bound
 * is never below it), then by bisection between that probe and the one before (the probes are 9% apart)
 */
export function slopeCutoffRange(env: Envelope, of: "cdf" | "pdf", slope: SlopeEnvelope, T: number, beta: number, span: number, target: number, yMin = 0): number | undefined {
  const t = env.t;
  const ok = (x: number) => truncationRange(env, of, slope, x, T, beta, span, yMin) <= target;
  // over [0, span] the bound is at least the uniform tail itself (truncationSup never falls below it): no probe above the
  // target can do (from yMin > 0 on it may fall below it: every probe is tried)
  const tail = of === "cdf" ? env.tailCdf : env.tailPdf;
  let i0 = 0;
  while (yMin <= 0 && i0 < t.length && tail[i0] > target) i0++;
  for (let j = i0; j < t.length; j += 8) {
    if (!ok(t[j])) continue;
    let i = j;
    while (i > i0 && i > j - 8 && ok(t[i - 1])) i--;
    if (i === 0) return t[0];
    let a = t[i - 1];
    let b = t[i];
    for (let k = 0; k < 8; k++) {
      const m = 0.5 * (a + b);
      if (ok(m)) b = m;
      else a = m;
    }
    return b;
  }
  return ok(t[t.length - 1]) ? t[t.length - 1] : undefined;
}

/** truncationRange at a cut-off tmax */
export function slopeTruncationRange(env: Envelope, of: "cdf" | "pdf", slope: SlopeEnvelope, tmax: number, T: number, beta: number, span: number, yMin = 0): number {
  return truncationRange(env, of, slope, tmax, T, beta, span, yMin);
}
