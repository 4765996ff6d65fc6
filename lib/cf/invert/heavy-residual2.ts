import { add, at, heavyPart, merge, mono, mul, value, ZERO, type Heavy, type Poly } from "./pair-poly";
import type { TailTerm } from "../types";
import { momentBounds } from "./moment-tails";
import { residualAliasing, type ResidualLaw } from "./heavy-residual";
import { kernelAliasing } from "./kernel-images";
import type { EndpointKernels } from "./part";

/**
 * A derived bound on the aliasing left when the images of two power-tailed terms are taken out (./images.ts,
 * TailTerm.images): X = G_1 + G_2 - m + Z with A = G_1 - m, B = G_2 - m, Z independent, and the residual of one image
 * (right side, u = y - m) D(u) = P(A + B + Z > u) - P(A > u) - P(B > u) (and the stop-loss transforms' likewise). Split
 * on |B| <= r_b = u/3, then on |Z| <= r_z = u/6 and |A| <= r_a = u/6 (V = B + Z, W = A + Z):
 *   P(A + V > u) - P(A > u) on |B| <= r_b: Taylor in V (integral remainder) on the good set, |V| <= u/2:
 *     f_A(u) |E[V; good]| + (E[B^2; |B| <= r_b] / 2 + E Z^2 / 2 + E|B| (|E Z| + E[|Z|; |Z| > r_z])) sup_{u/2} |f_A'|
 *     + S_A(u/6) P(|Z| > r_z) + P(Z > u/2) + S_A(u) P(Z < -u/2)
 *     (for r_z < |Z| <= u/2, u - V lies in [u/6, 11u/6], where S_A(u - V) and S_A(u) both lie in [0, S_A(u/6)]; for
 *     Z < -u/2, u - V > u, where both lie in [0, S_A(u)]);
 *   on |B| > r_b: P(B > max(u - W, r_b)) + P(u - W < B < -r_b) - P(A > u) P(|B| > r_b), and
 *     E S_B(max(u - W, r_b)) - S_B(u) = Taylor in W on |A| <= r_a, |Z| <= r_z (u - W >= r_b there) plus at most
 *     S_B(r_b) (P(A > r_a) + P(|Z| > r_z)) + S_B(u) P(A < -r_a) elsewhere (both terms lie in [0, S_B(r_b)], so their
 *     difference is at most the larger; on A < -r_a, |Z| <= r_z, W <= 0 and u - W >= u: both in [0, S_B(u)]);
 *     P(u - W < B < -r_b) <= P(B < -r_b) P(W > u + r_b) <= P(B < -r_b) (S_A(u + r_b - r_z) + P(|Z| > r_z)).
 * The stop-loss transform the same way, with pi_A, S_A, f_A one derivative lower, |pi'| <= 1 (so the bad part of the Z split
 * costs pi_A(u/6) P(|Z| > r_z) + r_b P(|Z| > u/2) + E[|Z|; |Z| > u/2]), and on |B| > r_b phi(t) = E[(B - t)^+; B > r_b] (= pi_B(t) for t >= r_b,
 * pi_B(r_b) + (r_b - t) S_B(r_b) below): off the good set both phi(u - W) and pi_B(u) lie in [0, pi_B(r_b) +
 * (W - u + r_b)^+ S_B(r_b)] (on A < -r_a, |Z| <= r_z: [0, pi_B(u)]), so |phi(u - W) - pi_B(u)| is at most that, and
 * E[(W - (u - r_b))^+] <= pi_A((u - r_b)/2) + E[|Z|; |Z| > (u - r_b)/2]; E[(B + W - u)^+; B < -r_b] <= P(B < -r_b)
 * E[(W - u - r_b)^+], (a + b - t)^+ <= (a - t/2)^+ + (b - t/2)^+. The density's pieces as the cdf's, one derivative higher.
 * The heavy parts' tails, truncated moments and density majorants come from their power-law majorants
 * (../direct/power-tail.ts) in the distance t from m (for t >= t0, where the distance to the majorant's origin is at least
 * 7t/8); Z's from Markov's inequality on its even moments (./moment-tails.ts). Every piece is then a sum of powers c u^-q
 * (a posynomial in u), summed over the images: the first IMAGES one by one, the rest by the integral (each q > 1).
 * The left side is the right side of the reflected variables.
 */

