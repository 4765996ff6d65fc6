import type { Node, NodeKind } from "./node";
import { commonStep } from "./lattice";
import { compoundTable, pgfAt } from "./compound-table";
import type { LatticeTable, RemainderJump } from "./types";
import { compoundDamped } from "./damped-cf";
import { COMPOUND_ORDER, GAMMA_ORDER, KERNEL_ORDER, compoundSeries, kernelsOfSeries, type EndpointSeries, type GammaKernel, type TransformSeries } from "./damped-kernels";
import { keptTerms } from "./endpoint-remainder";
import { COMPOUND_SERIES_WORK } from "./compound-remainder-terms";
import { layerCompoundAtoms, layerCompoundJumps, layerCompoundKinks, layerCompoundBends, type LayerCompoundAtoms } from "./layer-compound";
import { builtNote, chooseSpan, isPoissonCount, discretisedCompound, methodNote, type DiscretiseOptions, type DiscretisedCompound } from "./discretise";
import { withCumulantErrors } from "./cumulant-bounds";
import { compoundE } from "./cumulant-ops";
import { compoundDampedMajorant } from "./damped-majorant";
import { realCgf } from "./count-pgf";
import { endpointKernelsRemainder } from "./compound-remainder";
import { compoundArgErrAt, compoundArgSlope } from "./arg-rounding";
import { compoundErrors, dampedRelErrorAt, severityRounding, severityRoundingNote } from "./compound-errors";

const collectNotes = (cs: Node[]) => [...new Set(cs.flatMap((c) => c.notes))];

/**
 * Compound S = X_1 + ... + X_N: log phi_S(t) = log P_N(phi_X(t)) = K_N(log phi_X(t)), K_N the count's cumulant function
 * at complex argument (Klugman, Panjer & Willmot, Loss Models, aggregate loss models chapter). Cumulants by composing the two cumulant
 * series, K_S(u) = K_N(K_X(u)).
 */
