// Mixtures answered from their components (lib/cf/invert/mixture.ts): values, quantiles and expected shortfall
// against closed forms evaluated with @stdlib (gammainc, erfc); every stated bound at or above the actual error.
import { describe, it } from "vitest";
import gammainc from "@stdlib/math-base-special-gammainc";
import erfc from "@stdlib/math-base-special-erfc";
import gammaFn from "@stdlib/math-base-special-gamma";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

/** a component's cdf, sf, pdf and stop-loss E[(X - q)^+] from closed forms */
interface Ref {
  F(x: number): number;
  S(x: number): number;
  f(x: number): number;
  excess(q: number): number;
}

const Phi = (z: number) => 0.5 * erfc(-z / Math.SQRT2);

/** lognormal(mu, s): F = Phi((ln x - mu)/s); E[(X - q)^+] = e^{mu + s^2/2} Phi(d1) - q Phi(d2) (Klugman, Panjer & Willmot, Loss Models, app. A) */
function lognormal(mu: number, s: number): Ref {
  const z = (x: number) => (Math.log(x) - mu) / s;
  return {
    F: (x) => (x <= 0 ? 0 : Phi(z(x))),
    S: (x) => (x <= 0 ? 1 : Phi(-z(x))),
    f: (x) => (x <= 0 ? 0 : Math.exp(-0.5 * z(x) ** 2) / (x * s * Math.sqrt(2 * Math.PI))),
    excess: (q) => (q <= 0 ? Math.exp(mu + (s * s) / 2) - q : Math.exp(mu + (s * s) / 2) * Phi((mu + s * s - Math.log(q)) / s) - q * Phi(-z(q))),
  };
}

/** weibull(k, lam): S = e^{-(x/lam)^k}; int_q^inf S = lam Gamma(1 + 1/k) Q(1/k, (q/lam)^k) (Loss Models, app. A) */
function weibull(k: number, lam: number): Ref {
  return {
    F: (x) => (x <= 0 ? 0 : -Math.expm1(-((x / lam) ** k))),
    S: (x) => (x <= 0 ? 1 : Math.exp(-((x / lam) ** k))),
    f: (x) => (x <= 0 ? 0 : (k / lam) * (x / lam) ** (k - 1) * Math.exp(-((x / lam) ** k))),
    excess: (q) => (q <= 0 ? lam * gammaFn(1 + 1 / k) - q : lam * gammaFn(1 + 1 / k) * gammainc((q / lam) ** k, 1 / k, true, true)),
  };
}

/** gamma(a, r): F = P(a, r x); E[(X - q)^+] = (a/r) Q(a + 1, r q) - q Q(a, r q) (Loss Models, app. A) */
function gammaRef(a: number, r: number): Ref {
  return {
    F: (x) => (x <= 0 ? 0 : gammainc(r * x, a, true, false)),
    S: (x) => (x <= 0 ? 1 : gammainc(r * x, a, true, true)),
    f: (x) => (x <= 0 ? 0 : Math.exp(a * Math.log(r) + (a - 1) * Math.log(x) - r * x) / gammaFn(a)),
    excess: (q) => (q <= 0 ? a / r - q : (a / r) * gammainc(r * q, a + 1, true, true) - q * gammainc(r * q, a, true, true)),
  };
}

/**
 * Compound Poisson(lambda) of exponential(1) as the Erlang mixture sum_n e^{-lambda} lambda^n/n! Gamma(n, 1)
 * (Loss Models, sec. 9.3); the atom e^{-lambda} at 0 is part of F (F(0) = e^{-lambda}), f is the continuous part.
 */
function cpExp(lambda: number): Ref {
  const terms = 80;
  const pn = (n: number) => Math.exp(-lambda + n * Math.log(lambda) - Math.log(gammaFn(n + 1)));
  const over = (g: (n: number) => number) => {
    let s = 0;
    for (let n = 1; n <= terms; n++) s += pn(n) * g(n);
    return s;
  };
  return {
    F: (x) => (x < 0 ? 0 : Math.exp(-lambda) + over((n) => gammainc(x, n, true, false))),
    S: (x) => (x < 0 ? 1 : over((n) => gammainc(x, n, true, true))),
    f: (x) => (x <= 0 ? 0 : over((n) => Math.exp((n - 1) * Math.log(x) - x) / gammaFn(n))),
    excess: (q) => (q <= 0 ? lambda - q : over((n) => n * gammainc(q, n + 1, true, true) - q * gammainc(q, n, true, true))),
  };
}

