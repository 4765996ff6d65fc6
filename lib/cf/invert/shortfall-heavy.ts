// Expected shortfall of laws with power tails: the stop-loss E|X - q| by the period-doubling sums, with the derived
// bound of the images left (one heavy term, or a pair) reported before the Richardson estimate.
import type { Atom, CompiledModel } from "../types";
import { maybeKernels } from "./continuous";
import { exponentsFor, maybeTailLaw, type HeavyLadder } from "./heavy";
import { imageLadder } from "./images";
import { pairLaw, stopLossBuckets } from "./heavy-residual2";
import { bestDerivedEntry, lastRowWeights, residualLaw, type ResidualLaw } from "./heavy-residual";
import { directShortfall } from "../direct/shortfall";
import { directPoint } from "../direct/types";
import { imageScratch } from "./images";
import { shortfallImages } from "./images-shortfall";
import { buildNodes, probeEnvelope, type Envelope, type Nodes } from "./nodes";
import { evalPart, makePart, type ContinuousPart } from "./part";
import type { lawShape } from "./range";
import { richardsonAmplification, richardsonRow } from "./richardson";
import { kernelSfIntegral } from "./shortfall";
import { cabs } from "../complex";

/**
 * E[(X - q)^+] for power tails with a finite mean: E|Y - q| = (2/pi) int_0^inf (M - Re(phi(t) e^{-itq}))/t^2 dt
 * (e.g. Lukacs, Characteristic Functions, on absolute moments), whose mid-point sum equals E[tri_T(Y - q)] with
 * the triangle wave tri_T(u) = |u| on |u| <= T; the images beyond T give an error ~ T^{1-alpha}, removed by
 * doubling T and Richardson extrapolation with exponents j alpha + i - 1. Then E[(X-q)^+] = (E|X-q| + mu - q)/2,
 * atoms added exactly. The error left after the extrapolation is bounded where one or two terms' images are taken out
 * (./heavy-residual.ts, ./heavy-residual2.ts), else estimated from its last steps (callers say so: RICHARDSON_ESTIMATE_NOTE);
 * `reached` says whether the bound is within the goal max(target, tol) on E|X - q| (callers say so where it is not).
 */
