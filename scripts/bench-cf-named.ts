// npm run bench:cf-named — the kinds of model users send that were once slow or wrong, each by name (our own
// parameters): a heavy named law alone, compounds of gamma, lognormal and pareto claims, heavy portfolios (Student t,
// stable, gamma, weibull terms), a mixture of a heavy sum and a compound. Seven quantiles with ES and a 1000-point
// density over [q(0.001), q(0.999)] each, at the default tolerance; prints the least CPU time of BENCH_REPEAT calls
// (default 3, a fresh compile each), the route, and the largest relative quantile and ES bounds. Targets: 200 ms and
// 100 ms CPU. `--only=<prefix>` runs one. Pure lib/cf.
import { loadavg } from "node:os";
import { compile } from "@/lib/cf/compile";
import { clearDeadline, setDeadline } from "@/lib/cf/deadline";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

const SEVEN = [0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999];
const repeat = Math.max(1, Number(process.env.BENCH_REPEAT ?? 3));
const only = process.argv.find((a) => a.startsWith("--only="))?.slice(7);
const poisson = (lambda: number) => ({ family: "poisson", lambda });
const nb = (r: number, p: number) => ({ family: "negative_binomial", r, p });
const CASES: [string, Model][] = [
  ["pareto(1.53, 1.82) alone", { family: "pareto", alpha: 1.53, xm: 1.82 }],
  ["NB(3.2, 0.61) x gamma(1.56, 1)", { compound: { count: nb(3.2, 0.61), each: { family: "gamma", shape: 1.56, rate: 1 } } }],
  ["Poisson(2) x lognormal(0, 1)", { compound: { count: poisson(2), each: { family: "lognormal", mu: 0, sigma: 1 } } }],
  ["Poisson(25) x lognormal(8, 1.2)", { compound: { count: poisson(25), each: { family: "lognormal", mu: 8, sigma: 1.2 } } }],
  ["Poisson(2) x pareto(1.5, 1)", { compound: { count: poisson(2), each: { family: "pareto", alpha: 1.5, xm: 1 } } }],
  ["Poisson(2) x pareto(1.5, 1) mixed 1:1 with gamma(2, 1)", { mix: [{ weight: 0.5, of: { compound: { count: poisson(2), each: { family: "pareto", alpha: 1.5, xm: 1 } } } }, { weight: 0.5, of: { family: "gamma", shape: 2, rate: 1 } }] }],
  ["student_t + stable(1.28, 0.59) + gamma + weibull", { sum: [{ family: "student_t", nu: 3.5, loc: 0, scale: 1 }, { family: "stable", alpha: 1.28, beta: 0.59, scale: 1, loc: 0 }, { family: "gamma", shape: 2, rate: 1 }, { family: "weibull", shape: 1.5, scale: 2 }] }],
  ["NB(1.5, 0.4) x weibull + stable(1.25) + (t + t)", { sum: [{ compound: { count: nb(1.5, 0.4), each: { family: "weibull", shape: 1.3, scale: 1 } } }, { family: "stable", alpha: 1.25, beta: 0.3, scale: 1, loc: 0 }, { sum: [{ family: "student_t", nu: 4, loc: 0, scale: 1 }, { family: "student_t", nu: 2.5, loc: 1, scale: 0.5 }] }] }],
  ["mix of (pareto + NIG + weibull) and NB x lognormal", { mix: [{ weight: 0.6, of: { sum: [{ family: "pareto", alpha: 2.2, xm: 1 }, { family: "nig", alpha: 2, beta: 0.5, delta: 1, mu: 0 }, { family: "weibull", shape: 0.8, scale: 1 }] } }, { weight: 0.4, of: { compound: { count: nb(2, 0.5), each: { family: "lognormal", mu: 0, sigma: 1 } } } }] }],
] as [string, Model][];

/** least CPU ms of `repeat` calls, each on a fresh compile, with the last value */
function least<T>(model: Model, fn: (c: ReturnType<typeof compile>) => T): { cpu: number; value: T | null; error?: string } {
  let best = Infinity;
  let value: T | null = null;
  for (let i = 0; i < repeat; i++) {
    const c = compile(model);
    const c0 = process.cpuUsage();
    setDeadline(Date.now() + 60000);
    try {
      value = fn(c);
    } catch (e) {
      return { cpu: NaN, value: null, error: (e as Error).message };
    } finally {
      clearDeadline();
    }
    const d = process.cpuUsage(c0);
    best = Math.min(best, (d.user + d.system) / 1000);
  }
  return { cpu: best, value };
}

console.log(`named models, least CPU of ${repeat} (load ${loadavg()[0].toFixed(1)}); targets 200 ms (seven quantiles with ES), 100 ms (1000-point density)`);
for (const [name, model] of CASES) {
  if (only && !name.startsWith(only)) continue;
  const q = least(model, (c) => quantiles(c, SEVEN, { expectedShortfall: true }));
  if (!q.value) {
    console.log(`${name}: error ${q.error}`);
    continue;
  }
  const r = q.value;
  const relQ = Math.max(...Array.from(r.diagnostics.quantileError, (e, i) => e / Math.max(Math.abs(r.x[i]), 1e-300)));
  const relE = Math.max(...Array.from(r.diagnostics.expectedShortfallError ?? [], (e, i) => e / Math.abs(r.expectedShortfall![i])));
  const d = least(model, (c) => density(c, { grid: { from: r.x[0], to: r.x[6], count: 1000 } }));
  console.log(
    `${name}: quantiles+ES ${q.cpu.toFixed(1)} ms (${r.diagnostics.method}; relative bounds: quantile ${relQ.toExponential(1)}, ES ${relE.toExponential(1)}), ` +
      `density ${d.value ? `${d.cpu.toFixed(1)} ms (${d.value.diagnostics.method}, cdf bound ${d.value.diagnostics.error.cdf.toExponential(1)})` : `error ${d.error}`}`,
  );
}
