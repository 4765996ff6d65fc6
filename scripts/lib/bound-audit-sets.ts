// The bound audit's fixture sets: each reads a reference fixture under tests/fixtures/ and pushes its samples.
import { riskSet } from "./bound-audit-risk";
import { compile } from "@/lib/cf/compile";
import { moments } from "@/lib/cf/moments";
import { quantiles } from "@/lib/cf/invert/quantile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";
import { compiled, DOUBLE, guarded, levels, num, points, push, rawMoments, read, samples } from "./bound-audit-core";
import { directShortfall } from "./bound-audit-shortfall";
// ---- the fixture sets --------------------------------------------------------------------------------------

function directFamilies() {
  const set = "direct/families";
  const f = read<{ families: { model: Model; points: { x: string; pdf: string; cdf: string; sf: string; rel_diff: number | null }[]; quantiles: { p: number; x: string }[] }[] }>("direct/families.json");
  for (const fam of f.families) {
    const c = compiled(set, fam.model);
    if (!c) continue;
    // 20 significant digits written; rel_diff is the second method's difference
    const rel = fam.points.map((p) => Math.max(p.rel_diff ?? 1e-19, 1e-19));
    points(set, fam.model, c, fam.points.map((p) => ({ x: num(p.x), pdf: num(p.pdf), cdf: num(p.cdf), sf: num(p.sf) })), (v, i) => rel[i] * Math.abs(v));
    // quantiles: 20 digits written, found at 40 digits (absolute to ~1e-38 of the law's scale, which a quantile at 0
    // of a symmetric law shows as a residue like -2e-41)
    const scale = Math.max(...fam.quantiles.map((q) => Math.abs(num(q.x))));
    levels(set, fam.model, c, fam.quantiles.map((q) => ({ p: q.p, q: num(q.x), qErr: 1e-19 * Math.abs(num(q.x)) + 1e-38 * scale })));
  }
}

function referenceFamilies() {
  const set = "reference-families";
  const f = read<{ cases: { model: Model; cdf?: { x: number; cdf: number; sf: number }[]; raw?: number[]; cdfSource?: string }[] }>("reference-families/families.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    // scipy's cdf and sf: trusted to a few units in the 15th digit (scipy.stats, double precision)
    points(set, k.model, c, (k.cdf ?? []).map((p) => ({ x: p.x, cdf: p.cdf, sf: p.sf })), (v) => 1e-14 * Math.abs(v) + 1e-16);
    if (k.raw) rawMoments(set, k.model, c, k.raw, 1e-14);
  }
}

function truncnorm() {
  const set = "reference-truncnorm";
  const f = read<{ cases: { model: Model; cdf: { x: number; cdf: number; sf: number }[]; cdfSource: string; raw: number[] }[] }>("reference-truncnorm/truncnorm.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    // mpmath at 50 digits: the value's rounding to a double (the DOUBLE floor) is its only uncertainty
    const rel = k.cdfSource.startsWith("mpmath") ? 0 : 1e-14;
    points(set, k.model, c, k.cdf.map((p) => ({ x: p.x, cdf: p.cdf, sf: p.sf })), (v) => rel * Math.abs(v) + (rel ? 1e-16 : 0));
    rawMoments(set, k.model, c, k.raw, 1e-13);
  }
}

function counts() {
  const set = "reference-counts";
  const f = read<{ cases: { model: Model; pmf: number[] }[] }>("reference-counts/counts.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    let cdf = 0;
    const refs = k.pmf.map((p, x) => {
      cdf += p;
      return { x, pmf: p, cdf: Math.min(cdf, 1) };
    });
    // exact fractions written as doubles: the running sum carries one rounding per term
    points(set, k.model, c, refs, (v, x) => (x + 2) * DOUBLE * Math.abs(v));
  }
}

function cumulants() {
  const set = "cumulants";
  const f = read<{ cases: Record<string, { model: Model; mean: number; variance: number; cumulants: number[] }> }>("cumulants/cumulants.json");
  for (const k of Object.values(f.cases)) {
    const c = compiled(set, k.model);
    if (!c) continue;
    const m = guarded(`${set} moments`, () => moments(c, 4));
    if (!m) continue;
    k.cumulants.forEach((want, i) => {
      const got = m.cumulants[i];
      if (got !== null) push(set, "moment", `${JSON.stringify(k.model)} kappa_${i + 1}`, got, want, 1e-15 * Math.abs(want), m.cumulantError[i] ?? Infinity);
    });
  }
}