export function compoundNode(N: Node, X: Node, discretise: DiscretiseOptions | null = {}, exact = false, bracketLayers = false): Node {
  if (X.severity && X.kind.type === "continuous" && N.countCgf && discretise && !(discretise.auto && CONTINUOUS_BY_DEFAULT.has(X.severity.name)))
    return discretisedNode(N, X, discretise);
  // a per-claim layer's severity has atoms (at 0 and at the limit) besides its density: the compound keeps its
  // continuous part and lists its atoms (at multiples of the limit) when the count allows; discretised on request
  // or when the atoms cannot be listed
  let layered: (LayerCompoundAtoms & { a0: number; a1: number; v: number }) | null = null;
  if (X.severity?.atoms && N.countCgf && !exact) {
    layered = (discretise && !discretise.auto) || bracketLayers ? null : layeredAtoms(N, X);
    if (!layered) return discretisedNode(N, X, discretise ?? {});
  }
  const P0 = N.p0 ?? 0;
  let kind: NodeKind;
  const own: string[] = [];
  if (layered) {
    kind = { type: "mixed", atoms: layered.atoms, atomsComplete: true };
    own.push(
      `compound of layered claims kept continuous: ${layered.atoms.length} atom(s) at multiples of the limit listed (every claim at 0 or at the limit), mass left unlisted <= ${layered.unlisted.toExponential(2)} (counted in the CF error)`,
    );
  }
  else if (X.kind.type === "continuous") kind = P0 > 0 ? { type: "mixed", atoms: [{ x: 0, p: P0 }], atomsComplete: true } : { type: "continuous" };
  else if (X.kind.type === "lattice") {
    const { origin, step } = X.kind;
    const g = step === 0 ? Math.abs(origin) : commonStep(step, origin);
    if (g === 0) kind = { type: "lattice", origin: 0, step: 0, atoms: [{ x: 0, p: 1 }] };
    else kind = g === null ? { type: "discrete", atoms: null } : { type: "lattice", origin: 0, step: g, atoms: null };
  } else if (X.kind.type === "discrete") kind = { type: "discrete", atoms: null };
  else if (X.kind.atomsComplete && X.kind.atoms.length === 1 && X.kind.atoms[0].x === 0 && N.countCgf) {
    // severity = atom c at 0 plus a continuous part: S = 0 exactly when every summand is the atom, P = P_N(c)
    kind = { type: "mixed", atoms: [{ x: 0, p: pgfAt(N, X.kind.atoms[0].p) }], atomsComplete: true };
  } else {
    kind = { type: "mixed", atoms: P0 > 0 ? [{ x: 0, p: P0 }] : [], atomsComplete: false };
    own.push("compound of a severity with atoms and a continuous part: only the atom at 0 is listed");
  }
  own.push(...severityRoundingNote(N.cumulants(1)[0], X));
  const nMean = N.cumulants(1)[0] ?? N.location;
  const node: Node = {
    kind,
    momentIndex: Math.min(N.momentIndex, X.momentIndex),
    tails: X.tails,
    nodes: 1 + N.nodes + X.nodes,
    get notes() {
      return [...collectNotes([N, X]), ...own];
    },
    location: nMean * X.location,
    scale: Math.sqrt(Math.max(nMean, 0) * X.scale * X.scale + N.scale * N.scale * X.location * X.location) || X.scale,
    support: compoundSupport(N.support, X.support),
    logCf(t, re, im) {
      const a = new Float64Array(t.length);
      const b = new Float64Array(t.length);
      X.logCf(t, a, b);
      N.countCgf!(a, b, re, im);
    },
    dampedLogCf: X.kind.type === "continuous" || X.kind.type === "mixed" ? compoundDamped(N, X) : undefined,
    hasCompound: true,
    // |P_N(z + d) - P_N(z)| <= E[N] |d| for |z| <= 1 (|P_N'| <= E N on the unit disc); relative |dP / P| <= slope |d|
    // when the count's log-derivative is bounded (Poisson, negative binomial)
    ...compoundErrors(N, X, layered?.unlisted ?? 0),
    ...severityRounding(N.cumulants(1)[0], X, compoundArgSlope(N.cumulants(1)[0], X), compoundArgErrAt(N.cumulants(1)[0], X), !!(X.dampedCf && N.countLogPgf), {
      cgfSlope: N.cgfSlope,
      self: () => node,
      N,
    }),
    cumulants(n) {
      const kx = X.cumulants(n);
      const kn = N.cumulants(n);
      let valid = n;
      for (let k = 0; k < n; k++) if (kx[k] === null || kn[k] === null) {
        valid = k;
        break;
      }
      const out: (number | null)[] = new Array(n).fill(null);
      if (valid === 0) return out;
      // a_k = kappa_k(X)/k!, b_j = kappa_j(N)/j!; c_m = sum_j b_j [u^m] A(u)^j; kappa_m(S) = m! c_m
      const A = new Float64Array(valid + 1);
      let f = 1;
      for (let k = 1; k <= valid; k++) {
        f *= k;
        A[k] = (kx[k - 1] as number) / f;
      }
      const c = new Float64Array(valid + 1);
      let pow = new Float64Array(valid + 1);
      pow[0] = 1;
      let fj = 1;
      for (let j = 1; j <= valid; j++) {
        const next = new Float64Array(valid + 1);
        for (let i = 0; i <= valid; i++) {
          if (pow[i] === 0) continue;
          for (let k = 1; i + k <= valid; k++) next[i + k] += pow[i] * A[k];
        }
        pow = next;
        fj *= j;
        const bj = (kn[j - 1] as number) / fj;
        for (let m = j; m <= valid; m++) c[m] += bj * pow[m];
      }
      let fm = 1;
      for (let m = 1; m <= valid; m++) {
        fm *= m;
        out[m - 1] = c[m] * fm;
      }
      return out;
    },
  };
  withCumulantErrors(node, compoundE(N, X));
  const relAt = dampedRelErrorAt(N, X);
  if (relAt && node.dampedLogCf) node.dampedRelErrorAt = { cf: node.dampedLogCf, at: relAt };
  if (layered && X.severity?.edges) {
    const { a0, a1, v } = layered;
    node.densityJumps = layerCompoundJumps(N, a0, a1, v, layered.byCount, X.severity.edges);
    node.densityKinks = layerCompoundKinks(N, a0, a1, v, layered.byCount, X.severity.edges);
    node.densityBends = layerCompoundBends(N, a0, a1, v, layered.byCount, X.severity.edges);
  }
  if (node.dampedLogCf && X.laplaceExpansion && X.kind.type === "continuous" && N.table) {
    const k = kernelsFor(N, X);
    if (k) {
      node.transformSeries = k.series;
      if (k.kernels.length > 0) node.dampedKernels = { cf: node.dampedLogCf, kernels: k.kernels, rate: k.rate };
      // its decay: the bound's slowest term falls like |phi| ~ t^-shape (the rounding allowance slack M)
      if (k.kernels.length > 0 && k.exact) {
        const jump = gammaRemainderJump(k.exact);
        node.dampedRemainder = { cf: node.dampedLogCf, bound: gammaRemainderBound(k.exact), decay: k.exact.shape, ...(jump ? { jump } : {}) };
      }
      // pareto, weibull, lomax and Burr claims: the kernels match the severity's expansion, whose Watson remainder the family bounds
      // (the expansion object itself: a moved law carries a new one, and no bound)
      const er = X.endpointRemainder;
      const rb = k.kernels.length > 0 && !k.exact && er && er.series === X.laplaceExpansion ? endpointKernelsRemainder(N, er, k.kernels, k.order) : null;
      // every piece of that bound is a power sigma^-e with e at least the expansion's first exponent (the kernels' weights'
      // rounding leaves such a term of the kernels' own order)
      if (rb) node.dampedRemainder = { cf: node.dampedLogCf, bound: rb.bound, decay: er!.series.exps[0], ...(er!.series.exps[0] === 1 ? { jump: rb.jump } : {}) };
    }
  }
  if (node.dampedLogCf && !node.dampedKernels && X.severityKernel && X.kind.type === "continuous" && X.support[0] === 0 && node.support[0] === 0 && N.table) {
    const t = N.table(3);
    const pAt = (n: number) => (t && t.step === 1 && t.origin <= n && n - t.origin < t.p.length ? t.p[n - t.origin] : 0);
    const p1 = pAt(1);
    const mean = N.cumulants(1)[0];
    // P(N = 1) = (a + b) P(N = 0) for an (a, b, 0) count is below |a + b| 2^-1074 where P(N = 0) underflows to 0
    // (Poisson(1000)): the route (for its per-node bounds from a steep count's slope) then takes the one-claim term
    // as 0, with that as an absolute error
    const pj = N.panjer;
    const tiny = p1 === 0 && pj && pj.p0 === 0 ? Math.abs(pj.a + pj.b) * 1e-323 : null;
    if ((p1 > 0 || tiny !== null) && N.countCgf && mean !== null && Number.isFinite(mean)) {
      const absError = (N.cfAbsError ?? 0) + (tiny ?? 0);
      const count = {
        cgf: N.countCgf,
        logPgf: N.countLogPgf,
        slopeNear: N.countSlopeNear,
        derivTail: countDerivTail(N.table(DERIV_TERMS), mean),
        mean,
        absError,
        relError: N.cfRelError ?? 0,
      };
      node.dampedSeverity = { cf: node.dampedLogCf, kernel: { ...X.severityKernel(p1, pAt(2)), count } };
    }
  }
  // derived bounds on the transform past 0 for sums holding the compound (./damped-majorant.ts)
  const mean1 = N.countCgf ? N.cumulants(1)[0] : null;
  if (node.dampedLogCf && N.countCgf && mean1 !== null)
    node.dampedMajorant = compoundDampedMajorant(node, X, { cgf: N.countCgf, mean: mean1, absError: N.cfAbsError ?? 0, relError: N.cfRelError ?? 0, ...(N.table ? { table: (n: number) => N.table!(n) } : {}) });
  if (kind.type === "lattice" && X.table) {
    node.table = (maxLength) => compoundTable(N, X, kind as { step: number }, maxLength, node);
  }
  if (X.countCgf) {
    node.countCgf = (wr, wi, re, im) => {
      const a = new Float64Array(wr.length);
      const b = new Float64Array(wr.length);
      X.countCgf!(wr, wi, a, b);
      N.countCgf!(a, b, re, im);
    };
    node.p0 = pgfAt(N, X.p0 ?? 0);
  }
  return node;
}

