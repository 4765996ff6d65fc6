/** Parameter table of every named family: one source for the zod schemas, the validator and the catalogue. */
import type { DirectLaw } from "../direct/types";
import { stableDirect } from "../direct/stable";
import * as D from "../direct/families";

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
  /** allowed string values (only for `param` of stable) */
  values?: readonly string[];
  doc: string;
}

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
  /** how the CF is computed */
  cfMethod: "closed form" | "closed form (Bessel K)" | "numerical quadrature";
  discrete: boolean;
  source: string;
  /**
   * Optional direct evaluation of the law alone (or scaled / shifted): pdf, cdf, sf and, where it has one, the
   * quantile, from a closed form, a special function or a one-dimensional integral, each value with an absolute
   * error bound (contract in lib/cf/direct/types.ts). Return null for parameters it does not cover; the law is then
   * inverted from its CF like any other. Sums, mixes and compounds always use the CF.
   */
  direct?: (p: FamilyParams) => DirectLaw | null;
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
] as const;
export type FamilyName = (typeof FAMILY_NAMES)[number];

const R = Infinity;
const real = (name: string, doc: string, lo = -R, hi = R, loOpen = true, hiOpen = true, def?: number): ParamSpec => ({
  name,
  type: "real",
  lo,
  hi,
  loOpen: lo === -R ? true : loOpen,
  hiOpen: hi === R ? true : hiOpen,
  ...(def !== undefined ? { default: def } : {}),
  doc,
});
const pos = (name: string, doc: string, def?: number) => real(name, doc, 0, R, true, true, def);
const prob = (name: string, doc: string, loOpen = false) => real(name, doc, 0, 1, loOpen, false);