/** tests/fixtures/lognormal-cumulants: kappa_1..kappa_40 (mpmath at 400 digits, two methods, hi + lo) */
function lognormalCumulants() {
  const set = "lognormal-cumulants";
  const f = read<{ order: number; cases: { model: Model; cumulants: ([number, number] | null)[] }[] }>("lognormal-cumulants/lognormal-cumulants.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    const got = c && guarded(`${set} cumulants`, () => ({ v: c.cumulants(f.order), e: c.cumulantErrors?.(f.order) ?? [] }));
    if (!got) continue;
    k.cumulants.forEach((ref, i) => {
      const v = got.v[i];
      // hi + lo: the reference's uncertainty against hi is |lo|, as in the moments set
      if (ref && v !== null)
        samples.push({ set, quantity: "moment", label: `${JSON.stringify(k.model)} kappa_${i + 1}`, got: v, want: ref[0], refErr: Math.abs(ref[1]) + 1e-30 * Math.abs(ref[0]), bound: got.e[i] ?? Infinity, tail: false });
    });
  }
}

/**
 * tests/fixtures/moments: raw and central moments, cumulants and the ratios of models across the notation (mpmath at
 * 40 digits, two methods); each reference is hi + lo, so the reference's uncertainty against hi is |lo|, far below
 * the DOUBLE floor the other sets use
 */
function momentSet() {
  const set = "moments";
  type Pair = [number, number] | null;
  type MomentCase = { name: string; model: Model; order: number; raw: Pair[]; central: Pair[]; cumulants: Pair[]; skewness: Pair; excessKurtosis: Pair };
  const cases = ["moments/moments.json", "moments/truncnorm.json"].flatMap((file) => read<{ cases: MomentCase[] }>(file).cases);
  for (const k of cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    const m = guarded(`${set} moments ${k.name}`, () => moments(c, k.order));
    if (!m) continue;
    // an order-k quantity's scale (an exact 0 of the 40-digit reference can come out as 1e-40 of it)
    const sd = k.cumulants[1] ? Math.sqrt(Math.abs(k.cumulants[1][0])) : 1;
    const add = (label: string, got: number | null, bound: number | null, ref: Pair, scale = 1) => {
      if (ref === null || got === null) return;
      samples.push({ set, quantity: "moment", label: `${k.name} ${label}`, got, want: ref[0], refErr: Math.abs(ref[1]) + 1e-30 * Math.max(Math.abs(ref[0]), scale), bound: bound ?? Infinity, tail: false });
    };
    for (let j = 0; j < k.order; j++) {
      add(`E X^${j + 1}`, m.raw[j], m.rawError[j], k.raw[j]);
      add(`central ${j + 1}`, m.central[j], m.centralError[j], k.central[j], sd ** (j + 1));
      add(`kappa_${j + 1}`, m.cumulants[j], m.cumulantError[j], k.cumulants[j], sd ** (j + 1));
    }
    add("skewness", m.skewness, m.skewnessError, k.skewness);
    add("excess kurtosis", m.excessKurtosis, m.excessKurtosisError, k.excessKurtosis);
  }
}

function vgNigTails() {
  const set = "cf-reference/vg-nig-tails";
  const f = read<{ laws: { model: Model; points: { x: string; pdf: string; cdf: string; sf: string; rel_diff: number }[] }[] }>("cf-reference/vg-nig-tails.json");
  for (const law of f.laws) {
    const c = compiled(set, law.model);
    if (!c) continue;
    const rel = law.points.map((p) => Math.max(p.rel_diff ?? 1e-19, 1e-19));
    points(set, law.model, c, law.points.map((p) => ({ x: num(p.x), pdf: num(p.pdf), cdf: num(p.cdf), sf: num(p.sf) })), (v, i) => rel[i] * Math.abs(v));
  }
}

