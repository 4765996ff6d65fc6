import type { Atom, DensityJump, LatticeTable, TailTerm } from "./types";
import type { CompoundBracket, SeverityLaw } from "./discretise";
import type { DampedLogCf } from "./damped-cf";
import type { EndpointSeries, GammaKernel, TransformSeries } from "./damped-kernels";
import type { DirectLaw } from "./direct/types";
import type { DirectLaw as DistLaw } from "./families/dist";

/**
 * Internal kind, richer than the public LawKind: a lattice with step 0 is a single point, and lattice/discrete
 * laws carry their atoms when there are few of them.
 */
export type NodeKind =
  | { type: "continuous" }
  | { type: "lattice"; origin: number; step: number; atoms: Atom[] | null }
  | { type: "discrete"; atoms: Atom[] | null }
  | { type: "mixed"; atoms: Atom[]; atomsComplete: boolean };

/** One compiled node of the model tree. */
export interface Node {
  /** log phi(t) into (re, im); continuous branch when t is sorted (beta, PERT, truncated normal and per-claim layers:
   *  principal at each frequency, ./families/log-round-principal.ts; consumers take e^L) */
  logCf(t: Float64Array, re: Float64Array, im: Float64Array): void;
  kind: NodeKind;
  momentIndex: number;
  /** exact cumulants kappa_1..kappa_n, null where they do not exist */
  cumulants(n: number): (number | null)[];
  /** the same cumulants in running-error arithmetic (moment-error.ts), valid only beside the cumulants named in `of` */
  cumulantErrors?: { of: Node["cumulants"]; at(n: number): import("./moment-error").EstList };
  location: number;
  scale: number;
  support: readonly [number, number];
  tails: { left: number; right: number };
  nodes: number;
  notes: string[];
  /** exact pmf table for lattice laws (truncated at maxLength with the dropped mass), else null */
  table?(maxLength: number): LatticeTable | null;
  /** for laws on 0,1,2,...: log E[e^{w N}] at complex w (Re w <= 0), into (re, im), continuous along the index */
  countCgf?(wr: Float64Array, wi: Float64Array, re: Float64Array, im: Float64Array): void;
  /** the same at z = e^w given as zr + i zi (|z| <= 1): log P_N(z), where it has a form with no log or exp of z (Poisson) */
  countLogPgf?(zr: Float64Array, zi: Float64Array, re: Float64Array, im: Float64Array): void;
  /** a bound on |P_N'(z)| over the disc |z - z0| <= d (|z| <= 1) given |P_N(z0)|, where the count has one (Poisson) */
  countSlopeNear?(absPgf: number, d: number): number;
  /** (a, b, 0) class membership: P(N=k) = (a + b/k) P(N=k-1), k >= 1 (Loss Models, (a, b, 0) class; recalled from memory) */
  panjer?: {
    a: number;
    b: number;
    p0: number;
    c1?: number;
    /** bounds on the stored values' errors: a, b and p0 relative, c1 absolute (./panjer.ts) */
    err?: { a: number; b: number; p0: number; c1: number };
  };
  /** infinitely divisible (a, b, 0) counts: the (a, b, 0) law whose m-fold sum is this one, with its pgf */
  divide?: (m: number) => { a: number; b: number; pgf: (z: number) => number };
  /** P(N = 0) for laws on 0,1,2,... */
  p0?: number;
  /** a positive severity without a cheap CF (lognormal, pareto, weibull): compounds discretise it onto a lattice */
  severity?: SeverityLaw;
  /** direct evaluation of a single named law (kept through scale and shift, dropped by every other operator) */
  direct?: DirectLaw;
  /** a mixture's weights and components (kept through scale and shift): quantiles and density of a mixture are
   *  answered from its components, each by its own route */
  mixParts?: { weights: number[]; parts: Node[] };
  /** closed-form pdf, cdf and sf (named continuous laws): the per-claim layer integrates against them */
  dist?: DistLaw;
  /** a discretised compound of a claim law with its own cdf: the compounds of the claims rounded down and up */
  bounds?(): CompoundBracket | null;
  /** the table is an approximation of the law (discretised severity): kept even when it drops more than USEFUL_TAIL */
  approximate?: boolean;
  /** log E[exp((i t - beta) X)] for laws bounded below (damped inversion), where available */
  dampedLogCf?: DampedLogCf;
  /**
   * E[exp((i t - beta) X)] itself as re + i im, where the family sums it directly (no log and exp between its sums and a
   * count's log-pgf: a Poisson compound of it, ./damped-cf.ts compoundDamped); within the same cfAbsError
   */
  dampedCf?: DampedLogCf;
  /** the tree holds a compound (the damped inversion is used for such laws, and for laws bounded below with a power tail) */
  hasCompound?: boolean;
  /** an upper bound on E|X - c|, where the node derives one beyond its cumulants (Student t and stable laws without a
   *  variance, and the operators holding them: ./abs-moment.ts); NaN where none */
  absMomentAbout?: (c: number) => number;
  /** bound on the absolute error of the CF values phi(t) (0 for closed forms) */
  cfAbsError?: number;
  /** bound on the relative error of the CF values (compounds of numerical CFs: |dP/P| <= slope |d phi_X|) */
  cfRelError?: number;
  /** a bound S on the CF values' absolute error per unit |t| (damped: per unit |t| + beta) from frequencies the tree
   *  rounds (scaled arguments, ./arg-rounding.ts); absent is 0, NaN where not derived */
  argSlope?: number;
  /** the same error at frequency t >= 0 where a finer bound is derived (a scaled child's slope majorant): the error is at
   *  most min(argSlope t, argErrAt(t)) (undamped CF only) */
  argErrAt?: (t: number) => number;
  /** severities: a bound R with |phi(s)| times the rounding of the computed log phi(s) <= R |s| (damped: R (|t| + beta)), where
   *  derived; a compound carries E N R as an argument slope (its own allowance is relative to its log only) */
  logRoundSlope?: number;
  /** the same at frequency t >= 0 (undamped), falling with t where |phi| does: at most logRoundSlope t; `self`: the node it
   *  was read from (a family copied by spreading reads its majorants there) */
  logRoundAt?: (t: number, self?: Node) => number;
  /** the same for the damped transform at damping beta, frequency t >= 0: at most logRoundSlope (t + beta) */
  logRoundDampedAt?: (beta: number, t: number, self?: Node) => number;
  /** a bound on logRoundDampedAt over every frequency in [t0, t1] (0 <= t0 <= t1), from the pieces' monotone parts taken at
   *  the interval's ends: one call for a run of nodes (../invert/grid-rounding.ts) */
  logRoundDampedOn?: (beta: number, t0: number, t1: number, self?: Node) => number;
  /** severities: a bound on |phi~(beta, t)| (beta = 0: |phi(t)|) the family derives in closed form, where it does (a compound
   *  bounds its count's factor |P_N'(phi_X)| <= cgfSlope P_N(that) with it, ./compound-errors.ts) */
  logRoundModulus?: (beta: number, t: number) => number;
  /** severities: what the logRound bound assumes, where it assumes anything (a compound of the law lists it in its notes) */
  logRoundNote?: string;
  /** compounds: argErrAt's damped counterpart (the error is at most min(argSlope (t + beta), argErrDampedAt(beta, t))) */
  argErrDampedAt?: (beta: number, t: number) => number;
  /** a bound on argErrDampedAt over every frequency in [t0, t1] (0 <= t0 <= t1), where derived */
  argErrDampedOn?: (beta: number, t0: number, t1: number) => number;
  /**
   * severities (and sums and mixtures holding them or compounds of them, ./damped-error-carry.ts): a bound at frequency t,
   * damping beta, on the damped transform's absolute error (at most cfAbsError, non-increasing in |t|), valid only with
   * the dampedLogCf and dampedCf named there; `shifted(b)`: the same for the law moved by b; `modulus`: a bound on the
   * damped transform's modulus itself at (beta, t), non-increasing in |t| (a compound scales its claim law's value rounding
   * by it)
   */
  dampedErrorAt?: {
    cf: DampedLogCf;
    rect?: DampedLogCf;
    at(beta: number, t: number): number;
    shifted?(b: number): (beta: number, t: number) => number;
    modulus?(beta: number, t: number): number;
  };
  /** compounds (and sums holding them): a bound at t, damping beta, on the damped transform's relative error (at most cfRelError, non-increasing in |t|), valid only with the dampedLogCf named there */
  dampedRelErrorAt?: { cf: DampedLogCf; at(beta: number, t: number): number };
  /** severities: the endpoint expansion of the Laplace transform (compounds choose gamma kernels from it) */
  laplaceExpansion?: EndpointSeries;
  /** severities: a derived bound on what the transform leaves past laplaceExpansion's terms (compounds bound their kernels' remainder by it) */
  endpointRemainder?: import("./endpoint-remainder").EndpointRemainder;
  /** severities with a closed-form law: the one-claim term P(N = 1) F_X a compound takes out of its damped transform */
  severityKernel?: (w: number, w2: number) => import("./severity-kernel").SeverityKernel;
  /** compounds: the one-claim term taken out of the damped transform, valid only with the dampedLogCf named here */
  dampedSeverity?: { cf: DampedLogCf; kernel: import("./severity-kernel").SeverityKernel };
  /** gamma kernels subtracted from the damped transform (compounds, and sums and mixtures holding them), valid only
   *  with the dampedLogCf named here; rate: the rate a sum or mixture holding the node rebuilds its kernels at (the kernels'
   *  common rate; 1 / sd for a compound of gamma claims, whose kernels are its n-claim laws at the gamma's own rate) */
  dampedKernels?: { cf: DampedLogCf; kernels: GammaKernel[]; rate: number };
  /** a derived bound on the damped transform's remainder after the atoms and kernels (CompiledModel.dampedRemainderBound) */
  dampedRemainder?: { cf: DampedLogCf; bound(beta: number, t: number): number; decay: number; jump?: import("./types").RemainderJump };
  /** derived bounds on the damped transform past the law's lower end (./damped-majorant.ts), valid only with the dampedLogCf named there */
  dampedMajorant?: import("./damped-majorant").DampedMajorant;
  /** the whole transform's expansion at its lower endpoint(s), where known (sums and mixtures build kernels from it) */
  transformSeries?: TransformSeries;
  /** counts: sup |P'(z) / P(z)| over the unit disc (finite for Poisson and negative binomial) */
  cgfSlope?: number;
  /** sums (and their scalings): every power-tail index of the terms, where more than one may show in the tails */
  powerIndices?: number[];
  /** sums: the term with strictly the heaviest power tail, when it has a direct law */
  tailTerm?: TailTerm;
  /** sums: their independent terms, nested sums opened (../operators.ts sumNode), so that the tail analysis of a sum
   *  holding a sum sees every term (a Student t inside (t + t) as a term of its own) */
  sumTerms?: Node[];
  /** log of a non-increasing majorant of |phi| on t >= 0, where the tree gives one (./majorant.ts) */
  logMajorant?: import("./majorant").LogMajorant;
  /** a majorant of |phi - the listed atoms' terms| (the continuous part alone), where derived (./layer-majorant.ts) */
  continuousMajorant?: import("./layer-majorant").ContinuousMajorant;
  /** absolute error of log phi(t) beyond 8 units of rounding per node relative to 1 + |L| (special functions whose
   *  terms cancel), at frequency t >= 0 */
  logCfErr?: (t: number) => number;
  /** interior points where the density of the law's continuous part jumps, with the jump sizes (f(x+) - f(x-)) */
  densityJumps?: DensityJump[];
  /** the points where that density's slope jumps, with the sizes (f'(x+) - f'(x-)) */
  densityKinks?: DensityJump[];
  /** and where its second derivative jumps (f''(x+) - f''(x-)) */
  densityBends?: DensityJump[];
}

