// Compounds with lognormal/pareto/weibull severities are discretised (mean-preserving) onto a lattice and tabulated by
// FFT; the stated cdf error bound must cover the actual error against outside references.
import { describe, expect, it } from "vitest";
import jStat from "jstat";
import { density } from "@/lib/cf/invert/density";
import { compile, type Model } from "@/lib/cf";
import { close, record, worst } from "./model-assert";

const poissonWeibull1 = (lambda: number, scale: number) =>
  ({ compound: { count: { family: "poisson", lambda }, each: { family: "weibull", shape: 1, scale } } }) as Model;

/**
 * Compound Poisson(lambda) with exponential(1/scale) claims: F(x) = e^-lambda + sum_n P(N=n) P(Gamma(n, scale) <= x)
 * (Klugman, Panjer & Willmot, Loss Models, compound Poisson with exponential severity; Erlang mixture), with the gamma
 * cdf from jstat (jStat.gamma.cdf); weibull with shape 1 is the exponential law (JKB vol. 1, ch. 21).
 */
function erlangMixtureCdf(lambda: number, scale: number, x: number): number {
  let s = Math.exp(-lambda);
  let pn = Math.exp(-lambda);
  for (let n = 1; n < 200; n++) {
    pn *= lambda / n;
    s += pn * jStat.gamma.cdf(x, n, scale);
  }
  return s;
}

describe("discretised compound: classification, notes, mean", () => {
  it("NB(3, 0.2) x pareto(2.5, 1) is a lattice law whose notes state the discretisation and its error", () => {
    const c = compile({ compound: { count: { family: "negative_binomial", r: 3, p: 0.2 }, each: { family: "pareto", alpha: 2.5, xm: 1 } } }, { discretise: {} });
    expect(c.kind.type).toBe("lattice");
    const t = c.latticeTable!(2 ** 20)!;
    expect(t.cdfError).toBeGreaterThan(0);
    expect(c.notes.join(" ")).toMatch(/pareto severity discretised mean-preserving/);
    expect(c.notes.join(" ")).toMatch(/discretisation error: \|cdf - cdf of the continuous law\| <= /);
    // the atom at 0 is P(N = 0) = p^r exactly (the severity is >= xm > 0)
    close(t.p[0], 0.2 ** 3, { rel: 1e-12 }, "P(S = 0) = p^r");
    // mean preserved: sum k h p_k = E N E X = 12 * 5/3 = 20 (Loss Models, compound mean), up to the truncated tail
    let m = 0;
    for (let k = 0; k < t.p.length; k++) m += k * t.step * t.p[k];
    close(m, 20, { rel: 2e-3 }, "mean of the discretised compound (table cut at its end)");
  });
  it("discretise: false keeps the continuous route (mixed law with the atom P(N=0))", () => {
    const c = compile({ compound: { count: { family: "poisson", lambda: 2 }, each: { family: "lognormal", mu: 0, sigma: 1 } } }, { discretise: false });
    expect(c.kind.type).toBe("mixed");
  });
  it("by default lognormal, pareto and weibull compounds stay continuous (mixed: atom P(N=0)); discretised on request", () => {
    for (const each of [{ family: "lognormal", mu: 0, sigma: 2 }, { family: "pareto", alpha: 3, xm: 1 }, { family: "weibull", shape: 0.7, scale: 1 }] as Model[]) {
      const m = { compound: { count: { family: "poisson", lambda: 5 }, each } } as Model;
      const c = compile(m, { discretise: false });
      expect(c.kind.type).toBe("mixed");
      // P(S = 0) = P(N = 0) = e^-5 (the severities have no atom at 0; Loss Models, compound distributions)
      const k = c.kind as { atoms: { x: number; p: number }[] };
      expect(k.atoms).toEqual([{ x: 0, p: Math.exp(-5) }]);
      expect(compile(m, { discretise: {} }).kind.type).toBe("lattice");
      expect(compile(m).kind.type).toBe("mixed");
    }
  });
  it("exact cumulants are kept (the approximation only concerns the table)", () => {
    const c = compile({ compound: { count: { family: "poisson", lambda: 20 }, each: { family: "lognormal", mu: 1, sigma: 0.8 } } }, { discretise: {} });
    // compound Poisson cumulants kappa_n = lambda E X^n, E X^n = exp(n mu + n^2 sigma^2 / 2) (JKB vol. 1, ch. 14)
    const k = c.cumulants(2);
    close(k[0]!, 20 * Math.exp(1 + 0.32), { rel: 1e-12 }, "kappa_1");
    close(k[1]!, 20 * Math.exp(2 + 4 * 0.32), { rel: 1e-12 }, "kappa_2");
  });
});

