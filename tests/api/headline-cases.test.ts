// The headline aggregate-claims and stable cases through the public API (POST /quantiles, /density, /moments), against
// generated references: tests/fixtures/compound/compound.json (generate.py: tilted FFT convolution of the sampled
// lognormal density, cross-checked at step 2h and by mpmath's de Hoog inversion), compound/heavy.json (generate.py
// --heavy-only: rounded-down lattice compounds extrapolated in the span, cross-checked by an mpmath finite sum) and
// stable/stable.json (generate.py: Nolan's integrals in mpmath at 30 digits, checked by the tail series or a second
// integral). Each value must lie within the bound the response states (plus the reference's own uncertainty) and
// within the accuracy targets: quantiles 1e-7 and expected shortfall 1e-6 relative, cdf 1e-9 absolute, stable pdf and
// cdf 1e-6 relative; the method must say what was done (a continuous route, not a lattice table), and every error
// travels as a number in an array or a typed field.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { keyedClient } from "../support/api";

interface CompoundCase {
  model: { compound: { count: { family: string; lambda?: number }; each: Record<string, unknown> } };
  atom0: number;
  mean?: number;
  points: { x: number; pdf?: number; cdf: number; sf: number; cdfErr?: number }[];
  levels: { p: number; q: number; es: number | null; qErr?: number; esErr?: number }[];
  crossCheck: { maxCdfDifference: number };
}
const fixture = (path: string) => JSON.parse(readFileSync(join(__dirname, "../fixtures", path), "utf8"));
const compound = fixture("compound/compound.json") as { lognormal: CompoundCase[] };
const heavy = fixture("compound/heavy.json") as { cases: CompoundCase[] };
const stable = fixture("stable/stable.json") as {
  points: { model: { family: string; alpha: number; beta: number }; x: number; pdf: string; cdf: string; sf: string; rel_diff: number | null }[];
};

const find = (cases: CompoundCase[], lambda: number, each: Record<string, unknown>) => {
  const c = cases.find((k) => k.model.compound.count.lambda === lambda && Object.entries(each).every(([key, v]) => k.model.compound.each[key] === v));
  if (!c) throw new Error(`no fixture for lambda ${lambda}, ${JSON.stringify(each)}`);
  return c;
};

const HEADLINE = [
  { name: "Poisson(2)-lognormal(0, 1)", c: find(compound.lognormal, 2, { family: "lognormal", mu: 0, sigma: 1 }), levels: [0.95, 0.99, 0.995, 0.999] },
  { name: "Poisson(25)-lognormal(8, 1.2)", c: find(compound.lognormal, 25, { family: "lognormal", mu: 8, sigma: 1.2 }), levels: [0.99, 0.995, 0.999] },
  { name: "Poisson(2)-pareto(3, 1)", c: find(heavy.cases, 2, { family: "pareto", alpha: 3, xm: 1 }), levels: [0.95, 0.99, 0.995, 0.999] },
];

/** a number, finite and not negative: an error that travels as data */
const isBound = (v: unknown) => typeof v === "number" && Number.isFinite(v) && v >= 0;
const CONTINUOUS = ["gil-pelaez-damped", "fft-damped"];

const api = keyedClient();

