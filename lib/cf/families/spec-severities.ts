/** Parameter table entries of the severity families (lomax to truncated normal): heavy tails and bounded supports. */
import { gammaLaw } from "./continuous";
import { burr, inverseGamma, inverseGaussian, lomax } from "./severities";
import { betaLaw, triangular } from "./bounded";
import { truncatedNormal } from "./truncated";
import { betaDist, gammaDist, type DirectLaw } from "./dist";
import type { FamilyName, FamilySpec } from "./spec-types";
import { real, pos, withDist, shiftBuilt } from "./spec-types";
import * as DS from "../direct/severities";
import * as DB from "../direct/bounded";
import { withCumulantErrors } from "../cumulant-bounds";
import * as CE from "./cumulant-errors";
import { add, div, estList, exact, mul, rawToCumulantsE, sub } from "../moment-error";
import { affineLayerMoment, lomaxLayerMoment, withLayerMoment } from "./layer-moments";
import { betaLayerMoment, generalizedParetoLayerMoment, triangularLayerMoment } from "./layer-moments-shapes";
import { burrLayerMoment, inverseGammaLayerMoment } from "./layer-moments-transformed";
import { inverseGaussianLayerMoment } from "./layer-moments-ig";

/** a built node's direct law with layer moments attached (the node keeps everything else) */
const withLayered = <N extends { dist?: DirectLaw }>(n: N, attach: (d: DirectLaw) => DirectLaw): N => (n.dist ? { ...n, dist: attach(n.dist) } : n);

