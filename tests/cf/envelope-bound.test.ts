import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { makePart } from "@/lib/cf/invert/part";
import { envelopeOf, probeEnvelope, probeFrequencies } from "@/lib/cf/invert/nodes";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

// Exponential(1) (as weibull of shape 1: a family whose |phi| had no majorant) plus a uniform of width W moved to 3:
// |phi(s)| = |sin(W s / 2) / (W s / 2)| / sqrt(1 + s^2), the CFs of the exponential and uniform laws (Johnson, Kotz &
// Balakrishnan, Continuous Univariate Distributions vol. 1 ch. 19 and vol. 2 ch. 26). W is chosen so that two
// neighbouring probes (t_173, t_174 at scale 1) both fall near zeros of the sinc: the sampled envelope (running maximum of
// the probes) sat 4.7 times below |phi| between them.
const W = 33.4826;
const absPhi = (s: number) => Math.abs(Math.sin(0.5 * W * s) / (0.5 * W * s)) / Math.sqrt(1 + s * s);
const model = { sum: [{ family: "weibull", shape: 1, scale: 1 }, { shift: 3, of: { family: "uniform", a: 0, b: W } }] } as unknown as Model;

describe("envelope of |phi| between and beyond the probes (reference: closed-form CFs of the exponential and uniform laws)", () => {
  it("env(t_i) >= |phi(s)| for s on a dense grid over [t_i, t_i+1] and every later interval", () => {
    const m = compile(model);
    const e = probeEnvelope(makePart(m, [], 1 + 3 + W / 2), 1);
    const c = new Checker();
    // the sup over [t_i, inf) on the dense grid, from the right (|phi| <= 2 / (W s^2) is below 1e-300 long before the end)
    const n = e.t.length;
    const sup = new Float64Array(n);
    let run = 0;
    for (let i = n - 2; i >= 0; i--) {
      let mx = 0;
      for (let j = 0; j <= 400; j++) mx = Math.max(mx, absPhi(e.t[i] + ((e.t[i + 1] - e.t[i]) * j) / 400));
      run = Math.max(run, mx);
      sup[i] = run;
    }
    for (let i = 0; i < n - 1; i++) c.that(`env at t_${i} = ${e.t[i]}`, e.env[i] >= sup[i], `env ${e.env[i]} below sup |phi| ${sup[i]}`);
    // the tails bound (1/pi) int_{t_i}^inf |phi| and (1/pi) int |phi| / s: here against those integrals over the probed
    // range by the midpoint rule on 400 points per interval (|phi| is smooth on that scale)
    let ip = 0;
    let ic = 0;
    for (let i = n - 2; i >= 0; i--) {
      const h = (e.t[i + 1] - e.t[i]) / 400;
      for (let j = 0; j < 400; j++) {
        const s = e.t[i] + (j + 0.5) * h;
        ip += absPhi(s) * h;
        ic += (absPhi(s) / s) * h;
      }
      if (i % 8 === 0) {
        c.that(`pdf tail at t_${i}`, e.tailPdf[i] >= ip / Math.PI, `${e.tailPdf[i]} below ${ip / Math.PI}`);
        c.that(`cdf tail at t_${i}`, e.tailCdf[i] >= ic / Math.PI, `${e.tailCdf[i]} below ${ic / Math.PI}`);
      }
    }
    c.done();
  });

  for (const method of ["gil-pelaez", "fft"] as const) {
    it(`${method}: the stated bounds are not below the actual errors (density of the sum in closed form)`, () => {
      // f(x) = (F_E(x - 3) - F_E(x - 3 - W)) / W with F_E(y) = 1 - e^{-y} for y > 0 (convolution with a uniform)
      const FE = (y: number) => (y > 0 ? -Math.expm1(-y) : 0);
      // int F_E = y - F_E(y) for y > 0
      const IE = (y: number) => (y > 0 ? y - FE(y) : 0);
      const pdf = (x: number) => (FE(x - 3) - FE(x - 3 - W)) / W;
      const cdf = (x: number) => (IE(x - 3) - IE(x - 3 - W)) / W;
      const m = compile(model);
      const xs = [3.5, 5, 10, 20, 30, 36, 37, 40, 45];
      const r = method === "fft" ? density(m, { grid: { from: 0, to: 60, count: 601 }, method }) : density(m, { x: xs, method });
      const c = new Checker();
      const err = r.diagnostics.error;
      c.that("bounds finite", Number.isFinite(err.cdf), JSON.stringify(err));
      for (let i = 0; i < r.x.length; i++) {
        const x = r.x[i];
        c.honest(`x=${x} cdf`, r.cdf[i], cdf(x), err.cdf);
        if (r.pdf && Number.isFinite(err.pdf)) c.honest(`x=${x} pdf`, r.pdf[i], pdf(x), err.pdf);
      }
      c.done();
    });
  }
});

