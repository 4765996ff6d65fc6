// The numerical CF families (lognormal, weibull, pareto) against their stated accuracy, the continuous branch of
// powers and compounds, and special inputs.
import { afterAll, describe, expect, it } from "vitest";
import { compile, lgamma, NUMERIC_CF_ABS_ERROR } from "@/lib/cf";
import { close, closeC, record, worst } from "./model-assert";
import { paretoAsymptotic, weibullAsymptotic, weibullSeries } from "@/lib/cf/families/asymptotic";
import { cdiv, cexp, cfAt, cmul, cpow, Neumaier, type Cx } from "./cx-helpers";

const T = [-40, -7.5, -2, -1, -0.3, -1e-3, 0, 1e-6, 1e-3, 0.1, 0.5, 1, 2.5, 7, 15, 60];

describe(`numerical CFs (lognormal, weibull, pareto): absolute error <= ${NUMERIC_CF_ABS_ERROR}`, () => {
  it("weibull with shape 1 is exponential [JKB vol. 1, ch. 21]", () => {
    const got = cfAt({ family: "weibull", shape: 1, scale: 2 }, T);
    T.forEach((t, k) => {
      const r = cdiv([1, 0], [1, -2 * t]);
      const e = closeC(got[k][0], got[k][1], r[0], r[1], { rel: 1e-12 }, `t=${t}`);
      record("cf relative error (weibull shape 1 vs exponential)", e);
    });
  });
  it("weibull and lognormal near 0 agree with the moment series sum (it)^n E X^n / n! [JKB ch. 21, 14]", () => {
    const ln = { mu: 0.2, sigma: 0.5 };
    const wb = { k: 1.7, lambda: 1.3 };
    const ts = [1e-3, -2e-3, 5e-3];
    const series = (t: number, m: (n: number) => number): Cx => {
      let r = 0;
      let i = 0;
      let f = 1;
      for (let n = 0; n <= 10; n++) {
        if (n > 0) f *= n;
        const v = (t ** n * m(n)) / f;
        const s = n % 4;
        if (s === 0) r += v;
        else if (s === 1) i += v;
        else if (s === 2) r -= v;
        else i -= v;
      }
      return [r, i];
    };
    const gl = cfAt({ family: "lognormal", mu: ln.mu, sigma: ln.sigma }, ts);
    const gw = cfAt({ family: "weibull", shape: wb.k, scale: wb.lambda }, ts);
    ts.forEach((t, k) => {
      const a = series(t, (n) => Math.exp(n * ln.mu + (n * n * ln.sigma * ln.sigma) / 2));
      const b = series(t, (n) => wb.lambda ** n * Math.exp(lgamma(1 + n / wb.k)));
      record("numeric CF abs error (lognormal, small t)", closeC(gl[k][0], gl[k][1], a[0], a[1], { abs: NUMERIC_CF_ABS_ERROR }, `lognormal t=${t}`));
      record("numeric CF abs error (weibull, small t)", closeC(gw[k][0], gw[k][1], b[0], b[1], { abs: NUMERIC_CF_ABS_ERROR }, `weibull t=${t}`));
    });
  });
  it("lognormal and weibull vs brute-force quadrature of the published density on the real line", () => {
    // composite Simpson in y = log x with a fine step (independent route, no contour shift)
    const brute = (logDens: (y: number) => number, lo: number, hi: number, t: number): Cx => {
      const n = 400000;
      const h = (hi - lo) / n;
      const r = new Neumaier();
      const i = new Neumaier();
      for (let j = 0; j <= n; j++) {
        const y = lo + j * h;
        const w = (j === 0 || j === n ? 1 : j % 2 === 1 ? 4 : 2) * (h / 3);
        const f = Math.exp(logDens(y));
        r.add(w * f * Math.cos(t * Math.exp(y)));
        i.add(w * f * Math.sin(t * Math.exp(y)));
      }
      return [r.value, i.value];
    };
    // the brute-force route resolves the oscillation of exp(i t e^y) only where t e^y h << 1 over the mass
    for (const [sigma, ts] of [[0.1, [0.7, 3, 12]], [0.6, [0.7, 3, 12]], [1, [0.7, 3]]] as [number, number[]][]) {
      const got = cfAt({ family: "lognormal", mu: 0, sigma }, ts);
      ts.forEach((t, k) => {
        // density of y = log X: N(0, sigma^2) (JKB ch. 14)
        const r = brute((y) => -0.5 * (y / sigma) ** 2 - Math.log(sigma * Math.sqrt(2 * Math.PI)), -12 * sigma, 12 * sigma, t);
        record("numeric CF abs error (lognormal vs brute force)", closeC(got[k][0], got[k][1], r[0], r[1], { abs: NUMERIC_CF_ABS_ERROR }, `sigma=${sigma} t=${t}`));
      });
    }
    for (const shape of [0.6, 2, 4]) {
      const ts = [0.7, 3, 12];
      const got = cfAt({ family: "weibull", shape, scale: 1 }, ts);
      ts.forEach((t, k) => {
        // density of y = log X: shape e^{shape y} exp(-e^{shape y}) (JKB ch. 21 transformed)
        const r = brute((y) => Math.log(shape) + shape * y - Math.exp(shape * y), -60 / shape, Math.log(50) / shape, t);
        record("numeric CF abs error (weibull vs brute force)", closeC(got[k][0], got[k][1], r[0], r[1], { abs: NUMERIC_CF_ABS_ERROR }, `shape=${shape} t=${t}`));
      });
    }
  });
  it("large-t expansions (Watson's lemma) agree with the contour quadrature where both apply", () => {
    const out = new Float64Array(2);
    for (const [k, lam, as] of [[0.7, 2, [2, 3, 3.9]], [1.2, 0.5, [3, 3.9]], [0.3, 1, [2, 3, 3.9]]] as [number, number, number[]][]) {
      const ser = weibullSeries(k);
      for (const a of as) {
        // a < 4: the node itself uses the quadrature
        expect(weibullAsymptotic(ser, a, out), `series converges for k=${k}, a=${a}`).toBe(true);
        const q = cfAt({ family: "weibull", shape: k, scale: lam }, [a / lam])[0];
        record("numeric CF abs error (weibull series vs quadrature)", closeC(out[0], out[1], q[0], q[1], { abs: 1e-14 }, `k=${k} a=${a}`));
      }
    }
    // the pareto series (used for xm t > 40 + 3 alpha) is checked against brute-force quadrature in the next test
    expect(paretoAsymptotic(2.5, 60, out)).toBe(true);
    // weibull shape 1: the series is the geometric series of the exponential CF 1/(1 - i lambda t) (JKB vol. 1, ch. 19)
    expect(weibullAsymptotic(weibullSeries(1), 50, out)).toBe(true);
    const r = cdiv([1, 0], [1, -50]);
    closeC(out[0], out[1], r[0], r[1], { rel: 1e-14 }, "shape 1 at a = 50");
  });
  it("pareto near t = 0 (the rule's prefactor alpha / (xm t) is huge there): the expansion 1 + i t E X - t^2 E X^2 / 2 (JKB ch. 20)", () => {
    // E X = alpha xm / (alpha - 1), E X^2 = alpha xm^2 / (alpha - 2) (JKB vol. 1, ch. 20); the rest of e^{iy} past
    // 1 + iy - y^2/2 is at most min(|y|^3/6, y^2) (Taylor, common practice), whose mean over the Pareto law splits at
    // x = c = 6 / t into t^3/6 E[X^3; X <= c] + t^2 E[X^2; X > c], both in closed form
    const alpha = 2.5;
    const xm = 1;
    const c = compile({ family: "pareto", alpha, xm });
    for (const t of [1e-12, 1e-10, 1e-8, 1e-6]) {
      const m1 = (alpha * xm) / (alpha - 1);
      const m2 = (alpha * xm * xm) / (alpha - 2);
      const cut = 6 / t;
      const rest = ((t ** 3 / 6) * alpha * xm ** alpha * (cut ** (3 - alpha) - xm ** (3 - alpha))) / (3 - alpha) + (t * t * alpha * xm ** alpha * cut ** (2 - alpha)) / (alpha - 2);
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      c.cf(Float64Array.of(t), re, im);
      // the declared bound, the rest of the expansion, and the rounding of exp(log phi) back to phi (a few eps)
      record("numeric CF abs error (pareto near 0)", closeC(re[0], im[0], 1 - (t * t * m2) / 2, t * m1, { abs: (c.cfAbsError ?? 0) + rest + 8 * Number.EPSILON }, `t=${t}`));
    }
  });
  it("pareto vs quadrature of the density (JKB ch. 20) with an integration-by-parts tail", () => {
    const alpha = 2.5;
    const xm = 1;
    for (const t of [0.5, 1, 3, 60]) {
      const X = 200;
      // Simpson's error ~ (h t)^4 / 180: more panels for the large t
      const n = t > 10 ? 8_000_000 : 2_000_000;
      const h = (X - xm) / n;
      const rs = new Neumaier();
      const is = new Neumaier();
      for (let j = 0; j <= n; j++) {
        const x = xm + j * h;
        const w = (j === 0 || j === n ? 1 : j % 2 === 1 ? 4 : 2) * (h / 3);
        const f = alpha * xm ** alpha * x ** (-alpha - 1);
        rs.add(w * f * Math.cos(t * x));
        is.add(w * f * Math.sin(t * x));
      }
      const r = rs.value;
      const i = is.value;
      // int_X^inf e^{itx} x^{-b} dx = -e^{itX} X^{-b}/(it) + (b/(it)) int_X^inf e^{itx} x^{-b-1} dx, iterated
      let b = alpha + 1;
      let coef: Cx = [alpha * xm ** alpha, 0];
      let tail: Cx = [0, 0];
      for (let m = 0; m < 12; m++) {
        const term = cmul(coef, cdiv(cmul([-1, 0], cexp([-b * Math.log(X), t * X])), [0, t]));
        tail = [tail[0] + term[0], tail[1] + term[1]];
        coef = cmul(coef, cdiv([b, 0], [0, t]));
        b += 1;
      }
      const got = cfAt({ family: "pareto", alpha, xm }, [t])[0];
      record("numeric CF abs error (pareto vs quadrature)", closeC(got[0], got[1], r + tail[0], i + tail[1], { abs: NUMERIC_CF_ABS_ERROR }, `t=${t}`));
    }
  });
});

