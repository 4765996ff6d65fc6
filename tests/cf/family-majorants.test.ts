import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

// |phi(t)| and |E X e^{itX}| on a geometric grid (3 per octave, t in [0.05, 2000]) from
// tests/fixtures/cf-abs/generate.py (cf-abs.json, cf-abs-2.json, cf-abs-3.json, cf-abs-4.json): mpmath at 30 digits (1.3 for the first two files, Debian's 1.2.1 for the others: each file's source says) (quadosc/quad, or closed forms), cross-checked against a
// second method (closed forms, Kummer's function, the integral on the imaginary axis, or scipy.integrate.quad; the
// difference is in each row). The majorants are derived in lib/cf/family-majorants.ts, lib/cf/singular-majorants.ts,
// lib/cf/layer-majorant.ts (truncated normal) and lib/cf/lognormal-majorant.ts; each must be at least the reference at every grid point
// s >= t, and its stated tail power must hold on the grid. The reference is taken less 1e-25 (its absolute precision).
interface Row {
  t: number;
  abs: number;
  absDiff?: number;
  absMoment?: number;
  absMomentDiff?: number;
}
interface Case {
  family: string;
  params: Record<string, number>;
  rows: Row[];
}
const load = (f: string) => JSON.parse(readFileSync(join(__dirname, "../fixtures/cf-abs", f), "utf8")) as { source: string; cases: Case[] };
// cf-abs-2.json: the families with first-order majorants (generate.py with CASESET=2); cf-abs-3.json: densities with a
// power singularity at an end (beta shapes below 1, generalized pareto xi <= -1, burr and log-logistic gamma < 1; CASESET=3);
// cf-abs-4.json: the truncated normal (CASESET=4, method 2 its closed form by the complex erf)
const sets = [load("cf-abs.json"), load("cf-abs-2.json"), load("cf-abs-3.json"), load("cf-abs-4.json")];
const fixture = { source: sets[0].source, cases: sets.flatMap((s) => s.cases) };
const SLACK = 1e-25;

describe(`family majorants of |phi| and |phi'| (reference: ${fixture.source})`, () => {
  for (const cs of fixture.cases) {
    const label = `${cs.family}(${Object.values(cs.params).join(", ")})`;
    it(`${label}: M(t) >= |phi(s)| for grid s >= t, and the tail power holds`, () => {
      const m = compile({ family: cs.family, ...cs.params } as unknown as Model);
      const maj = m.logAbsMajorant!;
      const c = new Checker();
      c.that("has a majorant", !!maj);
      const t = Float64Array.from(cs.rows.map((r) => r.t));
      const lm = new Float64Array(t.length);
      maj(t, lm);
      let sup = 0;
      for (let i = t.length - 1; i >= 0; i--) {
        sup = Math.max(sup, cs.rows[i].abs - SLACK);
        c.that(`M(${t[i]})`, Math.exp(lm[i]) >= sup, `M ${Math.exp(lm[i])} below sup |phi| ${sup}`);
        const tail = maj.tail!(t[i]);
        for (let j = i; j < t.length; j++) {
          const b = Math.exp(tail.log) * Math.pow(t[i] / t[j], tail.q);
          c.that(`tail from ${t[i]} at ${t[j]}`, b >= cs.rows[j].abs - SLACK, `bound ${b} (q ${tail.q}) below |phi| ${cs.rows[j].abs}`);
        }
      }
      c.done();
    });
    if (cs.rows.some((r) => r.absMoment !== undefined)) {
      it(`${label}: the slope S(t) >= |phi'(s)| = |E X e^{isX}| for grid s >= t`, () => {
        const m = compile({ family: cs.family, ...cs.params } as unknown as Model);
        const sl = m.logAbsMajorant!.slope!;
        const c = new Checker();
        c.that("slope about 0", sl.center === 0, String(sl.center));
        const t = Float64Array.from(cs.rows.map((r) => r.t));
        const s = new Float64Array(t.length);
        sl.at(t, s);
        let sup = 0;
        for (let i = t.length - 1; i >= 0; i--) {
          sup = Math.max(sup, cs.rows[i].absMoment! - SLACK);
          c.that(`S(${t[i]})`, s[i] >= sup, `S ${s[i]} below sup |phi'| ${sup}`);
        }
        c.done();
      });
    }
  }
});