function compoundContinuous() {
  interface Case {
    model: Model;
    mean: number;
    points: { x: number; pdf: number; cdf: number; sf: number }[];
    levels: { p: number; q: number; es: number | null }[];
    crossCheck: { maxCdfDifference: number };
  }
  const f = read<{ exponential: Case[]; lognormal: Case[] }>("compound/compound.json");
  // sigma 1.5 .. 2.5 and lambda 1 000 .. 10 000 (generate.py --wide-only)
  const wide = read<{ lognormal: Case[] }>("compound/compound-wide.json");
  // gamma claims, and sums of such compounds with gamma and normal terms (generate_gamma.py: mpmath at 32 digits, the
  // gamma mixture over the count, checked by a numerical Laplace inversion)
  const gamma = read<{ cases: Case[] }>("compound/compound-gamma.json");
  // far-tail ES of Poisson-lognormal compounds to ~20 digits (generate_es.py: de Hoog and Talbot inversions at 30 digits):
  // compound.json's ES there carries its FFT's double-precision summation times 1 / (1 - p) (8e-3 at p = 0.9999)
  const fine = new Map<string, { q: string; es: string; esErr: number }>();
  for (const k of read<{ cases: { model: Model; levels: { p: number; q: string; es: string; esErr: number }[] }[] }>("compound/compound-es.json").cases)
    for (const l of k.levels) fine.set(`${JSON.stringify(k.model)} ${l.p}`, l);
  const groups: [string, Case[]][] = [
    ["compound/exponential", f.exponential],
    ["compound/lognormal", f.lognormal],
    ["compound/lognormal-wide", wide.lognormal],
    ["compound/gamma", gamma.cases],
  ];
  for (const [set, cases] of groups) {
    for (const k of cases) {
      const c = compiled(set, k.model);
      if (!c) continue;
      const e = k.crossCheck.maxCdfDifference;
      points(set, k.model, c, k.points, () => e);
      // no per-level uncertainty is written: the cdf cross-check over the density at q (from the points' scale) is not
      // available either, so the quantile's reference precision is the double's own (the counted floor); where
      // compound-es.json has the level, its quantile and ES replace these
      levels(
        set,
        k.model,
        c,
        k.levels.map((l) => {
          const f = fine.get(`${JSON.stringify(k.model)} ${l.p}`);
          return f ? { p: l.p, q: num(f.q), es: num(f.es), esErr: f.esErr } : l;
        }),
      );
      const mm = guarded(`${set} mean`, () => moments(c, 1));
      // the mean's derived bound (meanError; null where none is derived, shown as NO BOUND)
      push(set, "moment", `${JSON.stringify(k.model)} mean`, mm?.raw[0] ?? NaN, k.mean, 1e-15 * k.mean, mm?.meanError ?? NaN);
    }
  }
}

function compoundHeavy(file: string, set: string) {
  interface Case {
    model: Model;
    mean?: number;
    points: { x: number; cdf: number; sf: number; cdfErr: number }[];
    levels: { p: number; q: number; qErr: number; es: number; esErr: number }[];
  }
  const f = read<{ cases: Case[] }>(file);
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    points(set, k.model, c, k.points, (_, i) => k.points[i].cdfErr);
    levels(set, k.model, c, k.levels);
  }
}

/** endpoint-density.json: densities of pareto and lomax compounds (de Hoog and Talbot per n-claim term) */
function endpointDensity() {
  const set = "compound/endpoint-density";
  const f = read<{ cases: { model: Model; points: { x: number; pdf: number; methodsDifference: number }[] }[] }>("compound/endpoint-density.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    points(set, k.model, c, k.points.map((p) => ({ x: p.x, pdf: p.pdf })), (_, i) => k.points[i].methodsDifference);
  }
}

/** sums.json (mpmath convolution, densities to 24 digits) and cf-sums.json (sums led by a stable term, mpmath Fourier
 * inversion: its densities come from one quadrature, so only its quantiles and ES, each checked by a second one) */