describe("discretised compound vs independent references for heavy severities", () => {
  /**
   * NB(r=3, p=0.2) x pareto(2.5, xm=1) below 3 xm: at most two claims fit, so F(x) = P(N=0) + P(N=1) F_X(x) +
   * P(N=2) P(X1 + X2 <= x), F_X(x) = 1 - (xm/x)^alpha (JKB vol. 1, ch. 20), P(N=n) = C(n+r-1, n) p^r (1-p)^n
   * (JKK ch. 5), and P(X1 + X2 <= x) = int_xm^{x-xm} F_X(x - y) f_X(y) dy by brute-force composite Gauss-Legendre
   * quadrature (jStat-free; 4000 panels of 3 nodes, far below the tolerance).
   */
  const alpha = 2.5;
  const FX = (x: number) => (x < 1 ? 0 : 1 - x ** -alpha);
  const fX = (x: number) => (x < 1 ? 0 : alpha * x ** (-alpha - 1));
  const conv2 = (x: number) => {
    if (x <= 2) return 0;
    const a = 1;
    const b = x - 1;
    const P = 4000;
    const d = (b - a) / P;
    const gx = [0.5 - Math.sqrt(0.15), 0.5, 0.5 + Math.sqrt(0.15)];
    const gw = [5 / 18, 8 / 18, 5 / 18];
    let s = 0;
    for (let q = 0; q < P; q++) for (let g = 0; g < 3; g++) {
      const y = a + (q + gx[g]) * d;
      s += gw[g] * d * FX(x - y) * fX(y);
    }
    return s;
  };
  const p0 = 0.2 ** 3;
  const p1 = 3 * 0.2 ** 3 * 0.8;
  const p2 = 6 * 0.2 ** 3 * 0.8 ** 2;
  const F = (x: number) => p0 + p1 * FX(x) + p2 * conv2(x);
  it("NB(3, 0.2) x pareto(2.5, 1): |F_h - F| <= stated bound at points in [0, 3)", () => {
    const c = compile({ compound: { count: { family: "negative_binomial", r: 3, p: 0.2 }, each: { family: "pareto", alpha, xm: 1 } } }, { discretise: {} });
    const t = c.latticeTable!(2 ** 20)!;
    const bound = t.cdfError!;
    let worstErr = 0;
    for (const x of [0.5, 1, 1.2, 1.5, 1.99, 2.3, 2.5, 2.75, 2.99]) {
      const k = Math.floor(x / t.step + 1e-9);
      let cdf = 0;
      for (let i = 0; i <= k; i++) cdf += t.p[i];
      const ref = F(x);
      const err = Math.abs(cdf - ref);
      worstErr = Math.max(worstErr, err);
      if (!(err <= bound)) expect.fail(`x=${x}: lattice cdf ${cdf}, reference ${ref}, difference ${err}, stated bound ${bound}`);
    }
    record("discretised compound cdf error (NB x pareto, x < 3)", worstErr);
    record("stated bound (NB x pareto)", bound);
  });
  it("Poisson(20) x lognormal(1, 0.8): agrees with the continuous-CF inversion within both stated errors", async () => {
    const { density } = await import("@/lib/cf");
    const m = { compound: { count: { family: "poisson", lambda: 20 }, each: { family: "lognormal", mu: 1, sigma: 0.8 } } } as Model;
    const xs = [30, 60, 90, 150];
    const cont = density(compile(m, { discretise: false }), { x: xs, method: "gil-pelaez", cdfOnly: true, tolerance: 1e-7 });
    const c = compile(m, { discretise: {} });
    expect(c.kind.type).toBe("lattice");
    const t = c.latticeTable!(2 ** 20)!;
    let worstErr = 0;
    xs.forEach((x, i) => {
      const k = Math.floor(x / t.step + 1e-9);
      let cdf = 0;
      for (let j = 0; j <= k; j++) cdf += t.p[j];
      const err = Math.abs(cdf - cont.cdf[i]);
      const bound = t.cdfError! + cont.diagnostics.error.cdf;
      worstErr = Math.max(worstErr, err);
      if (!(err <= bound)) expect.fail(`x=${x}: lattice cdf ${cdf}, continuous inversion ${cont.cdf[i]}, difference ${err}, stated bound ${bound}`);
    });
    record("discretised compound cdf vs continuous inversion (Poisson(20) x lognormal)", worstErr);
    record("stated bound (Poisson(20) x lognormal)", t.cdfError!);
  });
});

