import { z } from "zod";
import { FAMILY_SPECS, type FamilyName, type ParamSpec } from "./families/spec";
import { MAX_LATTICE, MAX_REPEAT, MAX_SAMPLE } from "./limits";

/** Tolerances of the notation (issue 3): mixture weights and lattice probabilities must sum to 1 within these. */
export const MIX_WEIGHT_TOLERANCE = 1e-12;
export const LATTICE_SUM_TOLERANCE = 1e-9;

// ---- TypeScript shape of the notation (fields with defaults are optional) ----
export type FamilyModel =
  | { family: "normal"; mu: number; sigma: number }
  | { family: "cauchy"; loc: number; scale: number }
  | { family: "uniform"; a: number; b: number }
  | { family: "exponential"; rate: number }
  | { family: "gamma"; shape: number; rate: number }
  | { family: "chi_squared"; k: number }
  | { family: "laplace"; loc: number; scale: number }
  | { family: "logistic"; loc: number; scale: number }
  | { family: "student_t"; nu: number; loc?: number; scale?: number }
  | { family: "stable"; alpha: number; beta: number; scale?: number; loc?: number; param?: "S0" | "S1" }
  | { family: "variance_gamma"; sigma: number; nu: number; theta: number; loc?: number }
  | { family: "nig"; alpha: number; beta: number; delta: number; mu?: number }
  | { family: "lognormal"; mu: number; sigma: number }
  | { family: "pareto"; alpha: number; xm: number }
  | { family: "weibull"; shape: number; scale: number }
  | { family: "point"; at: number }
  | { family: "bernoulli"; p: number }
  | { family: "binomial"; n: number; p: number }
  | { family: "poisson"; lambda: number }
  | { family: "negative_binomial"; r: number; p: number }
  | { family: "geometric"; p: number };

export interface SumModel { sum: Model[] }
export interface ScaleModel { scale: number; of: Model }
export interface ShiftModel { shift: number; of: Model }
export interface RepeatModel { repeat: number; of: Model }
export interface MixModel { mix: { weight: number; of: Model }[] }
export interface CompoundModel { compound: { count: Model; each: Model } }
export interface LatticeModel { lattice: { origin: number; step: number; p: number[] } }
/** Empirical law: mass w_i / sum(w) at sample[i] (w_i = 1 when weights are absent); repeated values merge. */
export interface SampleModel { sample: number[]; weights?: number[] }

export type Model =
  | FamilyModel
  | SumModel
  | ScaleModel
  | ShiftModel
  | RepeatModel
  | MixModel
  | CompoundModel
  | LatticeModel
  | SampleModel;

// ---- zod schemas (request schemas of the API; recursion through z.lazy) ----
function rangeText(s: ParamSpec): string {
  const lo = s.lo === -Infinity ? "" : `${s.loOpen ? ">" : ">="} ${s.lo}`;
  const hi = s.hi === Infinity ? "" : `${s.hiOpen ? "<" : "<="} ${s.hi}`;
  return [lo, hi].filter(Boolean).join(" and ");
}

function paramSpec(family: FamilyName, name: string): ParamSpec {
  const s = FAMILY_SPECS[family].params.find((p) => p.name === name);
  if (!s) throw new Error(`no parameter ${name} in ${family}`);
  return s;
}

function num(family: FamilyName, name: string) {
  const s = paramSpec(family, name);
  const what = `${family}.${name}`;
  let n = z.number({ error: `${what} must be a finite number` });
  if (s.type === "int") n = n.int({ error: `${what} must be an integer` });
  if (s.lo !== -Infinity) n = s.loOpen ? n.gt(s.lo, { error: `${what} must be > ${s.lo}` }) : n.gte(s.lo, { error: `${what} must be >= ${s.lo}` });
  if (s.hi !== Infinity) n = s.hiOpen ? n.lt(s.hi, { error: `${what} must be < ${s.hi}` }) : n.lte(s.hi, { error: `${what} must be <= ${s.hi}` });
  return n.describe(`${s.doc}${rangeText(s) ? ` (${rangeText(s)})` : ""}`);
}
function numD(family: FamilyName, name: string) {
  return num(family, name).default(paramSpec(family, name).default as number);
}

