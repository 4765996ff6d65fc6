// The trade's severity, bounded and (a, b, 1) count families against outside references: CF, cdf/sf and raw moments
// from mpmath and scipy (tests/fixtures/reference-families/generate.py), pmfs from their definitions in exact
// fractions or mpmath (tests/fixtures/reference-counts/generate.py). Each case names its reference function.
import { afterAll, describe, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, moments, validateModel, isCfError } from "@/lib/cf";
import { buildNode } from "@/lib/cf/compile";
import { closeC, close, record, worst } from "./model-assert";

interface FamCase {
  name: string;
  model: Record<string, unknown>;
  cf: { t: number; phi: [number, number] }[];
  cfSource: string;
  cdf?: { x: number; cdf: number; sf: number }[];
  cdfSource?: string;
  raw?: number[];
  rawSource?: string;
}
const fam = JSON.parse(readFileSync("tests/fixtures/reference-families/families.json", "utf8")) as { cases: FamCase[] };
// truncated normal cases from their own generator (tests/fixtures/reference-truncnorm/generate.py)
fam.cases.push(...(JSON.parse(readFileSync("tests/fixtures/reference-truncnorm/truncnorm.json", "utf8")) as { cases: FamCase[] }).cases);
const cnt = JSON.parse(readFileSync("tests/fixtures/reference-counts/counts.json", "utf8")) as {
  cases: { name: string; model: Record<string, unknown>; pmf: number[]; source: string; exact: boolean }[];
};

afterAll(() => console.log("worst errors vs references:", JSON.stringify(worst)));

describe("new continuous families against mpmath / scipy", () => {
  for (const c of fam.cases) {
    it(`${c.name}: CF within 1e-12 absolute (${c.cfSource})`, () => {
      const m = compile(c.model);
      // both signs of t: phi(-t) = conj phi(t)
      // every reference point, small t included (Burr/log-logistic at t < 0.1 from the generator's route on the claim size)
      const pts = c.cf;
      const ts = [...pts.map((x) => -x.t).reverse(), 0, ...pts.map((x) => x.t)];
      const t = Float64Array.from(ts);
      const re = new Float64Array(ts.length);
      const im = new Float64Array(ts.length);
      m.cf(t, re, im);
      ts.forEach((tv, k) => {
        const ref = tv === 0 ? [1, 0] : c.cf.find((x) => x.t === Math.abs(tv))!.phi;
        const ri = tv < 0 ? -ref[1] : ref[1];
        const e = closeC(re[k], im[k], ref[0], ri, { abs: 1e-12 }, `${c.name} phi(${tv})`);
        record("cf abs " + c.model.family, e * Math.hypot(ref[0], ri) || e);
      });
    });
    if (c.cdf)
      it(`${c.name}: cdf and sf within 1e-12 relative (${c.cdfSource})`, () => {
        const node = buildNode(validateModel(c.model));
        if (!node.dist) return; // the beta family's cdf (incomplete beta) is left to the inversion
        for (const p of c.cdf!) {
          close(node.dist.cdf(p.x), p.cdf, { rel: 1e-11, abs: 1e-15 }, `${c.name} cdf(${p.x})`);
          close(node.dist.sf(p.x), p.sf, { rel: 1e-11, abs: 1e-15 }, `${c.name} sf(${p.x})`);
          record("cdf rel " + c.model.family, Math.abs(node.dist.cdf(p.x) - p.cdf) / Math.max(p.cdf, 1e-300));
          record("sf rel " + c.model.family, Math.abs(node.dist.sf(p.x) - p.sf) / Math.max(p.sf, 1e-300));
        }
      });
    if (c.raw)
      it(`${c.name}: raw moments within 1e-10 relative (${c.rawSource})`, () => {
        const r = moments(c.model, 4);
        c.raw!.forEach((v, k) => {
          close(r.raw[k] as number, v, { rel: 1e-10, abs: 1e-13 }, `${c.name} E X^${k + 1}`);
          record("raw rel " + c.model.family, Math.abs((r.raw[k] as number) - v) / Math.abs(v));
        });
        // orders beyond the tail index do not exist
        if (c.model.family !== "pert") for (let k = c.raw!.length; k < 4; k++) if (r.raw[k] !== null) throw new Error(`${c.name}: E X^${k + 1} should not exist, got ${r.raw[k]}`);
      });
  }
});

