// The tail analysis of an independent sum: every power-tail index of its terms, the heaviest term (with the other
// terms' moments and its images' pieces) that the power-tail route takes out.
import type { Node } from "./node";
import type { CompiledModel, TailTerm } from "./types";
import { affineDirect } from "./direct/affine";
import { addCumulants } from "./operators-shared";
import { cumulantEst } from "./cumulant-bounds";
import { stopLossBounds, type StopLossBounds } from "./invert/tail-moments";
import { shiftedMajorant } from "./majorant";
import { tailAbsMoment } from "./abs-moment";


/** Every finite power-tail index of the terms (either side), distinct and increasing. */
export function powerIndicesOf(cs: Node[]): number[] {
  const all = cs.flatMap((c) => c.powerIndices ?? [c.tails.left, c.tails.right]).filter((b) => Number.isFinite(b));
  return [...new Set(all)].sort((u, v) => u - v);
}

/**
 * The term of a continuous sum whose power tail is strictly the heaviest (smallest index, on either side) and that has a
 * direct law, with the other terms' mean (they must have one); null otherwise.
 */
export function heaviestTerm(cs: Node[]): TailTerm | null {
  const index = (c: Node) => Math.min(c.tails.left, c.tails.right);
  let best = -1;
  for (let j = 0; j < cs.length; j++) if (best < 0 || index(cs[j]) < index(cs[best])) best = j;
  const D = cs[best];
  const a = index(D);
  if (!D.direct || !Number.isFinite(a) || D.kind.type !== "continuous") return null;
  const rest = cs.filter((_, j) => j !== best);
  const restIndex = Math.min(...rest.map(index));
  if (!(restIndex > a)) return null;
  const restMoment = Math.min(...rest.map((c) => c.momentIndex));
  if (!(restMoment > 1)) return null;
  let shift = 0;
  for (const c of rest) {
    const m = c.cumulants(1)[0];
    if (m === null || !Number.isFinite(m)) return null;
    shift += m;
  }
  const restIndices = [...new Set(rest.flatMap((c) => [c.tails.left, c.tails.right]).filter((b) => Number.isFinite(b)))];
  const indices = [...restIndices, a + 2, ...restIndices.filter((b) => b < 3).map((b) => a + b - 1)];
  const dm = D.momentIndex > 1 ? D.cumulants(1)[0] : null;
  const images = imageTerms(cs, best, shift, dm);
  // D's stop-loss bounds from its moments, formed at the first use; G = D + shift moves u by the shift, rounded by at most
  // dv: the upper transform falls and the lower one rises in u, so each is taken dv towards the body
  let sl: StopLossBounds | null | undefined;
  const restBound = (u: number, side: 1 | -1): number => {
    if (sl === undefined) sl = D.momentIndex > 2 ? stopLossBounds(nodeMoments(D)) : null;
    if (!sl) return Infinity;
    const v = u - shift;
    const dv = Number.EPSILON * (Math.abs(u) + Math.abs(shift));
    return side === 1 ? sl.right(v - dv) : sl.left(v + dv);
  };
  return {
    ...(images ? { images } : {}),
    others: othersMoments(rest),
    rest: restBound,
    logCf: (t, re, im) => D.logCf(t, re, im),
    direct: shift === 0 ? D.direct : affineDirect(D.direct, 1, shift),
    shift,
    mean: dm === null || !Number.isFinite(dm) ? NaN : dm,
    // G = D + shift with this very shift: only D's mean carries an error
    meanError: dm === null || !Number.isFinite(dm) ? Infinity : (cumulantEst(D, 1)[0]?.e ?? Infinity),
    tails: D.tails,
    remainderAlpha: Math.min(...indices),
    indices,
    cfAbsError: (D.cfAbsError ?? 0) + (D.cfRelError ?? 0),
    absMomentAbout: tailAbsMoment(D, shift),
    ...(D.logMajorant ? { logAbsMajorant: shiftedMajorant(shift, D.logMajorant) } : {}),
  };
}

/** What stopLossBounds reads of a model, from a node: its moment index, cumulants with their bounds, and support. */
function nodeMoments(D: Node): CompiledModel {
  const view: Pick<CompiledModel, "momentIndex" | "cumulants" | "cumulantErrors" | "support"> = {
    momentIndex: D.momentIndex,
    cumulants: (n) => D.cumulants(n),
    cumulantErrors: (n) => cumulantEst(D, Math.max(0, Math.min(Math.floor(n), 64))).map((v) => (v === null ? null : v.e)),
    support: D.support,
  };
  return view as CompiledModel;
}

/**
 * What momentBounds (invert/moment-tails.ts) reads of the sum Y of the other terms: the least moment index, the cumulants
 * added, each with the sum of the terms' derived bounds plus the rounding of the addition (n - 1 roundings of partial sums
 * at most sum |kappa| in size).
 */