const IMAGES = 8;
const U = Number.EPSILON;

export interface PairLaw {
  A: Heavy;
  B: Heavy;
  m: number;
  /** log E|Z|^n (even n), E Z^2, |E Z| + the other offsets (delta) */
  lz: Float64Array | null;
  vZ: number;
  delta: number;
  /** imageBound's polynomials */
  polys?: Map<string, Poly>;
  /** pairAliasing's radii set by kind and period (RADII's index) */
  radii?: Map<string, number>;
  /** Z split into power-tailed parts and a light rest (TailTerm.images.pair.split), where known: the even shares and the
   *  light part's 1/8 and 1/32 (ZSplit) */
  zs: ZSplit[];
}

/**
 * Z = sum_i H_i + L' (J parts, H_i = D_i - m_i with power-law majorants, L' the rest with even moments, or the constant
 * -lShift when there is none): on |Z| > r some part exceeds rho_j r, sum_j rho_j = 1 - 1/64 (the rounding of the shifts
 * and a constant part c below r/64: r >= minR), so P(|Z| > r) <= sum_j P(|X_j| > rho_j r) and
 * E[|Z|; |Z| > r] <= sum_j E[|X_j| 1{|X_j| > rho_j r}] + sum_j E|X_j| sum_i P(|X_i| > rho_i r) (independence). The shares
 * are even (rho_j = (1 - 1/64)/J), or the light part's is 1/8 or 1/32 and the heavy parts share the rest: its Markov bound
 * falls fast, and the heavy parts' tails read at 0.86 r or 0.95 r instead of 0.49 r (a pareto(2.55) beside the pair: 4-5x
 * less).
 */
interface ZSplit {
  H: Heavy[];
  /** log E|L'|^n (even n), null without a light part */
  lz: Float64Array | null;
  /** each heavy part's share and the light part's */
  rho: number;
  rhoL: number;
  /** sum_j E|X_j| */
  EA: number;
  /** the least r the bounds hold for (each H_i's t0 / rho, 64 times the constant part and the shifts' rounding) */
  minR: number;
}

function zSplitOf(split: NonNullable<NonNullable<NonNullable<TailTerm["images"]>["pair"]>["split"]>, zShift: number, lightShare = 0): ZSplit | null {
  const H: Heavy[] = [];
  for (const h of split.heavy) {
    const p = heavyPart(h.tail, h.m, h.spread);
    if (!p) return null;
    H.push(p);
  }
  const J = H.length + (split.light ? 1 : 0);
  const uneven = lightShare > 0 && split.light && H.length > 0;
  const rho = (uneven ? (1 - 1 / 64 - lightShare) / H.length : (1 - 1 / 64) / J) * (1 - 4 * U);
  const rhoL = uneven ? lightShare * (1 - 4 * U) : rho;
  let EA = H.reduce((a, h) => a + h.EA, 0);
  let lz: Float64Array | null = null;
  // the shifts' rounding: lShift = zShift - sum m_i within a few ulps of the sizes
  const eps = 8 * U * (Math.abs(zShift) + Math.abs(split.lShift) + split.heavy.reduce((a, h) => a + Math.abs(h.m), 0));
  let c = 0;
  if (split.light) {
    const mb = momentBounds(split.light, split.lShift);
    if (!mb || mb.logU.length < 3 || !Number.isFinite(mb.logU[2])) return null;
    const lc = Math.log(mb.c);
    lz = new Float64Array(mb.logU.length).fill(NaN);
    for (let n = 2; n < mb.logU.length; n += 2) if (Number.isFinite(mb.logU[n])) lz[n] = mb.logU[n] + n * lc + 4 * U * (Math.abs(mb.logU[n]) + n * Math.abs(lc) + 1);
    EA += Math.exp(lz[2] / 2) * (1 + 4 * U);
  } else c = Math.abs(split.lShift);
  const minR = Math.max(...H.map((h) => h.t0 / rho), 64 * (c + eps));
  return { H, lz, rho, rhoL, EA: EA * (1 + 4 * U), minR };
}