export const NONE_MOMENT = (n: number): (number | null)[] => new Array<number | null>(n).fill(null);

/**
 * Cumulants -> raw moments: m_n = sum_{k=1}^n C(n-1,k-1) kappa_k m_{n-k} (Smith 1995, "A recursive formulation of the old
 * problem of obtaining moments from cumulants and vice versa", The American Statistician 49(2); computed check against
 * mpmath in tests/cf/moments-bounds.test.ts).
 */
export function cumulantsToRaw(kappa: (number | null)[]): (number | null)[] {
  const n = kappa.length;
  const m: (number | null)[] = [1];
  for (let j = 1; j <= n; j++) {
    let s = 0;
    let ok = true;
    let c = 1; // C(j-1, k-1)
    for (let k = 1; k <= j; k++) {
      const kk = kappa[k - 1];
      const mm = m[j - k];
      if (kk === null || mm === null) {
        ok = false;
        break;
      }
      s += c * kk * mm;
      c = (c * (j - k)) / k;
    }
    m.push(ok ? s : null);
  }
  return m.slice(1);
}

/** Raw moments m_1..m_n -> cumulants (inverse of the recursion above). */
export function rawToCumulants(m: (number | null)[]): (number | null)[] {
  const n = m.length;
  const mm = [1, ...m];
  const kappa: (number | null)[] = [];
  for (let j = 1; j <= n; j++) {
    let s = mm[j];
    if (s === null) {
      kappa.push(null);
      continue;
    }
    let c = 1;
    let ok = true;
    for (let k = 1; k < j; k++) {
      const kk = kappa[k - 1];
      const mv = mm[j - k];
      if (kk === null || mv === null) {
        ok = false;
        break;
      }
      s -= c * kk * mv;
      c = (c * (j - k)) / k;
    }
    kappa.push(ok ? s : null);
  }
  return kappa;
}

/** Cumulants -> central moments (kappa_1 set to 0). */
export function cumulantsToCentral(kappa: (number | null)[]): (number | null)[] {
  const k0 = kappa.slice();
  if (k0.length > 0 && k0[0] !== null) k0[0] = 0;
  return cumulantsToRaw(k0);
}

/** Fill a cumulant list to length n from a closed form valid for orders < limit (strict), null beyond. */
export function cumulantList(n: number, limit: number, f: (k: number) => number): (number | null)[] {
  const out: (number | null)[] = [];
  for (let k = 1; k <= n; k++) out.push(k < limit ? f(k) : null);
  return out;
}
