// Risk measures against closed forms of the trade (fixtures from tests/fixtures/reference-risk/generate.py):
// normal stop-loss and exceedance, compound Poisson-exponential (Erlang mixture) stop-loss and exceedance,
// Irwin-Hall ppm outside spec limits in exact fractions; exponential layer means in closed form. Every check also
// asserts that the returned error bound covers the actual error.
import { afterAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { validateModel, moments, compile as compileModel } from "@/lib/cf";
import { riskMeasures } from "@/lib/cf/risk";
import { close, record, worst } from "./model-assert";

const ref = JSON.parse(readFileSync("tests/fixtures/reference-risk/risk.json", "utf8"));
afterAll(() => console.log("worst errors vs references:", JSON.stringify(worst)));

function covered(value: number | null, error: number | null, expected: number, what: string, slack = 0) {
  if (value === null || error === null) throw new Error(`${what}: no value (${value}) or bound (${error})`);
  const diff = Math.abs(value - expected);
  record(what.split(" ")[0], diff);
  if (!(diff <= error + slack)) expect.fail(`${what}: value ${value}, expected ${expected}, difference ${diff} exceeds the returned bound ${error}`);
}

describe("normal law (closed form, scipy.stats.norm)", () => {
  for (const c of ref.normal) {
    it(`${JSON.stringify(c.model)}: stop-loss, limited mean, layer mean and exceedance`, () => {
      const ds = c.stopLoss.map((x: { d: number }) => x.d);
      const r = riskMeasures(validateModel(c.model), {
        stopLoss: ds,
        exceedance: ds,
        limitedMean: ds,
        layerMean: [{ deductible: ds[1], limit: ds[3] - ds[1] }],
      });
      const mu = c.model.mu;
      c.stopLoss.forEach((x: { d: number; value: number }, i: number) => {
        close(r.stopLoss!.value[i]!, x.value, { abs: 1e-6 * c.model.sigma }, `stop-loss at ${x.d}`);
        covered(r.stopLoss!.value[i], r.stopLoss!.error[i], x.value, `stopLoss normal d=${x.d}`, 1e-15);
        // E[min(X, u)] = mu - E[(X - u)+]
        covered(r.limitedMean!.value[i], r.limitedMean!.error[i], mu - x.value, `limitedMean normal u=${x.d}`, 1e-13 * Math.abs(mu));
      });
      c.exceedance.forEach((x: { x: number; value: number }, i: number) => covered(r.exceedance!.value[i], r.exceedance!.error[i], x.value, `exceedance normal x=${x.x}`, 1e-16));
      covered(r.layerMean!.value[0], r.layerMean!.error[0], c.stopLoss[1].value - c.stopLoss[3].value, "layerMean normal", 1e-13);
    });
  }
  it("lower-tail VaR and ES of a normal: ES_p = mu - sigma phi(z_p)/p (common practice)", () => {
    // z_{0.01} and phi(z_{0.01}) from scipy.stats.norm.ppf / pdf (tests/fixtures/reference-risk/generate.py prints the same law)
    const z = -2.3263478740408408;
    const phi = 0.026652142203457912;
    const r = riskMeasures(validateModel({ family: "normal", mu: 0.0005, sigma: 0.01 }), { var: { p: [0.01], tail: "lower" }, es: { p: [0.01], tail: "lower" } });
    covered(r.var!.value[0], r.var!.error[0], 0.0005 + 0.01 * z, "var lower", 1e-15);
    covered(r.es!.value[0], r.es!.error[0], 0.0005 - (0.01 * phi) / 0.01, "es lower", 1e-15);
  });
});

describe("compound Poisson with exponential claims (Erlang mixture, mpmath)", () => {
  for (const c of ref.compoundPoissonExponential) {
    it(`${JSON.stringify(c.model)}`, () => {
      const r = riskMeasures(validateModel(c.model), { stopLoss: c.stopLoss.map((x: { d: number }) => x.d), exceedance: c.exceedance.map((x: { x: number }) => x.x) });
      c.stopLoss.forEach((x: { d: number; value: number }, i: number) => covered(r.stopLoss!.value[i], r.stopLoss!.error[i], x.value, `stopLoss compound d=${x.d}`, 1e-14));
      c.exceedance.forEach((x: { x: number; value: number }, i: number) => covered(r.exceedance!.value[i], r.exceedance!.error[i], x.value, `exceedance compound x=${x.x}`, 1e-16));
    });
  }
});

describe("a far policy limit or retention asked beside near ones (Erlang mixture fixture, closed-form mean)", () => {
  // E[min(S, u)] = E[S] - E[(S - u)+] with E[S] = lambda / beta (common practice); past u = 1e6 the stop-loss is below
  // e^(3 - 250000) by the Chernoff bound with the claims' MGF at beta / 2 (common practice), zero in doubles. The far
  // points once stretched one integration grid over [0, 1e9] and left the near values with bounds of 54 on a mean of 6.
  const c = ref.compoundPoissonExponential[0];
  const mean = c.model.compound.count.lambda / c.model.compound.each.rate;
  for (const [route, options] of [["continuous", {}], ["discretised", { discretise: {} }]] as const)
    it(`${JSON.stringify(c.model)}, ${route}: limited means and stop-loss at 1e6 and 1e9 keep the near ones' bounds small`, () => {
      const ds = c.stopLoss.map((x: { d: number }) => x.d);
      const r = riskMeasures(validateModel(c.model), { stopLoss: [...ds, 1e6, 1e9], limitedMean: [...ds, 1e6, 1e9] }, options);
      const useful = route === "continuous" ? 1e-9 : 1e-3;
      // within the bound (plus the fixture's rounding), and the bound small next to the mean
      const check = (v: number | null, e: number | null, want: number, what: string, most: number) => {
        covered(v, e, want, what, 1e-15 * Math.abs(want));
        expect(e!, `${what}: bound ${e} above ${most}`).toBeLessThanOrEqual(most);
      };
      c.stopLoss.forEach((x: { d: number; value: number }, i: number) => {
        check(r.stopLoss!.value[i], r.stopLoss!.error[i], x.value, `stopLoss ${route} d=${x.d}`, useful * mean);
        check(r.limitedMean!.value[i], r.limitedMean!.error[i], mean - x.value, `limitedMean ${route} u=${x.d}`, useful * mean);
      });
      for (const k of [0, 1]) {
        const i = ds.length + k;
        check(r.stopLoss!.value[i], r.stopLoss!.error[i], 0, `stopLoss ${route} far`, 1e-9 * mean);
        check(r.limitedMean!.value[i], r.limitedMean!.error[i], mean, `limitedMean ${route} far`, useful * mean);
      }
    });
});

describe("Irwin-Hall stacks: probability outside spec limits (exact fractions)", () => {
  for (const c of ref.irwinHall) {
    it(`${c.model.repeat} uniform parts, [${c.lsl}, ${c.usl}]: ${c.exact}`, () => {
      const r = riskMeasures(validateModel(c.model), { outside: { lsl: c.lsl, usl: c.usl } });
      covered(r.outside!.value, r.outside!.error, c.probability, `outside IrwinHall n=${c.model.repeat}`, 1e-16);
      close(r.outside!.ppm, c.ppm, { abs: 1e6 * r.outside!.error + 1e-9 }, "ppm");
    });
  }
});

describe("exponential claims under a per-claim layer (closed form)", () => {
  // E[min(max(X - d, 0), l)] = e^{-rate d} (1 - e^{-rate l}) / rate (Loss Models, limited expected values of the exponential)
  const cases = [
    { rate: 1, d: 1, l: 2 },
    { rate: 0.01, d: 50, l: 100 },
    { rate: 2, d: 0, l: 0.5 },
  ];
  for (const { rate, d, l } of cases) {
    const exact = (Math.exp(-rate * d) * -Math.expm1(-rate * l)) / rate;
    it(`rate ${rate}, deductible ${d}, limit ${l}: the layer law's mean and the aggregate layer mean of one claim`, () => {
      const m = moments({ layer: { deductible: d, limit: l }, of: { family: "exponential", rate } }, 1);
      close(m.mean!, exact, { rel: 1e-12 }, "mean of the layered claim");
      record("layer mean rel", Math.abs(m.mean! - exact) / exact);
      const r = riskMeasures(validateModel({ family: "exponential", rate }), { layerMean: [{ deductible: d, limit: l }] });
      covered(r.layerMean!.value[0], r.layerMean!.error[0], exact, "layerMean exponential", 1e-15);
    });
  }
  it("compound Poisson of layered exponential claims: the mean is E[N] times the layer mean, within the returned bound", () => {
    const rate = 0.5;
    const lam = 20;
    const exact = lam * ((Math.exp(-rate * 1) * -Math.expm1(-rate * 4)) / rate);
    const model = validateModel({ compound: { count: { family: "poisson", lambda: lam }, each: { layer: { deductible: 1, limit: 4 }, of: { family: "exponential", rate } } } });
    // E[S] = limited mean at a level beyond the support's end (20 * 4 = 80 is not reached only with mass 0)
    const r = riskMeasures(model, { limitedMean: [1e4] });
    covered(r.limitedMean!.value[0], r.limitedMean!.error[0], exact, "compound layered mean", 1e-12);
  });
});

describe("measures that do not exist", () => {
  it("Cauchy: ES and stop-loss are null with a reason; VaR is finite", () => {
    const r = riskMeasures(validateModel({ family: "cauchy", loc: 0, scale: 1 }), { var: { p: [0.99] }, es: { p: [0.99] }, stopLoss: [1] });
    expect(r.es!.value[0]).toBeNull();
    expect(r.stopLoss!.value[0]).toBeNull();
    expect(r.notes.join(" ")).toMatch(/es: E\[X \| X >= q_p\] is infinite/);
    covered(r.var!.value[0], r.var!.error[0], Math.tan(Math.PI * 0.49), "var cauchy", 1e-12);
  });
  it("Lomax with alpha 0.8: no mean, so stop-loss and upper ES are null with a reason", () => {
    const r = riskMeasures(validateModel({ family: "lomax", alpha: 0.8, theta: 2 }), { stopLoss: [1], es: { p: [0.99] } });
    expect(r.stopLoss!.value[0]).toBeNull();
    expect(r.stopLoss!.error[0]).toBeNull();
    expect(r.es!.value[0]).toBeNull();
    expect(r.notes.join(" ")).toMatch(/stopLoss: E\[\(S - d\)\+\] is infinite/);
});
});

describe("per-claim layers of other claim laws (mpmath.quad on the claim density)", () => {
  for (const c of ref.layers as { name: string; model: unknown; mean: number; cf: { t: number; phi: [number, number] }[] }[]) {
    it(`${c.name}: mean within 1e-11 relative and CF within the declared bound (at most 1e-12)`, () => {
      const m = moments(c.model, 1);
      close(m.mean!, c.mean, { rel: 1e-11 }, `${c.name} mean`);
      record("layer mean rel", Math.abs(m.mean! - c.mean) / c.mean);
      const comp = compileModel(c.model);
      const t = Float64Array.from(c.cf.map((x) => x.t));
      const re = new Float64Array(t.length);
      const im = new Float64Array(t.length);
      comp.cf(t, re, im);
      c.cf.forEach((x, k) => {
        const e = Math.hypot(re[k] - x.phi[0], im[k] - x.phi[1]);
        record("layer cf abs", e);
        const declared = comp.cfAbsError ?? 0;
        if (!(e <= declared)) expect.fail(`${c.name} phi(${x.t}): value ${re[k]}+${im[k]}i, expected ${x.phi[0]}+${x.phi[1]}i, difference ${e}, declared bound ${declared}`);
      });
      expect(comp.cfAbsError).toBeLessThanOrEqual(1e-12);
    });
  }
});
