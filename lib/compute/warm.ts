// The compute threads' warm-up. V8 compiles a code path on its first runs, so a thread's first request through a
// route of the engine costs up to three times what the same request costs once the thread is warm (a seven-level
// quantile call on a sum of two stables, a Student t and an NIG: 350 ms cold, 100 ms warm; scripts/bench-cf-models.ts
// with BENCH_WARM shows the difference). When the pool starts, each thread runs these small requests once (the
// engine's main routes: closed forms, the light and heavy inversions, the damped route of compounds and their mixtures,
// lattice tables) so that users' first requests meet compiled code. Each call has its own deadline; the whole warm-up
// stops at its budget. The models are our own demo scenario (Tarnwell Mutual's motor and property books).
import { runConvolve, runDensity, runMoments, runQuantiles } from "@/lib/api/operations";
import { clearDeadline, setDeadline } from "@/lib/cf/deadline";
import type { OperationName } from "./types";

type WarmRequest = { op: OperationName; body: Record<string, unknown> };

const SEVEN = [0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999];
const motor = { compound: { count: { family: "poisson", lambda: 3.2 }, each: { family: "lognormal", mu: 0.4, sigma: 0.9 } } };
const property = { compound: { count: { family: "negative_binomial", r: 2.5, p: 0.55 }, each: { family: "gamma", shape: 1.7, rate: 0.6 } } };
const claims = (count: Record<string, unknown>, each: Record<string, unknown>) => ({ compound: { count, each } });
/**
 * Two books of several lines (mixtures whose components each take their own route: a closed form, damped compounds of
 * exponential, gamma and lognormal claims). The mixture route's code runs cold on a thread's first such request (an
 * eight-line book: three to five times its later cost) until it has run on two or three of them, whichever their
 * parameters: the five- and eight-line books below (the second one's quantiles twice, at other levels) do that before
 * users' first requests. Measured on scripts/bench-cf-models' mixtures, first call in a fresh process after the warm-up:
 * an eight-part compound mix 500 -> 135 ms (quantiles), 437 -> 111 ms (density); their later calls cost about the latter.
 */
const lines = {
  mix: [
    { weight: 0.2, of: { family: "gamma", shape: 2.1, rate: 0.8 } },
    { weight: 0.3, of: claims({ family: "negative_binomial", r: 1.8, p: 0.5 }, { family: "exponential", rate: 1.1 }) },
    { weight: 0.15, of: claims({ family: "negative_binomial", r: 2.2, p: 0.6 }, { family: "lognormal", mu: 0.5, sigma: 1.2 }) },
    { weight: 0.25, of: claims({ family: "poisson", lambda: 12 }, { family: "gamma", shape: 1.5, rate: 1.3 }) },
    { weight: 0.1, of: claims({ family: "poisson", lambda: 0.6 }, { family: "lognormal", mu: 0.8, sigma: 1.4 }) },
  ],
};
const regions = {
  mix: [
    { weight: 0.1, of: claims({ family: "negative_binomial", r: 2.4, p: 0.62 }, { family: "lognormal", mu: 0.7, sigma: 1 }) },
    { weight: 0.2, of: claims({ family: "poisson", lambda: 2.6 }, { family: "lognormal", mu: 1.4, sigma: 0.6 }) },
    { weight: 0.15, of: claims({ family: "poisson", lambda: 15 }, { family: "exponential", rate: 1.6 }) },
    { weight: 0.1, of: claims({ family: "negative_binomial", r: 2.9, p: 0.55 }, { family: "lognormal", mu: -0.6, sigma: 1.25 }) },
    { weight: 0.25, of: claims({ family: "negative_binomial", r: 3.2, p: 0.4 }, { family: "gamma", shape: 3.5, rate: 1.6 }) },
    { weight: 0.05, of: claims({ family: "negative_binomial", r: 0.9, p: 0.5 }, { family: "gamma", shape: 1.4, rate: 0.4 }) },
    { weight: 0.1, of: claims({ family: "poisson", lambda: 0.2 }, { family: "exponential", rate: 0.7 }) },
    { weight: 0.05, of: claims({ family: "poisson", lambda: 0.4 }, { family: "lognormal", mu: 1, sigma: 1.4 }) },
  ],
};
/** the routes' representatives: heavy two-sided sum, light sum with a quadrature term, positive power tail, damped sum, mixtures, two-tail sums */
const MODELS: Record<string, unknown>[] = [
  {
    sum: [
      { family: "stable", alpha: 1.4, beta: 0.3, scale: 1, loc: 0, param: "S1" },
      { family: "student_t", nu: 5, loc: 0, scale: 1.2 },
      { family: "nig", alpha: 2, beta: 0.4, delta: 0.7, mu: 0 },
    ],
  },
  { sum: [{ family: "gamma", shape: 2.2, rate: 0.9 }, { family: "uniform", a: -1, b: 2 }, { family: "weibull", shape: 1.3, scale: 2 }, { family: "lognormal", mu: 0.3, sigma: 0.8 }] },
  { sum: [{ family: "pareto", alpha: 2.4, xm: 1.2 }, { family: "gamma", shape: 3, rate: 1.5 }, { family: "normal", mu: 1, sigma: 0.5 }] },
  { sum: [motor, property, { family: "gamma", shape: 4, rate: 1 }] },
  { mix: [{ weight: 0.6, of: motor }, { weight: 0.4, of: property }] },
  // two power tails of close index: the heavy route's two-term residual (heavy-residual2.ts), one of each side
  {
    sum: [
      { family: "stable", alpha: 1.3, beta: 0.5, scale: 1, loc: 0, param: "S1" },
      { family: "stable", alpha: 1.35, beta: -0.2, scale: 0.8, loc: 0, param: "S1" },
      { family: "laplace", loc: 0, scale: 1 },
    ],
  },
  { sum: [{ family: "pareto", alpha: 2.3, xm: 1 }, { family: "pareto", alpha: 2.0, xm: 0.7 }, { family: "normal", mu: 0, sigma: 1 }] },
];
const routeRequests = (model: Record<string, unknown>): WarmRequest[] => [
  { op: "quantiles", body: { model, p: SEVEN, expectedShortfall: true } },
  { op: "density", body: { model, grid: { from: -2, to: 20, count: 1000 } } },
  { op: "moments", body: { model, order: 4 } },
];

