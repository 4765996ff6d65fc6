// Exact cumulants and moments against handbook formulas, through every operator; existence flags.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { compile, moments, CfError, MAX_MOMENT_ORDER } from "@/lib/cf";
import { close, record, worst } from "./model-assert";

const REL = 1e-12;

interface Case {
  name: string;
  model: unknown;
  source: string;
  mean: number;
  variance: number;
  skewness?: number;
  excessKurtosis?: number;
  rel?: number;
}

const w = Math.exp(0.36); // lognormal sigma = 0.6
interface Generated {
  model: unknown;
  source: string;
  mean: number;
  variance: number;
  skewness: number;
  excessKurtosis: number;
  thirdCentral: number;
}
const gen = JSON.parse(readFileSync(join(__dirname, "../fixtures/cumulants/cumulants.json"), "utf8")) as { cases: Record<string, Generated> };

const cases: Case[] = [
  { name: "normal", model: { family: "normal", mu: 2, sigma: 3 }, source: "JKB vol. 1, ch. 13", mean: 2, variance: 9, skewness: 0, excessKurtosis: 0 },
  { name: "gamma", model: { family: "gamma", shape: 2.5, rate: 4 }, source: "JKB vol. 1, ch. 17", mean: 2.5 / 4, variance: 2.5 / 16, skewness: 2 / Math.sqrt(2.5), excessKurtosis: 6 / 2.5 },
  { name: "chi_squared", model: { family: "chi_squared", k: 7 }, source: "JKB vol. 1, ch. 18 (mean k, variance 2k)", mean: 7, variance: 14, skewness: Math.sqrt(8 / 7), excessKurtosis: 12 / 7 },
  { name: "exponential", model: { family: "exponential", rate: 0.5 }, source: "JKB vol. 1, ch. 19", mean: 2, variance: 4, skewness: 2, excessKurtosis: 6 },
  { name: "uniform", model: { family: "uniform", a: -1, b: 5 }, source: "JKB vol. 2, ch. 26", mean: 2, variance: 3, skewness: 0, excessKurtosis: -1.2 },
  { name: "laplace", model: { family: "laplace", loc: 1, scale: 2 }, source: "JKB vol. 2, ch. 24", mean: 1, variance: 8, skewness: 0, excessKurtosis: 3 },
  { name: "logistic", model: { family: "logistic", loc: -1, scale: 0.5 }, source: "JKB vol. 2, ch. 23", mean: -1, variance: (Math.PI * Math.PI * 0.25) / 3, skewness: 0, excessKurtosis: 1.2 },
  { name: "student_t nu=7", model: { family: "student_t", nu: 7, loc: 1, scale: 2 }, source: "JKB vol. 2, ch. 28", mean: 1, variance: (4 * 7) / 5, skewness: 0, excessKurtosis: 6 / 3 },
  {
    name: "lognormal",
    model: { family: "lognormal", mu: 0.1, sigma: 0.6 },
    source: "JKB vol. 1, ch. 14",
    mean: Math.exp(0.1 + 0.18),
    variance: (w - 1) * Math.exp(0.2 + 0.36),
    skewness: (w + 2) * Math.sqrt(w - 1),
    excessKurtosis: w ** 4 + 2 * w ** 3 + 3 * w ** 2 - 6,
  },
  { name: "weibull shape 2 (Rayleigh)", model: { family: "weibull", shape: 2, scale: 2 }, source: "JKB vol. 1, ch. 21 with Gamma(3/2) = sqrt(pi)/2", mean: Math.sqrt(Math.PI), variance: 4 * (1 - Math.PI / 4) },
  { name: "weibull shape 1/2", model: { family: "weibull", shape: 0.5, scale: 3 }, source: "JKB vol. 1, ch. 21 with Gamma(3) = 2, Gamma(5) = 24", mean: 6, variance: 9 * 20 },
  { name: "pareto alpha=5", model: { family: "pareto", alpha: 5, xm: 2 }, source: "JKB vol. 1, ch. 20", mean: 10 / 4, variance: (4 * 5) / (16 * 3) },
  // variance gamma and NIG: cumulants by differentiating their published moment generating functions in mpmath
  // (tests/fixtures/cumulants/generate.py)
  ...(["variance_gamma", "nig"] as const).map((name) => {
    const c = gen.cases[name];
    return { name, model: c.model, source: `${c.source} (tests/fixtures/cumulants)`, mean: c.mean, variance: c.variance, skewness: c.skewness, excessKurtosis: c.excessKurtosis };
  }),
  { name: "poisson", model: { family: "poisson", lambda: 3.5 }, source: "JKK ch. 4", mean: 3.5, variance: 3.5, skewness: 1 / Math.sqrt(3.5), excessKurtosis: 1 / 3.5 },
  {
    name: "binomial",
    model: { family: "binomial", n: 12, p: 0.3 },
    source: "JKK ch. 3",
    mean: 3.6,
    variance: 12 * 0.3 * 0.7,
    skewness: (0.7 - 0.3) / Math.sqrt(12 * 0.21),
    excessKurtosis: (1 - 6 * 0.21) / (12 * 0.21),
  },
  {
    name: "negative_binomial",
    model: { family: "negative_binomial", r: 2.5, p: 0.4 },
    source: "JKK ch. 5",
    mean: (2.5 * 0.6) / 0.4,
    variance: (2.5 * 0.6) / 0.16,
    skewness: (1 + 0.6) / Math.sqrt(2.5 * 0.6),
    excessKurtosis: 6 / 2.5 + 0.16 / (2.5 * 0.6),
  },
  { name: "geometric", model: { family: "geometric", p: 0.25 }, source: "JKK ch. 5", mean: 3, variance: 12, skewness: 1.75 / Math.sqrt(0.75), excessKurtosis: 6 + 0.0625 / 0.75 },
  { name: "stable alpha=2", model: { family: "stable", alpha: 2, beta: 0.3, scale: 1.5, loc: -1 }, source: "Nolan (2020) ch. 1", mean: -1, variance: 4.5, skewness: 0, excessKurtosis: 0 },
  { name: "fair die (lattice)", model: { lattice: { origin: 1, step: 1, p: [1, 1, 1, 1, 1, 1].map(() => 1 / 6) } }, source: "common practice: mean 7/2, variance 35/12", mean: 3.5, variance: 35 / 12, skewness: 0, excessKurtosis: -222 / 175 },
  { name: "sample", model: { sample: [1, 2, 2, 7] }, source: "definition of the empirical law (population moments)", mean: 3, variance: (4 + 1 + 1 + 16) / 4 },
];