// Sums, scales, shifts and mixtures (lib/cf/majorant.ts): against the same fixture rows (lognormal(0, 1) and
// weibull(2, 1), method 1 values) and the uniform's closed form |sin(u)| / u, u = w t / 2, with its centred derivative
// (w / 2) |u cos u - sin u| / u^2 (common practice). The grid is geometric with 3 points per octave, so t / 2 is three rows down.
describe("majorants of sums, scales, shifts and mixtures (reference: cf-abs.json rows and the uniform's closed form)", () => {
  const rows = (family: string, key: string) => fixture.cases.find((c) => c.family === family && Object.values(c.params).join(",") === key)!.rows;
  const ln = rows("lognormal", "0,1");
  const wb = rows("weibull", "2,1");
  const t = Float64Array.from(ln.map((r) => r.t));
  const w = 2;
  const sinc = (s: number) => Math.abs(Math.sin(0.5 * w * s) / (0.5 * w * s));
  const dsinc = (s: number) => {
    const u = 0.5 * w * s;
    return 0.5 * w * Math.abs((u * Math.cos(u) - Math.sin(u)) / (u * u));
  };
  const values = (m: Model) => {
    const maj = compile(m).logAbsMajorant!;
    const out = new Float64Array(t.length);
    maj(t, out);
    return { maj, M: Array.from(out, Math.exp) };
  };
  const atLeastFromRight = (c: Checker, label: string, bound: number[], ref: (i: number) => number) => {
    let sup = 0;
    for (let i = bound.length - 1; i >= 0; i--) {
      sup = Math.max(sup, ref(i) - SLACK);
      c.that(`${label} at row ${i}`, bound[i] >= sup, `bound ${bound[i]} below ${sup}`);
    }
  };

  it("lognormal(0, 1) + uniform(0, 2) moved by 3: M >= |phi_L| |phi_U|; slope >= |phi_L'| |phi_U| + |phi_L| |(phi_U e^{-i t c_U})'|", () => {
    const { maj, M } = values({ sum: [{ family: "lognormal", mu: 0, sigma: 1 }, { shift: 3, of: { family: "uniform", a: 0, b: w } }] } as unknown as Model);
    const c = new Checker();
    atLeastFromRight(c, "M", M, (i) => ln[i].abs * sinc(t[i]));
    c.that("slope centre 0 + 3 + 1", maj.slope?.center === 4, String(maj.slope?.center));
    const s = new Float64Array(t.length);
    maj.slope!.at(t, s);
    atLeastFromRight(c, "slope", Array.from(s), (i) => ln[i].absMoment! * sinc(t[i]) + ln[i].abs * dsinc(t[i]));
    c.done();
  });

  it("0.5 lognormal(0, 1): M(t_{i+3}) >= |phi_L(t_i)| (t_{i+3} / 2 = t_i)", () => {
    const { M } = values({ scale: 0.5, of: { family: "lognormal", mu: 0, sigma: 1 } } as unknown as Model);
    const c = new Checker();
    c.that("grid ratio", Math.abs(t[3] / t[0] - 2) < 1e-12);
    atLeastFromRight(c, "M", M.slice(3), (i) => ln[i].abs);
    c.done();
  });

  it("0.3 lognormal(0, 1) + 0.7 weibull(2, 1) mixture: M >= 0.3 |phi_L| + 0.7 |phi_W|", () => {
    const { M } = values({ mix: [{ weight: 0.3, of: { family: "lognormal", mu: 0, sigma: 1 } }, { weight: 0.7, of: { family: "weibull", shape: 2, scale: 1 } }] } as unknown as Model);
    const c = new Checker();
    atLeastFromRight(c, "M", M, (i) => 0.3 * ln[i].abs + 0.7 * wb[i].abs);
    c.done();
  });
});