describe("continuous branch of the log-CF", () => {
  const fine = Float64Array.from({ length: 4001 }, (_, k) => -50 + k * 0.025);
  const models: [string, unknown][] = [
    ["repeat 200 of gamma(0.3)", { repeat: 200, of: { family: "gamma", shape: 0.3, rate: 1 } }],
    ["compound Poisson of a shifted normal", { compound: { count: { family: "poisson", lambda: 30 }, each: { family: "normal", mu: 2, sigma: 0.1 } } }],
    ["binomial n=40 p=0.9", { family: "binomial", n: 40, p: 0.9 }],
    ["mixture normal/point", { mix: [{ weight: 0.5, of: { family: "normal", mu: 3, sigma: 0.2 } }, { weight: 0.5, of: { family: "point", at: -1 } }] }],
    ["stable S1 alpha=0.8 beta=1", { family: "stable", alpha: 0.8, beta: 1, scale: 1, loc: 5 }],
  ];
  it.each(models)("%s: imaginary part has no 2 pi jumps and is 0 at t = 0 (common practice)", (_name, model) => {
    const c = compile(model);
    const re = new Float64Array(fine.length);
    const im = new Float64Array(fine.length);
    c.logCf(fine, re, im);
    let maxJump = 0;
    for (let k = 1; k < fine.length; k++) if (Number.isFinite(re[k]) && re[k] > -30) maxJump = Math.max(maxJump, Math.abs(im[k] - im[k - 1]));
    expect(maxJump, `largest step of Im log phi on a 0.025 grid`).toBeLessThan(Math.PI);
    close(im[2000], 0, { abs: 0 }, "Im log phi(0)");
    close(re[2000], 0, { abs: 1e-15 }, "Re log phi(0)");
  });
});