describe(`handbook moments (relative error <= ${REL} unless stated)`, () => {
  it.each(cases.map((c) => [c.name, c] as const))("%s", (_n, c) => {
    const m = moments(c.model, 4);
    const tol = { rel: c.rel ?? REL, abs: 1e-15 };
    const pairs: [string, number | null, number | undefined][] = [
      ["mean", m.mean, c.mean],
      ["variance", m.variance, c.variance],
      ["skewness", m.skewness, c.skewness],
      ["excess kurtosis", m.excessKurtosis, c.excessKurtosis],
    ];
    for (const [what, got, want] of pairs) {
      if (want === undefined) continue;
      expect(got, `${c.name} ${what}`).not.toBeNull();
      close(got as number, want, tol, `${c.name} ${what} [${c.source}]`);
      record(`moment relative error (${what})`, Math.abs((got as number) - want) / Math.max(Math.abs(want), 1e-300));
    }
    expect(m.exists.every(Boolean)).toBe(true);
  });
});

describe("high orders (to 12)", () => {
  it("lognormal raw moments E X^n = exp(n mu + n^2 sigma^2/2), n <= 12 (JKB ch. 14)", () => {
    for (const [mu, sigma] of [[0.1, 0.6], [-1, 0.05], [0, 1.2]]) {
      const m = moments({ family: "lognormal", mu, sigma }, 12);
      for (let n = 1; n <= 12; n++) {
        const want = Math.exp(n * mu + (n * n * sigma * sigma) / 2);
        close(m.raw[n - 1] as number, want, { rel: 1e-12 }, `lognormal(${mu},${sigma}) raw ${n}`);
        record("moment relative error (lognormal raw, orders 1-12)", Math.abs((m.raw[n - 1] as number) - want) / want);
      }
    }
  });
  it("lognormal variance stays accurate for tiny sigma (no cancellation): (e^{s^2} - 1) e^{2 mu + s^2}", () => {
    const s = 1e-6;
    close(moments({ family: "lognormal", mu: 0, sigma: s }, 2).variance as number, Math.expm1(s * s) * Math.exp(s * s), { rel: 1e-14 }, "variance");
  });
  it("gamma cumulants kappa_n = shape (n-1)! / rate^n to n = 12 (JKB ch. 17)", () => {
    const m = moments({ family: "gamma", shape: 1.3, rate: 0.7 }, 12);
    let f = 1;
    for (let n = 1; n <= 12; n++) {
      if (n > 1) f *= n - 1;
      close(m.cumulants[n - 1] as number, (1.3 * f) / 0.7 ** n, { rel: 1e-14 }, `kappa_${n}`);
    }
  });
  it("normal raw moments: E X^n for N(0,1) are (n-1)!! at even n (JKB vol. 1, ch. 13) and central moments of N(mu, s^2)", () => {
    const m = moments({ family: "normal", mu: 1.5, sigma: 2 }, 12);
    let dbl = 1;
    for (let n = 2; n <= 12; n += 2) {
      dbl *= n - 1;
      close(m.central[n - 1] as number, dbl * 2 ** n, { rel: 1e-14 }, `central ${n}`);
      close(m.central[n - 2] as number, 0, { abs: 1e-9 }, `central ${n - 1}`);
    }
  });
  it("compound Poisson: kappa_n = lambda E X^n (Loss Models, aggregate loss models chapter, common practice) to n = 12, exponential severity", () => {
    const m = moments({ compound: { count: { family: "poisson", lambda: 2.5 }, each: { family: "exponential", rate: 2 } } }, 12);
    let f = 1;
    for (let n = 1; n <= 12; n++) {
      f *= n;
      const want = (2.5 * f) / 2 ** n;
      close(m.cumulants[n - 1] as number, want, { rel: 1e-12 }, `kappa_${n}`);
      record("moment relative error (compound Poisson cumulants 1-12)", Math.abs((m.cumulants[n - 1] as number) - want) / want);
    }
  });
});

