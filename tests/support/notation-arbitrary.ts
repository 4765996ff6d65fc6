// fast-check arbitraries over the whole model notation: every family, sums, mixes, compounds (every count law,
// severities that are named laws, lattices, samples and per-claim layers), scales, shifts, repeats, lattices and
// samples (an uploaded data set reaches the engine as { "sample": [...], "weights"?: [...] }), up to 8 terms and
// one level of nesting under the top operator. Numbers are rounded to three decimals so a failing model reads well.
import fc from "fast-check";
import type { Model } from "@/lib/cf/types";

type A = fc.Arbitrary<Model>;

/** a number in [lo, hi] on a 0.001 grid */
const num = (lo: number, hi: number) => fc.integer({ min: Math.round(lo * 1000), max: Math.round(hi * 1000) }).map((v) => v / 1000);
const int = (lo: number, hi: number) => fc.integer({ min: lo, max: hi });
const fam = (family: string, params: Record<string, fc.Arbitrary<number | string>>): A =>
  fc.record(params).map((p) => ({ family, ...p }) as unknown as Model);

/** laws on the whole line or an interval with light (or no) tails */
const lightFamilies: A[] = [
  fam("normal", { mu: num(-3, 3), sigma: num(0.2, 3) }),
  fam("laplace", { loc: num(-1, 1), scale: num(0.3, 2) }),
  fam("logistic", { loc: num(-1, 1), scale: num(0.3, 2) }),
  fam("nig", { alpha: num(1.5, 3), beta: num(-1, 1), delta: num(0.5, 2), mu: num(-1, 1) }),
  fam("variance_gamma", { sigma: num(0.3, 2), nu: num(0.2, 1.5), theta: num(-0.5, 0.5), loc: num(-1, 1) }),
  num(0.1, 4).map((w) => ({ family: "uniform", a: -1, b: Math.round((w - 1) * 1000) / 1000 }) as Model),
  fc.tuple(num(-2, 0), num(0, 1), num(0.1, 2)).map(([a, t, w]) => {
    const b = Math.round((a + w) * 1000) / 1000;
    return { family: "triangular", a, c: Math.round((a + t * (b - a)) * 1000) / 1000, b } as Model;
  }),
  fc.tuple(num(-1, 1), num(0.3, 2), num(-3, 0), num(0.2, 4)).map(
    ([mu, sigma, lower, w]) => ({ family: "truncated_normal", mu, sigma, lower, upper: Math.round((lower + w) * 1000) / 1000 }) as Model,
  ),
  fam("beta", { alpha: num(0.6, 5), beta: num(0.6, 5), a: num(-1, 0), b: num(1, 3) }),
  fc.tuple(num(0, 0.99), num(0.5, 3), num(1, 6)).map(
    ([t, w, lambda]) => ({ family: "pert", a: 0, m: Math.round(t * w * 1000) / 1000, b: w, lambda }) as Model,
  ),
];

/** laws on [0, inf) with light tails */
const positiveLight: A[] = [
  fam("exponential", { rate: num(0.2, 3) }),
  fam("gamma", { shape: num(0.5, 6), rate: num(0.3, 3) }),
  fam("chi_squared", { k: num(0.5, 8) }),
  fam("inverse_gaussian", { mu: num(0.3, 3), lambda: num(0.5, 5) }),
];

/** laws on [0, inf) with power or subexponential tails */
const positiveHeavy: A[] = [
  fam("lognormal", { mu: num(-1, 1.5), sigma: num(0.3, 2) }),
  fam("pareto", { alpha: num(0.8, 4), xm: num(0.5, 2) }),
  fam("weibull", { shape: num(0.5, 3), scale: num(0.5, 3) }),
  fam("lomax", { alpha: num(1.2, 5), theta: num(0.5, 3) }),
  fam("generalized_pareto", { xi: num(-0.3, 0.6), sigma: num(0.5, 2), mu: num(0, 1) }),
  fam("burr", { alpha: num(0.8, 3), gamma: num(0.8, 3), theta: num(0.5, 2) }),
  fam("loglogistic", { gamma: num(1.5, 5), theta: num(0.5, 2) }),
  fam("inverse_gamma", { alpha: num(1.5, 5), theta: num(0.5, 3) }),
];

