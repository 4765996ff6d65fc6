/**
 * The names the engine answers with in `diagnostics.method`, each with what it means. The response schemas (and so
 * the OpenAPI document) list exactly these; the type checks below fail the build when the engine's method unions and
 * these lists drift apart.
 */
import type { InversionDiagnostics } from "./invert/types";
import type { QuantileDiagnostics } from "./invert/quantile";

export const METHOD_MEANINGS = {
  fft: "FFT inversion of the characteristic function on a grid",
  "gil-pelaez": "inversion of the characteristic function at the points asked for (Gil-Pelaez sums)",
  "fft-damped":
    "FFT inversion of the exponentially damped transform of a law bounded below (aggregate claims), atoms separated exactly",
  "gil-pelaez-damped":
    "pointwise inversion of the exponentially damped transform of a law bounded below (aggregate claims), atoms separated exactly",
  "lattice-table": "tabulated from the model exactly (recursion or convolution of lattice laws)",
  discretised: "opt-in discretisation of a continuous severity onto a lattice: an approximation with its own error bound",
  "lattice-fft": "pmf of a lattice law by FFT inversion of its characteristic function",
  atoms: "a law made of atoms only, listed exactly",
  "closed-form": "a single named family (alone, scaled or shifted) evaluated from its closed form, no inversion",
  "special-function": "a single named family evaluated from special functions (incomplete gamma, beta, ...), no inversion",
  "stable-integral": "a stable law evaluated from its integral representation and tail series, no inversion",
  mixture:
    "a mixture (possibly scaled or shifted) answered from its components, each by its own route (the notes name them); values and bounds are the weighted sums",
  inversion: "the measures from the law's cdf and quantiles as /density and /quantiles answer them (their method in the notes)",
  "discretised-bounds":
    "a compound of per-claim layers with method discretise, bracketed between the compounds of the claims rounded down and up; each value is the middle of the bracket, its error half the width",
} as const;

export type MethodName = keyof typeof METHOD_MEANINGS;

export const DENSITY_METHODS = ["fft", "gil-pelaez", "fft-damped", "gil-pelaez-damped", "lattice-table", "discretised", "lattice-fft", "atoms", "mixture", "closed-form", "special-function", "stable-integral"] as const satisfies readonly MethodName[];
/** POST /risk: a lattice table's route, the inversion routes, or the layered bracket */
export const RISK_METHODS = ["lattice-table", "discretised", "lattice-fft", "inversion", "discretised-bounds"] as const satisfies readonly MethodName[];
export type RiskMethod = (typeof RISK_METHODS)[number];
export const QUANTILE_METHODS = ["gil-pelaez", "gil-pelaez-damped", "lattice-table", "discretised", "lattice-fft", "atoms", "mixture", "closed-form", "special-function", "stable-integral"] as const satisfies readonly MethodName[];

/** what the request option method = "discretise" does (the request schemas' descriptions) */
export const DISCRETISE_OPT_IN =
  "opt-in mean-preserving discretisation of the continuous severities inside compounds (lognormal, pareto, weibull, lomax, burr, ...): " +
  "a lattice approximation, answered with method discretised and its error bound; by default such compounds are continuous laws " +
  "(an atom at 0 and a density) inverted from the damped transform (gil-pelaez-damped, fft-damped)";

/** "name: meaning; ..." for a schema description */
export function describeMethods(names: readonly MethodName[]): string {
  return names.map((n) => `${n}: ${METHOD_MEANINGS[n]}`).join("; ");
}

// compile-time: each list is exactly its engine union (no name missing, none extra)
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const densityListed: Same<(typeof DENSITY_METHODS)[number], InversionDiagnostics["method"]> = true;
const quantileListed: Same<(typeof QUANTILE_METHODS)[number], QuantileDiagnostics["method"]> = true;
void densityListed;
void quantileListed;
