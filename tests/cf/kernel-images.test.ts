// The endpoint kernels' images (lib/cf/invert/kernel-images.ts): the bound must be at least the images' actual sum, here
// for Erlang kernels, whose tails and densities are closed forms (common practice: Q(s, z) = e^-z sum_{k<s} z^k/k!, the
// density rate (rate y)^(s-1) e^(-rate y)/(s-1)!), summed over 2000 images (the rest below 1e-300). Tolerance: the bound may
// not fall below the sum by more than 1e-12 relative; and it is within a factor 1e3 of it (not vacuous).
import { describe, expect, it } from "vitest";
import { kernelAliasing } from "@/lib/cf/invert/kernel-images";
import type { EndpointKernels } from "@/lib/cf/invert/part";

function erlang(s: number, z: number): { Q: number; f: number } {
  let term = 1;
  let sum = 0;
  for (let k = 0; k < s; k++) {
    if (k > 0) term *= z / k;
    sum += term;
  }
  return { Q: Math.exp(-z) * sum, f: Math.exp(-z) * term };
}

describe("kernel images bound vs Erlang closed forms", () => {
  const cases: { k: EndpointKernels; x: number; T: number }[] = [
    { k: { at: 0, side: 1, rate: 0.5, power: 1, b: [0.3, -0.2, 0.05] }, x: 2, T: 20 },
    { k: { at: 5, side: -1, rate: 0.2, power: 2, b: [0.1, 0.4] }, x: 1, T: 40 },
    { k: { at: -3, side: 1, rate: 1.5, power: 1, b: [1e-3] }, x: 0, T: 8 },
  ];
  it.each(cases.map((c, i) => [i, c] as const))("case %i", (_i, c) => {
    const { k, x, T } = c;
    let cdf = 0;
    let pdf = 0;
    for (let m = 1; m <= 2000; m++) {
      const y = k.side === 1 ? x + m * T : x - m * T;
      const d = k.side * (y - k.at);
      k.b.forEach((b, q) => {
        const e = erlang(k.power + q, k.rate * d);
        cdf += Math.abs(b) * e.Q;
        pdf += Math.abs(b) * k.rate * e.f;
      });
    }
    const r = kernelAliasing([k], x, x, T);
    expect(r.cdf, `cdf images: bound ${r.cdf} vs sum ${cdf}`).toBeGreaterThanOrEqual(cdf * (1 - 1e-12));
    expect(r.pdf, `pdf images: bound ${r.pdf} vs sum ${pdf}`).toBeGreaterThanOrEqual(pdf * (1 - 1e-12));
    expect(r.cdf, `cdf bound not vacuous`).toBeLessThanOrEqual(1e3 * cdf);
    expect(r.pdf, `pdf bound not vacuous`).toBeLessThanOrEqual(1e3 * pdf);
  });
});
