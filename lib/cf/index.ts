// Public entry of the numerical core (pure TypeScript; no framework, no I/O).
export type { Atom, LawKind, CompiledModel, LatticeTable, CompileFn } from "./types";
export type { Model, FamilyModel, SumModel, ScaleModel, ShiftModel, RepeatModel, MixModel, CompoundModel, LatticeModel, SampleModel } from "./schema";
export {
  ModelSchema,
  FamilySchema,
  SumSchema,
  ScaleSchema,
  ShiftSchema,
  RepeatSchema,
  MixSchema,
  CompoundSchema,
  LatticeSchema,
  SampleSchema,
  MIX_WEIGHT_TOLERANCE,
  LATTICE_SUM_TOLERANCE,
} from "./schema";
export { validateModel, isCountLaw } from "./validate";
export { compile, USEFUL_TAIL, type CompileOptions } from "./compile";
export { discretiseSeverity, chooseSpan, type DiscretiseOptions, type SeverityLaw } from "./discretise";
export { CfError, isCfError, toPointer, type CfErrorCode, type CfIssue } from "./errors";
export { MAX_GRID_POINTS, MAX_MODEL_NODES, MAX_DEPTH, MAX_REPEAT, MAX_SAMPLE, MAX_LATTICE, MAX_MOMENT_ORDER } from "./limits";
export { moments, type MomentsResult } from "./moments";
export { familyCatalogue, type CatalogueEntry, type CatalogueParam } from "./catalogue";
export { FAMILY_NAMES, type FamilyName } from "./families/spec";
export { convolve, convolveDirect, convolveFft, convolveTables, powerTable, panjer, commonStep, type PanjerCount } from "./lattice";
export { besselK, logBesselKScaled, lgamma } from "./families/special";
export { NUMERIC_CF_ABS_ERROR } from "./families/numeric";
export { getFftPlan, type FftPlan } from "./fftplan";
export { density, autoGrid, DEFAULT_TOLERANCE, DEFAULT_TOLERANCE_HEAVY } from "./invert/density";
export type { DensityOptions, DensityResult, InversionDiagnostics, ErrorEstimate, GridSpec, InversionMethod } from "./invert/types";
export { quantiles, type QuantileOptions, type QuantileResult, type QuantileDiagnostics } from "./invert/quantile";
export { nextPowerOfTwo, clearFftPlans } from "./fftplan";
