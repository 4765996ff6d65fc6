// The characteristic function at frequencies the caller chooses, each value with a bound on its absolute error, for
// POST /api/v1/cf. The parts are those the inversion routes charge a node (invert/part.ts cfRelError, invert/nodes.ts
// buildNodes, invert/grid-rounding.ts nodeMoves), at the caller's exact frequencies.
import { cfRelError, cfUlps } from "./invert/part";
import type { CompiledModel } from "./types";

const EPS = Number.EPSILON;

export interface CfValues {
  re: Float64Array;
  im: Float64Array;
  /** a bound on |phi~(t) - phi(t)| at each t; NaN where the model derives none (its notes say why) */
  error: Float64Array;
  notes: string[];
}

export const CF_ARG_NOTE =
  "no error bound where the model rounds scaled frequencies inside a term without a derived slope bound (a stable law with alpha <= 1, or a compound or layer of a claim without a variance): those values are null in `error`";

export const CF_DECLARED_NOTE =
  "no error bound where the model declares no finite error for its CF values (a compound whose count has no mean over a numerical claim law): those values are null in `error`";

/**
 * phi(t) = exp(L(t)) from the model's log-CF, with |phi~ - phi| <= |phi| (e_L + e_decl) + a + min(S |t|, A(|t|)):
 * e_L the rounding of L, exp, cos and sin (cfRelError: ulps of the tree relative to 1 + |L|, plus the model's extra
 * per-frequency term), e_decl the model's declared relative error (numerical severities in compounds), a its declared
 * absolute error (numerical CFs), and S |t| the frequencies the tree rounds (scaled arguments, cfArgSlope; the finer
 * cfArgErrAt where derived). phi(-t) is the conjugate of phi(t), so |t| serves both signs.
 */
export function cfValues(model: CompiledModel, t: Float64Array): CfValues {
  const n = t.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const error = new Float64Array(n);
  model.logCf(t, re, im);
  const ulps = cfUlps(model);
  const extra = model.logCfExtraError;
  // a declaration with no finite bound (NaN, Infinity) is not read as 0: it leaves its values without a bound
  const dRel = model.cfRelError ?? 0;
  const abs = model.cfAbsError ?? 0;
  const S0 = model.cfArgSlope ?? 0;
  const S = S0 * (1 + 2 * EPS);
  const argAt = model.cfArgErrAt;
  let undone = false;
  for (let k = 0; k < n; k++) {
    const lr = re[k];
    const li = im[k];
    const at = Math.abs(t[k]);
    const m = Math.exp(lr);
    if (m === 0) {
      re[k] = 0;
      im[k] = 0;
    } else {
      re[k] = m * Math.cos(li);
      im[k] = m * Math.sin(li);
    }
    const rel = m === 0 ? 0 : cfRelError(ulps, lr, li, at, 0) + (extra ? extra(at) : 0) + dRel;
    // the scaled frequencies' rounding: none at t = 0 (every argument is 0 there)
    let arg = at === 0 ? 0 : S * at;
    if (at > 0 && argAt) arg = Math.min(arg, argAt(at));
    if (Number.isNaN(arg)) undone = true;
    // (a value that underflowed to 0 is within the absolute parts and its own size, below the smallest normal)
    const e = (m * rel + abs + arg + (m === 0 ? 1e-322 : 0)) * (1 + 4 * EPS);
    error[k] = Number.isNaN(lr) || Number.isNaN(li) ? NaN : e;
  }
  const notes = undone ? [CF_ARG_NOTE] : [];
  if (!(Number.isFinite(dRel) && Number.isFinite(abs))) notes.push(CF_DECLARED_NOTE);
  return { re, im, error, notes };
}
