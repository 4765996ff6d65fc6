import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { probeEnvelope } from "@/lib/cf/invert/nodes";
import { evalPart, makePart, withKernels, withTailLaw, type ContinuousPart } from "@/lib/cf/invert/part";
import gammainc from "@stdlib/math-base-special-gammainc";
import { lawShape } from "@/lib/cf/invert/range";
import type { Model } from "@/lib/cf/types";

// The truncation bound of the power-tail inversion when the sum's heaviest term G is taken out of the CF
// (phi_part = phi_X - phi_G): its envelope now comes from the two derived majorants, |phi_X| + |phi_G| between the
// probes bounded by the slopes (lib/cf/invert/envelope-bound.ts), not from samples of |phi_part|. Checked here: the
// envelope is the derived one, every value of |phi_part| at frequencies off the probe grid lies under it (the property a
// sampled envelope cannot promise), and the cdf at the reference quantiles of tests/fixtures/sums (mpmath numerical
// convolution, tests/fixtures/sums/generate.py) lies within the reported bound.

interface Level {
  p: string;
  x: string;
  x_check: number;
}
const cases = (JSON.parse(readFileSync(new URL("../fixtures/sums/sums.json", import.meta.url), "utf8")) as { cases: { name: string; model: Model; levels: Level[] }[] }).cases;

/** |phi_part| at n frequencies spread log-uniformly over [lo, hi], off the probe grid (a fixed irrational stride) */
function offGrid(part: ContinuousPart, lo: number, hi: number, n: number) {
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = lo * Math.pow(hi / lo, ((i * 0.6180339887498949) % 1));
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  evalPart(part, t, re, im);
  return { t, mag: Array.from(re, (r, i) => Math.hypot(r, im[i])) };
}

describe("tail-term part: derived envelope (sums of tests/fixtures/sums)", () => {
  it.each(cases.map((c) => [c.name, c] as const))("%s", (_name, c) => {
    const m = compile(c.model);
    const shape = lawShape(m);
    const part = withTailLaw(makePart(m, [], shape.center));
    expect(part.tail, "the sum has a heaviest term with a direct law").toBeDefined();
    const env = probeEnvelope(part, shape.spread);
    expect(env.derived, "envelope from the derived majorants").toBe(true);
    // the envelope at probe i bounds |phi_part| on [t_i, t_{i+1}]: check 4000 frequencies over the range where it is above
    // the smallest double
    let last = env.t.length - 1;
    while (last > 0 && !(env.env[last] > 1e-300)) last--;
    const { t, mag } = offGrid(part, env.t[0], env.t[last], 4000);
    let worst = 0;
    for (let i = 0; i < t.length; i++) {
      let k = 0;
      while (k + 1 < env.t.length && env.t[k + 1] <= t[i]) k++;
      worst = Math.max(worst, mag[i] / env.env[k]);
    }
    expect(worst, "largest |phi_part| / envelope off the probes").toBeLessThanOrEqual(1);
    // and the cdf at the reference quantiles, within the reported bound (the reference's own uncertainty x_check, a
    // quantile difference, moves the cdf by at most the density there times it)
    const xs = c.levels.map((l) => Number(l.x));
    const r = density(m, { x: xs });
    c.levels.forEach((l, i) => {
      const slack = r.pdf![i] * 2 * l.x_check;
      expect(Math.abs(r.cdf[i] - Number(l.p)), `${c.name}: cdf at the ${l.p} quantile, bound ${r.diagnostics.error.cdf}`).toBeLessThanOrEqual(r.diagnostics.error.cdf + slack);
    });
  });
});

