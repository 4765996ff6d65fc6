// Compounds of exponential claims: the density grid's truncation bound is derived (no "sampled" note). The remainder's
// bound there falls only like 1 / t (the kernels' weights' rounding, lib/cf/compound.ts gammaRemainderJump): its part past
// the last probe is bounded through its total variation (the Gibbs bound, lib/cf/invert/damped-psi.ts jumpTail).
// Reference: the Erlang mixture f(x) = sum_n p_n r^n x^(n-1) e^(-r x) / (n - 1)! and F(x) = p_0 + sum_n p_n P(n, r x)
// (Loss Models, compound models with exponential severity; common practice), the count's pmf by its recursion
// (Poisson: p_n = p_{n-1} lambda / n; negative binomial(r, p): p_n = p_{n-1} (r + n - 1)(1 - p) / n; JKB discrete vol.),
// P by @stdlib gammainc. Every density and cdf value must lie within its stated bound.
import gammainc from "@stdlib/math-base-special-gammainc";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";

type Count = { family: "poisson"; lambda: number } | { family: "negative_binomial"; r: number; p: number };

function countPmf(c: Count, n: number): Float64Array {
  const p = new Float64Array(n);
  if (c.family === "poisson") {
    p[0] = Math.exp(-c.lambda);
    for (let k = 1; k < n; k++) p[k] = (p[k - 1] * c.lambda) / k;
  } else {
    p[0] = Math.pow(c.p, c.r);
    for (let k = 1; k < n; k++) p[k] = (p[k - 1] * (c.r + k - 1) * (1 - c.p)) / k;
  }
  return p;
}

function erlangMixture(c: Count, rate: number, scale: number) {
  const pn = countPmf(c, 600);
  return (x: number) => {
    const y = x / scale;
    if (y <= 0) return { pdf: 0, cdf: y < 0 ? 0 : pn[0] };
    let pdf = 0;
    let cdf = pn[0];
    let logFact = 0;
    for (let n = 1; n < pn.length; n++) {
      if (pn[n] === 0) continue;
      if (n > 1) logFact += Math.log(n - 1);
      pdf += pn[n] * Math.exp(n * Math.log(rate) + (n - 1) * Math.log(y) - rate * y - logFact);
      cdf += pn[n] * gammainc(rate * y, n);
    }
    return { pdf: pdf / scale, cdf };
  };
}

describe("compound of exponential claims: density grid with a derived bound", () => {
  it.each([
    [{ family: "poisson", lambda: 21.561 } as Count, 0.331, 1, 0],
    [{ family: "negative_binomial", r: 1.733, p: 0.519 } as Count, 1.029, 1, 0],
    [{ family: "poisson", lambda: 2 } as Count, 1, 1000, 0],
    // shifted: the remainder taken relative to the lower end is the compound's own (lib/cf/kernel-carry.ts)
    [{ family: "poisson", lambda: 2 } as Count, 1.974, 1, -0.852],
  ])("%j x exponential(%s), scaled by %s, shifted by %s", (count, rate, scale, shift = 0) => {
    const compound = { compound: { count, each: { family: "exponential", rate } } };
    const scaled = scale === 1 ? compound : { scale, of: compound };
    const model = (shift === 0 ? scaled : { shift, of: scaled }) as Model;
    const c = compile(model);
    const base = erlangMixture(count, rate, scale);
    const ref = (x: number) => base(x - shift);
    const hi = c.location + 8 * c.scale;
    const d = density(c, { grid: { from: shift, to: hi, count: 1000 } });
    expect(d.diagnostics.method).toBe("fft-damped");
    const notes = d.diagnostics.notes.join(" ");
    expect(notes, "derived truncation bound").toContain("derived bounds on the transform's size");
    expect(notes).not.toContain("sampled at 8 frequencies");
    expect(d.diagnostics.tolerance?.met).toBe(true);
    expect(d.diagnostics.error.pdf).toBeLessThan(1e-9);
    let worst = 0;
    d.x.forEach((x, i) => {
      const want = ref(x);
      const ep = d.diagnostics.pointError?.pdf[i] ?? d.diagnostics.error.pdf;
      const ec = d.diagnostics.pointError?.cdf[i] ?? d.diagnostics.error.cdf;
      // the references' own rounding: a few ulps of the sums of positive terms
      const pdfErr = Math.abs(d.pdf![i] - want.pdf) - 1e-15 * (want.pdf + 1 / scale);
      const cdfErr = Math.abs(d.cdf[i] - want.cdf) - 1e-15;
      if (!(pdfErr <= ep)) expect.fail(`pdf at ${x}: ${d.pdf![i]} vs ${want.pdf}, bound ${ep}`);
      if (!(cdfErr <= ec)) expect.fail(`cdf at ${x}: ${d.cdf[i]} vs ${want.cdf}, bound ${ec}`);
      worst = Math.max(worst, pdfErr / ep);
    });
    expect(worst).toBeLessThanOrEqual(1);
  });
});
