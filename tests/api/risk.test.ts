// POST /api/v1/risk through the gate, and the quantiles endpoint's lower tail; numbers against jstat (npm, a
// general-purpose statistics library) and the normal stop-loss closed form sigma phi(z) + (mu - d)(1 - Phi(z))
// (common practice).
import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { keyedClient } from "../support/api";

const { post } = keyedClient();

function within(value: number, error: number, expected: number, what: string) {
  const diff = Math.abs(value - expected);
  expect(diff, `${what}: value ${value}, expected ${expected}, difference ${diff} above the returned bound ${error}`).toBeLessThanOrEqual(error + 1e-15);
}

describe("POST /api/v1/risk", () => {
  it("answers every measure of a normal law, aligned with the inputs, each within its own error bound", async () => {
    const mu = 10;
    const sg = 3;
    const res = await post("/api/v1/risk", {
      model: { family: "normal", mu, sigma: sg },
      var: { p: [0.01, 0.99] },
      es: { p: [0.99] },
      stopLoss: [8, 13],
      limitedMean: [12],
      layerMean: [{ deductible: 9, limit: 4 }],
      exceedance: [15],
      returnPeriod: [200],
      outside: { lsl: 4, usl: 17 },
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const b = res.body;
    const sl = (d: number) => {
      const z = (d - mu) / sg;
      return sg * jStat.normal.pdf(z, 0, 1) + (mu - d) * (1 - jStat.normal.cdf(z, 0, 1));
    };
    within(b.var.value[0], b.var.error[0], jStat.normal.inv(0.01, mu, sg), "VaR 1%");
    within(b.var.value[1], b.var.error[1], jStat.normal.inv(0.99, mu, sg), "VaR 99%");
    // ES_p = mu + sigma phi(z_p) / (1 - p)
    const z99 = jStat.normal.inv(0.99, 0, 1);
    expect(Math.abs(b.es.value[0] - (mu + (sg * jStat.normal.pdf(z99, 0, 1)) / 0.01))).toBeLessThan(1e-7);
    [8, 13].forEach((d, i) => within(b.stopLoss.value[i], b.stopLoss.error[i], sl(d), `stop-loss ${d}`));
    within(b.limitedMean.value[0], b.limitedMean.error[0], mu - sl(12), "limited mean 12");
    within(b.layerMean.value[0], b.layerMean.error[0], sl(9) - sl(13), "layer 4 xs 9");
    within(b.exceedance.value[0], b.exceedance.error[0], 1 - jStat.normal.cdf(15, mu, sg), "P(S > 15)");
    expect(Math.abs(b.returnPeriod.value[0] - jStat.normal.inv(1 - 1 / 200, mu, sg))).toBeLessThan(1e-7);
    const out = jStat.normal.cdf(4, mu, sg) + 1 - jStat.normal.cdf(17, mu, sg);
    within(b.outside.value, b.outside.error, out, "outside");
    expect(b.outside.ppm).toBeCloseTo(b.outside.value * 1e6, 6);
    expect(b.diagnostics.method).toBe("inversion");
    expect(b.meta.requestId).toBeTruthy();
  });

  it("returns null with a reason for a measure that does not exist (ES of a Cauchy law)", async () => {
    const res = await post("/api/v1/risk", { model: { family: "cauchy", loc: 0, scale: 1 }, es: { p: [0.99] }, var: { p: [0.99] } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.es.value).toEqual([null]);
    expect(res.body.es.error).toEqual([null]);
    expect(res.body.notes.join(" ")).toMatch(/infinite/);
    // VaR_0.99 of the standard Cauchy law is tan(0.49 pi) (closed form, common practice)
    within(res.body.var.value[0], res.body.var.error[0], Math.tan(0.49 * Math.PI), "Cauchy VaR");
  });

  it("rejects a request without a measure, and spec limits the wrong way round, as problem+json with pointers", async () => {
    const none = await post("/api/v1/risk", { model: { family: "normal", mu: 0, sigma: 1 } });
    expect(none.status).toBe(422);
    expect(none.headers["content-type"]).toMatch(/application\/problem\+json/);
    const bad = await post("/api/v1/risk", { model: { family: "normal", mu: 0, sigma: 1 }, outside: { lsl: 2, usl: 1 } });
    expect(bad.status).toBe(422);
    expect(JSON.stringify(bad.body.errors)).toMatch(/\/outside\/usl/);
    const period = await post("/api/v1/risk", { model: { family: "normal", mu: 0, sigma: 1 }, returnPeriod: [0.5] });
    expect(period.status).toBe(422);
  });
});

describe("POST /api/v1/quantiles with tail", () => {
  it("lower tail: ES_p = E[X | X <= q_p] = mu - sigma phi(z_p)/p (common practice), the loss tail of a return", async () => {
    const mu = 0.0005;
    const sg = 0.01;
    const res = await post("/api/v1/quantiles", { model: { family: "normal", mu, sigma: sg }, p: [0.01], expectedShortfall: true, tail: "lower" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const z = jStat.normal.inv(0.01, 0, 1);
    expect(Math.abs(res.body.x[0] - (mu + sg * z))).toBeLessThan(1e-9);
    expect(Math.abs(res.body.expectedShortfall[0] - (mu - (sg * jStat.normal.pdf(z, 0, 1)) / 0.01))).toBeLessThan(1e-9);
  });
});
