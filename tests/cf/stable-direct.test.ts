// Stable laws evaluated directly (integral representation and tail series) against the mpmath references of
// tests/fixtures/stable/generate.py: relative accuracy 1e-6 wherever the probability is above 1e-300, bounds never
// below the actual error, no negative probabilities, cdf monotone, and the public entry points use this route.
import { afterAll, describe, expect, it } from "vitest";
import { stableReferencePoints, type StableRow as Row } from "./stable-fixture";
import { compile, density, quantiles } from "@/lib/cf";
import { record, worst } from "./model-assert";

// the chosen cases, and a sample of the points scripts/bench-direct.ts draws (every 100th and 100th + 1 of each law)
const fixture = { points: stableReferencePoints() };
const SOURCE =
  "tests/fixtures/stable/stable.json and bench-sample.json (mpmath: Nolan 1997 integral, Levy closed form, or the alpha = 1 contour integral; " +
  "checked by Fourier inversion, tail series, Nolan, or for alpha = 1 Nolan's integrals by parts in log V)";
/** relative tolerance wherever the reference is above 1e-300 (and 1e-9 absolute on cdf/sf, whichever is larger) */
const REL = 1e-6;

function fail(what: string, r: Row, value: number, expected: number, tol: number, bound?: number): never {
  return expect.fail(
    `${what} of ${JSON.stringify(r.model)} at x = ${r.x}: value ${value}, expected ${expected}, difference ${Math.abs(value - expected)}, ` +
      `tolerance ${tol}${bound !== undefined ? `, reported bound ${bound}` : ""} (source: ${SOURCE})`,
  );
}

describe("stable, direct route vs mpmath references", () => {
  it("the fixture's two methods agree where the reference is numerical (cross-check written by the generator)", () => {
    for (const r of fixture.points) {
      // an exact closed-form reference (the Levy law) only reports how far the numerical check came
      if (r.source === "levy-closed-form") continue;
      if (r.rel_diff !== null && !(r.rel_diff <= 1e-10)) expect.fail(`${JSON.stringify(r.model)} x=${r.x}: ${r.check} vs nolan differ by ${r.rel_diff}`);
    }
    expect(fixture.points.length).toBeGreaterThan(100);
  });

  it.each(fixture.points.map((r) => [`${r.model.alpha}/${r.model.beta}/${r.model.param} x=${r.x}`, r] as const))("%s", (_n, r) => {
    const m = compile(r.model);
    expect(m.direct?.method).toBe("stable-integral");
    const d = density(m, { x: [r.x] });
    expect(d.diagnostics.method).toBe("stable-integral");
    const e = d.diagnostics.error;
    const checks: [string, number, number, number][] = [
      ["pdf", d.pdf![0], Number(r.pdf), e.pdf!],
      ["cdf", d.cdf[0], Number(r.cdf), e.cdf],
      ["sf", d.sf[0], Number(r.sf), e.cdf],
    ];
    for (const [what, v, ref, bound] of checks) {
      if (!(v >= 0)) fail(`${what} (negative)`, r, v, ref, 0);
      const diff = Math.abs(v - ref);
      if (ref > 1e-300) {
        const tol = what === "pdf" ? REL * ref : Math.max(REL * ref, Math.min(1e-9, REL));
        if (!(diff <= tol)) fail(what, r, v, ref, tol, bound);
        record(`stable ${what} relative error`, diff / ref);
        if (ref < 1e-12) record("stable tail (< 1e-12) relative error", diff / ref);
      } else if (!(v <= 1e-300 + bound)) fail(what, r, v, ref, 1e-300, bound);
      // the reported bound is never below the actual error (the reference carries 20 digits)
      if (!(diff <= bound + 1e-18 * ref)) fail(`${what} error bound`, r, v, ref, bound, bound);
      if (ref > 0) record(`stable ${what} bound / actual error`, Math.min(bound / Math.max(diff, 1e-300 + 1e-17 * ref), 1e300));
    }
  });
});