describe("discretised compound vs the Erlang-mixture closed form (weibull shape 1 = exponential severity)", () => {
  const cases: [number, number][] = [
    [2, 1],
    [10, 0.5],
  ];
  it.each(cases)("Poisson(%d) x weibull(1, %d): |F_h(kh) - F(kh)| <= stated bound", (lambda, scale) => {
    const c = compile(poissonWeibull1(lambda, scale), { discretise: {} });
    const t = c.latticeTable!(2 ** 20)!;
    const bound = t.cdfError!;
    let cdf = 0;
    let worstErr = 0;
    const mean = lambda * scale;
    for (let k = 0; k < t.p.length; k++) {
      cdf += t.p[k];
      const x = k * t.step;
      if (x > mean * 6) break;
      if (k % 37 !== 0) continue;
      // between lattice points the lattice cdf is flat: compare at x and just below the next point
      for (const y of [x, x + 0.999 * t.step]) {
        const err = Math.abs(cdf - erlangMixtureCdf(lambda, scale, y));
        worstErr = Math.max(worstErr, err);
        if (!(err <= bound)) expect.fail(`x=${y}: lattice cdf ${cdf}, Erlang mixture ${erlangMixtureCdf(lambda, scale, y)}, difference ${err}, stated bound ${bound}`);
      }
    }
    record(`discretised compound cdf error (Poisson(${lambda}) x exp)`, worstErr);
    record(`stated bound (Poisson(${lambda}) x exp)`, bound);
    // the bound is of the size of the jump of the step cdf, not wildly loose
    expect(bound).toBeLessThan(40 * worstErr + 1e-12);
  });
  it("density() on a discretised compound reports an error estimate no smaller than the actual cdf error", () => {
    const lambda = 2;
    const scale = 1;
    const c = compile(poissonWeibull1(lambda, scale), { discretise: {} });
    const t = c.latticeTable!(2 ** 20)!;
    const xs = Array.from({ length: 40 }, (_, i) => i * 17 * t.step);
    const r = density(c, { x: xs });
    let actual = 0;
    r.x.forEach((x, i) => (actual = Math.max(actual, Math.abs(r.cdf[i] - erlangMixtureCdf(lambda, scale, x)))));
    expect(actual).toBeGreaterThan(0);
    expect(r.diagnostics.error.cdf, `actual ${actual}, estimate ${r.diagnostics.error.cdf}`).toBeGreaterThanOrEqual(actual);
  });
  it("reflected (scale -2): F(y) = 1 - F_S(-y/2) within the stated bound, and 0 below the support", () => {
    // -2 S has no mass below -2 x_max and P(-2 S <= y) = P(S >= -y/2) = 1 - F_S(-y/2) where S is continuous (common
    // practice); F_S from the Erlang mixture. The reversed table carries its cut tail mass in its cdf error.
    const lambda = 2;
    const scale = 1;
    const c = compile({ scale: -2, of: poissonWeibull1(lambda, scale) }, { discretise: {} });
    expect(c.kind.type).toBe("lattice");
    const ys = Array.from({ length: 30 }, (_, i) => -0.37 - 0.61 * i);
    const r = density(c, { x: ys });
    expect(r.diagnostics.method).toBe("discretised");
    const bound = r.diagnostics.error.cdf;
    r.x.forEach((y, i) => {
      const ref = 1 - erlangMixtureCdf(lambda, scale, -y / 2);
      expect(Math.abs(r.cdf[i] - ref), `y=${y}: cdf ${r.cdf[i]}, reference ${ref}, bound ${bound}`).toBeLessThanOrEqual(bound);
    });
    // a discretised layered compound reflected: nothing below -a (2 limits), however the table is built
    const layered = { scale: -1.706, of: { compound: { count: { lattice: { origin: 0, step: 1, p: [0.197, 0.533, 0.27] } }, each: { layer: { deductible: 1.842, limit: 9.997 }, of: { family: "weibull", shape: 0.816, scale: 1.839 } } } } };
    const low = -1.706 * 2 * 9.997;
    const rl = density(compile(layered), { x: [low - 0.5, low - 0.0036] });
    rl.cdf.forEach((F, i) => expect(F, `cdf at ${rl.x[i]} below the support's end ${low}, bound ${rl.diagnostics.error.cdf}`).toBeLessThanOrEqual(rl.diagnostics.error.cdf));
  });
  it("print worst errors", () => {
    console.log("worst errors (discretised compounds):", JSON.stringify(worst, null, 1));
    expect(Object.keys(worst).length).toBeGreaterThan(0);
  });
});