// A shifted or scaled compound keeps the derived majorant of its continuous part (the atom at the shift taken out):
// Poisson(1.5)-gamma(2.5, 1) has continuous part (phi - e^{-1.5} e^{i t b}) / (1 - e^{-1.5}) after a shift by b, and
// |phi(t)| = exp(-1.5 (1 - Re psi(t))) with psi the gamma CF (1 - i t)^{-2.5} (common practice: compound Poisson CF).
describe("shifted and scaled compounds carry their continuous part's majorant", () => {
  const compound = { compound: { count: { family: "poisson", lambda: 1.5 }, each: { family: "gamma", shape: 2.5, rate: 1 } } };
  const p0 = Math.exp(-1.5);
  it.each([
    ["shift -0.852", { shift: -0.852, of: compound }, 1, -0.852],
    ["scale 2", { scale: 2, of: compound }, 2, 0],
    ["scale -0.5", { scale: -0.5, of: compound }, -0.5, 0],
  ] as const)("%s", (_label, model, a, b) => {
    const m = compile(model as unknown as Model);
    const cm = m.continuousMajorant;
    expect(cm, "continuous-part majorant present").toBeDefined();
    expect(cm!.atoms).toEqual([{ x: expect.closeTo(b, 15), p: expect.closeTo(p0, 15) }]);
    const n = 400;
    const t = new Float64Array(n);
    for (let i = 0; i < n; i++) t[i] = 1e-3 * Math.pow(1e6, i / (n - 1));
    const lm = new Float64Array(n);
    cm!.maj(t, lm);
    for (let i = 0; i < n; i++) {
      // the gamma CF at a t: (1 - i a t)^{-2.5} in polar form
      const u = a * t[i];
      const r = Math.pow(1 + u * u, -1.25);
      const th = 2.5 * Math.atan(u);
      const lr = -1.5 * (1 - r * Math.cos(th));
      const li = 1.5 * r * Math.sin(th) + b * t[i];
      const cr = (Math.exp(lr) * Math.cos(li) - p0 * Math.cos(b * t[i])) / (1 - p0);
      const ci = (Math.exp(lr) * Math.sin(li) - p0 * Math.sin(b * t[i])) / (1 - p0);
      expect(Math.hypot(cr, ci), `t = ${t[i]}`).toBeLessThanOrEqual(Math.exp(lm[i]) * (1 + 1e-12) + 1e-15);
    }
  });
});

// Found by the property tests: a sum whose other term is the zero law (a compound with N = 0 always) is the heaviest term
// alone, here inverse gamma(4.97, 0.505), with F(x) = Q(alpha, theta / x) (Loss Models, app. A; @stdlib gammainc, upper).
// With that term's CF taken out nothing is left to invert, and a part with the tail law and endpoint kernels must keep
// mass 0 - sum b (it had 1 - sum b: cdf 0.5 at 0).
describe("tail law with nothing left, and with kernels", () => {
  it("0 + inverse gamma(4.97, 0.505): cdf within its bound of the closed form", () => {
    const m = compile({ sum: [{ compound: { count: { family: "point", at: 0 }, each: { family: "normal", mu: 2.529, sigma: 1.981 } } }, { family: "inverse_gamma", alpha: 4.97, theta: 0.505 }] } as Model);
    const xs = [0, 0.05, 0.1, 0.2, 0.5, 1, 2];
    const r = density(m, { x: xs });
    xs.forEach((x, i) => {
      const ref = x > 0 ? gammainc(0.505 / x, 4.97, true, true) : 0;
      expect(Math.abs(r.cdf[i] - ref), `x = ${x}: cdf ${r.cdf[i]} vs ${ref}`).toBeLessThanOrEqual(r.diagnostics.error.cdf + 1e-15);
    });
  });
  it("withKernels keeps the tail law's mass", () => {
    const m = compile({ sum: [{ family: "lomax", alpha: 4.883, theta: 2.992 }, { family: "uniform", a: 0.9, b: 1.5 }] } as Model);
    const part = withTailLaw(makePart(m, [], 1));
    expect(part.tail).toBeDefined();
    expect(part.mass).toBe(0);
    const k = withKernels(part, [{ at: 0.9, side: 1, rate: 1, power: 1, b: [0.25, 0.125] }]);
    expect(k.mass).toBe(-0.375);
  });
});
