// The model notation: zod schemas (strict), the semantic validator (JSON pointers, actionable sentences, limits) and
// the classification of every model (LawKind).
import { describe, expect, it } from "vitest";
import {
  compile,
  validateModel,
  ModelSchema,
  FamilySchema,
  familyCatalogue,
  FAMILY_NAMES,
  MAX_MODEL_NODES,
  MAX_DEPTH,
  MAX_REPEAT,
  MAX_SAMPLE,
  MAX_LATTICE,
} from "@/lib/cf";
import { close, errorOf } from "./model-assert";

const N01 = { family: "normal", mu: 0, sigma: 1 };


describe("validator: invalid models give a typed error with a JSON pointer and a sentence", () => {
  const cases: [string, unknown, string, string, RegExp][] = [
    ["negative sigma deep in a sum", { sum: [N01, N01, { scale: 2, of: { family: "normal", mu: 0, sigma: -1 } }] }, "invalid_model", "/sum/2/of/sigma", /greater than 0, got -1/],
    ["missing parameter", { family: "gamma", shape: 2 }, "invalid_model", "/rate", /needs the parameter "rate"/],
    ["unknown family", { family: "gauss", mu: 0 }, "invalid_model", "/family", /Unknown family "gauss"/],
    ["unknown field", { family: "normal", mu: 0, sigma: 1, sd: 2 }, "invalid_model", "/sd", /Unknown field "sd"/],
    ["NaN parameter", { family: "poisson", lambda: NaN }, "invalid_model", "/lambda", /finite number/],
    ["infinite parameter", { family: "cauchy", loc: Infinity, scale: 1 }, "invalid_model", "/loc", /finite number/],
    ["string parameter", { family: "exponential", rate: "2" }, "invalid_model", "/rate", /finite number/],
    ["uniform with b <= a", { family: "uniform", a: 2, b: 2 }, "invalid_model", "/b", /greater than uniform.a/],
    ["nig with |beta| >= alpha", { family: "nig", alpha: 1, beta: 1, delta: 1, mu: 0 }, "invalid_model", "/beta", /\|beta\| < alpha/],
    ["stable alpha out of range", { family: "stable", alpha: 2.5, beta: 0 }, "invalid_model", "/alpha", /at most 2/],
    ["stable bad param", { family: "stable", alpha: 1.5, beta: 0, param: "S2" }, "invalid_model", "/param", /one of S0, S1/],
    ["binomial with fractional n", { family: "binomial", n: 2.5, p: 0.5 }, "invalid_model", "/n", /whole number/],
    ["probability above 1", { family: "bernoulli", p: 1.2 }, "invalid_model", "/p", /at most 1/],
    ["geometric with p = 0", { family: "geometric", p: 0 }, "invalid_model", "/p", /greater than 0/],
    ["mixture weights not summing to 1", { mix: [{ weight: 0.5, of: N01 }, { weight: 0.4, of: N01 }] }, "invalid_model", "/mix", /sum to 0\.9.*must sum to 1/],
    ["negative mixture weight", { mix: [{ weight: 1.5, of: N01 }, { weight: -0.5, of: N01 }] }, "invalid_model", "/mix/1/weight", /positive/],
    ["lattice not summing to 1", { lattice: { origin: 0, step: 1, p: [0.5, 0.4] } }, "invalid_model", "/lattice/p", /sums to 0\.9.*Normalise/],
    ["negative lattice probability", { lattice: { origin: 0, step: 1, p: [1.5, -0.5] } }, "invalid_model", "/lattice/p/1", />= 0/],
    ["zero lattice step", { lattice: { origin: 0, step: 0, p: [1] } }, "invalid_model", "/lattice/step", /positive/],
    ["continuous count", { compound: { count: N01, each: N01 } }, "invalid_model", "/compound/count", /law on 0, 1, 2/],
    ["count on non-integers", { compound: { count: { lattice: { origin: 0.5, step: 1, p: [1] } }, each: N01 } }, "invalid_model", "/compound/count", /law on 0, 1, 2/],
    ["negative count support", { compound: { count: { shift: -1, of: { family: "poisson", lambda: 1 } }, each: N01 } }, "invalid_model", "/compound/count", /law on 0, 1, 2/],
    ["zero scale", { scale: 0, of: N01 }, "invalid_model", "/scale", /non-zero/],
    ["fractional repeat", { repeat: 2.5, of: N01 }, "invalid_model", "/repeat", /whole number/],
    ["empty sum", { sum: [] }, "invalid_model", "/sum", /non-empty/],
    ["empty sample", { sample: [] }, "invalid_model", "/sample", /non-empty/],
    ["NaN in a sample", { sample: [1, NaN] }, "invalid_model", "/sample/1", /finite/],
    ["two operators", { sum: [N01], scale: 2, of: N01 }, "invalid_model", "", /exactly one operator/],
    ["not an object", 42, "invalid_model", "", /Expected a model object/],
    ["null", null, "invalid_model", "", /Expected a model object/],
    ["repeat too large", { repeat: MAX_REPEAT + 1, of: N01 }, "limit_exceeded", "/repeat", /at most/],
  ];
  it.each(cases)("%s", (_name, model, code, pointer, detail) => {
    const e = errorOf(model);
    expect({ code: e.code, pointer: e.pointer }, e.detail).toEqual({ code, pointer });
    expect(e.detail).toMatch(detail);
    expect(e.issues[0]).toEqual({ pointer: e.pointer, detail: e.detail });
  });

  it("lists every problem, not only the first", () => {
    const e = errorOf({ sum: [{ family: "normal", mu: 0, sigma: 0 }, { family: "gamma", shape: -1, rate: 1 }] });
    expect(e.issues.map((i) => i.pointer)).toEqual(["/sum/0/sigma", "/sum/1/shape"]);
  });

  it("pointers escape '~' and '/' (RFC 6901)", () => {
    const e = errorOf({ family: "normal", mu: 0, sigma: 1, "a/b~c": 1 });
    expect(e.pointer).toBe("/a~1b~0c");
  });
});

