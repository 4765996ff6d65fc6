import type { DirectMethod } from "../direct/types";
import type { Atom } from "../types";

export type InversionMethod = "auto" | "fft" | "gil-pelaez";

export interface GridSpec {
  from: number;
  to: number;
  count: number;
}

export interface DensityOptions {
  /** arbitrary evaluation points (pointwise method by default) */
  x?: Float64Array | readonly number[];
  /** uniform grid from..to with count points (FFT by default) */
  grid?: GridSpec;
  method?: InversionMethod;
  /** target absolute error of pdf and cdf (default 1e-10) */
  tolerance?: number;
  /** override of the periodisation window [a, b) used by the inversion */
  range?: { from: number; to: number };
  /** override of the frequency cut-off (largest |t| used) */
  maxFrequency?: number;
  /** skip the density (faster when only cdf/sf are wanted) */
  cdfOnly?: boolean;
  /** caller-owned output buffers of the request's length (continuous and mixed laws); reused when given */
  out?: { pdf?: Float64Array; cdf?: Float64Array; sf?: Float64Array };
}

/** Error budget of one inversion; every term is an upper estimate of absolute error over the points returned. */
export interface ErrorEstimate {
  /** aliasing (periodisation / discretisation of the frequency integral) */
  aliasing: number;
  /** truncation of the frequency integral at maxFrequency */
  truncation: number;
  /** floating point rounding, including the CF's own relative error */
  rounding: number;
  /** total for the density (or pmf) */
  pdf: number;
  /** total for cdf and sf */
  cdf: number;
}

export interface InversionDiagnostics {
  method: "fft" | "gil-pelaez" | "fft-damped" | "gil-pelaez-damped" | "lattice-table" | "discretised" | "lattice-fft" | "atoms" | "mixture" | DirectMethod;
  /** FFT size, or number of frequency nodes of the pointwise sum */
  gridSize: number;
  /** frequency nodes actually used (t_k = (k + 1/2) h, k < terms) */
  terms: number;
  /** frequency step h and the largest frequency used */
  frequencyStep: number;
  maxFrequency: number;
  /** periodisation window [from, to) in x */
  range: { from: number; to: number };
  /** probability mass inside the window as computed, F(to) - F(from) */
  capturedMass: number;
  error: ErrorEstimate;
  /** Richardson levels used for heavy tails (1 when none) */
  levels: number;
  notes: string[];
  /**
   * the absolute error the answer was computed to (the request's, else the default: 1e-10, or 1e-8 for laws with power
   * tails inverted by period doubling) and whether the bounds in `error` meet it (if not, a note says why)
   */
  tolerance?: { target: number; met: boolean };
  /**
   * bounds at each returned point, where the route bounds every point on its own (direct laws, mixtures of them);
   * each entry is at most the whole answer's bound in `error`. Absent where only the whole answer is bounded.
   */
  pointError?: PointErrors;
}

/** per-point bounds on the absolute error of pdf (or pmf), cdf and sf */
export interface PointErrors {
  pdf: Float64Array;
  cdf: Float64Array;
  sf: Float64Array;
}

export interface DensityResult {
  x: Float64Array;
  /** density of the continuous part times its weight (absent for lattice/discrete laws) */
  pdf?: Float64Array;
  /** probability at each x (lattice and discrete laws) */
  pmf?: Float64Array;
  cdf: Float64Array;
  sf: Float64Array;
  atoms: Atom[];
  diagnostics: InversionDiagnostics;
}