/**
 * Compound whose severity has no cheap CF (lognormal, pareto, weibull): its law is replaced by the compound of the
 * mean-preserving discretisation of the severity on a span h (actuarial common practice), a lattice law on 0, h, 2h,
 * ... tabulated by FFT. The CF and the cumulants stay those of the exact law; the kind and the table are the
 * approximation's, and the notes say so with the cdf error bound once the table is built.
 */
function discretisedNode(N: Node, X: Node, o: DiscretiseOptions): Node {
  const exact = compoundNode(N, X, null, true);
  const sev = X.severity!;
  const k = exact.cumulants(2);
  const nMean = N.cumulants(1)[0] ?? N.location;
  const sd = k[1] !== null && k[1] >= 0 ? Math.sqrt(k[1]) : null;
  const { h, K } = chooseSpan(sev, nMean, k[0], sd, o, isPoissonCount(N));
  const notes = [
    ...exact.notes.filter((x) => !x.startsWith(`${sev.name} CF`)),
    methodNote(sev, h, K),
  ];
  let built: DiscretisedCompound | null = null;
  const build = (): DiscretisedCompound => {
    if (!built) {
      built = discretisedCompound(N, sev, h, K);
      notes.push(builtNote(built));
    }
    return built;
  };
  const node: Node = {
    ...exact,
    kind: { type: "lattice", origin: 0, step: h, atoms: null },
    notes,
    approximate: true,
    ...(sev.cdf && sev.sf ? { bounds: () => build().bounds ?? null } : {}),
    table(maxLength) {
      const b = build();
      const t = b.table;
      if (t.p.length <= maxLength) return { ...t, p: t.p.slice(), cdfError: b.cdfError };
      let tail = t.tailMass;
      for (let i = maxLength; i < t.p.length; i++) tail += t.p[i];
      return { origin: 0, step: h, p: t.p.slice(0, maxLength), tailMass: tail, cdfError: b.cdfError, ...(t.round ? { round: t.round } : {}) };
    },
  };
  delete node.countCgf;
  delete node.p0;
  delete node.dampedLogCf;
  return node;
}