/** laws on the whole line with power tails */
const wholeLineHeavy: A[] = [
  fam("cauchy", { loc: num(-1, 1), scale: num(0.2, 2) }),
  fam("student_t", { nu: num(1.5, 10), loc: num(-1, 1), scale: num(0.5, 2) }),
  fam("stable", { alpha: num(0.5, 2), beta: num(-1, 1), scale: num(0.5, 2), loc: num(-1, 1), param: fc.constantFrom("S0", "S1") }),
];

/** count laws on 0, 1, 2, ... (also the counts of compounds) */
const countFamilies: A[] = [
  fam("poisson", { lambda: fc.oneof(num(0.1, 5), num(5, 50), fc.constant(200)) }),
  fam("negative_binomial", { r: num(0.5, 5), p: num(0.2, 0.9) }),
  fam("binomial", { n: int(1, 40), p: num(0.05, 0.95) }),
  fam("geometric", { p: num(0.2, 0.9) }),
  fam("bernoulli", { p: num(0.05, 0.95) }),
  fam("logarithmic", { p: num(0.1, 0.8) }),
  fam("zero_truncated_poisson", { lambda: num(0.3, 10) }),
  fam("zero_truncated_negative_binomial", { r: num(0.5, 4), p: num(0.2, 0.9) }),
  fam("zero_truncated_binomial", { n: int(1, 30), p: num(0.1, 0.9) }),
  fam("zero_modified_poisson", { lambda: num(0.3, 10), p0: num(0, 0.9) }),
  fam("zero_modified_negative_binomial", { r: num(0.5, 4), p: num(0.2, 0.9), p0: num(0, 0.9) }),
  fam("zero_modified_binomial", { n: int(1, 30), p: num(0.1, 0.9), p0: num(0, 0.9) }),
  fam("zero_modified_logarithmic", { p: num(0.1, 0.8), p0: num(0, 0.9) }),
];

/** probabilities from integer weights (at least one positive), normalised */
const probs = (min: number, max: number) =>
  fc.array(int(0, 100), { minLength: min, maxLength: max }).map((w) => {
    if (!w.some((v) => v > 0)) w[0] = 1;
    const s = w.reduce((a, b) => a + b, 0);
    return w.map((v) => v / s);
  });

const lattice = (origin: fc.Arbitrary<number>, step: fc.Arbitrary<number>): A =>
  fc.record({ origin, step, p: probs(1, 30) }).map((l) => ({ lattice: l }) as Model);

/** a sample (an uploaded data set), with weights or without */
const sample = (value: fc.Arbitrary<number>): A =>
  fc
    .tuple(fc.array(value, { minLength: 1, maxLength: 40 }), fc.boolean(), fc.array(int(0, 20), { minLength: 40, maxLength: 40 }))
    .map(([s, weighted, w]) => {
      if (!weighted) return { sample: s } as Model;
      const ws = s.map((_, i) => w[i]);
      if (!ws.some((v) => v > 0)) ws[0] = 1;
      return { sample: s, weights: ws } as Model;
    });

const countLaws: A = fc.oneof(
  { weight: 8, arbitrary: fc.oneof(...countFamilies) },
  { weight: 1, arbitrary: lattice(fc.constant(0), fc.constant(1)) },
  { weight: 1, arbitrary: sample(int(0, 12)) },
  { weight: 1, arbitrary: int(0, 4).map((at) => ({ family: "point", at }) as Model) },
);

/** families a per-claim layer takes (evaluated cdf): a selection of the half-line and interval laws */
const layerable: A[] = [
  fam("exponential", { rate: num(0.2, 3) }),
  fam("gamma", { shape: num(0.5, 6), rate: num(0.3, 3) }),
  fam("lognormal", { mu: num(-1, 1.5), sigma: num(0.3, 2) }),
  fam("pareto", { alpha: num(0.8, 4), xm: num(0.5, 2) }),
  fam("weibull", { shape: num(0.5, 3), scale: num(0.5, 3) }),
  fam("uniform", { a: num(0, 1), b: num(1.5, 4) }),
];

const layer: A = fc
  .record({ deductible: fc.option(num(0, 2), { nil: undefined }), limit: fc.option(num(0.5, 10), { nil: undefined }), share: fc.option(num(0.1, 1), { nil: undefined }) })
  .chain((l) => {
    const spec: Record<string, number> = {};
    for (const [k, v] of Object.entries(l)) if (v !== undefined) spec[k] = v;
    return fc.oneof(...layerable).map((of) => ({ layer: spec, of }) as Model);
  });