function sums(path: string, set: string, withPoints: boolean) {
  const f = read<{ cases: { model: Model; levels: { p: string; x: string; x_check: number; es: string; es_check: number; pdf: string }[] }[] }>(path);
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    levels(set, k.model, c, k.levels.map((l) => ({ p: num(l.p), q: num(l.x), qErr: Math.abs(l.x_check) + 1e-22, es: num(l.es), esErr: Math.abs(l.es_check) })));
    // at the reference quantile the cdf is p and the density the written one
    if (withPoints) points(set, k.model, c, k.levels.map((l) => ({ x: num(l.x), pdf: num(l.pdf), cdf: num(l.p) })), (v) => 1e-20 * Math.abs(v));
  }
}

function latticeSums() {
  const set = "lattice-sums";
  const f = read<{ cases: { model: Model; points: { x: number; pdf: string; cdf: string; sf: string; cdfErr: number }[]; levels: { p: number; q: string; qErr: number }[] }[] }>("lattice-sums/lattice-sums.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    // 22 significant digits written; cdfErr is the second method's difference
    points(set, k.model, c, k.points.map((p) => ({ x: p.x, pdf: num(p.pdf), cdf: num(p.cdf), sf: num(p.sf) })), (v, i) => k.points[i].cdfErr + 1e-21 * Math.abs(v));
    levels(set, k.model, c, k.levels.map((l) => ({ p: l.p, q: num(l.q), qErr: l.qErr })));
  }
}

/** lattice-alias.json: lattice laws inverted by FFT of the CF (mpmath closed forms vs recursions / incomplete gamma and beta) */
function latticeAlias() {
  const set = "lattice-alias";
  const f = read<{ cases: { model: Model; points: { x: number; pmf: string; cdf: string; sf: string; crossCheck: number }[] }[] }>("lattice-alias/lattice-alias.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    // 25 significant digits written; crossCheck is the second method's difference
    points(set, k.model, c, k.points.map((p) => ({ x: p.x, pmf: num(p.pmf), cdf: num(p.cdf), sf: num(p.sf) })), (v, i) => k.points[i].crossCheck + 1e-24 * Math.abs(v));
  }
}

function stable() {
  const set = "stable";
  const f = read<{ points: { model: Model; x: number; pdf: string; cdf: string; sf: string; rel_diff: number | null }[] }>("stable/stable.json");
  const byLaw = new Map<string, typeof f.points>();
  for (const p of f.points) byLaw.set(JSON.stringify(p.model), [...(byLaw.get(JSON.stringify(p.model)) ?? []), p]);
  for (const pts of byLaw.values()) {
    const c = compiled(set, pts[0].model);
    if (!c) continue;
    const rel = pts.map((p) => Math.max(p.rel_diff ?? 1e-19, 1e-19));
    points(set, pts[0].model, c, pts.map((p) => ({ x: p.x, pdf: num(p.pdf), cdf: num(p.cdf), sf: num(p.sf) })), (v, i) => rel[i] * Math.abs(v));
  }
}

/** stable-sums.json: sums of stable terms of one alpha (mpmath: product-CF inversion vs the folded law, two methods) */
function stableSums() {
  const set = "stable-sums";
  const f = read<{ cases: { model: Model; points: { x: number; pdf: string; cdf: string; sf: string; rel_diff: number | null }[]; levels: { p: number; x: string; x_check: number }[] }[] }>(
    "stable-sums/stable-sums.json",
  );
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    const rel = k.points.map((p) => Math.max(p.rel_diff ?? 1e-21, 1e-21));
    points(set, k.model, c, k.points.map((p) => ({ x: p.x, pdf: num(p.pdf), cdf: num(p.cdf), sf: num(p.sf) })), (v, i) => rel[i] * Math.abs(v));
    levels(set, k.model, c, k.levels.map((l) => ({ p: l.p, q: num(l.x), qErr: Math.abs(l.x_check) + 1e-21 * Math.abs(num(l.x)) })));
  }
}