/** pairLawOf per compiled term: its parts and polynomials (pure functions of the term) shared by every call on it */
const LAWS = new WeakMap<TailTerm, PairLaw | null>();

/**
 * The pair's law, where both terms have power-law majorants (and a mean) and the others have a variance: built once per
 * term (the quantiles' and the density's calls on a model share its parts and imageBound's polynomials), each call with
 * its own radii choices (pairAliasing), so that an answer does not depend on the calls before it.
 */
export function pairLaw(term: TailTerm): PairLaw | null {
  let L = LAWS.get(term);
  if (L === undefined) LAWS.set(term, (L = pairLawOf(term)));
  return L ? { ...L, radii: undefined } : null;
}

function pairLawOf(term: TailTerm): PairLaw | null {
  const im = term.images;
  const pair = im?.pair;
  if (!im || !pair || im.laws.length !== 2 || !Number.isFinite(pair.meanError)) return null;
  const [g1, g2] = im.laws;
  if (!g1.direct.powerTail || !g2.direct.powerTail) return null;
  const A = heavyPart(g1.direct.powerTail, pair.m, g1.direct.spread);
  const B = heavyPart(g2.direct.powerTail, pair.m, g2.direct.spread);
  if (!A || !B) return null;
  let lz: Float64Array | null = null;
  let vZ = 0;
  let dz = 0;
  const Y = pair.others;
  if (Y) {
    if (!(Y.momentIndex > 2)) return null;
    const mb = momentBounds(Y, pair.zShift);
    if (!mb || mb.logU.length < 3 || !Number.isFinite(mb.logU[2])) return null;
    const k1 = Y.cumulants(1)[0];
    const e1 = Y.cumulantErrors?.(1)[0];
    if (k1 === null || e1 === null || e1 === undefined || !Number.isFinite(k1) || !Number.isFinite(e1)) return null;
    const lc = Math.log(mb.c);
    lz = new Float64Array(mb.logU.length).fill(NaN);
    for (let n = 2; n < mb.logU.length; n += 2) if (Number.isFinite(mb.logU[n])) lz[n] = mb.logU[n] + n * lc + 4 * U * (Math.abs(mb.logU[n]) + n * Math.abs(lc) + 1);
    vZ = Math.exp(lz[2]) * (1 + 4 * U);
    dz = Math.abs(k1 - pair.zShift) + e1;
  }
  const zs: ZSplit[] = [];
  if (pair.split && Y) {
    for (const share of [0, 1 / 8, 1 / 32]) {
      const z = zSplitOf(pair.split, pair.zShift, share);
      if (z && (share === 0 || z.rhoL !== z.rho)) zs.push(z);
    }
  }
  return { A, B, m: pair.m, lz, vZ, delta: (pair.meanError + dz) * (1 + 4 * U), zs, polys: new Map() };
}

/** the even order n of Z's moments best at r1 for E[|Z|; |Z| > r1] <= E|Z|^n r1^(1-n) (0 without Z, NaN without any) */
function zOrder(lzs: Float64Array | null, r1: number): number {
  if (!lzs) return 0;
  let best = NaN;
  let bv = Infinity;
  const lr = Math.log(r1);
  for (let n = 2; n < lzs.length; n += 2) {
    const v = lzs[n] - (n - 1) * lr;
    if (v < bv) {
      bv = v;
      best = n;
    }
  }
  return best;
}

/** Z's tails: P(|Z| > r), E[|Z|; |Z| > r], and P(Z > r), P(Z < -r) (Ps, by side as Heavy.sf) */
type ZTails = { P: Poly; E1: Poly; Ps: [Poly, Poly] };