function mixRef(parts: { w: number; r: Ref }[]): Ref {
  const sum = (g: (r: Ref) => number) => parts.reduce((s, p) => s + p.w * g(p.r), 0);
  return { F: (x) => sum((r) => r.F(x)), S: (x) => sum((r) => r.S(x)), f: (x) => sum((r) => r.f(x)), excess: (q) => sum((r) => r.excess(q)) };
}

/** q_p = min{x : F(x) >= p} of the reference by bisection on its cdf (sf above the median) to a few ulps */
function refQuantile(r: Ref, p: number, lo: number, hi: number): number {
  const upper = p > 0.5;
  for (let k = 0; k < 400 && hi - lo > 2 * Number.EPSILON * Math.abs(hi); k++) {
    const mid = 0.5 * (lo + hi);
    if (upper ? r.S(mid) <= 1 - p : r.F(mid) >= p) hi = mid;
    else lo = mid;
  }
  return hi;
}

const LEVELS = [0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999, 0.9999];

function checkLaw(c: Checker, label: string, model: Model, ref: Ref, xs: number[], lo: number, hi: number, atomLevels: number[] = []) {
  const m = compile(model);
  const d = density(m, { x: xs });
  c.that(`${label}: density method`, d.diagnostics.method === "mixture", d.diagnostics.method);
  const e = d.diagnostics.error;
  // the bound is honest and useful (the default tolerance is 1e-10)
  c.that(`${label}: cdf bound <= 1e-9`, e.cdf <= 1e-9, String(e.cdf));
  xs.forEach((x, i) => {
    c.honest(`${label} F(${x})`, d.cdf[i], ref.F(x), e.cdf);
    c.honest(`${label} S(${x})`, d.sf[i], ref.S(x), e.cdf);
    c.honest(`${label} f(${x})`, d.pdf![i], ref.f(x), e.pdf);
  });
  const r = quantiles(m, LEVELS, { expectedShortfall: true });
  c.that(`${label}: quantile method`, r.diagnostics.method === "mixture", r.diagnostics.method);
  LEVELS.forEach((p, i) => {
    if (atomLevels.includes(p)) {
      c.that(`${label} q(${p}) is the atom at 0`, r.x[i] === 0 && r.diagnostics.quantileError[i] === 0, `${r.x[i]} +- ${r.diagnostics.quantileError[i]}`);
      return;
    }
    const q = refQuantile(ref, p, lo, hi);
    c.honest(`${label} q(${p})`, r.x[i], q, r.diagnostics.quantileError[i]);
    c.rel(`${label} q(${p})`, r.x[i], q, 1e-7);
    // ES_p = q + E[(X - q)^+] / (1 - p) (Acerbi & Tasche 2002)
    const es = q + ref.excess(q) / (1 - p);
    c.honest(`${label} ES(${p})`, r.expectedShortfall![i], es, r.diagnostics.expectedShortfallError![i]);
    c.rel(`${label} ES(${p})`, r.expectedShortfall![i], es, 1e-6);
    c.that(`${label} ES(${p}) bound within 1e-6 relative`, r.diagnostics.expectedShortfallError![i] <= 1e-6 * Math.abs(es), String(r.diagnostics.expectedShortfallError![i]));
  });
}