export function heavyShortfall(
  model: CompiledModel,
  atoms: Atom[],
  w: number,
  mean: number,
  shape: ReturnType<typeof lawShape>,
  tol: number,
  span: number,
  ladder?: HeavyLadder,
): (q: number, target: number) => { value: number; error: number; estimated: boolean; reached: boolean } {
  let part: ContinuousPart;
  let env: Envelope;
  let alphaR: number;
  let bases: number[] | undefined;
  // the quantiles' ladder: the same part (tail term, kernels) and, where they reach far enough, the same nodes; when its
  // sums have a term's images taken out, the ES sums take out that term's images too (./images.ts), where its law is in
  // closed form or has its own stop-loss transform (each image is otherwise a Gauss-Laguerre rule over a tail: a few hundred
  // evaluations of the law per level)
  const usable = (g: { direct: HeavyLadder["images"][number]["direct"] }) => g.direct.method === "closed-form" || !!g.direct.stopLoss;
  const useLadder = ladder && ladder.images.every(usable) ? ladder : undefined;
  let resid: ResidualLaw | null = null;
  let images = useLadder?.images ?? [];
  const scratch = imageScratch();
  const scratch2 = imageScratch();
  if (useLadder) {
    ({ part, env, alpha: alphaR, bases } = useLadder);
  } else {
    part = makePart(model, atoms, shape.center);
    env = probeEnvelope(part, shape.spread);
    ({ part, env, alpha: alphaR, bases } = maybeTailLaw(part, env, shape, tol));
    ({ part, env } = maybeKernels(part, env, shape, { a: shape.center - 64 * shape.spread, b: shape.center + 64 * shape.spread }, tol / 16, false, []));
  }
  // a derived bound on the aliasing left where one term is taken out (./heavy-residual.ts), with the endpoint kernels'
  // images bounded beside it (./kernel-images.ts, stop-loss kind)
  if (useLadder) resid = useLadder.resid;
  else if (part.tail) resid = residualLaw(part.tail);
  // two terms' images taken out: the pair's bound (./heavy-residual2.ts)
  let pair = useLadder && images.length === 2 ? useLadder.pair : null;
  // one term's images taken out whose rest R has no fourth moment (a second power tail of index <= 4, e.g. a Student t
  // with nu < 4 beside a pareto): the stop-loss residual needs E R^4 (its images' sum of E[|R|; |R| > r] <= E R^n / r^(n-1)
  // converges for n >= 4 only, ./heavy-residual.ts), the cdf's does not. The sums take out the next heaviest term's images
  // as well (from its direct law: the nodes are the same) and the pair's bound answers, where the model has them
  const twoLaws = model.tailTerm?.images?.laws;
  if (useLadder && resid && !resid.lm.some((v, n) => n >= 4 && Number.isFinite(v)) && twoLaws?.length === 2 && twoLaws.every(usable)) {
    const pl = pairLaw(model.tailTerm!);
    if (pl) {
      images = twoLaws;
      pair = pl;
      resid = null;
    }
  }
  // the weights 1/t^2 make the tail beyond T at most (2/pi) int_T E/t^2 <= 2 tailCdf(T)/T: cut where that is small
  let tmax = env.t[env.t.length - 1];
  let truncES = (2 * env.tailCdf[env.t.length - 1]) / tmax;
  for (let i = 0; i < env.t.length; i++) {
    if ((2 * env.tailCdf[i]) / env.t[i] <= tol / 16) {
      tmax = env.t[i];
      truncES = (2 * env.tailCdf[i]) / env.t[i];
      break;
    }
  }
  let pm = 0;
  for (const a of atoms) pm += a.p * a.x;
  // mean of the inverted (signed) measure: continuous part minus its kernels (gamma means at/side a/lambda)
  let muC = (mean - pm) / w;
  for (const k of part.kernels) for (let q = 0; q < k.b.length; q++) muC -= k.b[q] * (k.at + (k.side * (k.power + q)) / k.rate);
  // and minus the subtracted tail law G (mean E D + E rest)
  const G = part.tail;
  if (G) muC -= G.mean + G.shift;
  const alpha = Math.max(alphaR, 1.01);
  const exps = exponentsFor(bases?.map((b) => Math.max(b, 1.01)), alpha, -1, 8);
  // one period ladder for every level asked (nodes built once, on first use)
  const T0 = useLadder && (useLadder.T0 >= 4 * span || images.length) ? useLadder.T0 : Math.max(64 * shape.spread, 4 * span);
  const cache: Nodes[] = [];
  const nodesAt = (l: number) => {
    if (!cache[l]) {
      const h = (2 * Math.PI) / (T0 * 2 ** l);
      const K = Math.min(Math.max(8, Math.ceil(tmax / h)), 1 << 21);
      const sameT = useLadder && useLadder.T0 === T0;
      const own = sameT ? (l < useLadder.levels.length ? useLadder.levels[l] : useLadder.top?.l === l ? useLadder.top.nodes : null) : null;
      // the ladder's nodes serve when they reach tmax (the sums below stop at K)
      cache[l] = own && own.K >= K ? { ...own, K } : buildNodes(part, h, K);
    }
    return cache[l];
  };
  // sum_k |phi_k| / t_k^2 and sum_k |phi_k| / t_k per level (for the rounding bound; independent of q)
  // and sum_k (k mod 64) |phi_k| / t_k^2 (the rotations since the block's start, for weightedCosSum's drift)
  const absSums: number[] = [];
  const phaseSums: number[] = [];
  const driftSums: number[] = [];
  // the node values' own errors, weighted as the sum weighs them, sum_k (e_k + a) / t_k^2: e_k the CF value's error at
  // node k (./nodes.ts cfErrAt: its relative errors on |phi|), a the part's declared absolute error and the subtractions'
  // rounding at every node (as ./grid-rounding.ts nodeMoves' abs0). They were left out of the level's rounding.
  const errSums: number[] = [];
  let pa = 0;
  for (const a of part.atoms) pa += a.p;
  let kb = 0;
  for (const k of part.kernels) for (const b of k.b) kb += Math.abs(b);
  const absAt = (lev: number) => {
    if (absSums[lev] === undefined) {
      const nd = nodesAt(lev);
      const ek = nd.cfErrAt;
      const perNode =
        ((Math.max(part.cfAbsError - (nd.cfRelTaken ?? 0), 0) + 16 * Number.EPSILON * (1 + pa + kb)) / part.weight) * (1 + 4 * Number.EPSILON);
      let a = 0;
      let b = 0;
      let d = 0;
      let e = 0;
      for (let k = 0; k < nd.K; k++) {
        const tk = (k + 0.5) * nd.h;
        const m = cabs(nd.re[k], nd.im[k]) / tk;
        a += m / tk;
        b += m;
        d += (k & 63) * (m / tk);
        // without per-node errors (nodes built elsewhere), the CF's 64 units on |phi_k| as roundingOf assumes
        e += ((ek ? ek[k] : 64 * Number.EPSILON * cabs(nd.re[k], nd.im[k])) + perNode) / (tk * tk);
      }
      const g = 1 + (nd.K + 4) * Number.EPSILON;
      absSums[lev] = a * (1 + 4 * Number.EPSILON);
      phaseSums[lev] = b * (1 + 4 * Number.EPSILON);
      driftSums[lev] = d * (1 + 4 * Number.EPSILON);
      errSums[lev] = e * g;
    }
    return absSums[lev];
  };
  // a lower bound on the rounding allowance `round` of level lev (below): its term rel (2h/pi) sum_k |phi_k| / t_k^2 over
  // the first nodes alone (the terms are largest there, the rest are non-negative), rel without its K eps part, less
  // 1e-6 for the rounding of this partial sum; independent of q
  const roundFloors: number[] = [];
  const roundFloorAt = (lev: number) => {
    if (roundFloors[lev] !== undefined) return roundFloors[lev];
    const h = (2 * Math.PI) / (T0 * 2 ** lev);
    // the level's own node count (nodesAt): never more nodes than it has
    const m = Math.min(64, Math.max(8, Math.ceil(tmax / h)), 1 << 21);
    const t = new Float64Array(m);
    for (let k = 0; k < m; k++) t[k] = (k + 0.5) * h;
    const re = new Float64Array(m);
    const im = new Float64Array(m);
    evalPart(part, t, re, im);
    let a = 0;
    for (let k = 0; k < m; k++) a += cabs(re[k], im[k]) / t[k] / t[k];
    const floor = (Number.EPSILON / 2) * 78 * ((2 * h * a) / Math.PI) * (1 - 1e-6);
    return (roundFloors[lev] = Number.isFinite(floor) ? floor : 0);
  };
  // a lower bound on level lev's node-value allowance (levelSum's `values`), known before its nodes are built: over its
  // first m <= 64 nodes, (2h/pi) sum (e_k + perNode) / t_k^2 with e_k = (r_k + cfRelTaken) e^{Re L_k} / w, the least
  // buildNodes charges node k (its e_k takes the larger of that modulus and the part's); perNode as absAt's with the most
  // buildNodes may take off. The CF is evaluated here on those nodes alone, which may take another route than the
  // level's block (a batched rule): both values lie within r_k of phi (r_k its derived relative error, here at most
  // 1e-7, else no floor), so the level's e_k is at least (1 - 3 r_k) of this one; 1e-6 off covers that and the sums'
  // rounding. Every bound levelRaw gives at level lev is at least it (independent of q: kept per level)
  const relTaken = part.model.cfRelError !== undefined && part.model.cfRelError >= 0 && Number.isFinite(part.model.cfRelError) ? part.model.cfRelError : 0;
  const leastPerNode = ((Math.max(part.cfAbsError - relTaken, 0) + 16 * Number.EPSILON * (1 + pa + kb)) / part.weight) * (1 + 4 * Number.EPSILON);
  const valuesFloors: number[] = [];
  const valuesFloorAt = (lev: number) => (valuesFloors[lev] ??= valuesFloorOf(lev));
  const valuesFloorOf = (lev: number) => {
    const h = (2 * Math.PI) / (T0 * 2 ** lev);
    const m = Math.min(Math.max(8, Math.ceil(tmax / h)), 1 << 21, 64);
    const t = new Float64Array(m);
    for (let k = 0; k < m; k++) t[k] = (k + 0.5) * h;
    const re = new Float64Array(m);
    const im = new Float64Array(m);
    const rel = new Float64Array(m);
    const mod = new Float64Array(m);
    evalPart(part, t, re, im, rel, undefined, mod);
    let s = 0;
    for (let k = 0; k < m; k++) {
      if (!(rel[k] <= 1e-7)) return 0;
      s += ((rel[k] + relTaken) * (mod[k] / part.weight) + leastPerNode) / (t[k] * t[k]);
    }
    const floor = ((2 * h * s) / Math.PI) * (1 - 1e-6);
    return Number.isFinite(floor) ? floor : 0;
  };
  const boundAt = stopLossBuckets(resid, pair, T0, part.kernels);
  // level lev's sum V = mass T/2 - (2h/pi) sum_k Re(phi_k e^{-i t_k y}) / t_k^2 less the images, its rounding and the images' bound
  const levelSum = (lev: number, q: number, y: number) => {
    const T = T0 * 2 ** lev;
    const nodes = nodesAt(lev);
    const h = nodes.h;
    const K = nodes.K;
    const acc = weightedCosSum(nodes, K, y);
    const abs = absAt(lev);
    let v = (part.mass * T) / 2 - (2 * h * acc) / Math.PI;
    let imErr = 0;
    for (const g of images) {
      const im = shortfallImages(g.direct, g.tails, q, T, scratch);
      v -= im.value;
      imErr += im.error;
    }
    // V is a difference of terms of size T/2: its rounding, amplified by the extrapolation below
    // weightedCosSum's rounding (u = eps/2), per unit of (2h/pi) |phi_k| / t_k^2 at node k: each block of 64 starts
    // its phase from (k + 1/2) h y (h y, y = q - center and the product: 3 u t_k |y|), cos and sin within an ulp;
    // each rotation by (cos h y, sin h y) adds 2 u |h y| to the angle (inside the 3 u t_k |y|) and at most 6 u to
    // the modulus (the factor's cos/sin and the complex product, Higham 2002 sec. 3.6), k mod 64 of them at node k;
    // the term's products and the division by t_k^2 6 u; the blocked, compensated sum 66 u + K u^2; the scaling 3 u.
    // V = mass T/2 - (2h/pi) acc rounds once more (u of each part).
    const rel = (Number.EPSILON / 2) * (9 + 66 + 3 + K * Number.EPSILON);
    const phase = (Number.EPSILON / 2) * (3 * Math.abs(y) * phaseSums[lev] + 6 * driftSums[lev]) * ((2 * h) / Math.PI);
    const values = ((2 * h * errSums[lev]) / Math.PI) * (1 + 4 * Number.EPSILON);
    const sumRound = rel * ((2 * h * abs) / Math.PI) + phase + (Number.EPSILON / 2) * ((part.mass * T) / 2 + Math.abs((2 * h * acc) / Math.PI)) + values;
    return { T, v, imErr, sumRound };
  };
  // the level's derived bound (and, with G's second-order term kappa_2 sum_m (-1)^m [f_G(q + mT) + f_G(q - mT)] taken out,
  // the corrected value's: G's density images from its direct law, ./images.ts, with their derived bound)
  const second = resid !== null && Number.isFinite(resid.m3 + resid.k2 + resid.e2);
  const levelRaw = (lev: number, q: number, L: { T: number; v: number; imErr: number; sumRound: number }) => {
    const own = L.sumRound * (1 + 1e-10) + L.imErr + truncES;
    const raw = boundAt(lev, L.T, q, "stopLoss") + own;
    if (!(second && resid)) return { raw, raw2: NaN, v2: NaN };
    const g = imageLadder(resid.law, q, L.T, 1, scratch2)[0];
    const c = resid.k2 * g.pdf;
    // the term's bound: kappa_2's times the sum, the sum's times |kappa_2|, the product and difference rounded
    const raw2 = boundAt(lev, L.T, q, "stopLoss2") + own + Math.abs(resid.k2) * g.errPdf + resid.e2 * (Math.abs(g.pdf) + g.errPdf) + 4 * Number.EPSILON * (Math.abs(c) + Math.abs(L.v));
    return { raw, raw2, v2: L.v - c };
  };
  // the quantiles' ladder answering from its top level (HeavyLadder.top): the stop-loss sums likewise, from that level up
  // (the derived bound's least entry is a raw level's, ./heavy-ladder.ts), the lower levels only where no bound is derived
  const topL = useLadder?.top && useLadder.T0 === T0 && (resid || pair) ? useLadder.top.l : null;
  // E[(X - q)^+] from the extrapolated (or raw) E|X - q| sum absC with its error: atoms, kernels and G's own part added
  const finish = (q: number, absC: number, error: number, derived: boolean, goal: number) => {
    let atomPart = 0;
    for (const a of atoms) if (a.x > q) atomPart += a.p * (a.x - q);
    let kernelPart = 0;
    for (const k of part.kernels) kernelPart += kernelSfIntegral(k, q);
    // G's own E[(G - q)^+] from its direct law: directShortfall at level 1/2 returns q + 2 E[(G - q)^+]
    let gErr = 0;
    if (G) {
      // below G's median through the lower tail (directShortfall at level 1/4: q + (E G - q + int_-inf^q F_G) / (3/4)),
      // above it through the upper tail (level 1/2: q + 2 int_q^inf S_G)
      const pt = directPoint();
      G.direct.at(q, pt);
      const lv = pt.cdf < 0.5 ? 0.25 : 0.5;
      const r = directShortfall(G.direct, q, 0, lv, G.tails, G.mean + G.shift, G.meanError, G.rest ? (u, side) => G.rest!(u, side) : undefined);
      kernelPart += (r.value - q) * (1 - lv);
      gErr = r.error * (1 - lv) + 4 * Number.EPSILON * Math.abs(r.value);
    }
    // for the signed remainder of mass M: int (x - q)^+ = (int |x - q| + mu - q M) / 2
    const value = atomPart + w * ((absC + muC - q * part.mass) / 2 + kernelPart);
    return { value, error: (w * error) / 2 + w * gErr + 8 * Number.EPSILON * Math.abs(absC), estimated: !derived, reached: error <= goal };
  };
  return (q: number, target: number) => {
    const y = q - part.center;
    const goal = Math.max(target, tol);
    // each raw level's derived bound, and the last row's entry with the least one (./heavy-residual.ts)
    let bestD = { value: NaN, err: Infinity };
    if (topL !== null) {
      // from the top level: where it misses the goal one more doubling (its nodes are shared by every q, one level's cost
      // for the whole answer), then more while the bound may reach the goal at the rate of the last one (the residual's,
      // known without the nodes)
      for (let lev = topL; lev < 8; lev++) {
        const L = levelSum(lev, q, y);
        const r = levelRaw(lev, q, L);
        const e1 = r.raw * (1 + 1e-12);
        const e2 = r.raw2 * (1 + 1e-12);
        if (e1 < bestD.err) bestD = { value: L.v, err: e1 };
        if (e2 < bestD.err) bestD = { value: r.v2, err: e2 };
        if (!(bestD.err < Infinity) || bestD.err <= goal || lev === 0) break;
        const kind = e2 < e1 ? "stopLoss2" : "stopLoss";
        const bNow = boundAt(lev, T0 * 2 ** lev, q, kind);
        const bPrev = boundAt(lev - 1, T0 * 2 ** (lev - 1), q, kind);
        const known = bPrev > 0 && Number.isFinite(bPrev);
        const rate = known ? Math.min(1, bNow / bPrev) : 1;
        if (!(bestD.err * rate <= goal) && lev > topL) break;
        // the first level past the top only where the doublings left (to the eighth level) may bring the bound to its goal
        // at that rate, or where another q built it already (one sum over its nodes): a bound 1e3 times its goal, falling
        // by 2.7 a doubling, paid twice the top level's nodes for that factor alone
        if (lev === topL && known && cache[lev + 1] === undefined && !(bestD.err * rate ** (7 - lev) <= goal)) break;
        // where every level left has node values whose allowance alone reaches the best bound, none can lower it: their
        // nodes are not built
        let open = false;
        for (let j = lev + 1; j < 8 && !open; j++) open = !(valuesFloorAt(j) >= bestD.err);
        if (!open) break;
      }
      if (Number.isFinite(bestD.err)) return finish(q, bestD.value, bestD.err, true, goal);
    }
    const rows: number[][] = [];
    let best = NaN;
    let bestTotal = Infinity;
    const raw: number[] = [];
    const raw2: number[] = [];
    const rows2: number[][] = [];
    let prevD = NaN;
    let prev = NaN;
    let round = 0;
    for (let lev = 0; lev < 8; lev++) {
      const L = levelSum(lev, q, y);
      round = Math.max(round, L.sumRound * (1 + 1e-10) + L.imErr);
      const amp = richardsonAmplification(exps, lev + 1);
      const row = richardsonRow(L.v, rows[lev - 1], exps);
      rows.push(row);
      const cand = row[lev];
      if (resid || pair) {
        const r = levelRaw(lev, q, L);
        raw.push(r.raw);
        const W = lastRowWeights(exps, lev + 1);
        const d = bestDerivedEntry(W, raw);
        if (d.err < bestD.err) bestD = { value: row[d.j], err: d.err };
        if (second && resid) {
          rows2.push(richardsonRow(r.v2, rows2[lev - 1], exps));
          raw2.push(r.raw2);
          const d2 = bestDerivedEntry(W, raw2);
          if (d2.err < bestD.err) bestD = { value: rows2[lev][d2.j], err: d2.err };
        }
      }
      // levels go on for the derived bound only where one more doubling may bring it to the goal at the rate of the last
      // one (each level doubles the nodes)
      const rate = Number.isFinite(prevD) && prevD > 0 ? Math.min(1, bestD.err / prevD) : 1;
      const wantD = (resid !== null || pair !== null) && bestD.err > goal && (lev < 2 || bestD.err * rate <= goal);
      prevD = bestD.err;
      if (lev >= 2) {
        // the cut-off at tmax is shared by every level, so the differences cannot see it: added separately
        const total = 2 * Math.max(Math.abs(cand - prev), Math.abs(cand - row[lev - 1])) + amp * (round + truncES);
        if (total < bestTotal) {
          bestTotal = total;
          best = cand;
        }
        if (bestTotal <= Math.max(target, tol) && !wantD) break;
        // the floor amp (round + truncES) only grows with the level (amp does, round is a running maximum): once the
        // next level's floor reaches the best total, no further level can lower it. The next level's rounding is known
        // from below before its nodes are built (roundFloorAt): a level that could not be chosen is not built
        if (!wantD && richardsonAmplification(exps, lev + 2) * (Math.max(round, roundFloorAt(lev + 1)) + truncES) >= bestTotal) break;
      }
      prev = cand;
    }
    // every number carries a bound never below its error: the derived bound (with its own entry) wherever one is finite,
    // even above the goal (the caller reports the goal as not reached); twice the smallest total, an estimate made on the
    // levels' differences, only where no bound is derived
    const derived = Number.isFinite(bestD.err);
    return finish(q, derived ? bestD.value : best, derived ? bestD.err : 2 * bestTotal, derived, goal);
  };
}