/** one claim of a compound */
const severity: A = fc.oneof(
  { weight: 4, arbitrary: fc.oneof(...positiveLight) },
  { weight: 4, arbitrary: fc.oneof(...positiveHeavy) },
  { weight: 1, arbitrary: fc.oneof(...lightFamilies) },
  { weight: 1, arbitrary: lattice(num(0, 2), fc.constantFrom(0.5, 1, 2)) },
  { weight: 1, arbitrary: sample(num(0, 20)) },
  { weight: 2, arbitrary: layer },
);

const compound: A = fc.record({ count: countLaws, each: severity }).map((c) => ({ compound: c }) as Model);

/** a term of a sum or mix: anything but a further sum or mix */
const family: A = fc.oneof(
  { weight: 4, arbitrary: fc.oneof(...lightFamilies) },
  { weight: 2, arbitrary: fc.oneof(...positiveLight) },
  { weight: 2, arbitrary: fc.oneof(...positiveHeavy) },
  { weight: 1, arbitrary: fc.oneof(...wholeLineHeavy) },
  { weight: 1, arbitrary: fc.oneof(...countFamilies) },
);
const atomic: A = fc.oneof(
  lattice(num(-5, 5), fc.constantFrom(0.25, 0.5, 1, 2)),
  sample(num(-5, 20)),
  fc.oneof(...countFamilies),
  num(-3, 3).map((at) => ({ family: "point", at }) as Model),
);
const leaf: A = fc.oneof(
  { weight: 6, arbitrary: family },
  { weight: 4, arbitrary: compound },
  { weight: 2, arbitrary: atomic },
  { weight: 1, arbitrary: layer },
  { weight: 1, arbitrary: fc.tuple(int(2, 6), fc.oneof(family, compound)).map(([repeat, of]) => ({ repeat, of }) as Model) },
  { weight: 1, arbitrary: fc.tuple(num(0.3, 3), fc.oneof(family, compound)).map(([scale, of]) => ({ scale, of }) as Model) },
);

const weights = (n: number) =>
  fc.array(int(1, 100), { minLength: n, maxLength: n }).map((w) => {
    const s = w.reduce((a, b) => a + b, 0);
    return w.map((v) => v / s);
  });

/** 2 to 8 terms, most often 2 or 3 (as in the models people send) */
const terms = fc
  .oneof({ weight: 3, arbitrary: int(2, 3) }, { weight: 1, arbitrary: int(4, 8) })
  .chain((n) => fc.array(leaf, { minLength: n, maxLength: n }));

/** A model of the whole notation: a term alone, scaled or shifted, or a sum or mix of up to 8 terms. */
export const modelArbitrary: A = fc.oneof(
  { weight: 4, arbitrary: leaf },
  { weight: 1, arbitrary: fc.tuple(fc.oneof(num(0.2, 5), num(-3, -0.2)), leaf).map(([scale, of]) => ({ scale, of }) as Model) },
  { weight: 1, arbitrary: fc.tuple(num(-5, 5), leaf).map(([shift, of]) => ({ shift, of }) as Model) },
  { weight: 3, arbitrary: terms.map((sum) => ({ sum }) as Model) },
  { weight: 2, arbitrary: terms.chain((ts) => weights(ts.length).map((w) => ({ mix: ts.map((of, i) => ({ weight: w[i], of })) }) as Model)) },
);

/** the aggregate-claims corner of the notation: compounds alone, scaled, shifted, summed and mixed */
export const aggregateArbitrary: A = fc.oneof(
  compound,
  fc.tuple(num(0.2, 5), compound).map(([scale, of]) => ({ scale, of }) as Model),
  fc.tuple(num(-5, 5), compound).map(([shift, of]) => ({ shift, of }) as Model),
  fc.array(fc.oneof(compound, fc.oneof(...positiveLight)), { minLength: 2, maxLength: 5 }).map((sum) => ({ sum }) as Model),
  fc
    .array(compound, { minLength: 2, maxLength: 4 })
    .chain((terms) => weights(terms.length).map((w) => ({ mix: terms.map((of, i) => ({ weight: w[i], of })) }) as Model)),
);