describe("operators", () => {
  it("compound moments of NB(3, 0.4)-gamma(2, 0.5): mean, variance, third central moment from K_N(K_X(u)) differentiated in mpmath (tests/fixtures/cumulants)", () => {
    const c = gen.cases.compound_nb_gamma;
    const m = moments(c.model as Parameters<typeof moments>[0], 3);
    close(m.mean as number, c.mean, { rel: 1e-14 }, "E S");
    close(m.variance as number, c.variance, { rel: 1e-14 }, "Var S");
    close(m.central[2] as number, c.thirdCentral, { rel: 1e-13 }, "third central moment");
  });
  it("sum, scale, shift, repeat: cumulants add, scale by a^n, shift moves kappa_1, repeat multiplies (common practice)", () => {
    const X = { family: "gamma", shape: 2, rate: 3 };
    const kx = compile(X).cumulants(6) as number[];
    const m = moments({ shift: 4, of: { scale: -2, of: { repeat: 5, of: X } } }, 6);
    for (let n = 1; n <= 6; n++) {
      const want = 5 * kx[n - 1] * (-2) ** n + (n === 1 ? 4 : 0);
      close(m.cumulants[n - 1] as number, want, { rel: 1e-14 }, `kappa_${n}`);
    }
  });
  it("mixture: raw moments mix linearly (common practice)", () => {
    const m = moments({ mix: [{ weight: 0.3, of: { family: "normal", mu: -1, sigma: 2 } }, { weight: 0.7, of: { family: "exponential", rate: 1 } }] }, 4);
    const raw1 = 0.3 * -1 + 0.7 * 1;
    const raw2 = 0.3 * (4 + 1) + 0.7 * 2;
    const raw4 = 0.3 * (1 + 6 * 4 + 3 * 16) + 0.7 * 24;
    close(m.raw[0] as number, raw1, { rel: 1e-14 }, "E X");
    close(m.raw[1] as number, raw2, { rel: 1e-14 }, "E X^2");
    close(m.raw[3] as number, raw4, { rel: 1e-14 }, "E X^4");
  });
});