/** severities whose compounds are inverted as continuous laws (damped transform) unless discretisation is asked for */
const CONTINUOUS_BY_DEFAULT = new Set(["lognormal", "pareto", "weibull", "lomax", "burr", "loglogistic", "inverse_gamma"]);
/** the compound's transform series and its kernels (rate: the severity's own scale near its endpoint) */
/** a gamma severity's compound whose kernels are its first claims' laws exactly: what the remainder bound needs */
interface ExactKernels {
  /** p_0..p_J from the count's table (kernel n has weight p_n) */
  pn: Float64Array;
  shape: number;
  rate: number;
  /** log E[e^{w N}] at real w <= 0 (the count's cumulant function), where the count has it */
  cgf?: (w: number) => number;
}

/**
 * |psi_c(t)| for a compound of gamma(a, r) claims at 0 whose kernels are p_n gamma(n a, r), n = 1..J (kernelsFor): what is
 * left of sum_{n >= 1} p_n phi^n is sum_{n > J} p_n phi^n, phi(t + i beta) = (1 - i (t + i beta) / r)^-a, so it is at most
 * P(N > J) M^{J + 1} and at most P_N(M) (every term non-negative), M = (r / |r + beta - i t|)^a (exact, falling in t)
 * (common practice: the compound's transform as the count's pgf at the severity's; a steep count, Poisson(500), has
 * P(N > J) near 1 but P_N(0.9) = e^-50). The table's p_n carry a few ulps each (the kernels take the same numbers, so only
 * the true p_n's distance from them enters, at most 16 (J + 1) u M in all), P(N > J) = 1 - sum_{n <= J} p_n is taken up
 * by J + 2 ulps of its terms, and P_N(M) = exp(cgf(log M)) within 64 u (1 + |cgf|) of the exp and log.
 */
