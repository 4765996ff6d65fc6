// Risk measures of compound Poisson sums of layered claims against closed forms (fixtures from
// tests/fixtures/reference-layered/generate.py: thinned Erlang mixtures with inclusion-exclusion over the cap, mpmath
// at 40 digits). Each value must lie within its returned bound of the reference; the bound must also be useful (a
// stated fraction of the value) and never null where the measure exists.
import { afterAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { validateModel } from "@/lib/cf";
import { FAMILY_NAMES, FAMILY_SPECS } from "@/lib/cf/families/spec";
import { riskMeasures } from "@/lib/cf/risk";
import { record, worst } from "./model-assert";

const ref = JSON.parse(readFileSync("tests/fixtures/reference-layered/layered.json", "utf8"));
const ratios: Record<string, number> = {};
afterAll(() => {
  console.log("worst actual errors (layered):", JSON.stringify(worst));
  console.log("worst actual/bound (layered):", JSON.stringify(ratios));
});

/** |value - expected| <= error (+ the reference's own float rounding), and error <= useful * scale. */
function covered(value: number | null, error: number | null, expected: number, what: string, useful: number, scale = Math.abs(expected)) {
  if (value === null || error === null) expect.fail(`${what}: no value (${value}) or bound (${error}); expected ${expected}`);
  const diff = Math.abs(value! - expected);
  const slack = 4e-16 * Math.abs(expected);
  record(what.split(" ")[0], diff);
  ratios[what.split(" ")[0]] = Math.max(ratios[what.split(" ")[0]] ?? 0, error! > 0 ? diff / error! : diff > 0 ? Infinity : 0);
  if (!(diff <= error! + slack)) expect.fail(`${what}: value ${value}, expected ${expected}, difference ${diff} exceeds the returned bound ${error}`);
  if (!(error! <= useful * scale)) expect.fail(`${what}: bound ${error} is above the useful ${useful} x ${scale}`);
}

type Case = {
  model: unknown;
  mean: number;
  var: { p: number; value: number }[];
  es: { p: number; value: number }[];
  exceedance: { x: number; value: number }[];
  stopLoss: { d: number; value: number }[];
  limitedMean: { u: number; value: number }[];
  layerMean: { deductible: number; limit: number; value: number }[];
};

// risk measures keep layered compounds continuous by default (atoms at multiples of the limit listed, the layer CF by
// the Filon-type rule, the density's jumps taken out as kernels), as /density and /quantiles do; the bracket (claims
// rounded down and up onto a lattice, method "discretise") is checked here on the same references
for (const [route, options, method] of [
  ["continuous (default)", {}, "inversion"],
  ["bracket", { layeredCompounds: "bracket" }, "discretised-bounds"],
] as const)
describe(`compound Poisson of layered exponential claims (closed form), ${route}`, () => {
  for (const c of ref.exponential as Case[]) {
    it(`${JSON.stringify(c.model)}: VaR, ES, exceedance, stop-loss, limited and layer means within their bounds`, () => {
      const r = riskMeasures(validateModel(c.model), {
        var: { p: c.var.map((x) => x.p) },
        es: { p: c.es.map((x) => x.p) },
        exceedance: c.exceedance.map((x) => x.x),
        stopLoss: c.stopLoss.map((x) => x.d),
        limitedMean: c.limitedMean.map((x) => x.u),
        layerMean: c.layerMean.map(({ deductible, limit }) => ({ deductible, limit })),
      }, options);
      expect(r.diagnostics.method).toBe(method);
      // useful: quantiles and shortfalls within 1% of the value, probabilities within 0.01 absolute, means within 1% of E[S]
      c.var.forEach((x, i) => covered(r.var!.value[i], r.var!.error[i], x.value, `var p=${x.p}`, 0.01));
      c.es.forEach((x, i) => covered(r.es!.value[i], r.es!.error[i], x.value, `es p=${x.p}`, 0.01));
      c.exceedance.forEach((x, i) => covered(r.exceedance!.value[i], r.exceedance!.error[i], x.value, `exceedance x=${x.x}`, 0.01, 1));
      c.stopLoss.forEach((x, i) => covered(r.stopLoss!.value[i], r.stopLoss!.error[i], x.value, `stopLoss d=${x.d}`, 0.01, c.mean));
      c.limitedMean.forEach((x, i) => covered(r.limitedMean!.value[i], r.limitedMean!.error[i], x.value, `limitedMean u=${x.u}`, 0.01, c.mean));
      c.layerMean.forEach((x, i) => covered(r.layerMean!.value[i], r.layerMean!.error[i], x.value, `layerMean ${x.limit} xs ${x.deductible}`, 0.01, c.mean));
    });
  }
});

describe("compound Poisson of layered lognormal claims (reference bracket on a 16x finer span, mpmath + numpy)", () => {
  type Rng = { lo: number; hi: number };
  const lg = JSON.parse(readFileSync("tests/fixtures/reference-layered/lognormal.json", "utf8"));
  /** the engine's interval [value - error, value + error] must meet the reference's certified [lo, hi] */
  function meets(value: number | null, error: number | null, ref: Rng, what: string, useful: number) {
    if (value === null || error === null) expect.fail(`${what}: no value (${value}) or bound (${error}); reference [${ref.lo}, ${ref.hi}]`);
    const gap = Math.max(ref.lo - (value! + error!), value! - error! - ref.hi, 0);
    const mid = (ref.lo + ref.hi) / 2;
    record(what.split(" ")[0] + " lognormal", Math.abs(value! - mid));
    if (gap > 4e-16 * Math.abs(mid)) expect.fail(`${what}: engine [${value! - error!}, ${value! + error!}] misses the reference [${ref.lo}, ${ref.hi}] by ${gap}`);
    if (!(error! <= useful)) expect.fail(`${what}: bound ${error} above the useful ${useful}`);
  }
  for (const [route, options] of [["continuous (default)", {}], ["bracket", { layeredCompounds: "bracket" }]] as const)
  for (const c of lg.lognormal as { model: unknown; var: (Rng & { p: number })[]; es: (Rng & { p: number })[]; stopLoss: (Rng & { d: number })[]; exceedance: (Rng & { x: number })[] }[]) {
    it(`${JSON.stringify(c.model)}, ${route}: VaR, ES, stop-loss and exceedance meet the reference bracket`, () => {
      const r = riskMeasures(validateModel(c.model), {
        var: { p: c.var.map((x) => x.p) },
        es: { p: c.es.map((x) => x.p) },
        stopLoss: c.stopLoss.map((x) => x.d),
        exceedance: c.exceedance.map((x) => x.x),
      }, options);
      // useful: VaR and ES within 0.5% of the value, stop-loss within 5% of the value or 1e-3 absolute, probabilities within 5e-3
      c.var.forEach((x, i) => meets(r.var!.value[i], r.var!.error[i], x, `var p=${x.p}`, 0.005 * x.hi));
      c.es.forEach((x, i) => meets(r.es!.value[i], r.es!.error[i], x, `es p=${x.p}`, 0.005 * x.hi));
      c.stopLoss.forEach((x, i) => meets(r.stopLoss!.value[i], r.stopLoss!.error[i], x, `stopLoss d=${x.d}`, Math.max(0.05 * x.hi, 1e-3)));
      c.exceedance.forEach((x, i) => meets(r.exceedance!.value[i], r.exceedance!.error[i], x, `exceedance x=${x.x}`, 5e-3));
    });
  }
});

describe("the claim laws a per-claim layer accepts", () => {
  // every continuous family on a half line or an interval (the severities of the trade) is accepted; laws on the whole
  // line without a cdf the engine evaluates are refused with a message naming the accepted ones
  const accepted: Record<string, unknown>[] = [
    { family: "exponential", rate: 0.5 },
    { family: "gamma", shape: 0.7, rate: 0.2 },
    { family: "chi_squared", k: 3 },
    { family: "lognormal", mu: 0, sigma: 1.5 },
    { family: "pareto", alpha: 2.5, xm: 1 },
    { family: "weibull", shape: 0.5, scale: 1 },
    { family: "lomax", alpha: 2, theta: 3 },
    { family: "generalized_pareto", xi: 0.3, sigma: 1, mu: 0 },
    { family: "generalized_pareto", xi: -0.25, sigma: 1, mu: 0 },
    { family: "burr", alpha: 2, gamma: 1.5, theta: 1 },
    { family: "loglogistic", gamma: 3, theta: 1 },
    { family: "inverse_gaussian", mu: 2, lambda: 3 },
    { family: "inverse_gamma", alpha: 3, theta: 2 },
    { family: "beta", alpha: 0.6, beta: 3, a: 0, b: 6 },
    { family: "pert", a: 0, m: 2, b: 6, lambda: 4 },
    { family: "triangular", a: 0, c: 1, b: 4 },
    { family: "truncated_normal", mu: 1, sigma: 2, lower: 0 },
    { family: "uniform", a: 0, b: 4 },
  ];
  it("the list above is every family whose spec says a layer may take it, except normal (whole line)", () => {
    const flagged = FAMILY_NAMES.filter((f) => FAMILY_SPECS[f].layerable && f !== "normal");
    expect([...new Set(accepted.map((m) => m.family as string))].sort()).toEqual([...flagged].sort());
  });
  for (const of of accepted)
    it(`${JSON.stringify(of)}: layered, its mean is between 0 and the limit, continuous by default and bracketed on request`, () => {
      const layer = { layer: { deductible: 0.5, limit: 2 }, of };
      const model = validateModel({ compound: { count: { family: "poisson", lambda: 3 }, each: layer } });
      for (const [options, method] of [[{}, "inversion"], [{ layeredCompounds: "bracket" }, "discretised-bounds"]] as const) {
      const r = riskMeasures(model, { limitedMean: [1e6] }, options);
      expect(r.diagnostics.method).toBe(method);
      // E[S] = 3 E[Y] with 0 <= E[Y] <= 2 (common practice: the layer caps each claim)
      expect(r.limitedMean!.value[0]!).toBeGreaterThanOrEqual(0);
      expect(r.limitedMean!.value[0]!).toBeLessThanOrEqual(6 + r.limitedMean!.error[0]!);
      expect(r.limitedMean!.error[0]!).toBeLessThan(0.05);
      }
    });
  for (const family of ["cauchy", "laplace", "student_t"]) {
    it(`${family}: refused with the list of accepted laws`, () => {
      const of = family === "student_t" ? { family, nu: 3 } : { family, loc: 0, scale: 1 };
      let message = "";
      try {
        validateModel({ layer: { deductible: 1 }, of });
      } catch (e) {
        message = (e as Error).message;
      }
      expect(message).toMatch(/per-claim layer applies to a named law/);
      for (const name of ["lognormal", "beta", "pert", "burr", "truncated_normal"]) expect(message).toContain(name);
    });
  }
});