// Beta(1/2, 1/2) on [0, W] (a density singular at both ends: lib/cf/singular-majorants.ts) plus a gamma(3, 1):
// |phi(s)| = |J0(W s / 2)| (1 + s^2)^{-3/2}, its largest value on 401 points of each probe interval from
// tests/fixtures/cf-abs/generate.py (CASESET=peak: mpmath besselj, cross-checked with scipy.special.j0). W puts the probes
// t_112, t_113 and t_114 near zeros of J0; the running maximum of the sampled |phi| then falls below the peaks between
// them, which the test shows before checking the derived envelope.
describe("envelope of |phi| with a singular-density term (reference: cf-abs-peak.json, mpmath besselj)", () => {
  const f = JSON.parse(readFileSync(join(__dirname, "../fixtures/cf-abs/cf-abs-peak.json"), "utf8")) as {
    W: number;
    gammaShape: number;
    gammaRate: number;
    rows: { i: number; t: number; sup: number; supDiff: number }[];
  };
  const sumModel = { sum: [{ family: "beta", alpha: 0.5, beta: 0.5, a: 0, b: f.W }, { family: "gamma", shape: f.gammaShape, rate: f.gammaRate }] } as unknown as Model;
  // the largest reference value over the fixture's intervals j >= i (a lower bound of sup_{s >= t_i} |phi(s)|), less its
  // cross-check difference
  const supFrom = new Map<number, number>();
  let run = 0;
  for (let k = f.rows.length - 1; k >= 0; k--) {
    run = Math.max(run, f.rows[k].sup - f.rows[k].supDiff);
    supFrom.set(f.rows[k].i, run);
  }

  it("the sampled envelope misses the peaks between t_112 and t_115 (the case is one that can fail)", () => {
    const m = compile(sumModel);
    const t = probeFrequencies(1);
    const re = new Float64Array(t.length);
    const im = new Float64Array(t.length);
    m.cf(t, re, im);
    const mag = Float64Array.from(re, (r, i) => Math.hypot(r, im[i]));
    const sampled = envelopeOf(t, mag, () => 0);
    const c = new Checker();
    for (const i of [112, 113, 114]) c.that(`sampled env at t_${i} below the reference`, sampled.env[i] < supFrom.get(i)!, `sampled ${sampled.env[i]}, reference sup ${supFrom.get(i)}`);
    c.done();
  });

  it("derived envelope: env(t_i) >= the reference sup over [t_i, inf) on the fixture's intervals", () => {
    const m = compile(sumModel);
    const c = new Checker();
    c.that("has a derived majorant", !!m.logAbsMajorant?.tail);
    const e = probeEnvelope(makePart(m, [], f.W / 2 + f.gammaShape / f.gammaRate), 1);
    for (const r of f.rows) {
      c.that("probe grid", Math.abs(e.t[r.i] / r.t - 1) < 1e-12, `${e.t[r.i]} vs ${r.t}`);
      c.that(`env at t_${r.i}`, e.env[r.i] >= supFrom.get(r.i)!, `env ${e.env[r.i]} below the reference sup ${supFrom.get(r.i)}`);
    }
    c.done();
  });
});
