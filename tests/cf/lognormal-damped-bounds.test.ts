import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf/compile";
import { lognormalDampedBounds } from "@/lib/cf/lognormal-majorant";
import { probe, psiOf } from "@/lib/cf/invert/damped-psi";
import type { Atom, Model } from "@/lib/cf/types";

// The lognormal severity's derived bounds on its damped transform |E exp((it - a) X)| and on |E[X exp((it - a) X)]|
// (total variations of the density's derivatives, Leibniz's rule for the damping: lib/cf/lognormal-majorant.ts), against
// mpmath at 30 digits: tests/fixtures/severity-cf/generate-audit.py (two ray integrals per value) and
// generate-lognormal-slope.py (x f(x) as e^(mu + sigma^2/2) times a lognormal density, two rays). Each bound must hold at
// every frequency listed and, past t = 10 where the value is above 1e-16 (the range that decides a truncation at the
// tolerances served), stay within a factor 10 of it (the slope's, a correction between probes, within 40).
// Then the compound route's envelope of psi_c (Poisson-lognormal) built on them: derived, and above |psi_c| at
// frequencies off the probe grid.

interface Row {
  family: string;
  params: { mu: number; sigma: number };
  t: number;
  a: number;
  re?: string;
  im?: string;
  abs?: string;
  abs_diff: number;
}
const load = (name: string) => (JSON.parse(readFileSync(new URL(`../fixtures/severity-cf/${name}`, import.meta.url), "utf8")) as { cases: Row[] }).cases;

describe("lognormal damped-transform bounds vs mpmath", () => {
  it("|E exp((it - a) X)| (audit.json, a = 0 and damped)", () => {
    const rows = load("audit.json").filter((r) => r.family === "lognormal");
    expect(rows.length).toBeGreaterThan(100);
    let worst = 0;
    for (const r of rows) {
      const v = Math.hypot(Number(r.re), Number(r.im));
      const b = lognormalDampedBounds(r.params.mu, r.params.sigma).abs(r.a, r.t);
      expect(b, `${JSON.stringify(r.params)} t = ${r.t} a = ${r.a}: |phi| = ${v}`).toBeGreaterThanOrEqual(v - r.abs_diff);
      if (r.t >= 10 && v > 1e-16) worst = Math.max(worst, b / v);
    }
    expect(worst, "largest bound / value past t = 10").toBeLessThanOrEqual(10);
  });

  it("|E[X exp((it - a) X)]| (lognormal-slope.json)", () => {
    const rows = load("lognormal-slope.json");
    let worst = 0;
    for (const r of rows) {
      const v = Number(r.abs);
      const b = lognormalDampedBounds(r.params.mu, r.params.sigma).slope(r.a, r.t);
      expect(b, `${JSON.stringify(r.params)} t = ${r.t} a = ${r.a}: |E X e^(izX)| = ${v}`).toBeGreaterThanOrEqual(v - r.abs_diff);
      if (r.t >= 10 && v > 1e-16) worst = Math.max(worst, b / v);
    }
    expect(worst, "largest bound / value past t = 10").toBeLessThanOrEqual(40);
  });
});

describe("Poisson-lognormal: the damped envelope of psi_c is derived and holds between probes", () => {
  it.each([
    [2, 0, 1],
    [25, 8, 1.2],
    [1, 0, 2.5],
  ])("Poisson(%s)-lognormal(%s, %s)", (lambda, mu, sigma) => {
    const m = compile({ compound: { count: { family: "poisson", lambda }, each: { family: "lognormal", mu, sigma } } } as Model);
    const atoms = (m.kind as { atoms: Atom[] }).atoms;
    const beta = 4 / (m.location + 10 * m.scale);
    for (const pairOut of [false, true]) {
      const env = probe(m, atoms, beta, pairOut);
      expect(env.derived, "envelope from the derived bounds").toBe(true);
      let last = env.t.length - 1;
      while (last > 0 && !(env.env[last] > 1e-300)) last--;
      const n = 4000;
      const t = new Float64Array(n);
      for (let i = 0; i < n; i++) t[i] = env.t[0] * Math.pow(env.t[last] / env.t[0], (i * 0.6180339887498949) % 1);
      const re = new Float64Array(n);
      const im = new Float64Array(n);
      const noise = new Float64Array(n);
      psiOf(m, atoms, beta, pairOut)(t, re, im, noise);
      let worst = 0;
      for (let i = 0; i < n; i++) {
        let k = 0;
        while (k + 1 < env.t.length && env.t[k + 1] <= t[i]) k++;
        // the computed value may exceed the true one by its own error bound (noise)
        worst = Math.max(worst, (Math.hypot(re[i], im[i]) - noise[i]) / env.env[k]);
      }
      expect(worst, `largest |psi_c| / envelope off the probes (pair out: ${pairOut})`).toBeLessThanOrEqual(1);
    }
  });
});