/** J, P(N > J) within the rounding of its terms, and the weights' allowance 16 (J + 1) u (see gammaRemainderBound) */
function gammaTail(k: ExactKernels): { J: number; tail: number; slack: number } {
  const J = k.pn.length - 1;
  let head = 0;
  for (let n = 0; n <= J; n++) head += k.pn[n];
  return { J, tail: Math.min(1, Math.max(0, 1 - head) + (J + 4) * Number.EPSILON * Math.max(1, head)), slack: 16 * (J + 1) * Number.EPSILON };
}

function gammaRemainderBound(k: ExactKernels): (beta: number, t: number) => number {
  const { J, tail, slack } = gammaTail(k);
  return (beta, t) => {
    const rb = k.rate + beta;
    const M = Math.min(1, Math.pow(k.rate / Math.sqrt(rb * rb + t * t), k.shape) * (1 + 8 * Number.EPSILON));
    let rest = tail * Math.pow(M, J + 1);
    if (k.cgf && M > 0 && M < 1) {
      const c = k.cgf(Math.log(M));
      const P = Math.exp(c) * (1 + 64 * Number.EPSILON * (1 + Math.abs(c)));
      if (P < rest) rest = P;
    }
    return (rest + slack * M) * (1 + 4 * Number.EPSILON);
  };
}

/**
 * Exponential claims (shape 1): gammaRemainderBound's rounding part 16 (J + 1) u M falls only like 1 / t, so the density's
 * truncation past the last probe is not bounded by integrating it. That part is G = sum_{n <= J} (p_n - p~_n) phi^n, the
 * damped transform of g(y) = e^{-beta y} sum_n (p_n - p~_n) gamma(n, r)(y); each e^{-beta y} gamma(n, r)(y) is unimodal from
 * 0 (a jump of r at 0 for n = 1) with its peak at most r (the gamma(n) mode's density r m^m e^-m / m! <= r, Stirling), so
 * g's total variation is at most 2 r sum_n |p_n - p~_n| <= 2 r 16 (J + 1) u. The rest, F = sum_{n > J} p_n phi^n, is at
 * most P(N > J) M^{J + 1}: it falls like t^-(J + 1). Other shapes: none (below 1 the n-claim laws' densities are unbounded
 * at 0, above 1 the whole bound falls faster than 1 / t).
 */
function gammaRemainderJump(k: ExactKernels): RemainderJump | null {
  const { J, tail, slack } = gammaTail(k);
  if (k.shape !== 1 || J < 1) return null;
  return {
    fast: (beta, t) => {
      const rb = k.rate + beta;
      const M = Math.min(1, (k.rate / Math.sqrt(rb * rb + t * t)) * (1 + 8 * Number.EPSILON));
      return tail * Math.pow(M, J + 1) * (1 + 4 * Number.EPSILON);
    },
    decay: J + 1,
    tv: () => 2 * k.rate * slack * (1 + 4 * Number.EPSILON),
  };
}