export const SEVERITY_SPECS: Pick<Record<FamilyName, FamilySpec>, "lomax" | "generalized_pareto" | "burr" | "loglogistic" | "inverse_gaussian" | "inverse_gamma" | "beta" | "pert" | "triangular" | "truncated_normal"> = {
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
    direct: (p) => DS.lomaxDirect(p.alpha as number, p.theta as number),
    layerable: true,
    build: (p) => {
      const n = lomax(p.alpha, p.theta);
      if (n.dist) n.dist = withLayerMoment(n.dist, lomaxLayerMoment(p.alpha, p.theta));
      return withCumulantErrors(n, (m) => rawToCumulantsE(estList(m, p.alpha, CE.lomaxRawE(p.alpha, p.theta))));
    },
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
    direct: (p) => DS.generalizedParetoDirect(p.xi as number, p.sigma as number, (p.mu as number | undefined) ?? 0),
    layerable: true,
    build: (p) => {
      const { xi, sigma, mu } = p;
      // the derived parameters are rounded: their bounds go into the cumulants' bounds
      const q = (u: number, v: number) => div(exact(u), exact(v));
      // layer moments in the law's own parameters (the derived 1/xi and sigma/xi carry their rounding bounds)
      const layered = <D extends DirectLaw>(d: D, b: number): D => withLayerMoment(d, affineLayerMoment(generalizedParetoLayerMoment(xi, sigma), 1, b)) as D;
      if (xi > 0) {
        const n = lomax(1 / xi, sigma / xi);
        if (n.dist) n.dist = layered(n.dist, 0);
        return shiftBuilt(withCumulantErrors(n, (m) => rawToCumulantsE(estList(m, 1 / xi, CE.lomaxRawE(q(1, xi), q(sigma, xi))))), mu);
      }
      if (xi === 0) return shiftBuilt(withCumulantErrors(withDist(gammaLaw(1, 1 / sigma), layered(gammaDist(1, 1 / sigma), 0)), CE.gammaE_(1, q(1, sigma))), mu);
      return withCumulantErrors(
        withDist(betaLaw(1, -1 / xi, mu, mu - sigma / xi, "generalized_pareto"), layered(betaDist(1, -1 / xi, mu, mu - sigma / xi), mu)),
        CE.betaE(1, q(-1, xi), mu, sub(exact(mu), q(sigma, xi))),
      );
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
    direct: (p) => DS.burrDirect(p.alpha as number, p.gamma as number, p.theta as number),
    layerable: true,
    build: (p) => withCumulantErrors(withLayered(burr(p.alpha, p.gamma, p.theta), (d) => withLayerMoment(d, burrLayerMoment(p.alpha, p.gamma, p.theta, CE.burrRawE(p.alpha, p.gamma, p.theta)))), (m) => rawToCumulantsE(estList(m, p.alpha * p.gamma, CE.burrRawE(p.alpha, p.gamma, p.theta)))),
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
    direct: (p) => DS.burrDirect(1, p.gamma as number, p.theta as number, "log-logistic"),
    layerable: true,
    build: (p) => withCumulantErrors(withLayered(burr(1, p.gamma, p.theta, "loglogistic"), (d) => withLayerMoment(d, burrLayerMoment(1, p.gamma, p.theta, CE.burrRawE(1, p.gamma, p.theta)))), (m) => rawToCumulantsE(estList(m, p.gamma, CE.burrRawE(1, p.gamma, p.theta)))),
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
    direct: (p) => DS.inverseGaussianDirect(p.mu as number, p.lambda as number),
    layerable: true,
    build: (p) => withCumulantErrors(withLayered(inverseGaussian(p.mu, p.lambda), (d) => withLayerMoment(d, inverseGaussianLayerMoment(p.mu, p.lambda))), CE.inverseGaussianE(p.mu, p.lambda)),
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
    direct: (p) => DS.inverseGammaDirect(p.alpha as number, p.theta as number),
    layerable: true,
    build: (p) => withCumulantErrors(withLayered(inverseGamma(p.alpha, p.theta), (d) => withLayerMoment(d, inverseGammaLayerMoment(p.alpha, p.theta, CE.inverseGammaRawE(p.alpha, p.theta)))), (m) => rawToCumulantsE(estList(m, p.alpha, CE.inverseGammaRawE(p.alpha, p.theta)))),
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
    direct: (p) => DB.betaDirect(p.alpha as number, p.beta as number, (p.a as number | undefined) ?? 0, (p.b as number | undefined) ?? 1),
    layerable: true,
    build: (p) => {
      const d = betaDist(p.alpha, p.beta, p.a, p.b);
      const lm = betaLayerMoment(p.alpha, p.beta, p.a, p.b);
      return withCumulantErrors(withDist(betaLaw(p.alpha, p.beta, p.a, p.b), lm ? withLayerMoment(d, lm) : d), CE.betaE(p.alpha, p.beta, p.a, p.b));
    },
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
    direct: (p) => DB.pertDirect(p.a as number, p.m as number, p.b as number, (p.lambda as number | undefined) ?? 4),
    layerable: true,
    build: (p) => {
      const al = 1 + (p.lambda * (p.m - p.a)) / (p.b - p.a);
      const be = 1 + (p.lambda * (p.b - p.m)) / (p.b - p.a);
      const width = sub(exact(p.b), exact(p.a));
      const lam = exact(p.lambda);
      const alE = add(exact(1), div(mul(lam, sub(exact(p.m), exact(p.a))), width));
      const beE = add(exact(1), div(mul(lam, sub(exact(p.b), exact(p.m))), width));
      const d = betaDist(al, be, p.a, p.b);
      const lm = betaLayerMoment(alE, beE, p.a, p.b);
      return withCumulantErrors(withDist(betaLaw(al, be, p.a, p.b, "pert"), lm ? withLayerMoment(d, lm) : d), CE.betaE(alE, beE, p.a, p.b));
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
    direct: (p) => DB.triangularDirect(p.a as number, p.c as number, p.b as number),
    layerable: true,
    build: (p) => {
      const n = triangular(p.a, p.c, p.b);
      const lm = triangularLayerMoment(p.a, p.c, p.b);
      if (n.dist && lm) n.dist = withLayerMoment(n.dist, lm);
      return withCumulantErrors(n, CE.triangularE(p.a, p.c, p.b));
    },
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
    direct: (p) => DB.truncatedNormalDirect(p.mu as number, p.sigma as number, p.lower as number | undefined, p.upper as number | undefined),
    layerable: true,
    build: (p) => withCumulantErrors(truncatedNormal(p.mu, p.sigma, p.lower, p.upper), CE.truncatedNormalE(p.mu, p.sigma, p.lower ?? -Infinity, p.upper ?? Infinity)),
  },
};
