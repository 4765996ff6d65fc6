// The per-point bound on the damped inversion's image remainder (lib/cf/invert/damped-images.ts): its moment bounds
// against closed-form raw moments, and its tail bound against the Erlang-mixture reference tails of
// tests/fixtures/compound/compound.json (generate.py beside it, mpmath, two methods). A bound below the reference
// fails; its looseness against the exact moments is stated as a tolerance.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { imageIntegralTail, imageTail } from "@/lib/cf/invert/damped-images";
import { momentBounds } from "@/lib/cf/invert/moment-tails";
import type { Atom, Model } from "@/lib/cf/types";

const EPS = Number.EPSILON;

/** E X^n of gamma(shape s, rate r): s (s + 1) ... (s + n - 1) / r^n (Johnson, Kotz & Balakrishnan vol. 1, ch. 17, eq. 17.9) */
const gammaMoment = (s: number, r: number, n: number) => {
  let m = 1;
  for (let j = 0; j < n; j++) m *= (s + j) / r;
  return m;
};

/**
 * E S^n of S = X_1 + ... + X_N, N ~ Poisson(lambda), X ~ exponential(rate): given N = k, S ~ gamma(k, rate), so
 * E S^n = sum_k P(N = k) k (k + 1) ... (k + n - 1) / rate^n (Klugman, Panjer & Willmot, Loss Models, compound models
 * with exponential severities; the Erlang mixture), summed until the terms are below 1e-18 of the total
 */
const poissonExponentialMoment = (lambda: number, rate: number, n: number) => {
  let s = 0;
  let pk = Math.exp(-lambda);
  for (let k = 1; k < 2000; k++) {
    pk *= lambda / k;
    const t = pk * gammaMoment(k, rate, n);
    s += t;
    if (k > lambda && t < 1e-18 * s) break;
  }
  return s;
};

describe("damped images: raw moment bounds from the cumulants", () => {
  const cases: { name: string; model: Model; exact: (n: number) => number }[] = [
    { name: "gamma(2.5, 1.5), JKB eq. 17.9", model: { family: "gamma", shape: 2.5, rate: 1.5 }, exact: (n) => gammaMoment(2.5, 1.5, n) },
    {
      name: "Poisson(2)-exponential(1), Erlang mixture",
      model: { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "exponential", rate: 1 } } },
      exact: (n) => poissonExponentialMoment(2, 1, n),
    },
    {
      name: "Poisson(10)-exponential(0.5), Erlang mixture",
      model: { compound: { count: { family: "poisson", lambda: 10 }, each: { family: "exponential", rate: 0.5 } } },
      exact: (n) => poissonExponentialMoment(10, 0.5, n),
    },
  ];
  it.each(cases.map((c) => [c.name, c] as const))("%s: every upper bound at or above the exact moment, within 1e-9 of it", (_n, c) => {
    const m = compile(c.model);
    const b = momentBounds(m, 0);
    expect(b).not.toBeNull();
    const { c: scale, logU } = b!;
    // at least the orders where the closed form is accurate in doubles
    expect(logU.length - 1).toBeGreaterThanOrEqual(20);
    for (let n = 1; n < logU.length; n++) {
      const upper = Math.exp(logU[n] + n * Math.log(scale));
      const exact = c.exact(n);
      // the closed form's own rounding (n products, the series' sum): 4 n eps relative
      const floor = exact * (1 - 4 * (n + 2) * EPS);
      if (!(upper >= floor)) expect.fail(`${c.name} E X^${n}: bound ${upper} below the exact ${exact}`);
      const rel = upper / exact - 1;
      if (!(rel <= 1e-9)) expect.fail(`${c.name} E X^${n}: bound ${upper}, exact ${exact}, relative looseness ${rel} above the tolerance 1e-9`);
    }
  });
});

interface Case {
  model: Model;
  atom0: number;
  points: { x: number; sf: number }[];
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/compound.json"), "utf8")) as { exponential: Case[] };

describe("damped images: the tail bound B(z) against the Erlang-mixture tails (tests/fixtures/compound, mpmath)", () => {
  it.each(fixture.exponential.map((c) => [JSON.stringify(c.model), c] as const))("%s", (_name, c) => {
    const m = compile(c.model);
    const atoms: Atom[] = m.kind.type === "mixed" ? m.kind.atoms : [];
    // the nearest image put at the far check's distance, so the orders reach it (any distance gives a valid bound; it
    // only decides how many orders are computed, hence how tight)
    const B = imageTail(m, atoms, 0, m.dampedKernels ?? [], m.dampedSeverity ?? null, null, 20 * c.points[c.points.length - 1].x);
    expect(B).not.toBeNull();
    let prev = Infinity;
    for (const p of c.points) {
      if (!(p.x > 0)) continue;
      const b = B!(p.x);
      // the continuous part's mass beyond x is the whole sf there (the only atom is at 0); the reference to 1e-30
      if (!(b >= p.sf * (1 - 1e-14))) expect.fail(`x = ${p.x}: bound ${b} below the reference sf ${p.sf}`);
      expect(b).toBeLessThanOrEqual(prev);
      prev = b;
    }
    // far out the bound follows the light tail: at 20 times the largest fixture point it is below 1e-20 of the mass
    const far = 20 * c.points[c.points.length - 1].x;
    expect(B!(far)).toBeLessThan(1e-20);
  });
});

describe("damped images: the integrated image tail against closed-form tail integrals", () => {
  // B non-increasing with int_c^inf B in closed form: the exponential tail e^{-z} (int = e^{-c}) and the gamma(2, 1) tail
  // (1 + z) e^{-z} (int = (2 + c) e^{-c}); second = 2 and 6 are their second moments (E Z^2 of exponential(1), gamma(2, 1)).
  // The upper Riemann sum on steps [z_j, z_{j+1}] (ratio 1.25, later 2) is at least the integral, and at most its first step
  // 0.25 c B(c) plus twice the integral (each later step is at most its ratio times the integral over the one before)
  const cases = [
    { name: "exponential(1) tail", B: (z: number) => Math.exp(-z), int: (c: number) => Math.exp(-c), second: 2 },
    { name: "gamma(2, 1) tail", B: (z: number) => (1 + z) * Math.exp(-z), int: (c: number) => (2 + c) * Math.exp(-c), second: 6 },
  ];
  it.each(cases.flatMap((k) => [0.5, 3, 10, 40].map((c) => [`${k.name}, c = ${c}`, k, c] as const)))("%s", (_n, k, c) => {
    const got = imageIntegralTail(k.B, c, k.second);
    const exact = k.int(c);
    if (!(got >= exact * (1 - 1e-14))) expect.fail(`bound ${got} below the exact tail integral ${exact}`);
    const most = Math.min(k.second / (4 * c), 0.25 * c * k.B(c) + 2 * exact) * (1 + 1e-12) + 1e-300;
    if (!(got <= most)) expect.fail(`bound ${got} above ${most} (exact ${exact})`);
  });
});