/**
 * sum_{k < K} Re(phi_k e^{-i t_k y}) / t_k^2 with t_k = (k + 1/2) h: the phase advanced by one complex multiply per node
 * and recomputed every 64 nodes (as in ./pointwise.ts), instead of a cosine and a sine per node.
 */
function weightedCosSum(nodes: Nodes, K: number, y: number): number {
  const { h, re, im } = nodes;
  const th = h * y;
  const rc = Math.cos(th);
  const rs = Math.sin(th);
  // blocks of 64 summed in turn, the block sums compensated (Neumaier): the sum's rounding is at most 65 u of the
  // moduli's sum plus O(K u^2) (Higham 2002, eq. 4.4 and sec. 4.3), instead of (K - 1) u
  let acc = 0;
  let comp = 0;
  let k = 0;
  while (k < K) {
    const a0 = (k + 0.5) * th;
    let c = Math.cos(a0);
    let sn = Math.sin(a0);
    const end = Math.min(K, k + 64);
    let blk = 0;
    for (; k < end; k++) {
      const tk = (k + 0.5) * h;
      blk += (re[k] * c + im[k] * sn) / (tk * tk);
      const nc = c * rc - sn * rs;
      sn = sn * rc + c * rs;
      c = nc;
    }
    const t = acc + blk;
    comp += Math.abs(acc) >= Math.abs(blk) ? acc - t + blk : blk - t + acc;
    acc = t;
  }
  return acc + comp;
}