/** int_lo^hi (x - p) f(x) e^{is(x - p)} dx by composite Simpson on n panels (common practice), as [re, im] */
function simpsonSlope(lo: number, hi: number, p: number, f: (x: number) => number, s: number, n = 200000): [number, number] {
  let re = 0;
  let im = 0;
  const h = (hi - lo) / n;
  for (let k = 0; k <= n; k++) {
    const x = k === n ? hi : lo + k * h;
    const v = ((k === 0 || k === n ? 1 : k % 2 ? 4 : 2) * (x - p) * f(x) * h) / 3;
    re += v * Math.cos(s * (x - p));
    im += v * Math.sin(s * (x - p));
  }
  return [re, im];
}

/** int_lo^hi f(x) dx by composite Simpson on n panels (common practice) */
function simpson(lo: number, hi: number, f: (x: number) => number, n = 200000): number {
  const h = (hi - lo) / n;
  let sum = 0;
  for (let k = 0; k <= n; k++) sum += ((k === 0 || k === n ? 1 : k % 2 ? 4 : 2) * f(k === n ? hi : lo + k * h) * h) / 3;
  return sum;
}

/**
 * A slope majorant S(t) against the reference |phi'| from `deriv` on t = 0.05 .. 300 (ratio sqrt 2): S(t) at least the
 * supremum of the reference over s >= t there. Returns S and that supremum at the top frequency, and that frequency t.
 */
function checkSlope(ch: Checker, sl: { at(t: Float64Array, out: Float64Array): void }, deriv: (s: number) => number): { top: number; sup: number; t: number } {
  const ts: number[] = [];
  for (let t = 0.05; t <= 300; t *= Math.SQRT2) ts.push(t);
  const t = Float64Array.from(ts);
  const S = new Float64Array(t.length);
  sl.at(t, S);
  let sup = 0;
  let top = -1;
  for (let i = t.length - 1; i >= 0; i--) {
    sup = Math.max(sup, deriv(t[i]));
    if (top < 0) top = sup;
    ch.that(`S(${t[i]})`, S[i] >= sup * (1 + 1e-9), `S ${S[i]} below sup |phi'| ${sup}`);
  }
  return { top: S[t.length - 1], sup: top, t: t[t.length - 1] };
}

// Triangular(a, c, b): the slope about the midpoint p, S(t) >= |d/dt (phi(t) e^{-itp})| = |int (x - p) f(x) e^{it(x - p)} dx|
// for s >= t, against that integral by composite Simpson on each linear piece (common practice; 2e5 panels a piece, so the
// rule's error (h s)^4 stays below 1e-12 relative for s <= 300). Fails without the slope (none derived before).
describe("triangular slope majorant (reference: the defining integral by composite Simpson)", () => {
  const cases = [[0, 1, 2], [0, 0.3, 5], [-1, -1, 2], [1, 4, 4]];
  for (const [a, c, b] of cases) {
    it(`triangular(${a}, ${c}, ${b})`, () => {
      const w = b - a;
      const p = 0.5 * (a + b);
      // the density on each linear piece, taken to the piece's own ends (f jumps at an end where the mode is)
      const pieces: [number, number, (x: number) => number][] = [
        [a, c, (x) => (2 * (x - a)) / (w * (c - a))],
        [c, b, (x) => (2 * (b - x)) / (w * (b - c))],
      ];
      const deriv = (s: number) => {
        let re = 0;
        let im = 0;
        for (const [lo, hi, fp] of pieces) {
          if (hi <= lo) continue;
          const [r, i] = simpsonSlope(lo, hi, p, fp, s);
          re += r;
          im += i;
        }
        return Math.hypot(re, im);
      };
      const m = compile({ family: "triangular", a, c, b } as unknown as Model);
      const sl = m.logAbsMajorant!.slope!;
      const ch = new Checker();
      ch.that("slope about the midpoint", sl.center === p, String(sl.center));
      const { top, sup, t } = checkSlope(ch, sl, deriv);
      // falls like t^-2 inside (t^-1 with the mode at an end): within 50x of the reference's supremum at the top
      ch.that("tight at the top", top < 50 * sup + (c > a && c < b ? 0 : 1 / t), `S ${top} sup ${sup}`);
      ch.done();
    });
  }
});

