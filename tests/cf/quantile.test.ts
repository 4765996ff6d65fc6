// Quantiles (relative error <= 1e-8) and expected shortfall (relative error <= 1e-6) against closed forms and
// reference libraries, including atoms, flat stretches and lattice laws; estimates never below actual errors.
import { describe, expect, it } from "vitest";
import gammainc from "@stdlib/math-base-special-gammainc";
import erfcRef from "@stdlib/math-base-special-erfc";
import gammaFn from "@stdlib/math-base-special-gamma";
import normalQuantile from "@stdlib/stats-base-dists-normal-quantile";
import jStat from "jstat";
import { compile } from "@/lib/cf/compile";
import { CfError } from "@/lib/cf/errors";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { Checker, binomialLattice, build, cpExpSf } from "./invert-helpers";

const J = ((jStat as unknown as { jStat?: unknown }).jStat ?? jStat) as {
  binomial: { pdf(k: number, n: number, p: number): number };
};

const LEVELS = [1e-6, 1e-3, 0.05, 0.3, 0.5, 0.8, 0.99, 1 - 1e-4, 1 - 1e-6];
const phi = (z: number) => Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);

describe("quantiles and expected shortfall of continuous laws", () => {
  it("normal sum: q_p = mu + sigma z_p (@stdlib/stats-base-dists-normal-quantile), ES = mu + sigma phi(z_p)/(1-p) (McNeil, Frey & Embrechts, Quantitative Risk Management, Example 2.14)", () => {
    const mu = -2;
    const s = Math.sqrt(4.25);
    const r = quantiles(compile({ sum: [{ family: "normal", mu: 1, sigma: 2 }, { family: "normal", mu: -3, sigma: 0.5 }] } as Model), LEVELS, {
      expectedShortfall: true,
    });
    const c = new Checker();
    for (let i = 0; i < LEVELS.length; i++) {
      const p = LEVELS[i];
      // @stdlib's quantile is off by ~1e-12 relative at p = 1e-6 (a reference error larger than the folded normal's
      // bound): one Newton step on the cdf 0.5 erfc(-z / sqrt 2), or above the median on the sf 0.5 erfc(z / sqrt 2) against
      // 1 - p (exact), removes it (@stdlib erfc, relative in either tail)
      const q0 = normalQuantile(p, mu, s);
      const z0 = (q0 - mu) / s;
      const q = p <= 0.5 ? q0 - (s * (0.5 * erfcRef(-z0 / Math.SQRT2) - p)) / phi(z0) : q0 + (s * (0.5 * erfcRef(z0 / Math.SQRT2) - (1 - p))) / phi(z0);
      const es = mu + (s * phi((q - mu) / s)) / (1 - p);
      c.rel(`q(${p})`, r.x[i], q, 1e-8);
      c.honest(`q(${p})`, r.x[i], q, r.diagnostics.quantileError[i] + 4e-16 * Math.abs(q));
      c.rel(`ES(${p})`, r.expectedShortfall![i], es, 1e-6);
      c.honest(`ES(${p})`, r.expectedShortfall![i], es, r.diagnostics.expectedShortfallError![i] + 1e-15 * Math.abs(es));
    }
    c.done();
  });

  it("exponential(rate 2): q_p = -log(1-p)/2, ES = q_p + 1/2 (memorylessness; common practice)", () => {
    const r = quantiles(compile({ family: "exponential", rate: 2 } as Model), LEVELS, { expectedShortfall: true });
    const c = new Checker();
    for (let i = 0; i < LEVELS.length; i++) {
      const p = LEVELS[i];
      const q = -Math.log1p(-p) / 2;
      c.rel(`q(${p})`, r.x[i], q, 1e-8);
      c.honest(`q(${p})`, r.x[i], q, r.diagnostics.quantileError[i] + 4e-16 * q);
      c.rel(`ES(${p})`, r.expectedShortfall![i], q + 0.5, 1e-6);
      c.honest(`ES(${p})`, r.expectedShortfall![i], q + 0.5, r.diagnostics.expectedShortfallError![i] + 1e-15);
    }
    c.done();
  });

  it("gamma(2,1.5)+gamma(3.5,1.5) = gamma(5.5,1.5): F(q_p) = p checked with @stdlib/math-base-special-gammainc, error in x = (F(q) - p)/f(q)", () => {
    const r = quantiles(compile({ sum: [{ family: "gamma", shape: 2, rate: 1.5 }, { family: "gamma", shape: 3.5, rate: 1.5 }] } as Model), LEVELS);
    const c = new Checker();
    for (let i = 0; i < LEVELS.length; i++) {
      const p = LEVELS[i];
      const q = r.x[i];
      const f = Math.exp(4.5 * Math.log(q) + 5.5 * Math.log(1.5) - 1.5 * q) / gammaFn(5.5);
      // upper levels use the upper regularized function so that 1 - p keeps its digits
      const dF = p > 0.5 ? 1 - p - gammainc(1.5 * q, 5.5, true, true) : gammainc(1.5 * q, 5.5, true, false) - p;
      const dx = Math.abs(dF / f);
      c.that(`q(${p}) relative error ${(dx / q).toExponential(3)} <= 1e-8`, dx / q <= 1e-8);
      c.that(`q(${p}) error ${dx.toExponential(3)} within estimate ${r.diagnostics.quantileError[i].toExponential(3)}`, dx <= r.diagnostics.quantileError[i] + 1e-15 * q);
    }
    c.done();
  });

  it("compound Poisson(2) of exponential(1): levels inside the atom return 0; others solve the Erlang-mixture cdf (Klugman, Panjer & Willmot, Loss Models)", () => {
    const atom = Math.exp(-2);
    const ps = [1e-3, 0.1, atom, 0.2, 0.5, 0.95, 1 - 1e-6];
    const r = quantiles(compile({ compound: { count: { family: "poisson", lambda: 2 }, each: { family: "exponential", rate: 1 } } } as Model), ps, {
      expectedShortfall: true,
    });
    const c = new Checker();
    c.abs("q(1e-3)", r.x[0], 0, 0);
    c.abs("q(0.1)", r.x[1], 0, 0);
    c.abs("q(e^-2) (level equal to the atom's cdf)", r.x[2], 0, 0);
    for (let i = 3; i < ps.length; i++) {
      const q = r.x[i];
      const S = cpExpSf(2, q);
      // density of the continuous part at q from the series: -dS/dx by a centred difference is not needed; use the
      // relative cdf residual scaled by the level
      const h = 1e-6 * q;
      const f = (cpExpSf(2, q - h) - cpExpSf(2, q + h)) / (2 * h);
      const dx = Math.abs((S - (1 - ps[i])) / f);
      c.that(`q(${ps[i]}) relative error ${(dx / q).toExponential(3)} <= 1e-8`, dx / q <= 1e-8);
    }
    // ES at a level inside the atom: ES = 0 + E[S]/(1-p) = lambda E[Y] / (1 - p) (Acerbi & Tasche 2002, eq. for atoms)
    c.rel("ES(0.1)", r.expectedShortfall![1], 2 / 0.9, 1e-6);
    c.done();
  });

  it("0.3 point(1) + 0.7 normal(0,1): levels in the jump return 1, others invert 0.7 Phi (+0.3); ES by Acerbi & Tasche (2002) with E[(Z-q)^+] = phi(q) - q (1 - Phi(q)) (common practice)", () => {
    const m = compile({ mix: [{ weight: 0.3, of: { family: "point", at: 1 } }, { weight: 0.7, of: { family: "normal", mu: 0, sigma: 1 } }] } as Model);
    const ps = [1e-6, 0.1, 0.5, 0.6, 0.8889, 0.9, 0.99, 1 - 1e-6];
    const r = quantiles(m, ps, { expectedShortfall: true });
    const c = new Checker();
    const lowTop = 0.7 * (1 - 0.5 * erfcRef(1 / Math.SQRT2)); // 0.7 Phi(1)
    for (let i = 0; i < ps.length; i++) {
      const p = ps[i];
      const q = p < lowTop ? normalQuantile(p / 0.7, 0, 1) : p <= lowTop + 0.3 ? 1 : normalQuantile((p - 0.3) / 0.7, 0, 1);
      c.rel(`q(${p})`, r.x[i], q, 1e-8);
      c.honest(`q(${p})`, r.x[i], q, r.diagnostics.quantileError[i] + 4e-16 * Math.abs(q));
      const upperZ = 0.5 * erfcRef(q / Math.SQRT2);
      const es = q + (0.3 * Math.max(1 - q, 0) + 0.7 * (phi(q) - q * upperZ)) / (1 - p);
      c.rel(`ES(${p})`, r.expectedShortfall![i], es, 1e-6);
      c.honest(`ES(${p})`, r.expectedShortfall![i], es, r.diagnostics.expectedShortfallError![i] + 1e-15 * Math.abs(es));
    }
    c.done();
  });

  it("flat stretch: 1/2 IH4 + 1/2 (IH4 + 6) has F = 1/2 on [4, 6], so q(1/2) = 4 (definition q_p = min{x: F(x) >= p})", () => {
    const U = { family: "uniform", a: 0, b: 1 };
    const m = compile({
      mix: [
        { weight: 0.5, of: { repeat: 4, of: U } },
        { weight: 0.5, of: { shift: 6, of: { repeat: 4, of: U } } },
      ],
    } as Model);
    const r = quantiles(m, [0.25, 0.5, 0.75]);
    const c = new Checker();
    // the density vanishes like (4 - x)^3 at the stretch, so F is pinned down only to (48 e)^{1/4} in x; what must
    // hold: the answer is the stretch's left end within the stated error, never a point inside (4, 6]
    c.that("q(0.5) in [3.99, 4 + 1e-9]", r.x[1] <= 4 + 1e-9 && r.x[1] >= 3.99, String(r.x[1]));
    c.honest("q(0.5)", r.x[1], 4, r.diagnostics.quantileError[1]);
    c.that("note on the flat stretch", r.diagnostics.notes.some((n) => n.includes("flat stretch")));
    // symmetric halves: q(0.25) = 2 and q(0.75) = 8 (Irwin-Hall median n/2)
    c.rel("q(0.25)", r.x[0], 2, 1e-8);
    c.rel("q(0.75)", r.x[2], 8, 1e-8);
    c.done();
  });

  it("cauchy(1, 2): q_p = loc + scale tan(pi (p - 1/2)) (common practice), ES does not exist", () => {
    const ps = [0.05, 0.25, 0.5, 0.9];
    const r = quantiles(compile({ family: "cauchy", loc: 1, scale: 2 } as Model), ps, { expectedShortfall: true });
    const c = new Checker();
    for (let i = 0; i < ps.length; i++) {
      const q = 1 + 2 * Math.tan(Math.PI * (ps[i] - 0.5));
      c.abs(`q(${ps[i]})`, r.x[i], q, 1e-7 * Math.max(1, Math.abs(q)));
      c.honest(`q(${ps[i]})`, r.x[i], q, r.diagnostics.quantileError[i]);
      c.that(`ES(${ps[i]}) is NaN`, Number.isNaN(r.expectedShortfall![i]));
    }
    c.that("note says why", r.diagnostics.notes.some((n) => n.includes("does not exist")));
    c.done();
  });

  it("student_t(3): q from the closed-form cdf F = 1/2 + (atan(x/sqrt3) + sqrt3 x/(3+x^2))/pi (JKB vol. 2, ch. 28), ES = (nu + q^2) f(q) / ((nu-1)(1-p)) (integrating x f(x): d/dx[(nu+x^2) f] = -(nu-1) x f)", () => {
    const F = (x: number) => 0.5 + (Math.atan(x / Math.sqrt(3)) + (Math.sqrt(3) * x) / (3 + x * x)) / Math.PI;
    const f = (x: number) => (6 * Math.sqrt(3)) / (Math.PI * (3 + x * x) ** 2);
    const ps = [0.001, 0.3, 0.9, 0.99, 0.999, 1 - 1e-6];
    const r = quantiles(compile({ family: "student_t", nu: 3 } as Model), ps, { expectedShortfall: true });
    const c = new Checker();
    for (let i = 0; i < ps.length; i++) {
      let lo = -1e4;
      let hi = 1e4;
      // upper levels bisect on the survival function S(x) = (atan(w) - w/(1+w^2))/pi, w = sqrt3/x (x > 0), which keeps
      // its relative accuracy where 1 - F would cancel; for w < 1/2 the two terms cancel too (S near 1e-6 at x = 103
      // lost 1e-11 of the quantile), so there by their series sum_k (-1)^(k+1) 2k/(2k+1) w^(2k+1) (atan's Taylor series,
      // A&S 4.4.42, less w/(1+w^2) = sum_k (-1)^k w^(2k+1)), 40 terms, the rest below w^81
      const S = (x: number) => {
        const w = Math.sqrt(3) / x;
        if (w >= 0.5) return (Math.atan(w) - w / (1 + w * w)) / Math.PI;
        let s = 0;
        for (let k = 40; k >= 1; k--) s = (k % 2 ? 1 : -1) * ((2 * k) / (2 * k + 1)) * w ** (2 * k + 1) + s;
        return s / Math.PI;
      };
      for (let k = 0; k < 300; k++) {
        const mid = 0.5 * (lo + hi);
        if (ps[i] > 0.5 && mid > 0 ? S(mid) > 1 - ps[i] : F(mid) < ps[i]) lo = mid;
        else hi = mid;
      }
      const q = 0.5 * (lo + hi);
      const es = ((3 + q * q) * f(q)) / (2 * (1 - ps[i]));
      c.rel(`q(${ps[i]})`, r.x[i], q, 1e-8);
      c.honest(`q(${ps[i]})`, r.x[i], q, r.diagnostics.quantileError[i] + 1e-15 * Math.abs(q));
      c.rel(`ES(${ps[i]})`, r.expectedShortfall![i], es, 1e-6);
      c.honest(`ES(${ps[i]})`, r.expectedShortfall![i], es, r.diagnostics.expectedShortfallError![i] + 1e-15 * Math.abs(es));
    }
    c.done();
  });

  it("pareto(2.5, xm 1): q_p = xm (1-p)^{-1/alpha}, ES = alpha q_p/(alpha-1) (closed forms: S(x) = (xm/x)^alpha inverted, and ES = (1/(1-p)) int_q^inf x alpha xm^alpha x^{-alpha-1} dx integrated; JKB vol. 1, ch. 20 for the law)", () => {
    const ps = [0.01, 0.5, 0.99];
    const r = quantiles(compile({ family: "pareto", alpha: 2.5, xm: 1 } as Model), ps, { expectedShortfall: true });
    const c = new Checker();
    for (let i = 0; i < ps.length; i++) {
      const q = Math.pow(1 - ps[i], -1 / 2.5);
      const es = (q * 2.5) / 1.5;
      c.rel(`q(${ps[i]})`, r.x[i], q, 1e-8);
      c.honest(`q(${ps[i]})`, r.x[i], q, r.diagnostics.quantileError[i] + 1e-15 * q);
      c.rel(`ES(${ps[i]})`, r.expectedShortfall![i], es, 1e-6);
      c.honest(`ES(${ps[i]})`, r.expectedShortfall![i], es, r.diagnostics.expectedShortfallError![i] + 1e-15 * es);
    }
    c.done();
    // the Pareto CF is itself a quadrature per point (the slow part): allow for a loaded machine
  }, 120_000);
});

