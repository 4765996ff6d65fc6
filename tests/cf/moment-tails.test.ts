// Tail bounds behind the per-point aliasing of the inversions (lib/cf/invert/moment-tails.ts, light-images.ts):
// Markov's inequality on the moments from the cumulants against the normal and gamma tails in closed form
// (@stdlib/math-base-special-erfc, @stdlib/math-base-special-gammainc), and the kernels' image sums against the sum of
// their gamma tails term by term (@stdlib gammainc). A bound below its reference fails; its looseness is printed.
import { describe, expect, it } from "vitest";
import erfc from "@stdlib/math-base-special-erfc";
import gammainc from "@stdlib/math-base-special-gammainc";
import { compile } from "@/lib/cf/compile";
import { markovExcess, markovTail, momentBounds } from "@/lib/cf/invert/moment-tails";
import { kernelImages } from "@/lib/cf/invert/light-images";

/** the references are double-precision closed forms: a few ulps relative */
const REF = 1e-13;

describe("Markov's inequality on moments from the cumulants", () => {
  it("normal(1, 2): P(|X - 1| >= r) = erfc(r / (2 sqrt 2)) (@stdlib erfc), every r, even orders", () => {
    const m = compile({ family: "normal", mu: 1, sigma: 2 });
    const b = momentBounds(m, 1);
    expect(b).not.toBeNull();
    const looseness: string[] = [];
    for (const r of [2, 5, 10, 20, 40, 80]) {
      const exact = erfc(r / (2 * Math.SQRT2));
      const bound = markovTail(b!, r, true);
      if (!(bound >= exact * (1 - REF))) expect.fail(`r = ${r}: bound ${bound} below erfc ${exact}`);
      looseness.push(`r=${r}: ${(bound / exact).toExponential(1)}`);
    }
    // far out the best order grows with r: the bound follows the Gaussian tail to within its Markov factor
    expect(markovTail(b!, 40, true)).toBeLessThan(1e-15);
    console.log("normal tail bound/exact:", looseness.join(", "));
  });

  it("gamma(3, 4) from 0: P(X > z) = Q(3, 4 z) (@stdlib gammainc upper), every order", () => {
    const m = compile({ family: "gamma", shape: 3, rate: 4 });
    const b = momentBounds(m, 0);
    expect(b).not.toBeNull();
    for (const z of [1, 3, 10, 30]) {
      const exact = gammainc(4 * z, 3, true, true);
      const bound = markovTail(b!, z, false);
      if (!(bound >= exact * (1 - REF))) expect.fail(`z = ${z}: bound ${bound} below Q ${exact}`);
    }
    expect(markovTail(b!, 30, false)).toBeLessThan(1e-20);
  });
});

describe("stop-loss bounds on moments from the cumulants (markovExcess)", () => {
  it("exponential(1) from 0: E[(X - r)^+] = e^{-r} (closed form), every r", () => {
    const m = compile({ family: "exponential", rate: 1 });
    const looseness: string[] = [];
    for (const r of [0.5, 2, 5, 10, 20, 30]) {
      const b = momentBounds(m, 0, r);
      expect(b).not.toBeNull();
      const exact = Math.exp(-r);
      const bound = markovExcess(b!, r);
      if (!(bound >= exact * (1 - REF))) expect.fail(`r = ${r}: bound ${bound} below e^-r ${exact}`);
      looseness.push(`r=${r}: ${(bound / exact).toExponential(1)}`);
    }
    // far out the best order (up to 40) keeps the bound within a few decades of the exponential tail
    expect(markovExcess(momentBounds(m, 0, 30)!, 30)).toBeLessThan(1e-9);
    console.log("exponential stop-loss bound/exact:", looseness.join(", "));
  });

  it("gamma(3, 4) from 0: E[(X - z)^+] = (3/4) Q(4, 4z) - z Q(3, 4z) (@stdlib gammainc upper)", () => {
    const m = compile({ family: "gamma", shape: 3, rate: 4 });
    for (const z of [0.5, 1, 2, 3]) {
      const exact = 0.75 * gammainc(4 * z, 4, true, true) - z * gammainc(4 * z, 3, true, true);
      const bound = markovExcess(momentBounds(m, 0, z)!, z);
      if (!(bound >= exact * (1 - 1e-10))) expect.fail(`z = ${z}: bound ${bound} below ${exact}`);
    }
  });
});

describe("gamma kernels' image sums", () => {
  const cases = [
    { at: 0, side: 1 as const, rate: 2, power: 1, b: [0.3, -0.2, 0.05] },
    { at: 0, side: 1 as const, rate: 0.5, power: 0.5, b: [1.2, 0.4] },
    { at: 10, side: -1 as const, rate: 1, power: 2, b: [-0.7] },
  ];
  it.each(cases.map((k) => [JSON.stringify(k), k] as const))("%s: at or above sum_m |b_j| tail_j(r + (m - 1) T) summed term by term", (_n, k) => {
    for (const [x, T] of [
      [1, 20],
      [4, 12],
      [0.5, 40],
    ]) {
      const bound = kernelImages(k, x, T);
      const r = k.side === 1 ? x + T - k.at : k.at - (x - T);
      let exact = 0;
      for (let j = 0; j < k.b.length; j++) {
        for (let m = 1; m < 100000; m++) {
          const t = gammainc(k.rate * (r + (m - 1) * T), k.power + j, true, true);
          exact += Math.abs(k.b[j]) * t;
          if (t < 1e-30) break;
        }
      }
      if (!(bound >= exact * (1 - REF))) expect.fail(`x = ${x}, T = ${T}: bound ${bound} below the sum ${exact}`);
      // the integral's share is at most the tails beyond the first image over T times the mean: within a factor 10 here
      expect(bound).toBeLessThanOrEqual(10 * exact + 1e-300);
    }
  });
  it("a kernel whose images reach its own side is not covered (Infinity)", () => {
    expect(kernelImages({ at: 0, side: 1, rate: 1, power: 1, b: [1] }, 30, 20)).toBe(Infinity);
  });
});
