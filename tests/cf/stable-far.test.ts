// The Gauss rule for the weight K(v) = exp(v - e^v) (the density of log E, E standard exponential) that the alpha = 1
// far-tail route of lib/cf/direct/stable-far.ts integrates with, against closed forms of that law.
import { describe, it } from "vitest";
import { gumbelGaussRule } from "@/lib/cf/direct/stable-far";
import { close } from "./model-assert";

/** Euler-Mascheroni constant (Abramowitz & Stegun 6.1.3), to 16 digits */
const EULER_GAMMA = 0.5772156649015329;

describe("Gauss rule for the log-exponential weight", () => {
  it.each([7, 10])("%i nodes: mass 1, mean -gamma, variance pi^2/6 (A&S 6.3.2 and 6.4.2: digamma(1) = -gamma, trigamma(1) = pi^2/6)", (n) => {
    const { v, W } = gumbelGaussRule(n);
    let m0 = 0;
    let m1 = 0;
    let m2 = 0;
    for (let i = 0; i < n; i++) {
      if (!(W[i] > 0)) throw new Error(`weight ${i} = ${W[i]} not positive`);
      m0 += W[i];
      m1 += W[i] * v[i];
      m2 += W[i] * v[i] * v[i];
    }
    close(m0, 1, { abs: 1e-14 }, `${n}-node rule: total weight`);
    close(m1, -EULER_GAMMA, { abs: 1e-13 }, `${n}-node rule: E[log E]`);
    close(m2 - m1 * m1, (Math.PI * Math.PI) / 6, { abs: 1e-12 }, `${n}-node rule: Var[log E]`);
  });

  it.each([
    [0.5, Math.sqrt(Math.PI) / 2],
    [-0.5, Math.sqrt(Math.PI)],
    [1, 1],
  ])("10 nodes: E[exp(t log E)] = Gamma(1 + t) at t = %f (A&S 6.1.8, 6.1.1: Gamma(3/2) = sqrt(pi)/2, Gamma(1/2) = sqrt(pi))", (t, expected) => {
    const { v, W } = gumbelGaussRule(10);
    let s = 0;
    for (let i = 0; i < v.length; i++) s += W[i] * Math.exp(t * v[i]);
    // exp(t v) is not a polynomial: the 10-node rule is exact for degree 19, the rest is small but not zero
    close(s, expected, { rel: 1e-6 }, `E[E^${t}] by the 10-node rule`);
  });
});