function kernelsFor(N: Node, X: Node): { series: TransformSeries; kernels: GammaKernel[]; rate: number; exact?: ExactKernels; order?: number } | null {
  const sev = X.laplaceExpansion!;
  const e0 = Math.min(...sev.exps);
  // a severity whose expansion has a derived remainder (pareto, lomax, weibull, Burr): kernels to COMPOUND_ORDER
  const order = sev.rate === undefined && X.endpointRemainder && X.endpointRemainder.series === sev ? compoundOrder(sev) : KERNEL_ORDER;
  const nMax = Math.floor(order / e0) + 1;
  // a gamma severity (sev.rate): phi^n is the gamma(n a, r) law itself, so the n-claim laws are the kernels exactly, up to
  // n a <= GAMMA_ORDER (at most 8 of them, never fewer than the series would take): what is left decays like |s|^-((n + 1) a)
  const nGamma = sev.rate !== undefined ? Math.max(Math.min(Math.floor(GAMMA_ORDER / e0), 8), nMax - 1) : 0;
  const t = N.table!(Math.max(nMax, nGamma) + 1);
  if (!t || t.step !== 1 || !Number.isInteger(t.origin) || t.origin < 0) return null;
  const pn = new Float64Array(Math.max(nMax, nGamma) + 1);
  for (let n = 0; n < pn.length; n++) {
    const i = n - t.origin;
    pn[n] = i >= 0 && i < t.p.length ? t.p[i] : 0;
  }
  const series = compoundSeries(pn.subarray(0, nMax + 1), sev);
  // the rate a sum or mixture rebuilding its kernels from the series starts from (./kernel-carry.ts): 1 / sd, as before the
  // exact kernels (at the gamma's own rate NB(3.70, 0.29)-gamma(2.89, 0.513) + three terms took 143 267 terms against 92 897)
  const rate = 1 / Math.max(X.severity?.scale ?? X.scale, 1e-300);
  if (sev.rate !== undefined) {
    const kernels: GammaKernel[] = [];
    for (let n = 1; n <= nGamma; n++) if (pn[n] > 0) kernels.push({ at: n * sev.at, shape: n * e0, rate: sev.rate, w: pn[n] });
    // claims from 0 with one gamma term (the expansion of the gamma family itself): the kernels are the n-claim laws
    const cgf = N.countCgf ? realCgf(N.countCgf) : undefined;
    const exact = sev.at === 0 && sev.exps.length > 0 && X.kind.type === "continuous" ? { pn: pn.slice(0, nGamma + 1), shape: e0, rate: sev.rate, ...(cgf ? { cgf } : {}) } : undefined;
    return { series, kernels, rate, ...(exact ? { exact } : {}) };
  }
  if (order === KERNEL_ORDER) return { series, kernels: kernelsOfSeries(series, rate), rate };
  const high = compoundSeries(pn.subarray(0, nMax + 1), sev, order);
  const { kernels } = kernelsAtRate(high, rate, order);
  // a sum or mixture holding the compound rebuilds its kernels from `series` (to KERNEL_ORDER) at the severity's rate
  return { series, kernels, rate, order };
}

/**
 * The order to which a compound's kernels match its claims' expansion where that expansion's Watson remainder is derived
 * (pareto, lomax, weibull, Burr): COMPOUND_ORDER where the remainder bound's series work allows it (its terms to that
 * order times its blocks, squared, within COMPOUND_SERIES_WORK: weibull and Burr shapes from 0.5 on), else KERNEL_ORDER. What the
 * kernels leave then falls like t^-(COMPOUND_ORDER + e0) instead of t^-(KERNEL_ORDER + e0): Poisson(2)-pareto(3, 1),
 * 1000-point density, 74 820 -> 3 933 frequency terms.
 */
function compoundOrder(sev: EndpointSeries): number {
  const e0 = Math.min(...sev.exps);
  const blocks = Math.floor(COMPOUND_ORDER / e0);
  return (keptTerms(sev, COMPOUND_ORDER) * blocks) ** 2 <= COMPOUND_SERIES_WORK ? COMPOUND_ORDER : KERNEL_ORDER;
}