const fam = <N extends FamilyName>(name: N) => z.literal(name);

export const NormalSchema = z.object({ family: fam("normal"), mu: num("normal", "mu"), sigma: num("normal", "sigma") }).strict();
export const CauchySchema = z.object({ family: fam("cauchy"), loc: num("cauchy", "loc"), scale: num("cauchy", "scale") }).strict();
export const UniformSchema = z
  .object({ family: fam("uniform"), a: num("uniform", "a"), b: num("uniform", "b") })
  .strict()
  .refine((m) => m.b > m.a, { error: "uniform.b must be greater than uniform.a", path: ["b"] });
export const ExponentialSchema = z.object({ family: fam("exponential"), rate: num("exponential", "rate") }).strict();
export const GammaSchema = z.object({ family: fam("gamma"), shape: num("gamma", "shape"), rate: num("gamma", "rate") }).strict();
export const ChiSquaredSchema = z.object({ family: fam("chi_squared"), k: num("chi_squared", "k") }).strict();
export const LaplaceSchema = z.object({ family: fam("laplace"), loc: num("laplace", "loc"), scale: num("laplace", "scale") }).strict();
export const LogisticSchema = z.object({ family: fam("logistic"), loc: num("logistic", "loc"), scale: num("logistic", "scale") }).strict();
export const StudentTSchema = z
  .object({ family: fam("student_t"), nu: num("student_t", "nu"), loc: numD("student_t", "loc"), scale: numD("student_t", "scale") })
  .strict();
export const StableSchema = z
  .object({
    family: fam("stable"),
    alpha: num("stable", "alpha"),
    beta: num("stable", "beta"),
    scale: numD("stable", "scale"),
    loc: numD("stable", "loc"),
    param: z.enum(["S0", "S1"]).default("S1").describe("Nolan parameterisation S0 or S1"),
  })
  .strict();
export const VarianceGammaSchema = z
  .object({
    family: fam("variance_gamma"),
    sigma: num("variance_gamma", "sigma"),
    nu: num("variance_gamma", "nu"),
    theta: num("variance_gamma", "theta"),
    loc: numD("variance_gamma", "loc"),
  })
  .strict();
export const NigSchema = z
  .object({ family: fam("nig"), alpha: num("nig", "alpha"), beta: num("nig", "beta"), delta: num("nig", "delta"), mu: numD("nig", "mu") })
  .strict()
  .refine((m) => Math.abs(m.beta) < m.alpha, { error: "nig.beta must satisfy |beta| < alpha", path: ["beta"] });
export const LognormalSchema = z.object({ family: fam("lognormal"), mu: num("lognormal", "mu"), sigma: num("lognormal", "sigma") }).strict();
export const ParetoSchema = z.object({ family: fam("pareto"), alpha: num("pareto", "alpha"), xm: num("pareto", "xm") }).strict();
export const WeibullSchema = z.object({ family: fam("weibull"), shape: num("weibull", "shape"), scale: num("weibull", "scale") }).strict();
export const PointSchema = z.object({ family: fam("point"), at: num("point", "at") }).strict();
export const BernoulliSchema = z.object({ family: fam("bernoulli"), p: num("bernoulli", "p") }).strict();
export const BinomialSchema = z.object({ family: fam("binomial"), n: num("binomial", "n"), p: num("binomial", "p") }).strict();
export const PoissonSchema = z.object({ family: fam("poisson"), lambda: num("poisson", "lambda") }).strict();
export const NegativeBinomialSchema = z
  .object({ family: fam("negative_binomial"), r: num("negative_binomial", "r"), p: num("negative_binomial", "p") })
  .strict();
export const GeometricSchema = z.object({ family: fam("geometric"), p: num("geometric", "p") }).strict();

export const FamilySchema = z.discriminatedUnion("family", [
  NormalSchema,
  CauchySchema,
  UniformSchema,
  ExponentialSchema,
  GammaSchema,
  ChiSquaredSchema,
  LaplaceSchema,
  LogisticSchema,
  StudentTSchema,
  StableSchema,
  VarianceGammaSchema,
  NigSchema,
  LognormalSchema,
  ParetoSchema,
  WeibullSchema,
  PointSchema,
  BernoulliSchema,
  BinomialSchema,
  PoissonSchema,
  NegativeBinomialSchema,
  GeometricSchema,
]);