describe("stable, invariants on wide grids", () => {
  const laws = [
    { alpha: 0.3, beta: 0.9 },
    { alpha: 0.8, beta: 0 },
    { alpha: 0.8, beta: 1 },
    { alpha: 1, beta: 0.5 },
    { alpha: 1, beta: -1 },
    { alpha: 1.3, beta: -0.4 },
    { alpha: 1.7, beta: -1 },
    { alpha: 2 - 1e-3, beta: 0.3 },
    // next to alpha = 1 and alpha = 1 totally skewed (the panels' boxes of lib/cf/direct/stable-box.ts)
    { alpha: 0.999, beta: 0.5 },
    { alpha: 1.001, beta: -0.9 },
    { alpha: 1, beta: 1 },
  ];
  it.each(laws.flatMap((l) => (["S0", "S1"] as const).map((param) => [`alpha ${l.alpha} beta ${l.beta} ${param}`, { ...l, param }] as const)))(
    "%s: 0 <= cdf <= 1, non-decreasing within the bound, cdf + sf = 1 within the bound, pdf >= 0 (common practice)",
    (_n, l) => {
      const m = compile({ family: "stable", alpha: l.alpha, beta: l.beta, param: l.param });
      const xs: number[] = [];
      for (let e = -8; e <= 8; e += 0.25) xs.push(-(10 ** e), 10 ** e);
      for (let k = -40; k <= 40; k++) xs.push(k / 8);
      xs.sort((a, b) => a - b);
      const d = density(m, { x: xs });
      const b = d.diagnostics.error.cdf;
      for (let i = 0; i < xs.length; i++) {
        const what = `${JSON.stringify(l)} x=${xs[i]}`;
        if (!(d.cdf[i] >= 0 && d.cdf[i] <= 1 && d.sf[i] >= 0 && d.sf[i] <= 1 && d.pdf![i] >= 0)) expect.fail(`${what}: cdf ${d.cdf[i]} sf ${d.sf[i]} pdf ${d.pdf![i]}`);
        if (!(Math.abs(d.cdf[i] + d.sf[i] - 1) <= 2 * b + 4e-16)) expect.fail(`${what}: cdf + sf - 1 = ${d.cdf[i] + d.sf[i] - 1}, bound ${2 * b}`);
        if (i > 0 && !(d.cdf[i] >= d.cdf[i - 1] - 2 * b)) expect.fail(`${what}: cdf ${d.cdf[i]} below ${d.cdf[i - 1]} at x=${xs[i - 1]}, bound ${b}`);
        if (i > 0 && !(d.sf[i] <= d.sf[i - 1] + 2 * b)) expect.fail(`${what}: sf ${d.sf[i]} above ${d.sf[i - 1]} at x=${xs[i - 1]}, bound ${b}`);
      }
    },
  );
});

describe("stable through the quantile entry point", () => {
  const levels = [1e-4, 0.001, 0.01, 0.25, 0.5, 0.75, 0.99, 0.999, 0.9999];
  it.each([
    { alpha: 0.8, beta: 0.3, scale: 1, loc: 0, param: "S1" as const },
    { alpha: 1, beta: 0.5, scale: 2, loc: 1, param: "S0" as const },
    { alpha: 1.5, beta: -0.7, scale: 0.5, loc: -2, param: "S1" as const },
    { alpha: 1.9, beta: 0.9, scale: 1, loc: 0, param: "S0" as const },
  ])("$alpha/$beta/$param: F(q_p) = p within the quantile bound (cdf from the same references' method, 1e-7 relative in q)", (law) => {
    const m = compile({ family: "stable", ...law });
    const q = quantiles(m, levels);
    expect(q.diagnostics.method).toBe("stable-integral");
    for (let i = 0; i < levels.length; i++) {
      const err = q.diagnostics.quantileError[i];
      // rigorous bracket: F(q - err) <= p <= F(q + err) with the cdf's own bounds
      const d = density(m, { x: [q.x[i] - err, q.x[i] + err] });
      const e = d.diagnostics.error.cdf;
      const p = levels[i];
      const below = p > 0.5 ? 1 - d.sf[0] : d.cdf[0];
      const above = p > 0.5 ? 1 - d.sf[1] : d.cdf[1];
      if (!(below - e <= p && above + e >= p)) expect.fail(`${JSON.stringify(law)} p=${p}: q=${q.x[i]} err=${err}: F(q-err)=${below}, F(q+err)=${above}, cdf bound ${e}`);
      if (!(err <= 1e-7 * Math.max(1, Math.abs(q.x[i])))) expect.fail(`${JSON.stringify(law)} p=${p}: quantile bound ${err} above 1e-7 relative at q=${q.x[i]}`);
      record("stable quantile bound (relative)", err / Math.max(1, Math.abs(q.x[i])));
    }
  });
});

afterAll(() => {
  console.log("worst errors (stable direct):", JSON.stringify(worst));
});
