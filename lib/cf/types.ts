import type { Model } from "./schema";
import type { DirectLaw } from "./direct/types";
import type { CompoundBracket } from "./discretise";

export type { Model };

/** A point mass p at x. */
export interface Atom {
  x: number;
  p: number;
}

/** How the law's mass is laid out; decides which inversion applies. */
export type LawKind =
  | { type: "continuous" } // has a density
  | { type: "lattice"; origin: number; step: number } // all mass on origin + k*step (k integer, may be negative)
  | { type: "mixed"; atoms: Atom[] } // finite atoms plus a continuous part
  | { type: "discrete"; atoms: Atom[] | null }; // atoms without a common lattice (null when too many to list)

/** A tabulated lattice law: p[k] = P(X = origin + k*step); tailMass = mass dropped by truncation. */
export interface LatticeTable {
  origin: number;
  step: number;
  p: Float64Array;
  tailMass: number;
  /** when the table approximates a law that is not lattice (discretised severity): bound on |cdf error| vs that law */
  cdfError?: number;
  /**
   * where the table is a recursion from an accurate first term: a bound on the relative error of p[k] (the
   * recursion's roundings up to k), non-decreasing in k; absent where only the whole table's bound is known
   */
  pointRel?: (k: number) => number;
  /** with pointRel: a bound on p[k] for k past the table's end (the answer there is 0, so this bounds its error) */
  beyond?: (k: number) => number;
  /** bounds on the rounding of p: every entry (pmf) and their sum (l1), where derived (../table-rounding.ts) */
  round?: { pmf: number; l1: number };
  /**
   * where known: a bound on each entry's absolute error, the rounding only (a Panjer run's running bound,
   * ./compound-table.ts; a bulk table's, ./families/bulk-bound.ts; carried through reversals, mixtures and direct
   * convolutions, ./table-rounding.ts pointErrOf)
   */
  pointErr?: Float64Array;
  /** the dropped mass (tailMass) lies below the origin: a reversed table cut at its upper end (./operators.ts scaleNode) */
  tailBelow?: boolean;
  /**
   * where known, the first index at which the dropped mass (tailMass) may lie: the table's length for a recursion cut
   * at its end; a convolution of cut tables misses mass inside its own range too (./lattice.ts convolveRelTables)
   */
  tailFrom?: number;
}

