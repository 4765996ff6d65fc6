/** Types and shared helpers of the family parameter table (lib/cf/families/spec.ts). */
import { shiftedLogRound } from "./log-round";
import type { DirectLaw } from "../direct/types";
import type { Node } from "../node";
import { shiftDamped, shiftDampedCf } from "../damped-cf";
import { affineDist, type DirectLaw as DistLaw } from "./dist";
import { cumulantEst, withCumulantErrors } from "../cumulant-bounds";
import { add, exact } from "../moment-error";

/** The validated model fields of one family (defaults not yet filled in). */
export type FamilyParams = Readonly<Record<string, number | string | undefined>>;

export interface ParamSpec {
  name: string;
  /** "int" = integer-valued */
  type: "real" | "int";
  lo: number;
  hi: number;
  loOpen: boolean;
  hiOpen: boolean;
  default?: number | string;
  /** may be left out without a default (then absent: e.g. an open end of a truncation) */
  optional?: boolean;
  /** allowed string values (only for `param` of stable) */
  values?: readonly string[];
  doc: string;
}

/** Parameters of a validated family model (defaults filled in). */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type Params = Record<string, any>;

export interface FamilySpec {
  name: FamilyName;
  title: string;
  params: ParamSpec[];
  /** support as text */
  support: string;
  /** characteristic function as text (t real) */
  cf: string;
  /** which moments exist, as text */
  moments: string;
  /** machine-readable moment existence: "all", "none", or "below:<param or expression>" */
  momentExistence?: string;
  /** right-tail index as text: P(X > x) ~ x^-index ("none": lighter than any power; "bounded": bounded support) */
  tailIndex?: string;
  /** how the CF is computed */
  cfMethod: "closed form" | "closed form (Bessel K)" | "numerical quadrature" | "series and numerical quadrature";
  discrete: boolean;
  /** a law on 0, 1, 2, ... that may serve as the count of a compound */
  count?: boolean;
  /** a per-claim layer may take this law: its built node carries the pdf and cdf (closed form or special function)
   *  that the layer integrates against */
  layerable?: boolean;
  source: string;
  /**
   * Optional direct evaluation of the law alone (or scaled / shifted): pdf, cdf, sf and, where it has one, the
   * quantile, from a closed form, a special function or a one-dimensional integral, each value with an absolute
   * error bound (contract in lib/cf/direct/types.ts). Return null for parameters it does not cover; the law is then
   * inverted from its CF like any other. Sums, mixes and compounds always use the CF.
   */
  direct?: (p: FamilyParams) => DirectLaw | null;
  /** rules across parameters (after each is in range): the offending parameter and a sentence, or null */
  check?: (p: Params) => { param: string; detail: string } | null;
  /** the compiled law */
  build: (p: Params) => Node;
}


export const FAMILY_NAMES = [
  "normal",
  "cauchy",
  "uniform",
  "exponential",
  "gamma",
  "chi_squared",
  "laplace",
  "logistic",
  "student_t",
  "stable",
  "variance_gamma",
  "nig",
  "lognormal",
  "pareto",
  "weibull",
  "point",
  "bernoulli",
  "binomial",
  "poisson",
  "negative_binomial",
  "geometric",
  "lomax",
  "generalized_pareto",
  "burr",
  "loglogistic",
  "inverse_gaussian",
  "inverse_gamma",
  "beta",
  "pert",
  "triangular",
  "truncated_normal",
  "logarithmic",
  "zero_truncated_poisson",
  "zero_truncated_negative_binomial",
  "zero_truncated_binomial",
  "zero_modified_poisson",
  "zero_modified_negative_binomial",
  "zero_modified_binomial",
  "zero_modified_logarithmic",
] as const;
export type FamilyName = (typeof FAMILY_NAMES)[number];

export const withDist = (n: Node, d: DistLaw): Node => ({ ...n, dist: d });
export const R = Infinity;
export const real = (name: string, doc: string, lo = -R, hi = R, loOpen = true, hiOpen = true, def?: number): ParamSpec => ({
  name,
  type: "real",
  lo,
  hi,
  loOpen: lo === -R ? true : loOpen,
  hiOpen: hi === R ? true : hiOpen,
  ...(def !== undefined ? { default: def } : {}),
  doc,
});
export const pos = (name: string, doc: string, def?: number) => real(name, doc, 0, R, true, true, def);
export const prob = (name: string, doc: string, loOpen = false) => real(name, doc, 0, 1, loOpen, false);

/** A family node moved by b (location parameters of families built from others). */
export function shiftBuilt(n: Node, b: number): Node {
  if (b === 0) return n;
  const moved: Node = {
    ...n,
    location: n.location + b,
    support: [n.support[0] + b, n.support[1] + b],
    logCf(t, re, im) {
      n.logCf(t, re, im);
      for (let k = 0; k < t.length; k++) im[k] += b * t[k];
    },
    cumulants: (m) => n.cumulants(m).map((v, k) => (k === 0 && v !== null ? v + b : v)),
    ...(n.dist ? { dist: affineDist(n.dist, 1, b) } : {}),
    // the damped transform and the endpoint expansion move with the law (else a compound would use the unshifted ones)
    ...(n.dampedLogCf ? { dampedLogCf: shiftDamped(b, n) } : {}),
    dampedCf: shiftDampedCf(b, n),
    ...(n.laplaceExpansion ? { laplaceExpansion: { ...n.laplaceExpansion, at: n.laplaceExpansion.at + b } } : {}),
    ...(n.severity && b > 0 ? { severity: { ...n.severity, lo: n.severity.lo + b, pdf: (x: number) => n.severity!.pdf(x - b), upper: (q: number) => n.severity!.upper(q) + b } } : {}),
    ...(n.severity && b < 0 ? { severity: undefined } : {}),
    // the claim-law rounding moves with the shift (./log-round.ts)
    ...shiftedLogRound(n, b),
  };
  return withCumulantErrors(moved, (m) => cumulantEst(n, m).map((v, k) => (k === 0 && v ? add(v, exact(b)) : v)));
}