describe("limits (exported constants)", () => {
  it("model nodes <= 256", () => {
    const ok = { sum: Array.from({ length: MAX_MODEL_NODES - 1 }, () => N01) };
    expect(() => validateModel(ok)).not.toThrow();
    const e = errorOf({ sum: Array.from({ length: MAX_MODEL_NODES }, () => N01) });
    expect(e.code).toBe("limit_exceeded");
    expect(e.detail).toMatch(/more than 256 nodes/);
  });
  it("depth <= 32", () => {
    let m: unknown = N01;
    for (let k = 0; k < MAX_DEPTH; k++) m = { shift: 1, of: m };
    expect(() => validateModel(m)).not.toThrow();
    const e = errorOf({ shift: 1, of: m });
    expect(e.code).toBe("limit_exceeded");
    expect(e.detail).toMatch(/deeper than 32/);
  });
  it("sample size <= 1e6 and lattice length <= 2^20", () => {
    expect(errorOf({ sample: new Array(MAX_SAMPLE + 1).fill(0) }).code).toBe("limit_exceeded");
    const p = new Array(MAX_LATTICE + 1).fill(0);
    p[0] = 1;
    const e = errorOf({ lattice: { origin: 0, step: 1, p } });
    expect([e.code, e.pointer]).toEqual(["limit_exceeded", "/lattice/p"]);
  });
  it("weights within 1e-12 and lattice sums within 1e-9 are accepted", () => {
    expect(() => validateModel({ mix: [{ weight: 0.5 + 4e-13, of: N01 }, { weight: 0.5, of: N01 }] })).not.toThrow();
    expect(() => validateModel({ lattice: { origin: 0, step: 1, p: [0.5, 0.5 + 5e-10] } })).not.toThrow();
    expect(errorOf({ lattice: { origin: 0, step: 1, p: [0.5, 0.5 + 2e-9] } }).pointer).toBe("/lattice/p");
  });
});

describe("defaults are filled in", () => {
  it("student_t, stable, variance_gamma, nig", () => {
    expect(validateModel({ family: "student_t", nu: 3 })).toEqual({ family: "student_t", nu: 3, loc: 0, scale: 1 });
    expect(validateModel({ family: "stable", alpha: 1.5, beta: 0 })).toEqual({ family: "stable", alpha: 1.5, beta: 0, scale: 1, loc: 0, param: "S1" });
    expect(validateModel({ family: "variance_gamma", sigma: 1, nu: 1, theta: 0 })).toMatchObject({ loc: 0 });
    expect(validateModel({ family: "nig", alpha: 2, beta: 0, delta: 1 })).toMatchObject({ mu: 0 });
  });
});