const finite = (what: string) => z.number({ error: `${what} must be a finite number` });
const lazyModel = z.lazy(() => ModelSchema);

export const SumSchema = z.object({ sum: z.array(lazyModel).min(1, { error: "sum needs at least one term" }) }).strict();
export const ScaleSchema = z
  .object({ scale: finite("scale").refine((a) => a !== 0, { error: "scale must be non-zero; use a point law for a constant" }), of: lazyModel })
  .strict();
export const ShiftSchema = z.object({ shift: finite("shift"), of: lazyModel }).strict();
export const RepeatSchema = z
  .object({
    repeat: z
      .number({ error: "repeat must be an integer" })
      .int({ error: "repeat must be an integer" })
      .gte(1, { error: "repeat must be >= 1" })
      .lte(MAX_REPEAT, { error: `repeat must be <= ${MAX_REPEAT}` }),
    of: lazyModel,
  })
  .strict();
export const MixSchema = z
  .object({
    mix: z
      .array(z.object({ weight: finite("weight").gt(0, { error: "weight must be > 0" }), of: lazyModel }).strict())
      .min(1, { error: "mix needs at least one component" }),
  })
  .strict()
  .refine((m) => Math.abs(m.mix.reduce((s, c) => s + c.weight, 0) - 1) <= MIX_WEIGHT_TOLERANCE, {
    error: `mix weights must sum to 1 within ${MIX_WEIGHT_TOLERANCE}`,
    path: ["mix"],
  });
export const CompoundSchema = z.object({ compound: z.object({ count: lazyModel, each: lazyModel }).strict() }).strict();
export const LatticeSchema = z
  .object({
    lattice: z
      .object({
        origin: finite("lattice.origin"),
        step: finite("lattice.step").gt(0, { error: "lattice.step must be > 0" }),
        p: z
          .array(finite("lattice probability").gte(0, { error: "lattice probabilities must be >= 0" }))
          .min(1, { error: "lattice.p needs at least one probability" })
          .max(MAX_LATTICE, { error: `lattice.p may hold at most ${MAX_LATTICE} values` }),
      })
      .strict(),
  })
  .strict()
  .refine((m) => Math.abs(m.lattice.p.reduce((s, v) => s + v, 0) - 1) <= LATTICE_SUM_TOLERANCE, {
    error: `lattice.p must sum to 1 within ${LATTICE_SUM_TOLERANCE}`,
    path: ["lattice", "p"],
  });
export const SampleSchema = z
  .object({
    sample: z
      .array(finite("sample value"))
      .min(1, { error: "sample needs at least one value" })
      .max(MAX_SAMPLE, { error: `sample may hold at most ${MAX_SAMPLE} values` }),
    weights: z
      .array(finite("sample weight").gte(0, { error: "sample weights must be >= 0" }))
      .max(MAX_SAMPLE, { error: `weights may hold at most ${MAX_SAMPLE} values` })
      .optional()
      .describe("optional weight of each sample value (finite, >= 0, positive total); the law puts mass w_i / sum(w) at sample[i]"),
  })
  .strict()
  .superRefine((m, ctx) => {
    if (!m.weights) return;
    if (m.weights.length !== m.sample.length)
      ctx.addIssue({ code: "custom", message: `weights must have one entry per sample value (${m.sample.length}), got ${m.weights.length}`, path: ["weights"] });
    else if (!(m.weights.reduce((s, w) => s + w, 0) > 0))
      ctx.addIssue({ code: "custom", message: "weights must have a positive total", path: ["weights"] });
  });

/** The whole notation. Structural checks only; `validateModel` adds the count-law rule and the tree limits. */
export const ModelSchema: z.ZodType<Model> = z.union([
  FamilySchema,
  SumSchema,
  ScaleSchema,
  ShiftSchema,
  RepeatSchema,
  MixSchema,
  CompoundSchema,
  LatticeSchema,
  SampleSchema,
]) as unknown as z.ZodType<Model>;