/** Z's P(|Z| > r) and E[|Z|; |Z| > r] as monomials in r at the even order n (Markov; each side's tail at most P) */
function zTails(lzs: Float64Array | null, best: number): ZTails {
  if (!lzs || best === 0) return { P: ZERO, E1: ZERO, Ps: [ZERO, ZERO] };
  if (!Number.isFinite(best)) return { P: mono(Infinity, 0), E1: mono(Infinity, 0), Ps: [mono(Infinity, 0), mono(Infinity, 0)] };
  const mn = Math.exp(lzs[best] + 4 * U * (Math.abs(lzs[best]) + 1)) * (1 + 4 * U);
  const P = mono(mn, best);
  return { P, E1: mono(mn, best - 1), Ps: [P, P] };
}

/** Z's tails from its split (ZSplit), for r >= minR; the light part's Markov order n. One side: Z > r needs some part
 *  above its share (X_j > rho_j r), as |Z| > r needs |X_j| > rho_j r */
function zSplitTails(z: ZSplit, n: number): ZTails {
  const l = zTails(z.lz, n);
  const P = add(...z.H.map((h) => at(h.P, z.rho)), at(l.P, z.rhoL));
  const E1 = add(...z.H.map((h) => at(h.E1, z.rho)), at(l.E1, z.rhoL), mul(mono(z.EA, 0), P));
  const side = (d: 0 | 1) => merge(add(...z.H.map((h) => at(h.sf[d], z.rho)), at(l.P, z.rhoL)));
  return { P: merge(P), E1: merge(E1), Ps: [side(0), side(1)] };
}

export type PairKind = "cdf" | "pdf" | "stopLoss";

/** one side's per-image bound as a polynomial in u (d = 0 right, 1 left: the left tails of both parts), equal powers merged
 *  and kept per side, kind and Z's moment order */
function imageBound(L: PairLaw, d: 0 | 1, kind: PairKind, u1: number, split: number, r: number): Poly {
  const R = RADII[r];
  const zs = split >= 0 ? L.zs[split] : null;
  const n = zs ? zOrder(zs.lz, zs.rhoL * u1 * R.z) : zOrder(L.lz, u1 * R.z);
  const key = `${zs ? `s${split}` : "m"}:${d}:${kind}:${n}:${r}`;
  const cache = (L.polys ??= new Map());
  let p = cache.get(key);
  if (!p) cache.set(key, (p = merge(imageBoundAt(L, d, kind, zs ? zSplitTails(zs, n) : zTails(L.lz, n), R))));
  return p;
}

/**
 * The split radii as fractions of u: r_b = b u, r_a = a u, r_z = z u, and k u where the bad Z set of the first piece is
 * split again (1/3, 1/6, 1/6, 1/2 in the comment at the top). Each set keeps the conditions the pieces use: b + k < 1 (u - V
 * >= (1 - b - k) u on |Z| <= k u), a + z <= 1 - b (u - W >= r_b on the second piece's good set), z <= b (u - B - Z >= u on
 * B < -r_b, |Z| <= r_z, for the density), z <= k; every bound holds for each set, so their least is taken per period and
 * point (pairAliasing). The majorants are read at (1 - b - z) u, (1 - a - z) u, (1 - b - k) u, b u, a u (all at least t0).
 */
const RADII = [
  { b: 1 / 3, a: 1 / 6, z: 1 / 6, k: 1 / 2 },
  { b: 1 / 4, a: 1 / 4, z: 1 / 8, k: 1 / 2 },
  { b: 1 / 4, a: 1 / 8, z: 1 / 8, k: 1 / 2 },
  { b: 3 / 8, a: 3 / 16, z: 1 / 8, k: 5 / 16 },
  // a third power tail in Z (a pareto beside the pair): its own images, P(Z > k u), want k near 1, the pair's pieces at
  // small radii then far below it
  { b: 1 / 8, a: 1 / 8, z: 1 / 16, k: 3 / 4 },
  { b: 1 / 16, a: 1 / 16, z: 1 / 32, k: 7 / 8 },
] as const;
type Radii = (typeof RADII)[number];
/** a fraction rounded down (majorants decreasing in t are read there) or up (E[H^2; |H| <= r] and r itself) */
const down = (x: number) => x * (1 - 4 * U);
const up = (x: number) => x * (1 + 4 * U);
/** the least fraction of u any majorant is read at */
const leastRead = (R: Radii) => down(Math.min(R.a, R.b, 1 - R.b - R.k, 1 - R.b - R.z, 1 - R.a - R.z));