describe("discretised compound: special inputs", () => {
  it("pareto with alpha <= 1 (no mean): runs, and the stated error covers the wrapped tail by the Jensen bound", () => {
    const c = compile({ compound: { count: { family: "poisson", lambda: 3 }, each: { family: "pareto", alpha: 0.8, xm: 2 } } }, { discretise: {} });
    expect(c.kind.type).toBe("lattice");
    expect(c.momentIndex).toBe(0.8);
    const t = c.latticeTable!(2 ** 20)!;
    // E N^2 = lambda + lambda^2 = 12; the wrapped-mass bound 12^0.9 (xm / (M h))^0.8 is part of cdfError
    const M = 2 * t.p.length;
    const jensen = 12 ** 0.9 * (2 / (M * t.step)) ** 0.8;
    expect(t.cdfError!).toBeGreaterThanOrEqual(2 * jensen);
    // the mass cut off at the end is reported, P(S > x) >= P(N >= 1) P(X > x) = (1 - e^-3)(xm/x)^0.8 (one claim alone)
    const x = t.p.length * t.step;
    expect(t.tailMass).toBeGreaterThanOrEqual(0.5 * (1 - Math.exp(-3)) * (2 / x) ** 0.8);
  });
  it("an explicit span is used as given; the lattice then holds round numbers", () => {
    const c = compile({ compound: { count: { family: "poisson", lambda: 2 }, each: { family: "weibull", shape: 1.5, scale: 3 } } }, { discretise: { span: 0.25 } });
    expect(c.kind).toEqual({ type: "lattice", origin: 0, step: 0.25 });
    // P(S = 0) = P(N = 0) = e^-2 plus the severity's mean-preserving share at 0, E[(1 - X/h)+] > 0
    const t = c.latticeTable!(2 ** 20)!;
    expect(t.p[0]).toBeGreaterThan(Math.exp(-2));
    expect(t.p[0]).toBeLessThan(Math.exp(-2) + 2 * Math.exp(-2) * (1 - Math.exp(-((0.25 / 3) ** 1.5))));
  });
  it("a tolerance option: a strict one buys a finer span (up to 2^18 points), a loose one no finer than it needs", () => {
    const m = { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "pareto", alpha: 3, xm: 1 } } } as Model;
    const dflt = compile(m, { discretise: {} }).kind as { step: number };
    const strict = compile(m, { discretise: { tolerance: 1e-6 } }).kind as { step: number };
    const loose = compile(m, { discretise: { tolerance: 1e-1 } }).kind as { step: number };
    expect(strict.step).toBeLessThan(dflt.step);
    // loose: h >= tol * scale / (2 E N) = 0.025, still at most scale/16
    expect(loose.step).toBeGreaterThanOrEqual(0.025);
    expect(loose.step).toBeLessThanOrEqual(1 / 16);
  });
});
