// Seeded random models from the whole notation (families, sums, mixes, compounds, scales, shifts, lattices,
// samples), up to 8 terms and one level of nesting: shared by the property tests and the model benchmark.
import type { Model } from "@/lib/cf/types";

/** mulberry32: a small seeded generator (common practice). */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

type R = () => number;
const pick = <T>(r: R, xs: readonly T[]): T => xs[Math.floor(r() * xs.length)];
const between = (r: R, a: number, b: number) => Math.round((a + (b - a) * r()) * 1000) / 1000;

function count(r: R): Model {
  return pick(r, [
    () => ({ family: "poisson", lambda: pick(r, [0.1, 0.5, 2, between(r, 1, 30), 100]) }),
    () => ({ family: "negative_binomial", r: between(r, 0.5, 4), p: between(r, 0.2, 0.8) }),
  ])() as Model;
}

/** Severities; `all` adds pareto and weibull claims (their compounds' CFs decay slowly: slower inversions). */
function severity(r: R, all = false): Model {
  const smooth: (() => Model)[] = [
    () => ({ family: "lognormal", mu: between(r, -1, 2), sigma: between(r, 0.3, 1.5) }) as Model,
    () => ({ family: "gamma", shape: between(r, 1.2, 4), rate: between(r, 0.2, 2) }) as Model,
    () => ({ family: "exponential", rate: between(r, 0.2, 2) }) as Model,
  ];
  const rough: (() => Model)[] = [
    () => ({ family: "weibull", shape: between(r, 0.6, 2.5), scale: between(r, 0.5, 3) }) as Model,
    () => ({ family: "pareto", alpha: between(r, 1.5, 4), xm: between(r, 0.5, 2) }) as Model,
  ];
  return pick(r, all ? [...smooth, ...rough] : smooth)();
}

/** A single term: a named family (light or heavy), a compound, a lattice or a sample. */
export function term(r: R, heavy = true, allSeverities = false, latticeOnly = false, noCompound = false, kinks = true): Model {
  const light: (() => Model)[] = [
    () => ({ family: "normal", mu: between(r, -3, 3), sigma: between(r, 0.2, 3) }) as Model,
    () => ({ family: "gamma", shape: between(r, 0.8, 5), rate: between(r, 0.3, 3) }) as Model,
    () => ({ family: "uniform", a: -1, b: between(r, 0, 4) }) as Model,
    () => ({ family: "laplace", loc: between(r, -1, 1), scale: between(r, 0.3, 2) }) as Model,
    () => ({ family: "nig", alpha: 2, beta: between(r, -1, 1), delta: between(r, 0.5, 2), mu: 0 }) as Model,
    () => ({ compound: { count: count(r), each: severity(r, allSeverities) } }) as Model,
  ];
  // lattice terms: alone, or summed with lattice terms (a mixture of a lattice and a density is a mixed law with
  // very many atoms, which the inversion handles slowly)
  const atomic: (() => Model)[] = [
    () => ({ lattice: { origin: 0, step: 1, p: [0.25, 0.5, 0.25] } }) as Model,
    () => ({ family: "poisson", lambda: between(r, 0.5, 20) }) as Model,
    () => ({ family: "binomial", n: 1 + Math.floor(r() * 30), p: between(r, 0.1, 0.9) }) as Model,
  ];
  if (latticeOnly) return pick(r, atomic)();
  if (noCompound) light.splice(5, 1);
  // uniform and laplace (kinks and jumps of the density: slowly decaying CFs) only where asked for
  if (!kinks) light.splice(2, 2);
  const heavyOnes: (() => Model)[] = [
    () => ({ family: "student_t", nu: between(r, 2.5, 8), loc: 0, scale: between(r, 0.5, 2) }) as Model,
    () => ({ family: "pareto", alpha: between(r, 1.5, 4), xm: between(r, 0.5, 2) }) as Model,
    () => ({ family: "lognormal", mu: between(r, -1, 1), sigma: between(r, 0.3, 1.2) }) as Model,
    () => ({ family: "weibull", shape: between(r, 0.6, 2.5), scale: between(r, 0.5, 3) }) as Model,
    () => ({ family: "stable", alpha: between(r, 1.2, 1.9), beta: between(r, -0.8, 0.8), scale: 1, loc: 0, param: "S1" }) as Model,
  ];
  return pick(r, heavy ? [...light, ...heavyOnes] : light)();
}

/** A model: one term, or a sum / mix / scale / shift of up to `maxTerms` terms (one level of nesting). */
export function randomModel(r: R, maxTerms = 8, heavy = true, allSeverities = false, kinks = true, mixes = true): Model {
  const n = 1 + Math.floor(r() * maxTerms);
  const lattice = r() < 0.15;
  // compounds are combined with terms bounded below (gamma, other compounds): such sums and mixtures keep the
  // damped inversion; compounds next to laws on the whole line take the slow general route
  const aggregate = !lattice && r() < 0.35;
  const terms = Array.from({ length: n }, () =>
    aggregate
      ? r() < 0.6
        ? ({ compound: { count: count(r), each: severity(r, allSeverities) } } as Model)
        : ({ family: "gamma", shape: between(r, 0.8, 5), rate: between(r, 0.3, 3) } as Model)
      : term(r, heavy && !lattice, allSeverities, lattice, true, kinks),
  );
  const kind = r();
  if (n === 1 || kind < 0.15) {
    const t = terms[0];
    const w = r();
    if (w < 0.15) return { scale: between(r, 0.5, 3), of: t } as Model;
    if (w < 0.3) return { shift: between(r, -5, 5), of: t } as Model;
    return t;
  }
  if (kind < 0.75 || !mixes) return { sum: terms } as Model;
  const ws = terms.map(() => between(r, 0.1, 1));
  const tot = ws.reduce((s, v) => s + v, 0);
  return { mix: terms.map((of, i) => ({ weight: ws[i] / tot, of })) } as Model;
}