describe("quantiles of lattice and atomic laws", () => {
  it("binomial(30, 0.35): smallest k with F(k) >= p; ES by Acerbi & Tasche (2002) from the pmf (jstat binomial pdf)", () => {
    const n = 30;
    const pr = 0.35;
    const pmf = Array.from({ length: n + 1 }, (_, k) => J.binomial.pdf(k, n, pr));
    const ps = [0.001, 0.1, 0.5, 0.9, 0.999, 1 - 1e-6];
    for (const withTable of [true, false]) {
      const r = quantiles(binomialLattice(n, pr, withTable), ps, { expectedShortfall: true });
      const c = new Checker();
      for (let i = 0; i < ps.length; i++) {
        const p = ps[i];
        let k = 0;
        let F = pmf[0];
        while (F < p) F += pmf[++k];
        c.abs(`q(${p}) table=${withTable}`, r.x[i], k, 0);
        let ex = 0;
        for (let j = k + 1; j <= n; j++) ex += pmf[j] * (j - k);
        c.rel(`ES(${p}) table=${withTable}`, r.expectedShortfall![i], k + ex / (1 - p), 1e-6);
      }
      c.done();
    }
  });

  it("binomial(30, 0.35), table and FFT: the quantile's bound is 0 where the cdf bound separates the level from every jump, else it spans the points it cannot tell apart (jstat binomial pdf)", () => {
    const n = 30;
    const pr = 0.35;
    const pmf = Array.from({ length: n + 1 }, (_, k) => J.binomial.pdf(k, n, pr));
    const cdf: number[] = [];
    pmf.reduce((s, v, k) => (cdf[k] = s + v), 0);
    // levels on the reference's own jumps (F(7), F(11)) and between them; the reference quantile at a jump level is
    // ambiguous within the reference's rounding, so the check there is only that the answer is within its bound of
    // one of the two candidates
    const onJump = [cdf[7], cdf[11]];
    const between = [0.5 * (cdf[9] + cdf[10]), 0.37, 0.91];
    const ps = [...onJump, ...between];
    for (const withTable of [true, false]) {
      const r = quantiles(binomialLattice(n, pr, withTable), ps);
      const c = new Checker();
      const e = r.diagnostics.cdfError;
      ps.forEach((p, i) => {
        let k = 0;
        while (cdf[k] < p) k++;
        const err = r.diagnostics.quantileError[i];
        const separated = (k === 0 || cdf[k - 1] < p - 2 * e) && cdf[k] > p + 2 * e;
        if (separated) {
          c.abs(`q(${p}) table=${withTable}`, r.x[i], k, 0);
          c.that(`q(${p}) table=${withTable}: bound 0 when the level is separated`, err === 0, String(err));
        } else {
          // k or k + 1 (p within the reference's rounding of F(k)); the bound reaches the other one
          c.that(`q(${p}) table=${withTable}: answer ${r.x[i]} within its bound ${err} of ${k} and ${k + 1}`, Math.abs(r.x[i] - k) <= err || Math.abs(r.x[i] - (k + 1)) <= err);
          c.that(`q(${p}) table=${withTable}: a jump level carries a bound of at least one step`, err >= 1, String(err));
        }
      });
      c.done();
    }
  });

  it("a level equal to an atom's cdf returns that atom; p = 0 and p = 1 return the support ends", () => {
    const atoms = [
      { x: -1, p: 0.25 },
      { x: 2, p: 0.5 },
      { x: 5, p: 0.25 },
    ];
    const m = build({ logCf: () => [0, 0], kind: { type: "discrete", atoms }, location: 2, scale: 1, support: [-1, 5] });
    const r = quantiles(m, [0, 0.25, 0.2500001, 0.75, 0.9, 1]);
    expect(Array.from(r.x)).toEqual([-1, -1, 2, 2, 5, 5]);
  });

  it("levels outside [0, 1] or NaN are rejected with a pointer", () => {
    const m = compile({ family: "normal", mu: 0, sigma: 1 } as Model);
    for (const bad of [-0.1, 1.5, NaN]) {
      try {
        quantiles(m, [0.5, bad]);
        throw new Error("no error");
      } catch (e) {
        expect(e).toBeInstanceOf(CfError);
        expect((e as CfError).pointer).toBe("/p/1");
      }
    }
  });

  it("an empty level list returns empty arrays", () => {
    const r = quantiles(compile({ family: "normal", mu: 0, sigma: 1 } as Model), []);
    expect(r.x.length).toBe(0);
  });
});
