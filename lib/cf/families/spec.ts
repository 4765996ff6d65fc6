/** Parameter table of every named family: one source for the zod schemas, the validator and the catalogue. */
import type { DirectLaw } from "../direct/types";
import { stableDirect } from "../direct/stable";
import * as D from "../direct/families";

/** The validated model fields of one family (defaults not yet filled in). */
export type FamilyParams = Readonly<Record<string, number | string | undefined>>;
/**
 * Parameter table of every named family: one source for the zod schemas, the validator, the compiler and the
 * catalogue. Adding a family is one entry here plus its module.
 */
import type { Node } from "../node";
import { shiftDamped } from "../damped-cf";
import { cauchy, gammaLaw, laplace, logistic, nig, normal, studentT, uniform, varianceGamma } from "./continuous";
import { stable } from "./stable";
import { lognormal, pareto, weibull } from "./numeric";
import { binomial, negativeBinomial, point, poisson } from "./discrete";
import { burr, inverseGamma, inverseGaussian, lomax } from "./severities";
import { betaLaw, triangular } from "./bounded";
import { logarithmic, zeroModified } from "./counts";
import { truncatedNormal } from "./truncated";
import { affineDist, betaDist, gammaDist, lognormalDist, normalDist, paretoDist, uniformDist, weibullDist, type DirectLaw as DistLaw } from "./dist";

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