function layered() {
  const set = "reference-layered";
  const f = read<{ exponential: { model: Model; mean: number; var: { p: number; value: number }[]; es: { p: number; value: number }[]; exceedance: { x: number; value: number }[] }[] }>("reference-layered/layered.json");
  for (const k of f.exponential) {
    const c = compiled(set, k.model);
    if (!c) continue;
    points(set, k.model, c, k.exceedance.map((e) => ({ x: e.x, sf: e.value })), (v) => 1e-14 * Math.abs(v) + 1e-16);
    const es = new Map(k.es.map((e) => [e.p, e.value]));
    levels(set, k.model, c, k.var.map((v) => ({ p: v.p, q: v.value, qErr: 1e-14 * v.value, es: es.get(v.p) ?? null, esErr: 1e-14 * (es.get(v.p) ?? 0) })));
  }
  const g = read<{ lognormal: { model: Model; var: { p: number; lo: number; hi: number }[]; es: { p: number; lo: number; hi: number }[]; exceedance: { x: number; lo: number; hi: number }[] }[] }>("reference-layered/lognormal.json");
  const lset = "reference-layered/lognormal (brackets)";
  for (const k of g.lognormal) {
    const c = compiled(lset, k.model);
    if (!c) continue;
    const mid = (b: { lo: number; hi: number }) => [(b.lo + b.hi) / 2, (b.hi - b.lo) / 2] as const;
    points(lset, k.model, c, k.exceedance.map((e) => ({ x: e.x, sf: mid(e)[0] })), (_, i) => mid(k.exceedance[i])[1]);
    levels(lset, k.model, c, k.var.map((v, i) => ({ p: v.p, q: mid(v)[0], qErr: mid(v)[1], es: mid(k.es[i])[0], esErr: mid(k.es[i])[1] })));
  }
}

function risk() {
  const set = "reference-risk";
  const f = read<{ normal: { model: Model; exceedance: { x: number; value: number }[] }[]; compoundPoissonExponential: { model: Model; exceedance: { x: number; value: number }[] }[]; layers: { model: Model; mean: number }[] }>("reference-risk/risk.json");
  for (const k of [...f.normal, ...f.compoundPoissonExponential]) {
    const c = compiled(set, k.model);
    if (!c) continue;
    points(set, k.model, c, k.exceedance.map((e) => ({ x: e.x, sf: e.value })), (v) => 1e-14 * Math.abs(v) + 1e-16);
  }
  for (const k of f.layers) {
    const c = compiled(set, k.model);
    if (!c) continue;
    const m = guarded(`${set} mean`, () => moments(c, 1));
    if (m && m.raw[0] !== null) push(set, "moment", `${JSON.stringify(k.model)} mean`, m.raw[0], k.mean, 1e-12 * Math.abs(k.mean), m.meanError ?? NaN);
  }
}

/** tests/fixtures/layer-moments: per-claim layer moments and compound Poisson cumulants of layers (mpmath, two methods, hi + lo) */
function layerMoments() {
  const set = "layer-moments";
  type Pair = [number, number] | null;
  const f = read<{ cases: { model: Model; raw: Pair[]; crossCheck: (number | null)[] }[]; compounds: { model: Model; cumulants: Pair[]; crossCheck: number[] }[] }>("layer-moments/layer-moments.json");
  const add = (label: string, got: number | null, bound: number | null, ref: Pair, cross: number | null) => {
    if (ref === null || got === null) return;
    samples.push({ set, quantity: "moment", label, got, want: ref[0], refErr: Math.abs(ref[1]) + ((cross ?? 0) + 1e-30) * Math.abs(ref[0]), bound: bound ?? Infinity, tail: false });
  };
  for (const k of f.cases) {
    const m = guarded(`${set} ${JSON.stringify(k.model)}`, () => moments(compile(k.model), 4));
    if (m) k.raw.forEach((ref, j) => add(`${JSON.stringify(k.model)} E Y^${j + 1}`, m.raw[j], m.rawError[j], ref, k.crossCheck[j]));
  }
  for (const k of f.compounds) {
    const m = guarded(`${set} ${JSON.stringify(k.model)}`, () => moments(compile(k.model), 4));
    if (m) k.cumulants.forEach((ref, j) => add(`${JSON.stringify(k.model)} kappa_${j + 1}`, m.cumulants[j], m.cumulantError[j], ref, k.crossCheck[j]));
  }
}

/**
 * tests/fixtures/direct/vg-nig.json: variance-gamma and NIG (alone, scaled, shifted) in bodies and tails down to 1e-40
 * (mpmath at 60 digits, Bessel-K closed form with quadrature tails; checked by the mixture integrals); an infinite
 * reference density (variance-gamma with nu >= 2 at its location) is checked by tests/cf/direct-vg-nig.test.ts instead
 */
