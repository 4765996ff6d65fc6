// The quantiles' ladder answering from its top level alone (HeavyLadder.top): which level, from the derived bound's parts
// known before the level's nodes are built.
import { imageLadder } from "./images";
import { truncationAt } from "./nodes";
import { richardsonAmplification } from "./richardson";
import { MAX_TERMS, kernelTotals } from "./shared";
import { evalLadder, residualBucket, setTop, type HeavyLadder } from "./heavy-ladder";

/**
 * Level l's derived cdf bound at x less its rounding (known only with the level's nodes): the residual aliasing and the
 * kernels' images at T0 2^l, the images' bounds, twice the truncation at the level's cut-off K h. At most the bound the
 * level reports (which adds the rounding), so a level chosen on it never stops short of what the full ladder did.
 */
function boundBefore(lad: HeavyLadder, x: number, l: number): number {
  const T = lad.T0 * 2 ** l;
  const h = (2 * Math.PI) / T;
  const K = Math.min(Math.max(8, Math.ceil(lad.tmax / h)), MAX_TERMS);
  let e = residualBucket(lad, x, l, false).cdf + 2 * truncationAt(lad.env, K * h).cdf + kernelTotals(lad.part, x).errCdf;
  for (const law of lad.images) e += imageLadder(law.direct, x, T, 1, lad.imageScratch)[0].errCdf;
  return e;
}

/**
 * Pick the top level as the level-by-level ladder did (./quantile-heavy.ts, from three levels, up to three more): the
 * least level from the third whose bound at every probe is within tol, else while the doublings left may bring it there
 * at the last doubling's rate, or while the sums' own floor one extrapolation level up stays below it; at most the sixth.
 * The bounds before the nodes (boundBefore) leave out the rounding: where the built level's own bound then exceeds tol at
 * a probe, one more doubling. False (nothing built) where a probe has no finite bound: the ladder goes level by level.
 */
export function chooseTop(lad: HeavyLadder, probes: number[], tol: number): boolean {
  const scratch = { pdf: new Float64Array(1), cdf: new Float64Array(1), sf: new Float64Array(1), one: new Float64Array(1) };
  const last = Math.min(5, lad.expC.length - 1);
  let l = 2;
  let prevD = NaN;
  let d = Infinity;
  for (; ; l++) {
    d = Math.max(...probes.map((x) => boundBefore(lad, x, l)));
    if (!(d < Infinity)) return false;
    if (l >= last || d <= tol) break;
    const more = l - 2;
    const rate = Number.isFinite(prevD) && prevD > 0 ? Math.min(1, d / prevD) : NaN;
    const reach = Number.isFinite(rate) ? d * rate ** (3 - more) <= tol : d <= 1e3 * tol;
    prevD = d;
    const T = lad.T0 * 2 ** l;
    const K = Math.min(Math.max(8, Math.ceil((lad.tmax * T) / (2 * Math.PI))), MAX_TERMS);
    const floorNext = richardsonAmplification(lad.expC, l + 2) * 2 * truncationAt(lad.env, (K * 2 * Math.PI) / T).cdf;
    if (!reach && floorNext >= d) break;
  }
  setTop(lad, l);
  if (d <= tol && l < last && Math.max(...probes.map((x) => evalLadder(lad, x, scratch).errCdf)) > tol) setTop(lad, l + 1);
  return true;
}
