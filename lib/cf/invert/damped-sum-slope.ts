// The summation-by-parts envelopes of a sum bounded through the operators: |psi_c'| from the product rule's slope bounds.
import type { Atom, CompiledModel } from "../types";
import { envelopeOf } from "./nodes";
import type { Probed } from "./damped-psi";
import type { SlopeEnvelope } from "./damped-slope";

const EPS = Number.EPSILON;

/**
 * Per probe t_i, a bound on |psi_c'| at every frequency t >= t_i for a sum of compounds and gamma terms whose envelope is
 * derived through the operators (./damped-psi.ts probeAt, the same pieces): psi_c = (psi past lo) - atom + (atom's
 * difference, constant in t) - sum of kernels, so |psi_c'| <= the operators' slope (../damped-majorant.ts: the product
 * rule over the telescoped product, non-increasing) plus each kernel's w e^{-beta (at - lo)} (rate / r)^shape (|at - lo| +
 * shape / r), r = |rate + beta - i t| (d/dt of e^{-i t (at - lo)} (rate / (rate + beta - i t))^shape, both non-increasing);
 * where the sum's bounds see its kernels cancel (../damped-kernel-rest.ts) the least of both. Null where not derived.
 */
export function sumSlopeBounds(model: CompiledModel, atoms: Atom[], beta: number, env: Probed): Float64Array | null {
  const dm = model.dampedMajorant;
  const lo = model.support[0];
  if (!env.derived || env.throughOperators !== true || !dm || model.dampedSeverity || !atoms.every((a) => a.x === lo)) return null;
  // the probe formed these very bounds beside its sizes (the same operations, ./damped-psi.ts probeAt): taken from it
  if (env.opSlope && env.opSlope.beta === beta) {
    const s = env.opSlope.s;
    for (let i = 0; i < s.length; i++) if (!(s[i] <= Infinity)) return null;
    return s;
  }
  const ks = model.dampedKernels ?? [];
  const kr = dm.kernelRest && dm.kernelRest.kernels === model.dampedKernels ? dm.kernelRest : null;
  const tp = env.t;
  const n = tp.length;
  const s = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let v = dm.slope(beta, tp[i]);
    for (const k of ks) {
      const w = Math.abs(k.w) * Math.exp(-beta * (k.at - lo)) * (1 + 8 * EPS);
      const r = Math.hypot(k.rate + beta, tp[i]);
      v += w * Math.pow(k.rate / r, k.shape) * (1 + 16 * EPS) * (Math.abs(k.at - lo) + k.shape / r) * (1 + 4 * EPS);
    }
    v *= 1 + 4 * (ks.length + 2) * EPS;
    if (kr) v = Math.min(v, kr.at(beta, tp[i]).slope);
    if (!(v <= Infinity)) return null;
    s[i] = v;
  }
  return s;
}

/**
 * The slope envelopes (./damped-slope.ts) of such a sum: of |c'| for the cdf's coefficients c = psi_c / (beta - i t),
 * |c'| <= |psi_c'| / |beta - i t| + |psi_c| / |beta - i t|^2, and of |psi_c'| for the density's. Each tail is the steps'
 * integral (1/pi) int_{t_i}^{t_n}; past the last probe t_n no slope bound is derived, so there the far part:
 * with nodes t_k = (k + 1/2) h and partial sums of e^{-i t_k y} from K at most 1 / |sin(h y / 2)| (./damped-slope.ts), Abel's
 * summation (c_k -> 0: |c_k| is at most the derived size bound, which falls like t^-q past t_n) gives the truncated sum
 * as sum_{k >= K} (c_k - c_{k+1}) S_k, so what the setup bounds is (h / pi) sum_{k >= K} |c_k - c_{k+1}|. With N the last
 * node at or below t_n: the terms with t_{k+1} <= t_n are each at most int_{t_k}^{t_{k+1}} |c'|, in all at most the steps'
 * integral from the cut-off (the tail below); the rest at most |c_k| + |c_{k+1}|, in all 2 sum_{k >= N} |c_k| (or from K,
 * where K > N). With E_i >= |c| at every t >= t_i (the derived envelope of |psi_c|; over |beta - i t| >= t for the cdf)
 * and h <= t_n - t_{n-2} (then t_N > t_n - h >= t_{n-2}): |c_N| <= E_{n-2}, the first node past t_n <= E_{n-1}, each
 * further one at most (1 / h) times the integral over the cell before it of the size bound past t_n, in all I / h with
 * I = int_{t_n}^inf of it (the cdf's: the derived envelope's tailCdf at t_n, R / q, that integral or it over pi; the
 * density's from the size bound's power, see below). So (h / pi) 2 sum |c_k| <= h (2 / pi) (E_{n-2} + E_{n-1}) + 2 tail(t_n) (`far`; the tail Infinity where not derived).
 */