/**
 * Kernels to a high order at one rate r: their weights are the series' coefficients over r^e less the lower kernels'
 * binomial terms, which grow like the claims' density's Taylor coefficients at its endpoint times e! / r^e where r is below
 * their growth (pareto(3, 1) to order 8 at r = 1: weights up to 2.4e5 of both signs, whose closed forms' rounding is 1e-10
 * of the density; pareto(80, 1): 7e7 at order 4, r0 = 1). So the least r = r0 2^{k/2}, k = 0..16, whose weights' absolute
 * sum is at most 2 (the continuous part's mass is below 1), else the r of the least sum.
 */
function kernelsAtRate(s: TransformSeries, r0: number, order: number): { kernels: GammaKernel[]; rate: number } {
  let best: { kernels: GammaKernel[]; rate: number; size: number } | null = null;
  for (let k = 0; k <= 16; k++) {
    const r = r0 * Math.pow(2, k / 2);
    const kernels = kernelsOfSeries(s, r, order);
    const size = kernels.reduce((v, x) => v + Math.abs(x.w), 0);
    if (!best || size < best.size) best = { kernels, rate: r, size };
    if (size <= 2) break;
  }
  return best!;
}

/** the atoms of a compound of per-claim layered claims (atom a0 at 0, a1 at the limit v), or null */
function layeredAtoms(N: Node, X: Node): (LayerCompoundAtoms & { a0: number; a1: number; v: number }) | null {
  if (X.kind.type !== "mixed" || !X.kind.atomsComplete || X.kind.atoms.length > 2) return null;
  let a0 = 0;
  let a1 = 0;
  let v = Infinity;
  for (const at of X.kind.atoms) {
    if (at.x === 0) a0 += at.p;
    else if (v === Infinity) {
      v = at.x;
      a1 = at.p;
    } else return null;
  }
  const r = layerCompoundAtoms(N, a0, a1, v);
  return r && { ...r, a0, a1, v };
}

function compoundSupport(n: readonly [number, number], x: readonly [number, number]): [number, number] {
  const mul = (a: number, b: number) => (a === 0 || b === 0 ? 0 : a * b);
  const c = [mul(n[0], x[0]), mul(n[0], x[1]), mul(n[1], x[0]), mul(n[1], x[1])];
  if (n[0] === 0) c.push(0);
  return [Math.min(...c), Math.max(...c)];
}

export { pgfAt };

/** terms of the count's table summed by countDerivTail (past them s^{M-1} E N, negligible where the bound is used: s small) */
const DERIV_TERMS = 32;

/**
 * sum_{n >= from} n p_n s^{n-1} <= sum_{from <= n < M} n p_n (1 + rel_n) s^{n-1} + s^{M-1} E N for 0 <= s <= 1 (every term
 * non-negative; the table's p_n within pointRel relative, n p_n summed to at most E N past it), the powers and the sum
 * within (M + 4) 2 eps; undefined without a table from a recursion with per-point bounds (the callers keep E N s^{from-1})
 */
function countDerivTail(t: LatticeTable | null, mean: number): ((s: number, from: number) => number) | undefined {
  if (!t || t.step !== 1 || t.origin !== 0 || !t.pointRel || !(mean >= 0)) return undefined;
  const M = t.p.length;
  const w = new Float64Array(M);
  for (let n = 0; n < M; n++) w[n] = n * t.p[n] * (1 + t.pointRel(n));
  return (s: number, from: number) => {
    if (!(s >= 0 && s <= 1)) return Infinity;
    let sum = 0;
    let pw = Math.pow(s, Math.max(from - 1, 0));
    for (let n = Math.max(from, 1); n < M; n++, pw *= s) sum += w[n] * pw;
    return (sum + Math.pow(s, Math.max(M - 1, 0)) * mean) * (1 + 2 * (M + 4) * Number.EPSILON);
  };
}