describe("headline aggregate-claims cases through the public API, against generated references", () => {
  it.each(HEADLINE)("$name: quantiles and expected shortfall within their stated bounds and the targets", async ({ c, levels }) => {
    const refs = levels.map((p) => {
      const l = c.levels.find((k) => k.p === p);
      if (!l || l.es === null) throw new Error(`no reference level ${p}`);
      return l;
    });
    const res = await api.post("/api/v1/quantiles", { model: c.model, p: levels, expectedShortfall: true });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const d = res.body.diagnostics;
    // the method tells the truth: a continuous route, never a lattice table or an "exact" label on an approximation
    expect(CONTINUOUS).toContain(d.method);
    expect(Array.isArray(d.quantileError) && Array.isArray(d.expectedShortfallError) && Array.isArray(d.notes)).toBe(true);
    expect(d.quantileError).toHaveLength(levels.length);
    expect(d.expectedShortfallError).toHaveLength(levels.length);
    expect(isBound(d.cdfError)).toBe(true);
    refs.forEach((l, i) => {
      const q = res.body.x[i];
      const qb = d.quantileError[i];
      const es = res.body.expectedShortfall[i];
      const eb = d.expectedShortfallError[i];
      expect(isBound(qb) && isBound(eb), `p=${l.p}: bounds ${qb}, ${eb}`).toBe(true);
      expect(qb, `p=${l.p}: a quantile bound of 0 would claim an exact answer`).toBeGreaterThan(0);
      const dq = Math.abs(q - l.q);
      const de = Math.abs(es - (l.es as number));
      const refQ = l.qErr ?? 0;
      const refE = l.esErr ?? 0;
      expect(dq, `p=${l.p}: quantile ${q}, reference ${l.q}, difference ${dq}, stated bound ${qb}, reference uncertainty ${refQ}`).toBeLessThanOrEqual(qb + refQ);
      expect(de, `p=${l.p}: ES ${es}, reference ${l.es}, difference ${de}, stated bound ${eb}, reference uncertainty ${refE}`).toBeLessThanOrEqual(eb + refE);
      // accuracy targets: quantile 1e-7 relative, ES 1e-6 relative (beyond the reference's own uncertainty)
      expect(Math.max(dq - refQ, 0) / l.q, `p=${l.p}: quantile relative error (target 1e-7)`).toBeLessThanOrEqual(1e-7);
      expect(Math.max(de - refE, 0) / (l.es as number), `p=${l.p}: ES relative error (target 1e-6)`).toBeLessThanOrEqual(1e-6);
    });
  });

  it.each(HEADLINE)("$name: /density answers a pdf with the atom P(N = 0) at 0, not span cells; cdf within its bound and 1e-9", async ({ c }) => {
    const lambda = c.model.compound.count.lambda as number;
    const res = await api.post("/api/v1/density", { model: c.model, x: c.points.map((p) => p.x) });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(CONTINUOUS).toContain(res.body.diagnostics.method);
    expect(res.body.pmf).toBeUndefined();
    expect(res.body.pdf).toHaveLength(c.points.length);
    // P(S = 0) = P(N = 0) = e^-lambda (Poisson law, common practice); the fixture writes the same
    expect(res.body.atoms).toHaveLength(1);
    expect(res.body.atoms[0].x).toBe(0);
    expect(Math.abs(res.body.atoms[0].p - Math.exp(-lambda))).toBeLessThanOrEqual(1e-15);
    expect(Math.abs(res.body.atoms[0].p - c.atom0)).toBeLessThanOrEqual(1e-15);
    const e = res.body.diagnostics.error;
    for (const k of ["aliasing", "truncation", "rounding", "pdf", "cdf"]) expect(isBound(e[k]), `error.${k} = ${e[k]}`).toBe(true);
    c.points.forEach((p, i) => {
      const ref = p.cdfErr ?? c.crossCheck.maxCdfDifference;
      const dc = Math.abs(res.body.cdf[i] - p.cdf);
      const ds = Math.abs(res.body.sf[i] - p.sf);
      expect(dc, `cdf(${p.x}): got ${res.body.cdf[i]}, reference ${p.cdf}, stated bound ${e.cdf}, reference uncertainty ${ref}`).toBeLessThanOrEqual(e.cdf + ref);
      expect(ds, `sf(${p.x}): got ${res.body.sf[i]}, reference ${p.sf}, stated bound ${e.cdf}, reference uncertainty ${ref}`).toBeLessThanOrEqual(e.cdf + ref);
      expect(Math.max(dc - ref, 0), `cdf(${p.x}): target 1e-9 absolute`).toBeLessThanOrEqual(1e-9);
      if (p.pdf !== undefined) {
        const dp = Math.abs(res.body.pdf[i] - p.pdf);
        expect(dp, `pdf(${p.x}): got ${res.body.pdf[i]}, reference ${p.pdf}, stated bound ${e.pdf}, reference uncertainty ${ref}`).toBeLessThanOrEqual(e.pdf + ref);
      }
    });
  });

  it("Poisson(2)-lognormal(0, 1) and Poisson(25)-lognormal(8, 1.2): /moments mean lambda e^(mu + sigma^2/2) within 1e-10 relative", async () => {
    for (const { c } of HEADLINE.slice(0, 2)) {
      const res = await api.post("/api/v1/moments", { model: c.model, order: 2 });
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      // E S = E N E X (Wald's identity, common practice); the fixture writes lambda e^(mu + sigma^2 / 2)
      const want = c.mean as number;
      expect(Math.abs(res.body.mean - want) / want, `mean ${res.body.mean}, reference ${want}`).toBeLessThanOrEqual(1e-10);
    }
  });
});

describe("stable alpha = 0.8, beta = 0 everywhere on the line through the public API", () => {
  const pts = stable.points.filter((p) => p.model.alpha === 0.8 && p.model.beta === 0);

  it("x = -1e7: a positive pdf, cdf and sf in [0, 1]; every fixture point within its bound and 1e-6 relative", async () => {
    expect(pts.some((p) => p.x === -1e7)).toBe(true);
    const res = await api.post("/api/v1/density", { model: pts[0].model, x: pts.map((p) => p.x) });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const d = res.body.diagnostics;
    expect(d.method).toBe("stable-integral");
    expect(isBound(d.error.pdf) && isBound(d.error.cdf)).toBe(true);
    pts.forEach((p, i) => {
      const [pdf, cdf, sf] = [res.body.pdf[i], res.body.cdf[i], res.body.sf[i]];
      expect(pdf, `pdf(${p.x})`).toBeGreaterThan(0);
      expect(cdf >= 0 && cdf <= 1 && sf >= 0 && sf <= 1, `x=${p.x}: cdf ${cdf}, sf ${sf}`).toBe(true);
      const want = { pdf: Number(p.pdf), cdf: Number(p.cdf), sf: Number(p.sf) };
      const rel = p.rel_diff ?? 1e-19;
      for (const [k, got, bound] of [
        ["pdf", pdf, d.error.pdf],
        ["cdf", cdf, d.error.cdf],
        ["sf", sf, d.error.cdf],
      ] as const) {
        const w = want[k];
        const diff = Math.abs(got - w);
        const ref = rel * w;
        expect(diff, `${k}(${p.x}): got ${got}, reference ${w}, difference ${diff}, stated bound ${bound}, reference uncertainty ${ref}`).toBeLessThanOrEqual(bound + ref);
        expect(Math.max(diff - ref, 0) / w, `${k}(${p.x}): relative error (target 1e-6)`).toBeLessThanOrEqual(1e-6);
      }
    });
  });
});