const withDist = (n: Node, d: DistLaw): Node => ({ ...n, dist: d });

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
    layerable: true,
    build: (p) => withDist(normal(p.mu, p.sigma), normalDist(p.mu, p.sigma)),
    tailIndex: "none",
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
    build: (p) => cauchy(p.loc, p.scale),
    momentExistence: "none",
    tailIndex: "1",
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
    layerable: true,
    build: (p) => withDist(uniform(p.a, p.b), uniformDist(p.a, p.b)),
    check: (p) => (p.b > p.a ? null : { param: "b", detail: `uniform.b (${p.b}) must be greater than uniform.a (${p.a}).` }),
    tailIndex: "bounded",
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
    layerable: true,
    build: (p) => withDist(gammaLaw(1, p.rate), gammaDist(1, p.rate)),
    tailIndex: "none",
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
    layerable: true,
    build: (p) => withDist(gammaLaw(p.shape, p.rate), gammaDist(p.shape, p.rate)),
    tailIndex: "none",
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
    layerable: true,
    build: (p) => withDist(gammaLaw(p.k / 2, 0.5), gammaDist(p.k / 2, 0.5)),
    tailIndex: "none",
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
    build: (p) => laplace(p.loc, p.scale),
    tailIndex: "none",
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
    build: (p) => logistic(p.loc, p.scale),
    tailIndex: "none",
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
    build: (p) => studentT(p.nu, p.loc ?? 0, p.scale ?? 1),
    momentExistence: "below:nu",
    tailIndex: "nu",
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
    build: (p) => stable(p.alpha, p.beta, p.scale ?? 1, p.loc ?? 0, p.param ?? "S1"),
    momentExistence: "below:alpha (all when alpha = 2)",
    tailIndex: "alpha (none when alpha = 2; one-sided when beta = +-1)",
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
    build: (p) => varianceGamma(p.sigma, p.nu, p.theta, p.loc ?? 0),
    tailIndex: "none",
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
    build: (p) => nig(p.alpha, p.beta, p.delta, p.mu ?? 0),
    check: (p) => (Math.abs(p.beta) < p.alpha ? null : { param: "beta", detail: `nig.beta (${p.beta}) must satisfy |beta| < alpha (${p.alpha}).` }),
    tailIndex: "none",
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
    layerable: true,
    build: (p) => withDist(lognormal(p.mu, p.sigma), lognormalDist(p.mu, p.sigma)),
    tailIndex: "none (heavier than any exponential)",
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
    layerable: true,
    build: (p) => withDist(pareto(p.alpha, p.xm), paretoDist(p.alpha, p.xm)),
    momentExistence: "below:alpha",
    tailIndex: "alpha",
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
    layerable: true,
    build: (p) => withDist(weibull(p.shape, p.scale), weibullDist(p.shape, p.scale)),
    tailIndex: "none",
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
    build: (p) => point(p.at),
    tailIndex: "bounded",
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
    build: (p) => binomial(1, p.p),
    count: true,
    tailIndex: "bounded",
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
    build: (p) => binomial(p.n, p.p),
    count: true,
    tailIndex: "bounded",
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
    build: (p) => poisson(p.lambda),
    count: true,
    tailIndex: "none",
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
    build: (p) => negativeBinomial(p.r, p.p),
    count: true,
    tailIndex: "none",
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
    build: (p) => negativeBinomial(1, p.p),
    count: true,
    tailIndex: "none",
  },
  lomax: {
    name: "lomax",
    title: "Lomax (Pareto type II, the actuarial Pareto)",
    params: [pos("alpha", "shape (tail index)"), pos("theta", "scale")],
    support: "[0, inf)",
    cf: "e^{-i theta t} times the Pareto(alpha, xm = theta) CF; F(x) = 1 - (theta/(x + theta))^alpha",
    moments: "orders r < alpha (E X^n = theta^n n! Gamma(alpha - n)/Gamma(alpha))",
    momentExistence: "below:alpha",
    tailIndex: "alpha",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), app. A.2.3.1 (Pareto); JKB vol. 1, ch. 20, sec. 3 (Pareto II)",
    layerable: true,
    build: (p) => lomax(p.alpha, p.theta),
  },
  generalized_pareto: {
    name: "generalized_pareto",
    title: "Generalised Pareto",
    params: [real("xi", "shape (tail index 1/xi when xi > 0)"), pos("sigma", "scale"), { ...real("mu", "location"), default: 0 }],
    support: "[mu, inf) for xi >= 0; [mu, mu - sigma/xi] for xi < 0",
    cf: "xi > 0: e^{i mu t} Lomax(1/xi, sigma/xi); xi = 0: exponential(1/sigma); xi < 0: e^{i mu t} Beta(1, -1/xi) on [0, -sigma/xi]",
    moments: "orders r < 1/xi when xi > 0; all orders when xi <= 0",
    momentExistence: "below:1/xi (all when xi <= 0)",
    tailIndex: "1/xi when xi > 0; none when xi = 0; bounded when xi < 0",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Embrechts, Klueppelberg & Mikosch, Modelling Extremal Events (1997), sec. 3.4, def. 3.4.9; S(x) = (1 + xi (x - mu)/sigma)^(-1/xi)",
    layerable: true,
    build: (p) => {
      const { xi, sigma, mu } = p;
      if (xi > 0) return shiftBuilt(lomax(1 / xi, sigma / xi), mu);
      if (xi === 0) return shiftBuilt(withDist(gammaLaw(1, 1 / sigma), gammaDist(1, 1 / sigma)), mu);
      return withDist(betaLaw(1, -1 / xi, mu, mu - sigma / xi, "generalized_pareto"), betaDist(1, -1 / xi, mu, mu - sigma / xi));
    },
  },
  burr: {
    name: "burr",
    title: "Burr XII",
    params: [pos("alpha", "shape (tail)"), pos("gamma", "shape (power)"), pos("theta", "scale")],
    support: "[0, inf)",
    cf: "no closed form: integral over s = log(x/theta) of the density on a shifted contour; S(x) = (1 + (x/theta)^gamma)^(-alpha)",
    moments: "orders r < alpha gamma (E X^r = theta^r Gamma(1 + r/gamma) Gamma(alpha - r/gamma)/Gamma(alpha))",
    momentExistence: "below:alpha*gamma",
    tailIndex: "alpha gamma",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), app. A.2.2.2 (Burr); Burr (1942), Ann. Math. Statist. 13, form XII",
    layerable: true,
    build: (p) => burr(p.alpha, p.gamma, p.theta),
  },
  loglogistic: {
    name: "loglogistic",
    title: "Log-logistic",
    params: [pos("gamma", "shape"), pos("theta", "scale (the median)")],
    support: "[0, inf)",
    cf: "no closed form: Burr XII with alpha = 1; F(x) = u/(1 + u), u = (x/theta)^gamma",
    moments: "orders r < gamma (E X^r = theta^r Gamma(1 + r/gamma) Gamma(1 - r/gamma))",
    momentExistence: "below:gamma",
    tailIndex: "gamma",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), app. A.2.2.4 (loglogistic)",
    layerable: true,
    build: (p) => burr(1, p.gamma, p.theta, "loglogistic"),
  },
  inverse_gaussian: {
    name: "inverse_gaussian",
    title: "Inverse Gaussian",
    params: [pos("mu", "mean"), pos("lambda", "shape")],
    support: "(0, inf)",
    cf: "exp((lambda/mu) (1 - sqrt(1 - 2 i mu^2 t / lambda)))",
    moments: "all orders (kappa_n = (2n-3)!! mu^(2n-1) / lambda^(n-1))",
    tailIndex: "none",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 15, eqs. 15.4-15.6",
    layerable: true,
    build: (p) => inverseGaussian(p.mu, p.lambda),
  },
  inverse_gamma: {
    name: "inverse_gamma",
    title: "Inverse gamma",
    params: [pos("alpha", "shape (tail index)"), pos("theta", "scale")],
    support: "(0, inf)",
    cf: "no elementary closed form (2 (-i theta t)^(alpha/2) K_alpha(sqrt(-4 i theta t)) / Gamma(alpha)): integral over s = log(x/theta) on a shifted contour; F(x) = Q(alpha, theta/x)",
    moments: "orders r < alpha (E X^r = theta^r Gamma(alpha - r)/Gamma(alpha))",
    momentExistence: "below:alpha",
    tailIndex: "alpha",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), app. A.2.3.3 (inverse gamma); JKB vol. 1, ch. 17",
    layerable: true,
    build: (p) => inverseGamma(p.alpha, p.theta),
  },
  beta: {
    name: "beta",
    title: "Beta on [a, b]",
    params: [pos("alpha", "shape at the lower end"), pos("beta", "shape at the upper end"), { ...real("a", "lower end"), default: 0 }, { ...real("b", "upper end (b > a)"), default: 1 }],
    support: "[a, b]",
    cf: "e^{i a t} 1F1(alpha; alpha + beta; i (b - a) t)",
    moments: "all orders (E Y^k = prod_{j<k} (alpha + j)/(alpha + beta + j) for Y = (X - a)/(b - a))",
    tailIndex: "bounded",
    cfMethod: "series and numerical quadrature",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 2, ch. 25, eqs. 25.1-25.13 (four-parameter beta); Kummer's function A&S 13.1.2",
    check: (p) => (p.b > p.a ? null : { param: "b", detail: `beta.b (${p.b}) must be greater than beta.a (${p.a}).` }),
    layerable: true,
    build: (p) => withDist(betaLaw(p.alpha, p.beta, p.a, p.b), betaDist(p.alpha, p.beta, p.a, p.b)),
  },
  pert: {
    name: "pert",
    title: "PERT (beta from minimum, most likely, maximum)",
    params: [real("a", "minimum"), real("m", "most likely value (a <= m <= b)"), real("b", "maximum (b > a)"), { ...pos("lambda", "weight of the mode"), default: 4 }],
    support: "[a, b]",
    cf: "beta on [a, b] with alpha = 1 + lambda (m - a)/(b - a), beta = 1 + lambda (b - m)/(b - a)",
    moments: "all orders (mean (a + lambda m + b)/(lambda + 2))",
    tailIndex: "bounded",
    cfMethod: "series and numerical quadrature",
    discrete: false,
    source: "Vose, Risk Analysis: A Quantitative Guide (3rd ed., 2008), ch. 9, PERT and modified PERT (recalled from memory); Malcolm et al. (1959), Operations Research 7",
    check: (p) =>
      !(p.b > p.a) ? { param: "b", detail: `pert.b (${p.b}) must be greater than pert.a (${p.a}).` } : p.m < p.a || p.m > p.b ? { param: "m", detail: `pert.m (${p.m}) must lie in [a, b] = [${p.a}, ${p.b}].` } : null,
    layerable: true,
    build: (p) => {
      const al = 1 + (p.lambda * (p.m - p.a)) / (p.b - p.a);
      const be = 1 + (p.lambda * (p.b - p.m)) / (p.b - p.a);
      return withDist(betaLaw(al, be, p.a, p.b, "pert"), betaDist(al, be, p.a, p.b));
    },
  },
  triangular: {
    name: "triangular",
    title: "Triangular",
    params: [real("a", "lower end"), real("c", "mode (a <= c <= b)"), real("b", "upper end (b > a)")],
    support: "[a, b]",
    cf: "-2 ((b - c) e^{i a t} - (b - a) e^{i c t} + (c - a) e^{i b t}) / ((b - a)(c - a)(b - c) t^2)",
    moments: "all orders (mean (a + b + c)/3, variance (a^2 + b^2 + c^2 - ab - ac - bc)/18)",
    tailIndex: "bounded",
    cfMethod: "closed form",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 2, ch. 26, sec. 9 (triangular)",
    check: (p) =>
      !(p.b > p.a) ? { param: "b", detail: `triangular.b (${p.b}) must be greater than triangular.a (${p.a}).` } : p.c < p.a || p.c > p.b ? { param: "c", detail: `triangular.c (${p.c}) must lie in [a, b] = [${p.a}, ${p.b}].` } : null,
    layerable: true,
    build: (p) => triangular(p.a, p.c, p.b),
  },
  truncated_normal: {
    name: "truncated_normal",
    title: "Truncated normal",
    params: [real("mu", "mean of the untruncated normal"), pos("sigma", "standard deviation of the untruncated normal"), { ...real("lower", "lower end (absent: unbounded below)"), optional: true }, { ...real("upper", "upper end (absent: unbounded above)"), optional: true }],
    support: "[lower, upper]",
    cf: "e^{i mu t - sigma^2 t^2/2} (Phi(beta - i sigma t) - Phi(alpha - i sigma t)) / (Phi(beta) - Phi(alpha)), alpha = (lower - mu)/sigma, beta = (upper - mu)/sigma; computed by quadrature of the density",
    moments: "all orders",
    tailIndex: "none (bounded when both ends are given)",
    cfMethod: "numerical quadrature",
    discrete: false,
    source: "Johnson, Kotz & Balakrishnan vol. 1, ch. 13, sec. 10.1 (truncated normal)",
    check: (p) =>
      p.lower !== undefined && p.upper !== undefined && !(p.upper > p.lower)
        ? { param: "upper", detail: `truncated_normal.upper (${p.upper}) must be greater than truncated_normal.lower (${p.lower}).` }
        : (p.lower !== undefined && (p.lower - p.mu) / p.sigma > 37) || (p.upper !== undefined && (p.upper - p.mu) / p.sigma < -37)
          ? { param: p.lower !== undefined && (p.lower - p.mu) / p.sigma > 37 ? "lower" : "upper", detail: "The truncation interval lies more than 37 standard deviations from mu; its probability underflows. Move mu or the ends." }
          : null,
    layerable: true,
    build: (p) => truncatedNormal(p.mu, p.sigma, p.lower, p.upper),
  },
  logarithmic: {
    name: "logarithmic",
    title: "Logarithmic (log-series)",
    params: [real("p", "parameter, P(N = k) proportional to p^k / k", 0, 1, true, true)],
    support: "{1, 2, 3, ...}",
    cf: "log(1 - p e^{it}) / log(1 - p)",
    moments: "all orders",
    tailIndex: "none",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Johnson, Kemp & Kotz, Univariate Discrete Distributions (3rd ed.), ch. 7; Loss Models (5th ed.), sec. 6.6, (a, b, 1) class with a = p, b = -p",
    build: (p) => logarithmic(p.p),
  },
  zero_modified_logarithmic: {
    name: "zero_modified_logarithmic",
    title: "Zero-modified logarithmic",
    params: [real("p", "parameter of the logarithmic law, P(N = k) proportional to p^k / k for k >= 1", 0, 1, true, true), real("p0", "P(N = 0)", 0, 1, false, true)],
    support: "{0, 1, 2, ...}",
    cf: "p0 + (1 - p0) log(1 - p e^{it}) / log(1 - p)",
    moments: "all orders",
    tailIndex: "none",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), sec. 6.6 and app. B.3.3 (zero-modified logarithmic, (a, b, 1) class with a = p, b = -p)",
    build: (p) => zeroModified(logarithmic(p.p), p.p0, 1),
  },
  zero_truncated_poisson: {
    name: "zero_truncated_poisson",
    title: "Zero-truncated Poisson",
    params: [pos("lambda", "mean of the untruncated Poisson")],
    support: "{1, 2, 3, ...}",
    cf: "(exp(lambda (e^{it} - 1)) - e^{-lambda}) / (1 - e^{-lambda})",
    moments: "all orders",
    tailIndex: "none",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), sec. 6.6 and app. B.3.1; Johnson, Kemp & Kotz, ch. 4, sec. 10",
    build: (p) => zeroModified(poisson(p.lambda), 0, -Math.expm1(-p.lambda)),
  },
  zero_truncated_negative_binomial: {
    name: "zero_truncated_negative_binomial",
    title: "Zero-truncated negative binomial",
    params: [pos("r", "number of successes of the untruncated law"), real("p", "success probability", 0, 1, true, true)],
    support: "{1, 2, 3, ...}",
    cf: "(P(e^{it}) - p^r) / (1 - p^r), P the negative binomial generating function",
    moments: "all orders",
    tailIndex: "none",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), sec. 6.6 and app. B.3.1",
    build: (p) => zeroModified(negativeBinomial(p.r, p.p), 0, -Math.expm1(p.r * Math.log(p.p))),
  },
  zero_truncated_binomial: {
    name: "zero_truncated_binomial",
    title: "Zero-truncated binomial",
    params: [{ ...real("n", "number of trials", 1, 1e9, false, false), type: "int" }, real("p", "success probability", 0, 1, true, false)],
    support: "{1, ..., n}",
    cf: "((1 - p + p e^{it})^n - (1 - p)^n) / (1 - (1 - p)^n)",
    moments: "all orders",
    tailIndex: "bounded",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), sec. 6.6 and app. B.3.1",
    build: (p) => zeroModified(binomial(p.n, p.p), 0, -Math.expm1(p.n * Math.log1p(-p.p))),
  },
  zero_modified_poisson: {
    name: "zero_modified_poisson",
    title: "Zero-modified Poisson",
    params: [pos("lambda", "mean of the unmodified Poisson"), real("p0", "P(N = 0)", 0, 1, false, true)],
    support: "{0, 1, 2, ...}",
    cf: "p0 + (1 - p0) (exp(lambda (e^{it} - 1)) - e^{-lambda}) / (1 - e^{-lambda})",
    moments: "all orders",
    tailIndex: "none",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), sec. 6.6 and app. B.3.2",
    build: (p) => zeroModified(poisson(p.lambda), p.p0, -Math.expm1(-p.lambda)),
  },
  zero_modified_negative_binomial: {
    name: "zero_modified_negative_binomial",
    title: "Zero-modified negative binomial",
    params: [pos("r", "number of successes of the unmodified law"), real("p", "success probability", 0, 1, true, true), real("p0", "P(N = 0)", 0, 1, false, true)],
    support: "{0, 1, 2, ...}",
    cf: "p0 + (1 - p0) (P(e^{it}) - p^r) / (1 - p^r), P the negative binomial generating function",
    moments: "all orders",
    tailIndex: "none",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), sec. 6.6 and app. B.3.2",
    build: (p) => zeroModified(negativeBinomial(p.r, p.p), p.p0, -Math.expm1(p.r * Math.log(p.p))),
  },
  zero_modified_binomial: {
    name: "zero_modified_binomial",
    title: "Zero-modified binomial",
    params: [{ ...real("n", "number of trials", 1, 1e9, false, false), type: "int" }, real("p", "success probability", 0, 1, true, false), real("p0", "P(N = 0)", 0, 1, false, true)],
    support: "{0, 1, ..., n}",
    cf: "p0 + (1 - p0) ((1 - p + p e^{it})^n - (1 - p)^n) / (1 - (1 - p)^n)",
    moments: "all orders",
    tailIndex: "bounded",
    cfMethod: "closed form",
    discrete: true,
    count: true,
    source: "Klugman, Panjer & Willmot, Loss Models (5th ed.), sec. 6.6 and app. B.3.2",
    build: (p) => zeroModified(binomial(p.n, p.p), p.p0, -Math.expm1(p.n * Math.log1p(-p.p))),
  },
};

/** A family node moved by b (location parameters of families built from others). */
function shiftBuilt(n: Node, b: number): Node {
  if (b === 0) return n;
  return {
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
    ...(n.laplaceExpansion ? { laplaceExpansion: { ...n.laplaceExpansion, at: n.laplaceExpansion.at + b } } : {}),
    ...(n.severity && b > 0 ? { severity: { ...n.severity, lo: n.severity.lo + b, pdf: (x: number) => n.severity!.pdf(x - b), upper: (q: number) => n.severity!.upper(q) + b } } : {}),
    ...(n.severity && b < 0 ? { severity: undefined } : {}),
  };
}