// Beta and pert with shapes >= 1: the slope about the midpoint against int (x - p) f(x) e^{is(x - p)} dx by composite Simpson
// (common practice), densities with closed-form normalisers: beta(2, 3) 12 y (1 - y)^2, beta(1, 2.5) 2.5 (1 - y)^1.5, pert
// (0, 1, 4; lambda 4) = beta(2, 4) on [0, 4], 20 y (1 - y)^3 / 4 (JKB vol. 2 ch. 25; pert's shapes 1 + lambda (m - a) / (b - a)
// and 1 + lambda (b - m) / (b - a), common practice).
describe("beta and pert slope majorants (reference: the defining integral by composite Simpson)", () => {
  const cases: [Model, number, number, (y: number) => number][] = [
    [{ family: "beta", alpha: 2, beta: 3 } as unknown as Model, 0, 1, (y) => 12 * y * (1 - y) ** 2],
    [{ family: "beta", alpha: 1, beta: 2.5, a: -1, b: 2 } as unknown as Model, -1, 2, (y) => 2.5 * (1 - y) ** 1.5],
    [{ family: "pert", a: 0, m: 1, b: 4 } as unknown as Model, 0, 4, (y) => 20 * y * (1 - y) ** 3],
  ];
  for (const [model, a, b, fy] of cases) {
    it(JSON.stringify(model), () => {
      const w = b - a;
      const p = 0.5 * (a + b);
      const deriv = (s: number) => Math.hypot(...simpsonSlope(a, b, p, (x) => fy((x - a) / w) / w, s));
      const sl = compile(model).logAbsMajorant!.slope!;
      const ch = new Checker();
      ch.that("slope about the midpoint", sl.center === p, String(sl.center));
      checkSlope(ch, sl, deriv);
      ch.done();
    });
  }
});

// Truncated normal: the slope about mu against int (x - mu) f(x) e^{is(x - mu)} dx, f = phi(z) / (sigma Z), with Z and the
// integral both by composite Simpson (common practice; an infinite end cut at 12 sigma, where the density is below 1e-31).
describe("truncated normal slope majorant (reference: the defining integral by composite Simpson)", () => {
  const cases = [
    { mu: 0, sigma: 1, lower: -1, upper: 2 },
    { mu: 1, sigma: 0.5, lower: 0, upper: 1.2 },
    { mu: 0, sigma: 2, lower: 1, upper: 3 },
    { mu: 0, sigma: 1, lower: 0.5 },
  ];
  for (const cs of cases) {
    it(JSON.stringify(cs), () => {
      const a = cs.lower;
      const b = cs.upper ?? cs.mu + 12 * cs.sigma;
      const dens = (x: number) => Math.exp(-0.5 * ((x - cs.mu) / cs.sigma) ** 2) / (cs.sigma * Math.sqrt(2 * Math.PI));
      const Z = simpson(a, b, dens);
      const deriv = (s: number) => Math.hypot(...simpsonSlope(a, b, cs.mu, (x) => dens(x) / Z, s));
      const sl = compile({ family: "truncated_normal", ...cs } as unknown as Model).logAbsMajorant!.slope!;
      const ch = new Checker();
      ch.that("slope about mu", sl.center === cs.mu, String(sl.center));
      checkSlope(ch, sl, deriv);
      ch.done();
    });
  }
});