export const FAMILY_SPECS: Record<FamilyName, FamilySpec> = {
  normal: {
    name: "normal",
    title: "Normal",
    params: [real("mu", "mean"), pos("sigma", "standard deviation")],
    support: "(-inf, inf)",
    cf: "exp(i mu t - sigma^2 t^2 / 2)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions vol. 1, ch. 13",
    direct: (p) => D.normalDirect(p.mu as number, p.sigma as number),
  },
  cauchy: {
    name: "cauchy",
    title: "Cauchy",
    params: [real("loc", "location (median)"), pos("scale", "half width at half maximum")],
    support: "(-inf, inf)",
    cf: "exp(i loc t - scale |t|)",
    moments: "none (E|X|^r finite only for r < 1)",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 16",
    direct: (p) => D.cauchyDirect(p.loc as number, p.scale as number),
  },
  uniform: {
    name: "uniform",
    title: "Uniform",
    params: [real("a", "lower end"), real("b", "upper end (b > a)")],
    support: "[a, b]",
    cf: "(exp(i b t) - exp(i a t)) / (i t (b - a))",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 2, ch. 26",
    direct: (p) => D.uniformDirect(p.a as number, p.b as number),
  },
  exponential: {
    name: "exponential",
    title: "Exponential",
    params: [pos("rate", "rate (1/mean)")],
    support: "[0, inf)",
    cf: "rate / (rate - i t)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 19",
    direct: (p) => D.gammaDirect(1, p.rate as number),
  },
  gamma: {
    name: "gamma",
    title: "Gamma",
    params: [pos("shape", "shape k"), pos("rate", "rate (1/scale)")],
    support: "[0, inf)",
    cf: "(1 - i t / rate)^(-shape)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 17",
    direct: (p) => D.gammaDirect(p.shape as number, p.rate as number),
  },
  chi_squared: {
    name: "chi_squared",
    title: "Chi-squared",
    params: [pos("k", "degrees of freedom")],
    support: "[0, inf)",
    cf: "(1 - 2 i t)^(-k/2)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 18",
    direct: (p) => D.gammaDirect((p.k as number) / 2, 0.5),
  },
  laplace: {
    name: "laplace",
    title: "Laplace",
    params: [real("loc", "location"), pos("scale", "scale b (variance 2 b^2)")],
    support: "(-inf, inf)",
    cf: "exp(i loc t) / (1 + scale^2 t^2)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 2, ch. 24",
    direct: (p) => D.laplaceDirect(p.loc as number, p.scale as number),
  },
  logistic: {
    name: "logistic",
    title: "Logistic",
    params: [real("loc", "location"), pos("scale", "scale s (variance pi^2 s^2 / 3)")],
    support: "(-inf, inf)",
    cf: "exp(i loc t) pi scale t / sinh(pi scale t)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 2, ch. 23",
    direct: (p) => D.logisticDirect(p.loc as number, p.scale as number),
  },
  student_t: {
    name: "student_t",
    title: "Student t (location-scale)",
    params: [pos("nu", "degrees of freedom"), { ...real("loc", "location"), default: 0 }, pos("scale", "scale", 1)],
    support: "(-inf, inf)",
    cf: "exp(i loc t) K_{nu/2}(sqrt(nu) scale |t|) (sqrt(nu) scale |t|)^{nu/2} / (Gamma(nu/2) 2^{nu/2-1})",
    moments: "orders r < nu",
    cfMethod: "closed form (Bessel K)",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 2, ch. 28; Bessel K by Abramowitz & Stegun 9.6.24",
    direct: (p) => D.studentDirect(p.nu as number, (p.loc as number | undefined) ?? 0, (p.scale as number | undefined) ?? 1),
  },
  stable: {
    name: "stable",
    title: "Stable (Nolan S0 or S1)",
    params: [
      real("alpha", "index of stability", 0, 2, true, false),
      real("beta", "skewness", -1, 1, false, false),
      pos("scale", "scale gamma", 1),
      { ...real("loc", "location delta (in the chosen parameterisation)"), default: 0 },
      {
        name: "param",
        type: "real",
        lo: NaN,
        hi: NaN,
        loOpen: true,
        hiOpen: true,
        default: "S1",
        values: ["S0", "S1"],
        doc: "parameterisation S0 (continuous in alpha) or S1 (default)",
      },
    ],
    support: "(-inf, inf); a half line when alpha < 1 and beta = +-1",
    cf:
      "S1: exp(-scale^a |t|^a (1 - i beta tan(pi a/2) sign t) + i loc t), a != 1; " +
      "exp(-scale |t| (1 + i beta (2/pi) sign t log|t|) + i loc t), a = 1. " +
      "S0: exp(-scale^a |t|^a (1 + i beta tan(pi a/2) sign t (|scale t|^(1-a) - 1)) + i loc t), a != 1; " +
      "exp(-scale |t| (1 + i beta (2/pi) sign t log(scale |t|)) + i loc t), a = 1",
    moments: "orders r < alpha when alpha < 2; all orders when alpha = 2",
    cfMethod: "closed form",
    discrete: false,
    source: "Nolan, Univariate Stable Distributions (2020), ch. 1, parameterisations S0 and S1",
    direct: (p) => stableDirect(p.alpha as number, p.beta as number, (p.scale as number | undefined) ?? 1, (p.loc as number | undefined) ?? 0, (p.param as "S0" | "S1" | undefined) ?? "S1"),
  },
  variance_gamma: {
    name: "variance_gamma",
    title: "Variance-gamma",
    params: [pos("sigma", "volatility of the Brownian part"), pos("nu", "variance rate of the gamma time"), real("theta", "drift of the Brownian part"), { ...real("loc", "location"), default: 0 }],
    support: "(-inf, inf)",
    cf: "exp(i loc t) (1 - i theta nu t + sigma^2 nu t^2 / 2)^(-1/nu)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Madan, Carr & Chang (1998), Eur. Finance Review 2 (recalled from memory)",
  },
  nig: {
    name: "nig",
    title: "Normal inverse Gaussian",
    params: [pos("alpha", "tail heaviness"), real("beta", "asymmetry (|beta| < alpha)"), pos("delta", "scale"), { ...real("mu", "location"), default: 0 }],
    support: "(-inf, inf)",
    cf: "exp(i mu t + delta (sqrt(alpha^2 - beta^2) - sqrt(alpha^2 - (beta + i t)^2)))",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: false,
    source: "Barndorff-Nielsen (1997), Scand. J. Statist. 24, sec. 2",
  },
  lognormal: {
    name: "lognormal",
    title: "Lognormal",
    params: [real("mu", "mean of log X"), pos("sigma", "standard deviation of log X")],
    support: "(0, inf)",
    cf: "no closed form: integral of exp(i t e^y) against the N(mu, sigma^2) density in y, computed on a shifted contour",
    moments: "all orders (E X^n = exp(n mu + n^2 sigma^2 / 2)); the moment generating function does not exist",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 14",
    direct: (p) => D.lognormalDirect(p.mu as number, p.sigma as number),
  },
  pareto: {
    name: "pareto",
    title: "Pareto (type I)",
    params: [pos("alpha", "tail index"), pos("xm", "minimum (scale)")],
    support: "[xm, inf)",
    cf: "no elementary closed form: alpha (-i xm t)^alpha Gamma(-alpha, -i xm t), computed on a rotated contour",
    moments: "orders r < alpha",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 20",
    direct: (p) => D.paretoDirect(p.alpha as number, p.xm as number),
  },
  weibull: {
    name: "weibull",
    title: "Weibull",
    params: [pos("shape", "shape k"), pos("scale", "scale lambda")],
    support: "[0, inf)",
    cf: "no closed form for general shape: integral of exp(i t x) against the density, computed on a rotated contour",
    moments: "all orders (E X^n = scale^n Gamma(1 + n/shape))",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 21",
    direct: (p) => D.weibullDirect(p.shape as number, p.scale as number),
  },
  point: {
    name: "point",
    title: "Point mass",
    params: [real("at", "the value")],
    support: "{at}",
    cf: "exp(i at t)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: true,
    source: "common practice",
  },
  bernoulli: {
    name: "bernoulli",
    title: "Bernoulli",
    params: [prob("p", "P(X = 1)")],
    support: "{0, 1}",
    cf: "1 - p + p exp(i t)",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: true,
    source: "Johnson, Kemp & Kotz, Univariate Discrete Distributions, ch. 3",
  },
  binomial: {
    name: "binomial",
    title: "Binomial",
    params: [{ ...real("n", "number of trials", 0, 1e9, false, false), type: "int" }, prob("p", "success probability")],
    support: "{0, 1, ..., n}",
    cf: "(1 - p + p exp(i t))^n",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: true,
    source: "Johnson, Kemp & Kotz, ch. 3",
  },
  poisson: {
    name: "poisson",
    title: "Poisson",
    params: [real("lambda", "mean", 0, R, false)],
    support: "{0, 1, 2, ...}",
    cf: "exp(lambda (exp(i t) - 1))",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: true,
    source: "Johnson, Kemp & Kotz, ch. 4",
  },
  negative_binomial: {
    name: "negative_binomial",
    title: "Negative binomial (failures before the r-th success)",
    params: [pos("r", "number of successes (real r > 0 allowed)"), real("p", "success probability", 0, 1, true, false)],
    support: "{0, 1, 2, ...}",
    cf: "(p / (1 - (1 - p) exp(i t)))^r",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: true,
    source: "Johnson, Kemp & Kotz, ch. 5",
  },
  geometric: {
    name: "geometric",
    title: "Geometric (failures before the first success)",
    params: [real("p", "success probability", 0, 1, true, false)],
    support: "{0, 1, 2, ...}",
    cf: "p / (1 - (1 - p) exp(i t))",
    moments: "all orders",
    cfMethod: "closed form",
    discrete: true,
    source: "Johnson, Kemp & Kotz, ch. 5",
  },
};