export interface CompiledModel {
  /** log phi(t) written into (re, im); im is the continuous branch (unwrapped from t=0 outward), except below laws whose
   *  log is principal at each frequency (Node.logCf: beta, PERT, truncated normal, per-claim layers) */
  logCf(t: Float64Array, re: Float64Array, im: Float64Array): void;
  /** phi(t) written into (re, im). */
  cf(t: Float64Array, re: Float64Array, im: Float64Array): void;
  readonly kind: LawKind;
  /** sup{ r : E|X|^r < inf } (Infinity when all moments exist, 0 for Cauchy-like). */
  readonly momentIndex: number;
  /** exact cumulants kappa_1..kappa_n (index 0 = kappa_1), null where the order does not exist. */
  cumulants(n: number): (number | null)[];
  /** bounds on the absolute error of cumulants(n) (running error analysis, moment-error.ts); Infinity where none is derived */
  cumulantErrors?(n: number): (number | null)[];
  /** robust location and positive scale for range choice when cumulants do not exist. */
  readonly location: number;
  readonly scale: number;
  /** known support [lo, hi] (may be infinite). */
  readonly support: readonly [number, number];
  /** tail decay hints for the range chooser: power-law index per side; Infinity = lighter than any power. */
  readonly tails: { left: number; right: number };
  /** number of nodes of the model tree (for compute units). */
  readonly nodes: number;
  /** bound on the absolute error of the CF values (0 for closed forms; numerical CFs declare theirs) */
  readonly cfAbsError?: number;
  /** bound on the relative error of the CF values (compounds of numerical severities) */
  readonly cfRelError?: number;
  /** absolute error of the CF values per unit |t| (damped transform: per unit |t| + beta) from the frequencies the tree
   *  rounds (scaled arguments, ../cf/arg-rounding.ts); 0 when none, NaN where not derived */
  readonly cfArgSlope?: number;
  /** a finer bound on that error at t >= 0 (undamped CF), where derived: the error is at most min(cfArgSlope t, cfArgErrAt(t)) */
  readonly cfArgErrAt?: (t: number) => number;
  /** the same for the damped transform at damping beta (compounds whose severity bounds its own rounding per frequency) */
  readonly cfArgErrDampedAt?: (beta: number, t: number) => number;
  /** a bound on cfArgErrDampedAt over every frequency in [t0, t1] (0 <= t0 <= t1), where derived */
  readonly cfArgErrDampedOn?: (beta: number, t0: number, t1: number) => number;
  /** a bound at frequency t, damping beta, on dampedLogCf's relative error, at most cfRelError (compounds whose severity bounds its own per frequency) */
  dampedRelErrorAt?(beta: number, t: number): number;
  /** the same for dampedLogCf's absolute error, at most cfAbsError (sums and mixtures holding severities that bound theirs per frequency) */
  dampedAbsErrorAt?(beta: number, t: number): number;
  /** log E[exp((i t - beta) X)], beta >= 0, for aggregate laws bounded below (compounds): the damped inversion's input */
  dampedLogCf?(beta: number, t: Float64Array, re: Float64Array, im: Float64Array): void;
  /** gamma kernels the damped inversion subtracts from the transform and adds back in closed form (compounds of
   *  severities with a slowly decaying CF: a jump or a power singularity at the support's lower end) */
  dampedKernels?: readonly import("./damped-kernels").GammaKernel[];
  /**
   * a derived bound, non-increasing in t, on |psi_c(t)|: the damped transform less the atoms at 0 and dampedKernels (a
   * compound of gamma claims, whose kernels are its first claims' laws): the damped envelope is then derived
   */
  dampedRemainderBound?(beta: number, t: number): number;
  /** a power q > 0 with dampedRemainderBound(beta, t) <= R (t_0 / t)^q past any t_0 large against the kernels' rates (the tail past the probes) */
  dampedRemainderDecay?: number;
  /**
   * where dampedRemainderDecay is 1 or less: psi_c = F + G with |F(t)| <= fast(beta, t), falling like t^-decay (decay > 1)
   * past any t_0 large against the kernels' rates, and G the damped transform of a function of total variation at most
   * tv(beta) (the kernels' weights' rounding: a few ulps of each n-claim law of exponential claims), whose truncated
   * inversion is within a fixed multiple of tv at every point and cut-off (see ./invert/damped-psi.ts)
   */
  dampedRemainderJump?: RemainderJump;
  /**
   * derived bounds on the damped transform past the support's lower end lo (atom: P(X = lo)): a sum of compounds and
   * gamma terms without kernels bounds its remainder psi_c from them (../cf/damped-majorant.ts)
   */
  dampedMajorant?: {
    atom: number;
    rest(beta: number, t: number): number;
    slope(beta: number, t: number): number;
    decay(beta: number, t0: number): import("./damped-majorant").MajorantDecay;
    /** the same less the model's gamma kernels (where `kernels` is model.dampedKernels), seeing them cancel (../cf/damped-kernel-rest.ts) */
    kernelRest?: import("./damped-kernel-rest").KernelRest;
  };
  /** the one-claim term of a compound (P(N = 1) times a closed-form severity law) the damped inversion takes out of
   *  the transform and adds back in closed form */
  dampedSeverity?: import("./severity-kernel").SeverityKernel;
  /** notes on approximations already made (e.g. "lognormal severity discretised on step h, mean-preserving"). */
  readonly notes: string[];
  /** a single named law, possibly scaled or shifted, evaluated without its CF (closed form, special function or
   *  integral representation); density() and quantiles() use it when present */
  readonly direct?: DirectLaw;
  /** sums: every power-tail index of the terms (Richardson in the period takes its exponents from all of them) */
  readonly powerIndices?: number[];
  /** an upper bound on E|X - c| beyond the cumulants' (laws without a variance on both sides, ./abs-moment.ts); NaN where none */
  readonly absMomentAbout?: (c: number) => number;
  /** units of rounding of logCf relative to 1 + |log phi| (lib/cf/invert/part.ts cfRelError) */
  logCfUlps?: number;
  /** absolute error of logCf at t beyond those units (special functions whose terms cancel) */
  logCfExtraError?(t: number): number;
  /** log of a non-increasing majorant of |phi| on t >= 0 (M(t) >= sup_{s >= t} |phi(s)|), where the tree gives one */
  logAbsMajorant?: import("./majorant").LogMajorant;
  /** a majorant of |phi(t) - sum_j p_j e^{i t x_j}| over the listed atoms (the continuous part alone), where derived */
  continuousMajorant?: import("./layer-majorant").ContinuousMajorant;
  /** sums: the term with the heaviest power tail, when it has a direct law (see TailTerm) */
  readonly tailTerm?: TailTerm;
  /** when the law is lattice and can be tabulated (finite lattices, Panjer for compounds, or the opt-in
   *  discretisation of a continuous severity, whose table carries its cdfError), return the pmf starting at
   *  `origin` on `step`, truncated with the dropped tail mass reported; otherwise null. */
  latticeTable?(maxLength: number): LatticeTable | null;
  /** a lattice law that stands for a discretised continuous one: only its table describes it (its CF is the
   *  continuous law's), so without a table it cannot be inverted as a lattice law */
  discretisedLattice?: boolean;
  /** a mixture (possibly scaled or shifted): its weights and compiled components, each answerable by its own route */
  components?(): readonly { weight: number; model: CompiledModel }[];
  /** a discretised compound of claims with their own cdf (per-claim layers): the compounds with every claim rounded
   *  down and rounded up onto the table's lattice, which bracket the law in the usual stochastic order */
  bounds?(): CompoundBracket | null;
  /** the transform's expansion at the points where the density is not smooth (Node.transformSeries), where every term
   *  of the tree gives it: the undamped routes fit their kernels at those points (../invert/continuous.ts maybeKernels) */
  readonly transformSeries?: import("./damped-kernels").TransformSeries;
  /** points where the density of the continuous part jumps, with the sizes (the inversion takes them out as kernels) */
  readonly densityJumps?: readonly DensityJump[];
  /** points where the slope of that density jumps, f'(at+) - f'(at-) = size (taken out as shape-2 kernels beside the jumps) */
  readonly densityKinks?: readonly DensityJump[];
  /** and where its second derivative jumps, f''(at+) - f''(at-) = size (shape-3 kernels) */
  readonly densityBends?: readonly DensityJump[];
}