function imageBoundAt(L: PairLaw, d: 0 | 1, kind: PairKind, z: ZTails, R: Radii): Poly {
  const { A, B } = L;
  const [rz, ra, rb, k] = [down(R.z), down(R.a), down(R.b), down(R.k)];
  // where the Taylor terms read A's and B's derivatives, where the bad Z set reads A's, and the split of (W - u - r_b)^+
  const tA = down(1 - R.b - R.z);
  const tB = down(1 - R.a - R.z);
  const bz = down(1 - R.b - R.k);
  const half = down((1 + R.b) / 2);
  const far = down((1 - R.b) / 2);
  const PZ = at(z.P, rz);
  const E1Z = at(z.E1, rz);
  const EZ = Math.sqrt(L.vZ) * (1 + 2 * U);
  const PA = at(A.P, ra);
  const PB = at(B.P, rb);
  const E1A = at(A.E1, ra);
  const E1B = at(B.E1, rb);
  const c = (k: number) => mono(k, 0);
  // |E[V; good]| and |E[W; good]| (V = B + Z, W = A + Z): the offsets and the parts off the good set
  // (equal powers merged as they are formed: the products below would multiply the terms' counts)
  const offV = merge(add(c(L.delta), E1B, mul(c(B.EA), PZ), E1Z, mul(c(EZ), PB)));
  const offW = merge(add(c(L.delta), E1A, mul(c(A.EA), PZ), E1Z, mul(c(EZ), PA)));
  // Taylor's remainder in V on the good set G = {|B| <= r_b, |Z| <= r_z}: |g(V) - g(0) - V g'(0)| <= (V^2 / 2) sup |g''|, and
  // (B, Z independent) E[V^2; G] <= E[B^2; |B| <= r_b] + E Z^2 + 2 |E[B; |B| <= r_b]| |E[Z; |Z| <= r_z]|, with
  // |E[B; |B| <= r_b]| <= E|B| and |E[Z; |Z| <= r_z]| <= |E Z| + E[|Z|; |Z| > r_z] <= delta + E1Z: so half the second
  // moments plus the cross term (before: the whole second moments, from (B + Z)^2 <= 2 B^2 + 2 Z^2); W = A + Z alike
  const m2V = merge(add(mul(c(0.5), add(at(B.M2, up(R.b)), c(L.vZ))), mul(c(B.EA), add(c(L.delta), E1Z))));
  const m2W = merge(add(mul(c(0.5), add(at(A.M2, up(R.a)), c(L.vZ))), mul(c(A.EA), add(c(L.delta), E1Z))));
  const bad = merge(add(PA, PZ));
  // off the second piece's good set split by A's side: on {A > r_a} or {|Z| > r_z} the difference is at most B's quantity
  // at r_b; on {A < -r_a, |Z| <= r_z}, W <= 0 (z <= a in every radii set) and u - W >= u, where B's quantity at u bounds
  // both terms. B's left tail alone where B < -r_b is asked (P(B < -r_b) <= P(|B| > r_b))
  const split = R.z <= R.a;
  const badHi = split ? merge(add(at(A.sf[d], ra), PZ)) : bad;
  const PAl = split ? at(A.sf[1 - d], ra) : ZERO;
  const PBl = at(B.sf[1 - d], rb);
  const offGood = (q: Poly[]) => add(mul(at(q[d], rb), badHi), mul(q[d], PAl));
  // the bad Z set of the first piece split at |Z| = u/2: up to it u - V stays within [u/6, 11u/6] (|B| <= u/3), so the
  // difference there is at most A's tail (density) at u/6; beyond it at most 1 (fmax_A)
  const PZ2 = at(z.P, k);
  // by Z's side: on Z < -k u (the reflected side's likewise), u - V >= (1 - b + k) u, where A's tail (density) there bounds
  // both terms instead of 1 (fmax_A)
  const PZ2hi = at(z.Ps[d], k);
  const PZ2lo = at(z.Ps[1 - d], k);
  const lowRead = down(Math.min(1, 1 - R.b + R.k));
  if (kind === "pdf") {
    // f_X(u) - f_A(u) - f_B(u) = [E f_A(u - V) 1{|B| <= r_b} - f_A(u) P(|B| <= r_b)] - f_A(u) P(|B| > r_b)
    //   + [E f_B(u - W) 1{u - W > r_b} - f_B(u)] + E f_W(u - B) 1{B < -r_b}   (int_{|b| > r_b} f_B(b) f_W(u - b) db split
    // at b = r_b and b = -r_b, W = A + Z): the cdf's pieces one derivative higher (Taylor with f'' on the good sets), the
    // bad Z set at most f_A(u/6) P(|Z| > r_z) + fmax_A P(|Z| > u/2) in the first, the bad set of the third at most
    // f_B's majorant at r_b times P(bad) (both f_B(u - W) 1{u - W > r_b} and f_B(u) lie between 0 and it),
    // and the last at most P(|B| > r_b) (f_A(u) + fmax_A P(|Z| > r_z)) (u - B - Z >= u on |Z| <= r_z there)
    return add(
      mul(A.f1[d], offV),
      mul(m2V, at(A.f2[d], tA)),
      mul(at(A.f0[d], bz), PZ),
      mul(c(A.fmax), PZ2hi),
      mul(at(A.f0[d], lowRead), PZ2lo),
      mul(A.f0[d], PB),
      mul(B.f1[d], offW),
      mul(m2W, at(B.f2[d], tB)),
      offGood(B.f0),
      mul(PBl, add(A.f0[d], mul(c(A.fmax), PZ))),
    );
  }
  if (kind === "cdf") {
    return add(
      mul(A.f0[d], offV),
      mul(m2V, at(A.f1[d], tA)),
      mul(at(A.sf[d], bz), PZ),
      PZ2hi,
      mul(at(A.sf[d], lowRead), PZ2lo),
      mul(B.f0[d], offW),
      mul(m2W, at(B.f1[d], tB)),
      offGood(B.sf),
      // P(u - W < B < -r_b) <= P(B < -r_b) P(W > u + r_b) (B, W independent), and W > u + r_b needs A > u + r_b - r_z or Z > r_z
      mul(PBl, add(at(A.sf[d], down(1 + R.b - R.z)), PZ)),
      mul(A.sf[d], PB),
    );
  }
  return add(
    mul(A.sf[d], offV),
    mul(m2V, at(A.f0[d], tA)),
    // the bad Z set: pi_A(u/6) P(|Z| > u/6) up to |Z| = u/2 (u - V within [u/6, 11u/6] there), then |V| <= r_b + |Z|:
    // (u/3) P(|Z| > u/2) + E[|Z|; |Z| > u/2]
    mul(at(A.pi[d], bz), PZ),
    mul(mono(up(R.b), -1), PZ2),
    at(z.E1, k),
    mul(B.sf[d], offW),
    mul(m2W, at(B.f0[d], tB)),
    offGood(B.pi),
    mul(at(B.sf[d], rb), add(at(A.pi[d], far), at(z.E1, far))),
    mul(PBl, add(at(A.pi[d], half), at(z.E1, half))),
    mul(A.pi[d], PB),
  );
}