describe("mixtures answered from their components", () => {
  it("lognormal + weibull + gamma: pdf, cdf, sf, quantiles and ES against the closed forms (@stdlib gammainc, erfc)", () => {
    const c = new Checker();
    const model = {
      mix: [
        { weight: 0.3, of: { family: "lognormal", mu: 0.2, sigma: 0.6 } },
        { weight: 0.45, of: { family: "weibull", shape: 1.3, scale: 2 } },
        { weight: 0.25, of: { family: "gamma", shape: 2.5, rate: 0.8 } },
      ],
    } as Model;
    const ref = mixRef([
      { w: 0.3, r: lognormal(0.2, 0.6) },
      { w: 0.45, r: weibull(1.3, 2) },
      { w: 0.25, r: gammaRef(2.5, 0.8) },
    ]);
    checkLaw(c, "LN+W+G", model, ref, [0.01, 0.3, 1, 2.5, 6, 15, 30], 0, 200);
    c.done();
  });

  it("compound Poisson(2)-exponential(1) + gamma(3, 0.5): the weighted atom at 0 and the Erlang mixture (Loss Models, sec. 9.3)", () => {
    const c = new Checker();
    const model = {
      mix: [
        { weight: 0.6, of: { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "exponential", rate: 1 } } } },
        { weight: 0.4, of: { family: "gamma", shape: 3, rate: 0.5 } },
      ],
    } as Model;
    const ref = mixRef([
      { w: 0.6, r: cpExp(2) },
      { w: 0.4, r: gammaRef(3, 0.5) },
    ]);
    // the atom: 0.6 e^{-2} = 0.0812 at 0, so levels 0.001 .. 0.01 fall inside its jump
    const m = compile(model);
    const d = density(m, { x: [1] });
    c.honest("atom at 0", d.atoms.find((a) => a.x === 0)?.p ?? NaN, 0.6 * Math.exp(-2), 1e-15);
    checkLaw(c, "CP-exp+G", model, ref, [0.05, 0.5, 1, 3, 8, 20], 0, 400, [0.001, 0.01]);
    c.done();
  });

  it("compound Poisson(3)- and Poisson(12)-exponential(1): the upper levels lie past the first component's range, which grows once to their brackets (Erlang mixtures, Loss Models, sec. 9.3)", () => {
    const c = new Checker();
    const cp = (lambda: number) => ({ compound: { count: { family: "poisson", lambda }, each: { family: "exponential", rate: 1 } } });
    const model = { mix: [{ weight: 0.5, of: cp(3) }, { weight: 0.5, of: cp(12) }] } as Model;
    const ref = mixRef([
      { w: 0.5, r: cpExp(3) },
      { w: 0.5, r: cpExp(12) },
    ]);
    // the atom 0.5 (e^{-3} + e^{-12}) = 0.0249 at 0 holds levels 0.001 and 0.01
    checkLaw(c, "CP3+CP12", model, ref, [0.5, 3, 10, 25, 45], 0, 400, [0.001, 0.01]);
    // far levels: their first brackets lie past the first component's range, where its values are wide until it grows;
    // at 1 - 1e-9 the cdf bound (~1e-10) over the density (~1e-9) leaves a few 1e-6 relative
    const far = [1 - 1e-7, 1 - 1e-9];
    const r = quantiles(compile(model), far, { expectedShortfall: false });
    far.forEach((p, i) => {
      const q = refQuantile(ref, p, 0, 400);
      c.honest(`CP3+CP12 q(${p})`, r.x[i], q, r.diagnostics.quantileError[i]);
      c.rel(`CP3+CP12 q(${p})`, r.x[i], q, 1e-5);
      c.that(`CP3+CP12 q(${p}) bound within 1e-5 relative`, r.diagnostics.quantileError[i] <= 1e-5 * q, String(r.diagnostics.quantileError[i]));
    });
    c.done();
  });

  it("a scaled and shifted mixture is the mixture of the scaled and shifted components (common practice)", () => {
    const c = new Checker();
    const inner = {
      mix: [
        { weight: 0.5, of: { family: "lognormal", mu: 0, sigma: 0.8 } },
        { weight: 0.5, of: { family: "gamma", shape: 4, rate: 2 } },
      ],
    };
    const base = mixRef([
      { w: 0.5, r: lognormal(0, 0.8) },
      { w: 0.5, r: gammaRef(4, 2) },
    ]);
    // Y = 1.5 + 2 X: F_Y(y) = F_X((y - 1.5)/2), f_Y(y) = f_X((y - 1.5)/2)/2, E[(Y - q)^+] = 2 E[(X - (q - 1.5)/2)^+]
    const u = (y: number) => (y - 1.5) / 2;
    const ref: Ref = { F: (y) => base.F(u(y)), S: (y) => base.S(u(y)), f: (y) => base.f(u(y)) / 2, excess: (q) => 2 * base.excess(u(q)) };
    checkLaw(c, "1.5 + 2 mix", { shift: 1.5, of: { scale: 2, of: inner } } as unknown as Model, ref, [1.6, 2, 3.5, 6, 12], 1.5, 200);
    c.done();
  });
});