/** A jump f(at+) - f(at-) = size of a density (in units of the whole law's probability, atoms included). */
export interface DensityJump {
  at: number;
  size: number;
}

/**
 * The term D of a sum X = D + Y whose power tail is strictly the heaviest, when D has a direct law (pdf, cdf, sf with
 * bounds). The power-tail inversion subtracts the CF of G = D + E[Y] and adds G back directly: the tails of
 * X - G cancel to first and second order (E S_D(x - Y) - S_D(x - E Y) ~ S_D''(x) Var(Y) / 2), so the remainder
 * decays like |x|^{-remainderAlpha} and shorter periods suffice.
 */
export interface TailTerm {
  /** log-CF of D alone */
  logCf(t: Float64Array, re: Float64Array, im: Float64Array): void;
  /** the direct law of G = D + E[Y] */
  direct: DirectLaw;
  /** E[Y]: the other terms' mean */
  shift: number;
  /** E[D] (NaN when infinite) */
  mean: number;
  /** the derived bound on E[D]'s error (Infinity where none is known) */
  meanError: number;
  tails: { left: number; right: number };
  /** power-tail index of what is left: the smallest of `indices` */
  remainderAlpha: number;
  /** the power terms y^{-b} the tails of what is left may hold: the other terms' indices b, D's index a + 2 (second
   *  order of E S_D(x - Y) - S_D(x - E Y)) and a + b - 1 for each b < 3 (the same when Y has no variance) */
  indices: number[];
  /** bound on the absolute error of D's CF values */
  cfAbsError: number;
  /** an upper bound on E|G - c| (NaN where none is derived: D without a mean) */
  absMomentAbout?: (c: number) => number;
  /** the law of Y = X - D as the moment routines read it (momentIndex, cumulants with derived bounds, support) */
  others?: CompiledModel;
  /** optional: a derived majorant of |phi_G| = |phi_D| (D's, its slope about the centre moved by `shift`) */
  logAbsMajorant?: import("./majorant").LogMajorant;
  /**
   * optional: derived bounds on G's stop-loss transforms E[(G - u)^+] (side 1) and E[(u - G)^+] (side -1) from D's moments
   * (invert/tail-moments.ts), Infinity where none; the part of G's ES integral past its last node (direct/shortfall.ts)
   */
  rest?(u: number, side: 1 | -1): number;
  /**
   * Two or more terms with power tails and direct laws (D first, then the next heaviest): the images the pointwise sums
   * take out of every term's law G_i = D_i + E[X - D_i] (./invert/images.ts). What is left then has power terms
   * `indices`: the other terms' indices b, a_i + 2 per term, and a_i + b - 1 for every other term's index b < 3
   * (X - G_1 - G_2 ... in the tails: S_X(y) = sum_i S_{D_i}(y - E[X - D_i]) + O(y^{-a_i - b + 1}, y^{-a_i - 2}),
   * the same expansion as for one term, with the next heaviest term's own tail taken out too).
   */
  images?: {
    laws: { direct: DirectLaw; tails: { left: number; right: number } }[];
    remainderAlpha: number;
    indices: number[];
    /**
     * X = G_1 + G_2 - m + Z: m = E[X] as computed, Z = the other terms (their law as the moment routines read it, null when
     * there are none) less zShift, and a bound on the offsets of the means (E[G_1 - m], E[G_2 - m], E[Z] together)
     */
    pair?: {
      m: number;
      zShift: number;
      meanError: number;
      others: CompiledModel | null;
      /**
       * optional: Z split as sum_i (D_i - m_i) + (L - lShift), the other terms with power-law majorants of their densities
       * (D_i, about the points m_i) apart from the rest L (its law as the moment routines read it, null when there is none),
       * so that Z's tails fall like the D_i's rather than like Markov's bound on Z's highest even moment
       */
      split?: { heavy: { tail: import("./direct/power-tail").PowerTail; m: number; spread: number }[]; light: CompiledModel | null; lShift: number };
    };
  };
}

/** compile(model) in ./compile.ts has this signature; throws CfError. */
export type CompileFn = (model: Model) => CompiledModel;

/** CompiledModel.dampedRemainderJump: the remainder's part falling fast, and the total variation of the slow rest */
export interface RemainderJump {
  fast(beta: number, t: number): number;
  decay: number;
  tv(beta: number): number;
}