describe("zod schemas (API request schemas)", () => {
  const good = [
    { family: "normal", mu: 0, sigma: 1 },
    { sum: [N01, { repeat: 3, of: { family: "poisson", lambda: 2 } }] },
    { mix: [{ weight: 0.3, of: N01 }, { weight: 0.7, of: { family: "point", at: 1 } }] },
    { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "lognormal", mu: 0, sigma: 1 } } },
    { lattice: { origin: 1, step: 1, p: [0.5, 0.5] } },
    { sample: [1, 2, 3] },
    { shift: 2, of: { scale: -1, of: N01 } },
  ];
  it.each(good)("accepts %j", (m) => {
    const r = ModelSchema.safeParse(m);
    expect(r.success, JSON.stringify(r.error?.issues)).toBe(true);
  });
  const bad: [unknown, string][] = [
    [{ family: "normal", mu: 0, sigma: 1, extra: 1 }, "unknown key"],
    [{ family: "normal", mu: 0, sigma: -1 }, "range"],
    [{ sum: [N01], extra: 1 }, "unknown key on an operator"],
    [{ mix: [{ weight: 0.5, of: N01 }] }, "weights"],
    [{ lattice: { origin: 0, step: 1, p: [0.3] } }, "lattice sum"],
    [{ family: "uniform", a: 1, b: 0 }, "a < b"],
    [{ family: "normal", mu: Infinity, sigma: 1 }, "finite"],
  ];
  it.each(bad)("rejects %j (%s)", (m) => {
    expect(ModelSchema.safeParse(m).success).toBe(false);
  });
  it("family schema is a discriminated union on `family` with one member per catalogue entry", () => {
    expect(FamilySchema.options.length).toBe(FAMILY_NAMES.length);
    expect(familyCatalogue().map((f) => f.name)).toEqual([...FAMILY_NAMES]);
  });
  it("the catalogue is plain JSON (no Infinity) and states existence", () => {
    const cat = familyCatalogue();
    expect(JSON.parse(JSON.stringify(cat))).toEqual(cat);
    const by = Object.fromEntries(cat.map((c) => [c.name, c]));
    expect(by.cauchy.momentExistence).toBe("none");
    expect(by.pareto.momentExistence).toBe("below:alpha");
    expect(by.lognormal.momentExistence).toBe("all");
    expect(by.stable.parameters.find((p) => p.name === "param")?.values).toEqual(["S0", "S1"]);
  });
});

