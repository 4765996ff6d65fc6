// Benchmark: compounds of heavy-tailed continuous severities (pareto, weibull, lomax, Burr XII), alone and inside
// sums, through lib/cf directly. Prints, per model, the route and the time (ms) of the seven quantiles 0.001 ... 0.999
// with ES, of the tail levels 0.95 ... 0.9999 with ES, and of a 1 000-point density. `--only=<prefix>` runs one.
import { compile, density, quantiles, type Model } from "../lib/cf/index";

const poisson = (lambda: number) => ({ family: "poisson", lambda }) as const;
const nb = (r: number, p: number) => ({ family: "negative_binomial", r, p }) as const;
const cases: [string, Model][] = [
  ["Poisson(2) x pareto(3, 1)", { compound: { count: poisson(2), each: { family: "pareto", alpha: 3, xm: 1 } } }],
  ["Poisson(2) x lomax(2.5, 1)", { compound: { count: poisson(2), each: { family: "lomax", alpha: 2.5, theta: 1 } } }],
  ["NB(3, 0.4) x burr(2, 1.5, 1)", { compound: { count: nb(3, 0.4), each: { family: "burr", alpha: 2, gamma: 1.5, theta: 1 } } }],
  ["Poisson(3) x burr(3, 0.7, 1)", { compound: { count: poisson(3), each: { family: "burr", alpha: 3, gamma: 0.7, theta: 1 } } }],
  ["Poisson(2) x pareto(3, 1) + gamma(2, 1)", { sum: [{ compound: { count: poisson(2), each: { family: "pareto", alpha: 3, xm: 1 } } }, { family: "gamma", shape: 2, rate: 1 }] }],
  ["Poisson(2) x lomax(2.5, 1) + Poisson(5) x weibull(0.5, 1)", { sum: [{ compound: { count: poisson(2), each: { family: "lomax", alpha: 2.5, theta: 1 } } }, { compound: { count: poisson(5), each: { family: "weibull", shape: 0.5, scale: 1 } } }] }],
  ["Poisson(2) x pareto(3, 1) + normal(0, 1)", { sum: [{ compound: { count: poisson(2), each: { family: "pareto", alpha: 3, xm: 1 } } }, { family: "normal", mu: 0, sigma: 1 }] }],
];
const only = process.argv.find((a) => a.startsWith("--only="))?.slice(7);
const SEVEN = [0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999];
const TAIL = [0.95, 0.99, 0.999, 0.9999];

function timed<T>(f: () => T): [T, number] {
  const t0 = performance.now();
  const r = f();
  return [r, performance.now() - t0];
}

for (const [name, model] of cases) {
  if (only && !name.startsWith(only)) continue;
  const [q7, t7] = timed(() => quantiles(compile(model), SEVEN, { expectedShortfall: true }));
  const [qt, tt] = timed(() => quantiles(compile(model), TAIL, { expectedShortfall: true }));
  const c = compile(model);
  const hi = qt.x[2];
  const xs = Array.from({ length: 1000 }, (_, i) => (hi * (i + 0.5)) / 1000);
  const [d, td] = timed(() => density(c, { x: xs }));
  const worstQ = Math.max(...Array.from(qt.diagnostics.quantileError, (e, i) => e / qt.x[i]));
  const worstEs = Math.max(...Array.from(qt.diagnostics.expectedShortfallError ?? [], (e, i) => e / qt.expectedShortfall![i]));
  console.log(
    `${name}: seven quantiles + ES ${t7.toFixed(0)} ms (${q7.diagnostics.method}); tail levels + ES ${tt.toFixed(0)} ms ` +
      `(relative bounds: quantile ${worstQ.toExponential(1)}, ES ${worstEs.toExponential(1)}); 1000-point density ${td.toFixed(0)} ms ` +
      `(${d.diagnostics.method}, cdf bound ${d.diagnostics.error.cdf.toExponential(1)})`,
  );
}