describe("(a, b, 1) counts against their definitions", () => {
  for (const c of cnt.cases.filter((x) => x.model.family === "zero_modified_logarithmic"))
    it(`${c.name}: as a compound count, the (a, b, 1) recursion with claims of size 1 reproduces the pmf (${c.source})`, () => {
      const t = compile({ compound: { count: c.model, each: { lattice: { origin: 1, step: 1, p: [1] } } } }).latticeTable!(4096)!;
      c.pmf.forEach((v, k) => {
        const got = k >= t.origin && k - t.origin < t.p.length ? t.p[k - t.origin] : 0;
        close(got, v, { rel: 1e-12, abs: 1e-17 }, `${c.name} P(S=${k})`);
      });
    });
  for (const c of cnt.cases) {
    it(`${c.name}: pmf (${c.source})`, () => {
      const t = compile(c.model).latticeTable!(4096)!;
      const tol = c.exact ? { rel: 1e-13, abs: 1e-17 } : { rel: 1e-12, abs: 1e-17 };
      c.pmf.forEach((v, k) => {
        const got = k >= t.origin && k - t.origin < t.p.length ? t.p[k - t.origin] : 0;
        close(got, v, tol, `${c.name} P(N=${k})`);
        record("pmf rel " + c.model.family, v > 0 ? Math.abs(got - v) / v : Math.abs(got));
      });
      // the CF at t is sum_k p_k e^{itk}
      const m = compile(c.model);
      const ts = Float64Array.of(0.3, 1.7);
      const re = new Float64Array(2);
      const im = new Float64Array(2);
      m.cf(ts, re, im);
      ts.forEach((tv, j) => {
        let sr = 0;
        let si = 0;
        c.pmf.forEach((v, k) => {
          sr += v * Math.cos(tv * k);
          si += v * Math.sin(tv * k);
        });
        // fixtures stop at k = 25; the rest of the mass bounds the difference
        const rest = 1 - c.pmf.reduce((s, v) => s + v, 0);
        closeC(re[j], im[j], sr, si, { abs: 1e-12 + Math.max(rest, 0) }, `${c.name} phi(${tv})`);
      });
    });
  }
  it("compound of a zero-truncated Poisson count by the (a, b, 1) recursion matches the sum over counts", () => {
    // S = X_1 + ... + X_N, N ~ ZT Poisson(2), X ~ Bernoulli(0.3) on {0, 1}: S | N = n is Binomial(n, 0.3), so
    // P(S = k) = sum_n P(N = n) C(n, k) 0.3^k 0.7^(n-k) (common practice: conditioning on the count)
    const lam = 2;
    const pN = (n: number) => (Math.exp(-lam) * lam ** n) / (factorial(n) * -Math.expm1(-lam));
    const t = compile({ compound: { count: { family: "zero_truncated_poisson", lambda: lam }, each: { family: "bernoulli", p: 0.3 } } }).latticeTable!(64)!;
    for (let k = 0; k < 10; k++) {
      let s = 0;
      for (let n = Math.max(k, 1); n < 60; n++) s += pN(n) * binom(n, k) * 0.3 ** k * 0.7 ** (n - k);
      close(t.p[k - t.origin] ?? 0, s, { rel: 1e-12, abs: 1e-18 }, `P(S=${k})`);
    }
  });
});

describe("special inputs of the new families", () => {
  const bad: [unknown, string][] = [
    [{ family: "triangular", a: 0, c: 5, b: 4 }, "/c"],
    [{ family: "triangular", a: 1, c: 1, b: 1 }, "/b"],
    [{ family: "beta", alpha: 2, beta: 3, a: 2, b: 1 }, "/b"],
    [{ family: "pert", a: 0, m: -1, b: 4 }, "/m"],
    [{ family: "lomax", alpha: 0, theta: 1 }, "/alpha"],
    [{ family: "zero_modified_poisson", lambda: 2, p0: 1 }, "/p0"],
    [{ family: "logarithmic", p: 1 }, "/p"],
    [{ layer: { deductible: -1 }, of: { family: "exponential", rate: 1 } }, "/layer/deductible"],
    [{ layer: { share: 1.5 }, of: { family: "exponential", rate: 1 } }, "/layer/share"],
    [{ layer: {}, of: { family: "cauchy", loc: 0, scale: 1 } }, "/of"],
  ];
  for (const [m, ptr] of bad)
    it(`rejects ${JSON.stringify(m)} at ${ptr}`, () => {
      try {
        validateModel(m);
      } catch (e) {
        if (isCfError(e) && e.pointer === ptr) return;
        throw new Error(`wrong error for ${JSON.stringify(m)}: ${e}`);
      }
      throw new Error(`accepted ${JSON.stringify(m)}`);
    });
  it("a logarithmic count serves as a compound count; a lomax does not", () => {
    validateModel({ compound: { count: { family: "logarithmic", p: 0.5 }, each: { family: "exponential", rate: 1 } } });
    try {
      validateModel({ compound: { count: { family: "lomax", alpha: 2, theta: 1 }, each: { family: "exponential", rate: 1 } } });
    } catch (e) {
      if (isCfError(e)) return;
    }
    throw new Error("lomax accepted as a count");
  });
});

function factorial(n: number) {
  let f = 1;
  for (let k = 2; k <= n; k++) f *= k;
  return f;
}
function binom(n: number, k: number) {
  if (k > n) return 0;
  let c = 1;
  for (let j = 1; j <= k; j++) c = (c * (n - k + j)) / j;
  return c;
}