function othersMoments(rest: Node[]): TailTerm["others"] {
  const view: Pick<CompiledModel, "momentIndex" | "cumulants" | "cumulantErrors" | "support"> = {
    momentIndex: Math.min(...rest.map((c) => c.momentIndex)),
    cumulants: (n) => addCumulants(rest.map((c) => c.cumulants(n)), n),
    cumulantErrors: (n) => {
      const m = Math.max(0, Math.min(Math.floor(n), 64));
      const per = rest.map((c) => cumulantEst(c, m));
      const out: (number | null)[] = [];
      for (let k = 0; k < m; k++) {
        let e = 0;
        let abs = 0;
        for (const p of per) {
          const v = p[k];
          if (v === null || v === undefined) {
            e = NaN;
            break;
          }
          e += v.e;
          abs += Math.abs(v.v);
        }
        out.push(Number.isNaN(e) ? null : e + rest.length * Number.EPSILON * abs);
      }
      return out;
    },
    support: [rest.reduce((s, c) => s + c.support[0], 0), rest.reduce((s, c) => s + c.support[1], 0)],
  };
  return view as CompiledModel;
}

/**
 * The images of the heaviest term D = cs[best] and of the next heaviest, when that one too has a direct law and a power
 * tail strictly heavier than the rest (see TailTerm.images): G_2 = D_2 + E[X - D_2] needs D's mean as well.
 */
function imageTerms(cs: Node[], best: number, shift: number, dm: number | null): TailTerm["images"] | null {
  if (cs.length < 2 || dm === null || !Number.isFinite(dm)) return null;
  const index = (c: Node) => Math.min(c.tails.left, c.tails.right);
  let second = -1;
  for (let j = 0; j < cs.length; j++) if (j !== best && (second < 0 || index(cs[j]) < index(cs[second]))) second = j;
  const D2 = cs[second];
  const a2 = index(D2);
  if (!D2.direct || !Number.isFinite(a2) || D2.kind.type !== "continuous" || !(D2.momentIndex > 1)) return null;
  const others = cs.filter((_, j) => j !== best && j !== second);
  if (!(Math.min(...others.map(index)) > a2)) return null;
  const m2 = D2.cumulants(1)[0];
  if (m2 === null || !Number.isFinite(m2)) return null;
  // E[X - D_2] = E[rest of D] - E[D_2] + E[D]
  const shift2 = shift - m2 + dm;
  const D = cs[best];
  const a1 = index(D);
  const finite = (c: Node) => [c.tails.left, c.tails.right].filter((b) => Number.isFinite(b));
  const otherIdx = [...new Set(others.flatMap(finite))];
  const indices = [...new Set([...otherIdx, a1 + 2, a2 + 2, ...[...otherIdx, ...finite(D2)].filter((b) => b < 3).map((b) => a1 + b - 1), ...[...otherIdx, ...finite(D)].filter((b) => b < 3).map((b) => a2 + b - 1)])];
  // for a derived bound on what the two terms' images leave (invert/heavy-residual2.ts): X = G_1 + G_2 - m + Z with
  // m = E[X] as computed, Z = the other terms less (shift2 - dm), and a bound on the means' errors and roundings
  const eMean = (c: Node) => cumulantEst(c, 1)[0]?.e ?? Infinity;
  // the other terms with power tails and density majorants apart (each about its mean as computed; any point serves)
  const heavyZ = others.filter((c) => Number.isFinite(index(c)) && c.direct?.powerTail && c.kind.type === "continuous" && Number.isFinite(c.cumulants(1)[0] ?? NaN));
  const lightZ = others.filter((c) => !heavyZ.includes(c));
  const mZ = heavyZ.map((c) => c.cumulants(1)[0]!);
  const split =
    heavyZ.length && lightZ.every((c) => !Number.isFinite(index(c)))
      ? {
          heavy: heavyZ.map((c, i) => ({ tail: c.direct!.powerTail!, m: mZ[i], spread: c.direct!.spread })),
          light: lightZ.length ? othersMoments(lightZ)! : null,
          lShift: shift2 - dm - mZ.reduce((a, b) => a + b, 0),
        }
      : null;
  const pair = {
    m: shift + dm,
    zShift: shift2 - dm,
    meanError: eMean(D) + eMean(D2) + 8 * Number.EPSILON * (Math.abs(shift) + Math.abs(dm) + Math.abs(m2) + Math.abs(shift2)),
    others: others.length ? othersMoments(others)! : null,
    ...(split ? { split } : {}),
  };
  return {
    laws: [
      { direct: shift === 0 ? D.direct! : affineDirect(D.direct!, 1, shift), tails: D.tails },
      { direct: shift2 === 0 ? D2.direct : affineDirect(D2.direct, 1, shift2), tails: D2.tails },
    ],
    remainderAlpha: Math.min(...indices),
    indices,
    pair,
  };
}