describe("existence flags (always right) and null with a reason", () => {
  const cases: [string, unknown, number][] = [
    ["cauchy: none", { family: "cauchy", loc: 0, scale: 1 }, 0],
    ["student_t nu=3: orders 1, 2", { family: "student_t", nu: 3 }, 2],
    ["student_t nu=4: orders < 4 (4 excluded)", { family: "student_t", nu: 4 }, 3],
    ["stable alpha=1.5: order 1", { family: "stable", alpha: 1.5, beta: 0.2 }, 1],
    ["stable alpha=0.7: none", { family: "stable", alpha: 0.7, beta: 0 }, 0],
    ["stable alpha=1: none", { family: "stable", alpha: 1, beta: 0 }, 0],
    ["pareto alpha=2.5: orders 1, 2", { family: "pareto", alpha: 2.5, xm: 1 }, 2],
    ["pareto alpha=3: orders 1, 2", { family: "pareto", alpha: 3, xm: 1 }, 2],
    ["lognormal: all 12", { family: "lognormal", mu: 0, sigma: 2 }, 12],
    ["sum with a student_t: the smaller index", { sum: [{ family: "normal", mu: 0, sigma: 1 }, { family: "student_t", nu: 5.5 }] }, 5],
    ["compound with pareto severity", { compound: { count: { family: "poisson", lambda: 1 }, each: { family: "pareto", alpha: 3.5, xm: 1 } } }, 3],
    ["mixture with a cauchy", { mix: [{ weight: 0.99, of: { family: "normal", mu: 0, sigma: 1 } }, { weight: 0.01, of: { family: "cauchy", loc: 0, scale: 1 } }] }, 0],
  ];
  it.each(cases)("%s", (_n, model, count) => {
    const m = moments(model, MAX_MOMENT_ORDER);
    for (let k = 1; k <= MAX_MOMENT_ORDER; k++) {
      const ex = k <= count;
      expect(m.exists[k - 1], `order ${k}`).toBe(ex);
      if (ex) {
        expect(m.raw[k - 1], `raw ${k}`).not.toBeNull();
        expect(m.reasons[k - 1]).toBeNull();
      } else {
        expect([m.raw[k - 1], m.central[k - 1], m.cumulants[k - 1]], `order ${k}`).toEqual([null, null, null]);
        expect(m.reasons[k - 1]).toMatch(/infinite/);
      }
    }
    if (count < 1) expect(m.mean).toBeNull();
    if (count < 2) expect(m.variance).toBeNull();
  });
  it("pareto alpha=3 mean and variance from the handbook (JKB ch. 20)", () => {
    const m = moments({ family: "pareto", alpha: 3, xm: 2 }, 4);
    close(m.mean as number, 3, { rel: 1e-15 }, "mean");
    close(m.variance as number, (4 * 3) / (4 * 1), { rel: 1e-14 }, "variance");
    expect(m.skewness).toBeNull();
  });
  it("point law: zero variance gives null skewness with a note", () => {
    const m = moments({ family: "point", at: 2 }, 4);
    expect([m.mean, m.variance, m.skewness, m.excessKurtosis]).toEqual([2, 0, null, null]);
    expect(m.notes.join(" ")).toMatch(/variance is zero/);
  });
  it("order limits: 0 and 13 are rejected with typed errors", () => {
    expect(() => moments({ family: "normal", mu: 0, sigma: 1 }, 0)).toThrow(CfError);
    try {
      moments({ family: "normal", mu: 0, sigma: 1 }, 13);
    } catch (e) {
      expect((e as CfError).code).toBe("limit_exceeded");
    }
    expect(() => moments({ family: "normal", mu: 0, sigma: 1 }, 13)).toThrow(CfError);
  });
  it("accepts a compiled model", () => {
    const c = compile({ family: "poisson", lambda: 2 });
    expect(moments(c, 3).cumulants).toEqual([2, 2, 2]);
  });
});

afterAll(() => {
  console.log("worst errors (moments):", JSON.stringify(worst, null, 1));
});
