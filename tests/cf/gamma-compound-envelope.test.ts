import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { probe } from "@/lib/cf/invert/damped-psi";
import type { Atom, Model } from "@/lib/cf/types";

// Compounds of gamma (and exponential) claims on the damped route: the kernels taken out are the first J claim-count laws
// p_n gamma(n a, r) exactly, so the remainder is sum_{n > J} p_n phi^n and its derived bound (lib/cf/compound.ts
// gammaRemainderBound) makes the envelope of the transform derived. Checked against the closed form of a Poisson(lambda)
// compound written here on its own: E exp((it - beta) S) = exp(lambda (phi - 1)) with phi = (1 - i (t + i beta) / r)^-a,
// and p_n = e^-lambda lambda^n / n! (common practice: the compound Poisson transform; JKB discrete vol., Poisson pmf).
// The remainder after the atom at 0 and the kernels must lie under the model's bound and under the probe envelope at
// frequencies off the probe grid.

/** (1 - i z / r)^-a at z = t + i beta, as [re, im] */
function gammaCf(a: number, r: number, t: number, beta: number): [number, number] {
  const ur = 1 + beta / r;
  const ui = -t / r;
  const mod = Math.pow(ur * ur + ui * ui, -a / 2);
  const arg = -a * Math.atan2(ui, ur);
  return [mod * Math.cos(arg), mod * Math.sin(arg)];
}

/** sum_{n > J} p_n phi^n = exp(lambda (phi - 1)) - sum_{n <= J} p_n phi^n, as |.| */
function remainder(lambda: number, J: number, phi: [number, number]): number {
  const er = Math.exp(lambda * (phi[0] - 1));
  let re = er * Math.cos(lambda * phi[1]);
  let im = er * Math.sin(lambda * phi[1]);
  let pr = 1;
  let pi = 0;
  let pn = Math.exp(-lambda);
  for (let n = 0; n <= J; n++) {
    if (n > 0) {
      const nr = pr * phi[0] - pi * phi[1];
      pi = pr * phi[1] + pi * phi[0];
      pr = nr;
      pn *= lambda / n;
    }
    re -= pn * pr;
    im -= pn * pi;
  }
  return Math.hypot(re, im);
}

describe("compounds of gamma claims: derived damped envelope", () => {
  it.each([
    [3, 2, 0.001],
    [2, 1, 1.974],
    [500, 1, 1],
    [0.4, 0.5, 2],
  ])("Poisson(%s)-gamma(%s, %s)", (lambda, a, r) => {
    const each = a === 1 ? { family: "exponential", rate: r } : { family: "gamma", shape: a, rate: r };
    const m = compile({ compound: { count: { family: "poisson", lambda }, each } } as Model);
    const bound = m.dampedRemainderBound;
    expect(bound, "a derived remainder bound").toBeDefined();
    const J = Math.max(...(m.dampedKernels ?? []).map((k) => Math.round(k.shape / a)));
    const atoms = m.kind.type === "mixed" ? (m.kind.atoms as Atom[]) : [];
    const beta = 4 / (m.location + 10 * m.scale);
    const env = probe(m, atoms, beta, false);
    expect(env.derived, "envelope from the derived bound").toBe(true);
    let worstBound = 0;
    let worstEnv = 0;
    for (let i = 0; i < 3000; i++) {
      const t = env.t[0] * Math.pow(1e9, (i * 0.6180339887498949) % 1);
      const R = remainder(lambda, J, gammaCf(a, r, t, beta));
      // the closed form here rounds at about 1e-15 of the terms it subtracts (sizes at most 1)
      const slack = 1e-14;
      worstBound = Math.max(worstBound, (R - slack) / bound!(beta, t));
      let k = 0;
      while (k + 1 < env.t.length && env.t[k + 1] <= t) k++;
      if (env.env[k] > 0) worstEnv = Math.max(worstEnv, (R - slack) / env.env[k]);
      else expect(R, `t = ${t}: envelope 0`).toBeLessThanOrEqual(slack);
    }
    expect(worstBound, "largest remainder / its bound").toBeLessThanOrEqual(1);
    expect(worstEnv, "largest remainder / envelope off the probes").toBeLessThanOrEqual(1);
  });
});