describe("special inputs", () => {
  it("NaN t gives NaN, +-Inf gives 0 for a law with a density and NaN for a lattice law; t = 0 gives exactly 1", () => {
    const t = Float64Array.of(NaN, Infinity, -Infinity, 0);
    const re = new Float64Array(4);
    const im = new Float64Array(4);
    compile({ family: "normal", mu: 1, sigma: 1 }).cf(t, re, im);
    expect(Number.isNaN(re[0]) && Number.isNaN(im[0])).toBe(true);
    expect([re[1], im[1], re[2], im[2], re[3], im[3]]).toEqual([0, 0, 0, 0, 1, 0]);
    compile({ family: "poisson", lambda: 1 }).cf(t, re, im);
    expect(Number.isNaN(re[1]) && Number.isNaN(re[2])).toBe(true);
    expect([re[3], im[3]]).toEqual([1, 0]);
  });
  it("empty t is a no-op; short output buffers are rejected", () => {
    const c = compile({ family: "cauchy", loc: 0, scale: 1 });
    expect(() => c.cf(new Float64Array(0), new Float64Array(0), new Float64Array(0))).not.toThrow();
    expect(() => c.cf(new Float64Array(3), new Float64Array(2), new Float64Array(3))).toThrow(RangeError);
  });
  it("huge grid: 2^20 points of a 3-term sum in one call, spot-checked against the closed form (JKB ch. 13, 17)", () => {
    const n = 2 ** 20;
    const t = Float64Array.from({ length: n }, (_, k) => (k - n / 2) * 1e-3);
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    compile({ sum: [{ family: "normal", mu: 1, sigma: 0.1 }, { family: "gamma", shape: 2, rate: 3 }, { family: "point", at: -1 }] }).cf(t, re, im);
    for (const k of [0, 1234, n / 2, n / 2 + 1, n - 1]) {
      const x = t[k];
      const g = cpow([1, -x / 3], -2);
      const r = cmul(g, cexp([-0.005 * x * x, 0]));
      closeC(re[k], im[k], r[0], r[1], { rel: 1e-12, abs: 1e-300 }, `t=${x}`);
    }
  });
  it("extreme parameters stay finite: tiny and huge scales, huge t", () => {
    const t = Float64Array.of(1e-300, 1e300, -1e300);
    const re = new Float64Array(3);
    const im = new Float64Array(3);
    for (const m of [
      { family: "normal", mu: 0, sigma: 1e-300 },
      { family: "gamma", shape: 1e-8, rate: 1e8 },
      { family: "student_t", nu: 1e6 },
      { family: "stable", alpha: 0.1, beta: 1, scale: 1e-10 },
    ]) {
      compile(m).cf(t, re, im);
      for (let k = 0; k < 3; k++) {
        expect(Number.isFinite(re[k]) && Number.isFinite(im[k]), `${JSON.stringify(m)} t=${t[k]}`).toBe(true);
        expect(Math.hypot(re[k], im[k])).toBeLessThanOrEqual(1 + 1e-15);
      }
      close(re[0], 1, { abs: 1e-12 }, `${JSON.stringify(m)} at t=1e-300`);
    }
  });
});

afterAll(() => {
  console.log("worst errors (families, numerical):", JSON.stringify(worst, null, 1));
});