/** the images' sum of one side: the first IMAGES at u1 + k T one by one, the rest by the integral of each power */
function sideSum(p: Poly, u1: number, T: number): number {
  let s = 0;
  for (let k = 0; k < IMAGES; k++) s += value(p, u1 + k * T);
  const ul = u1 + (IMAGES - 1) * T;
  for (let i = 0; i < p.c.length; i++) {
    if (p.c[i] === 0) continue;
    if (!(p.q[i] > 1) || !Number.isFinite(p.c[i])) return Infinity;
    s += (p.c[i] * Math.pow(ul, 1 - p.q[i])) / ((p.q[i] - 1) * T);
  }
  return s * (1 + 1e-12);
}

/**
 * Bound on the aliasing the two terms' images leave at period T, for every x in [xLo, xHi]; the stop-loss kind includes the
 * factor 2 of the E|X - q| sum. Infinity where the nearest image is too near m for every radii set (the parts' majorants
 * need t >= t0: 6 t0 for the first set).
 */
export function pairAliasing(L: PairLaw, xLo: number, xHi: number, T: number, kind: PairKind): number {
  const slack = 8 * U * (Math.abs(xLo) + Math.abs(xHi) + Math.abs(L.m) + T);
  const uR = xLo + T - L.m - slack;
  const uL = L.m - xHi + T - slack;
  // every radii set, with Z's tails from its moments or from one of its splits (where the images are far enough for them:
  // Z's tails are read at r_z and beyond), gives a bound: the first call at a period ranks them by the nearest images'
  // terms (the images' sums fall like u^-q, q > 1, from there), sums the images for the best, and keeps that choice for
  // the later calls at that period (the root finders ask for hundreds of nearby points; the choice does not change what
  // is bounded), all of them again where the one kept does not apply at this point (or its sum is not finite)
  const key = `${kind}:${T}`;
  const chosen = (L.radii ??= new Map()).get(key);
  const applies = (r: number, j: number) => {
    const need = up(Math.max(L.A.t0, L.B.t0) / leastRead(RADII[r]));
    if (!(uR >= need && uL >= need)) return false;
    return j < 0 || down(Math.min(uR, uL) * RADII[r].z) >= L.zs[j].minR;
  };
  const full = (r: number, j: number) => sideSum(imageBound(L, 0, kind, uR, j, r), uR, T) + sideSum(imageBound(L, 1, kind, uL, j, r), uL, T);
  let s = Infinity;
  if (chosen !== undefined && applies(chosen >> 4, (chosen & 15) - 1)) s = full(chosen >> 4, (chosen & 15) - 1);
  if (!(s < Infinity)) {
    const cands: { r: number; j: number; near: number }[] = [];
    for (let r = 0; r < RADII.length; r++)
      for (let j = -1; j < L.zs.length; j++)
        if (applies(r, j)) cands.push({ r, j, near: value(imageBound(L, 0, kind, uR, j, r), uR) + value(imageBound(L, 1, kind, uL, j, r), uL) });
    cands.sort((a, b) => a.near - b.near);
    for (const c of cands) {
      s = full(c.r, c.j);
      if (s < Infinity) {
        if (chosen === undefined) L.radii.set(key, c.r * 16 + c.j + 1);
        break;
      }
    }
  }
  return (kind === "stopLoss" ? 2 * s : s) * (1 + 4 * U);
}