function directVgNig() {
  const set = "direct/vg-nig";
  const f = read<{ laws: { model: Model; points: { x: string; pdf: string; cdf: string; sf: string; rel_diff: number }[]; quantiles: { p: number; x: string; rel_diff: number }[] }[] }>("direct/vg-nig.json");
  for (const law of f.laws) {
    const c = compiled(set, law.model);
    if (!c) continue;
    const rel = law.points.map((p) => Math.max(p.rel_diff, 1e-19));
    points(set, law.model, c, law.points.map((p) => ({ x: num(p.x), ...(Number.isFinite(num(p.pdf)) ? { pdf: num(p.pdf) } : {}), cdf: num(p.cdf), sf: num(p.sf) })), (v, i) => rel[i] * Math.abs(v));
    // 20 digits written, found to 1e-45 of the scale; the check's tail difference moves it by at most that much of the
    // tail over the density, well below 1e-19 relative here
    const scale = Math.max(...law.quantiles.map((q) => Math.abs(num(q.x))));
    levels(set, law.model, c, law.quantiles.map((q) => ({ p: q.p, q: num(q.x), qErr: 1e-19 * Math.abs(num(q.x)) + 1e-38 * scale })));
  }
}

/** positive-sums.json: sums of two nonnegative terms, one power-tailed (mpmath convolution at 24 digits, both ways) */
function positiveSums() {
  const set = "positive-sums";
  type P = { x: string; cdf: string; check: number; sf: string; sf_check: number; pdf: string; pdf_check: number };
  type L = { p: string; q: string; check: number; es?: string; es_check?: number };
  const f = read<{ cases: { model: Model; points: P[]; quantiles: L[] }[] }>("positive-sums/positive-sums.json");
  for (const k of f.cases) {
    const c = compiled(set, k.model);
    if (!c) continue;
    // the two integrals' difference, and the reference's own 24 digits
    const pts = k.points.map((p) => ({ x: num(p.x), pdf: num(p.pdf), cdf: num(p.cdf), sf: num(p.sf) }));
    const errs = k.points.map((p) => ({ pdf: p.pdf_check, cdf: p.check, sf: p.sf_check }));
    points(set, k.model, c, pts, (v, i) => Math.max(errs[i].pdf, errs[i].cdf, errs[i].sf) + 1e-22 * Math.abs(v));
    levels(set, k.model, c, k.quantiles.map((l) => ({ p: num(l.p), q: num(l.q), qErr: l.check + 1e-22, ...(l.es ? { es: num(l.es), esErr: (l.es_check ?? 0) + 1e-22 } : {}) })));
  }
}

export const SETS: [string, () => void][] = [
  ["direct/families", directFamilies],
  ["direct/vg-nig", directVgNig],
  ["direct/shortfall", directShortfall],
  ["reference-families", referenceFamilies],
  ["reference-truncnorm", truncnorm],
  ["reference-counts", counts],
  ["cumulants", cumulants],
  ["moments", momentSet],
  ["cf-reference/vg-nig-tails", vgNigTails],
  ["compound/compound", compoundContinuous],
  ["compound/heavy", () => compoundHeavy("compound/heavy.json", "compound/heavy")],
  ["compound/endpoint-density", endpointDensity],
  ["compound/heavy-sums", () => compoundHeavy("compound/heavy-sums.json", "compound/heavy-sums")],
  ["pareto-compound-sums", () => compoundHeavy("pareto-compound-sums/pareto-compound-sums.json", "pareto-compound-sums")],
  ["sums", () => sums("sums/sums.json", "sums", true)],
  ["cf-sums", () => sums("sums/cf-sums.json", "cf-sums", false)],
  ["positive-sums", positiveSums],
  ["lattice-sums", latticeSums],
  ["lattice-alias", latticeAlias],
  ["stable", stable],
  ["stable-sums", stableSums],
  ["reference-layered", layered],
  ["reference-risk", risk],
  ["risk-measures", riskSet],
  ["layer-moments", layerMoments],
  ["lognormal-cumulants", lognormalCumulants],
];