/**
 * Heavy-tailed claims (the liability and casualty books: Poisson-pareto, NB-Burr, and a Poisson-lomax plus Poisson-weibull
 * sum), seven levels with ES and a density at 1 000 points each: their damped route's own code (the claims' transforms by
 * quadrature, the endpoint kernels' remainder bounds, the points' interpolation) ran cold on a thread's first such request.
 * First call in a fresh process after the whole warm-up (scratch timing, CPU, one run each at load 15-20, 7 levels with ES /
 * 1 000-point density), before -> after: Poisson(2)-pareto(3, 1) 356 -> 121 / 374 -> 203 ms; Poisson(2)-lomax(2.5, 1)
 * 174 -> 115 / 228 -> 202; NB(3, 0.4)-burr(2, 1.5, 1) 249 -> 96 / 530 -> 340; Poisson(3)-burr(3, 0.7, 1) 309 -> 231 /
 * 427 -> 421; Poisson(2)-lomax + Poisson(5)-weibull(0.5) 349 -> 219 / 595 -> 361. The six requests cost some 1.2 s of
 * CPU per thread at that load (the loose tolerance keeps their terms few; the code compiled is the same).
 */
const liability = claims({ family: "poisson", lambda: 1.4 }, { family: "pareto", alpha: 2.8, xm: 1.5 });
const casualty = claims({ family: "negative_binomial", r: 2.5, p: 0.45 }, { family: "burr", alpha: 2.4, gamma: 1.3, theta: 1.5 });
const marine = { sum: [claims({ family: "poisson", lambda: 1.7 }, { family: "lomax", alpha: 2.3, theta: 2 }), claims({ family: "poisson", lambda: 4 }, { family: "weibull", shape: 0.6, scale: 1.5 })] };
const heavyRequests = (model: Record<string, unknown>, hi: number): WarmRequest[] => [
  { op: "quantiles", body: { model, p: SEVEN, expectedShortfall: true, tolerance: 1e-6 } },
  { op: "density", body: { model, x: Array.from({ length: 1000 }, (_, i) => (hi * (i + 0.5)) / 1000), tolerance: 1e-6 } },
];

export const WARM_REQUESTS: WarmRequest[] = [
  ...MODELS.flatMap(routeRequests),
  { op: "density", body: { model: motor, x: Array.from({ length: 200 }, (_, i) => 0.1 * i), tolerance: 1e-9 } },
  { op: "quantiles", body: { model: { family: "pareto", alpha: 1.8, xm: 2 }, p: SEVEN, expectedShortfall: true } },
  ...heavyRequests(liability, 20),
  ...heavyRequests(casualty, 30),
  ...heavyRequests(marine, 60),
  { op: "convolve", body: { terms: [{ origin: 0, step: 1, p: [0.2, 0.5, 0.3] }, { origin: 1, step: 1, p: [0.6, 0.4] }], power: 3 } },
  // last, the costliest: on a loaded machine the budget then cuts these, never the other routes' single requests
  ...routeRequests(lines),
  ...routeRequests(regions),
  { op: "quantiles", body: { model: regions, p: [0.05, 0.5, 0.95, 0.995, 0.9995], expectedShortfall: true } },
];

const RUN: Partial<Record<OperationName, (body: never) => unknown>> = {
  quantiles: runQuantiles,
  density: runDensity,
  moments: runMoments,
  convolve: runConvolve,
};

export interface WarmReport {
  /** requests run to the end */
  done: number;
  /** requests that failed or hit their deadline (op and message): the warm-up goes on past them */
  failed: string[];
  /** requests not started because the budget ran out */
  skipped: number;
  ms: number;
}

/** Runs WARM_REQUESTS in this thread, each under min(perCallMs, what is left of budgetMs); never throws. */
export function warmEngine(budgetMs = 8000, perCallMs = 2000): WarmReport {
  const t0 = performance.now();
  const report: WarmReport = { done: 0, failed: [], skipped: 0, ms: 0 };
  for (const r of WARM_REQUESTS) {
    const left = budgetMs - (performance.now() - t0);
    if (left <= 0) {
      report.skipped++;
      continue;
    }
    setDeadline(Date.now() + Math.min(perCallMs, left));
    try {
      RUN[r.op]!(r.body as never);
      report.done++;
    } catch (e) {
      report.failed.push(`${r.op}: ${(e as Error).message}`);
    } finally {
      clearDeadline();
    }
  }
  report.ms = Math.round(performance.now() - t0);
  return report;
}