export function sumSlopeEnvelopes(model: CompiledModel, atoms: Atom[], beta: number, env: Probed, pdf: boolean): { c: SlopeEnvelope; p: SlopeEnvelope | null } | null {
  const s = sumSlopeBounds(model, atoms, beta, env);
  if (!s) return null;
  const tp = env.t;
  const n = tp.length;
  const mc = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const d2 = beta * beta + tp[i] * tp[i];
    mc[i] = (s[i] / Math.sqrt(d2) + env.env[i] / d2) * (1 + 8 * EPS);
  }
  // the density's I: not the envelope's tailPdf, which where the power is 1 is the split's (jumpTail: what G's inversion
  // misses, not an integral of |psi_c|), but the size bound's own power past t_n, R (t_n / t)^q, as ./damped-psi.ts probeAt
  // forms it: int = R t_n / (q - 1) for q > 1, else none (over pi for the tail's units; 2 tail then bounds 2 I / pi)
  const { R, q } = sizePower(model, beta, tp[n - 1]);
  const farPdf = q > 1 ? ((R * tp[n - 1]) / ((q - 1) * Math.PI)) * (1 + 8 * EPS) : Infinity;
  const make = (mag: Float64Array, of: "cdf" | "pdf"): SlopeEnvelope => {
    const e = envelopeOf(tp, mag, () => 0);
    const tailPdf = new Float64Array(n);
    let sp = 0;
    for (let i = n - 2; i >= 0; i--) {
      sp += e.env[i] * (tp[i + 1] - tp[i]);
      tailPdf[i] = (sp / Math.PI) * (1 + 2 * n * EPS);
    }
    // E_i: |psi_c| itself for the density, over |beta - i t| >= t_i for the cdf
    const E = (i: number) => (of === "pdf" ? env.env[i] : env.env[i] / tp[i]);
    const tail = of === "pdf" ? farPdf : env.tailCdf[n - 1];
    const far = { step: ((2 * (E(n - 2) + E(n - 1))) / Math.PI) * (1 + 8 * EPS), tail: 2 * tail * (1 + 4 * EPS), hMax: tp[n - 1] - tp[n - 2] };
    return { ...e, tailPdf, derived: true, far };
  };
  return { c: make(mc, "cdf"), p: pdf ? make(s, "pdf") : null };
}

/**
 * R and q with |psi_c(t)| <= R (t_n / t)^q for t >= t_n, as ./damped-psi.ts probeAt takes them for the tail of a sum bounded
 * through the operators: the operators' decay (../damped-majorant.ts), each kernel adding w e^{-beta (at - lo)} (rate / t_n)^shape
 * (r >= t) at power shape, or the kernel rest's (../damped-kernel-rest.ts) where its R / q is the smaller (the atom's
 * difference is 0 here: probeAt derives no tail otherwise)
 */
function sizePower(model: CompiledModel, beta: number, tn: number): { R: number; q: number } {
  const dm = model.dampedMajorant!;
  const lo = model.support[0];
  const d = dm.decay(beta, tn);
  let R = d.R;
  let q = d.q;
  for (const k of model.dampedKernels ?? []) {
    const w = Math.abs(k.w) * Math.exp(-beta * (k.at - lo)) * (1 + 8 * EPS);
    R += w * Math.pow(k.rate / tn, k.shape) * (1 + 16 * EPS);
    q = Math.min(q, k.shape);
  }
  const kr = dm.kernelRest && dm.kernelRest.kernels === model.dampedKernels ? dm.kernelRest : null;
  if (kr) {
    const dk = kr.decay(beta, tn);
    if (dk.q > 0 && dk.R / dk.q < R / q) return dk;
  }
  return { R, q };
}