/**
 * The stop-loss residual bounds of the expected-shortfall ladder (./shortfall.ts) per level, for every q in a bucket of width
 * T0/256 (one term's, or the pair's; the corrected kind only for one term), with the endpoint kernels' images where the
 * sums had kernels taken out (./kernel-images.ts), computed once per bucket and level.
 */
export function stopLossBuckets(
  resid: ResidualLaw | null,
  pair: PairLaw | null,
  T0: number,
  kernels: readonly EndpointKernels[] = [],
): (lev: number, T: number, q: number, kind: "stopLoss" | "stopLoss2") => number {
  const bounds = new Map<string, number>();
  return (lev, T, q, kind) => {
    const w = T0 / 256;
    const k = Math.floor(q / w);
    const key = `${kind}:${lev}:${k}`;
    let v = bounds.get(key);
    if (v === undefined) {
      const lo = Math.min(q, k * w - 4 * U * (Math.abs(k * w) + w));
      const hi = Math.max(q, (k + 1) * w + 4 * U * (Math.abs((k + 1) * w) + w));
      v = resid ? residualAliasing(resid, lo, hi, T, kind) : pair && kind === "stopLoss" ? pairAliasing(pair, lo, hi, T, kind) : Infinity;
      if (kernels.length && v < Infinity) v += kernelAliasing(kernels, lo, hi, T).stopLoss;
      bounds.set(key, v);
    }
    return v;
  };
}