describe("classification (LawKind)", () => {
  const cases: [string, unknown, unknown][] = [
    ["normal", N01, { type: "continuous" }],
    ["poisson + binomial", { sum: [{ family: "poisson", lambda: 2 }, { family: "binomial", n: 3, p: 0.5 }] }, { type: "lattice", origin: 0, step: 1 }],
    ["steps 1 and 0.5 stay lattice on 0.5", { sum: [{ family: "poisson", lambda: 1 }, { scale: 0.5, of: { family: "poisson", lambda: 1 } }] }, { type: "lattice", origin: 0, step: 0.5 }],
    ["steps 0.3 and 0.2 give 0.1", { sum: [{ lattice: { origin: 0, step: 0.3, p: [0.5, 0.5] } }, { lattice: { origin: 1, step: 0.2, p: [0.5, 0.5] } }] }, { type: "lattice", origin: 1, step: 0.1 }],
    ["lattice shifted by a point", { sum: [{ family: "poisson", lambda: 1 }, { family: "point", at: 0.25 }] }, { type: "lattice", origin: 0.25, step: 1 }],
    ["negative scale of a lattice", { scale: -2, of: { family: "binomial", n: 4, p: 0.5 } }, { type: "lattice", origin: -0, step: 2 }],
    ["repeat of a die", { repeat: 3, of: { lattice: { origin: 1, step: 1, p: [0.25, 0.25, 0.25, 0.25] } } }, { type: "lattice", origin: 3, step: 1 }],
    ["sample on a lattice", { sample: [0.5, 1.5, 1.5, 3] }, { type: "lattice", origin: 0.5, step: 0.5 }],
    ["compound Poisson of a lattice severity", { compound: { count: { family: "poisson", lambda: 2 }, each: { lattice: { origin: 2, step: 1, p: [0.5, 0.5] } } } }, { type: "lattice", origin: 0, step: 1 }],
    ["compound geometric of a continuous severity", { compound: { count: { family: "geometric", p: 0.3 }, each: { family: "exponential", rate: 1 } } }, { type: "mixed", atoms: [{ x: 0, p: 0.3 }] }],
    ["compound with count >= 1 is continuous", { compound: { count: { shift: 1, of: { family: "poisson", lambda: 1 } }, each: { family: "exponential", rate: 1 } } }, { type: "continuous" }],
    ["point mixed with continuous", { mix: [{ weight: 0.2, of: { family: "point", at: 3 } }, { weight: 0.8, of: N01 }] }, { type: "mixed", atoms: [{ x: 3, p: 0.2 }] }],
    ["mixed plus continuous is continuous", { sum: [N01, { mix: [{ weight: 0.5, of: { family: "point", at: 0 } }, { weight: 0.5, of: N01 }] }] }, { type: "continuous" }],
    ["mixed plus point moves the atom", { sum: [{ family: "point", at: 1 }, { mix: [{ weight: 0.5, of: { family: "point", at: 0 } }, { weight: 0.5, of: N01 }] }] }, { type: "mixed", atoms: [{ x: 1, p: 0.5 }] }],
    ["incommensurate steps", { sum: [{ family: "bernoulli", p: 0.5 }, { scale: Math.SQRT2, of: { family: "bernoulli", p: 0.5 } }] }, { type: "discrete", atoms: [{ x: 0, p: 0.25 }, { x: 1, p: 0.25 }, { x: Math.SQRT2, p: 0.25 }, { x: 1 + Math.SQRT2, p: 0.25 }] }],
    ["incommensurate sample", { sample: [0, 1, Math.PI] }, { type: "discrete", atoms: [{ x: 0, p: 1 / 3 }, { x: 1, p: 1 / 3 }, { x: Math.PI, p: 1 / 3 }] }],
  ];
  it.each(cases)("%s", (_name, model, kind) => {
    const k = compile(model).kind as { atoms?: { x: number; p: number }[] };
    const want = kind as { atoms?: { x: number; p: number }[] };
    expect({ ...k, atoms: undefined }).toEqual({ ...want, atoms: undefined });
    if (want.atoms) {
      expect(k.atoms?.length).toBe(want.atoms.length);
      want.atoms.forEach((a, j) => {
        close(k.atoms![j].x, a.x, { abs: 1e-12 }, `atom ${j} x`);
        close(k.atoms![j].p, a.p, { abs: 1e-15 }, `atom ${j} p`);
      });
    }
  });
  it("compound Poisson of a continuous severity has an atom exp(-lambda) at the shifted zero (Loss Models, aggregate loss models chapter)", () => {
    const c = compile({ shift: 5, of: { compound: { count: { family: "poisson", lambda: 1.5 }, each: { family: "gamma", shape: 2, rate: 1 } } } });
    expect(c.kind.type).toBe("mixed");
    const atoms = (c.kind as { atoms: { x: number; p: number }[] }).atoms;
    expect(atoms.length).toBe(1);
    close(atoms[0].x, 5, { abs: 0 }, "atom position");
    close(atoms[0].p, Math.exp(-1.5), { rel: 1e-15 }, "P(N=0)");
  });
  it("severity with an atom at 0 (zero claims): the compound's atom at 0 has mass P_N(c) (Loss Models, aggregate loss chapter)", () => {
    const c = compile({
      compound: {
        count: { family: "poisson", lambda: 2 },
        each: { mix: [{ weight: 0.3, of: { family: "point", at: 0 } }, { weight: 0.7, of: { family: "exponential", rate: 1 } }] },
      },
    });
    const atoms = (c.kind as { atoms: { x: number; p: number }[] }).atoms;
    expect(c.kind.type).toBe("mixed");
    expect(atoms.length).toBe(1);
    // P_N(z) = exp(lambda (z - 1)) at z = 0.3
    close(atoms[0].p, Math.exp(2 * (0.3 - 1)), { rel: 1e-15 }, "P(S = 0)");
    expect(c.notes.join(" ")).not.toMatch(/not every atom/);
  });
  it("infinite-lattice components of mixed laws list their atoms from the pmf (JKK ch. 4 Poisson pmf)", () => {
    const a = compile({ mix: [{ weight: 0.4, of: { family: "poisson", lambda: 2 } }, { weight: 0.6, of: N01 }] });
    const atoms = (a.kind as { atoms: { x: number; p: number }[] }).atoms;
    let f = 1;
    for (let k = 0; k < 10; k++) {
      if (k > 0) f *= k;
      close(atoms[k].x, k, { abs: 0 }, `atom ${k} x`);
      close(atoms[k].p, (0.4 * Math.exp(-2) * 2 ** k) / f, { rel: 1e-14 }, `atom ${k} mass`);
    }
    const total = atoms.reduce((s, x) => s + x.p, 0);
    close(total, 0.4, { abs: 1e-15 }, "total atom mass");
    const b = compile({ sum: [{ family: "poisson", lambda: 1 }, { compound: { count: { family: "poisson", lambda: 1 }, each: { family: "exponential", rate: 1 } } }] });
    const bt = (b.kind as { atoms: { x: number; p: number }[] }).atoms;
    close(bt[3].p, (Math.exp(-1) / 6) * Math.exp(-1), { rel: 1e-14 }, "P(S = 3) = P(N1 = 3) P(compound = 0)");
    expect(b.notes.join(" ")).not.toMatch(/not every atom/);
  });
  it("support, tails and location hints", () => {
    const p = compile({ family: "pareto", alpha: 1.5, xm: 2 });
    expect(p.support).toEqual([2, Infinity]);
    expect(p.tails).toEqual({ left: Infinity, right: 1.5 });
    const s = compile({ family: "stable", alpha: 0.5, beta: 1, scale: 1, loc: 3 });
    expect(s.support).toEqual([3, Infinity]);
    const c = compile({ sum: [{ family: "cauchy", loc: 1, scale: 2 }, { family: "cauchy", loc: 2, scale: 3 }] });
    expect([c.location, c.scale, c.momentIndex]).toEqual([3, 5, 1]);
    expect(compile({ repeat: 4, of: N01 }).nodes).toBe(2);
  });
});
