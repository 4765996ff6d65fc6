// Benchmark: compounds with lognormal/pareto/weibull severities, discretised lattice route vs the continuous-CF route.
// Prints medians (ms) of compile + density on a 101-point grid. `--before` also times the continuous route.
import { compile, density, type Model } from "../lib/cf/index";

const cases: [string, Model][] = [
  ["NB(3, 0.2) x pareto(2.5, 1)", { compound: { count: { family: "negative_binomial", r: 3, p: 0.2 }, each: { family: "pareto", alpha: 2.5, xm: 1 } } }],
  ["Poisson(5) x lognormal(0, 2)", { compound: { count: { family: "poisson", lambda: 5 }, each: { family: "lognormal", mu: 0, sigma: 2 } } }],
  ["Poisson(5) x weibull(0.7, 2)", { compound: { count: { family: "poisson", lambda: 5 }, each: { family: "weibull", shape: 0.7, scale: 2 } } }],
];
const before = process.argv.includes("--before");
const only = process.argv.find((a) => a.startsWith("--only="))?.slice(7);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

for (const [name, model] of cases) {
  if (only && !name.startsWith(only)) continue;
  const grid = { grid: { from: 0, to: 100, count: 101 } };
  const ts: number[] = [];
  let note = "";
  for (let r = 0; r < 7; r++) {
    const t0 = performance.now();
    const res = density(compile(model), grid);
    ts.push(performance.now() - t0);
    note = res.diagnostics.notes.find((n) => n.startsWith("discretisation error")) ?? "";
  }
  console.log(`${name}: discretised lattice route, median ${median(ts).toFixed(1)} ms (first ${ts[0].toFixed(1)} ms); ${note}`);
  if (before) {
    const t0 = performance.now();
    density(compile(model, { discretise: false }), grid);
    console.log(`${name}: continuous-CF route (before), ${(performance.now() - t0).toFixed(0)} ms`);
  }
}

// lognormal with sigma <= 1 keeps the continuous-CF route by default; the forced lattice route for comparison
const ln: Model = { compound: { count: { family: "poisson", lambda: 20 }, each: { family: "lognormal", mu: 1, sigma: 0.8 } } };
for (const [label, opts] of [["continuous-CF route (default)", {}], ["discretised (opt-in)", { discretise: {} }]] as const) {
  const ts: number[] = [];
  let err = 0;
  for (let r = 0; r < 7; r++) {
    const t0 = performance.now();
    const res = density(compile(ln, opts), { grid: { from: 0, to: 100, count: 101 } });
    ts.push(performance.now() - t0);
    err = res.diagnostics.error.cdf;
  }
  console.log(`Poisson(20) x lognormal(1, 0.8): ${label}, median ${median(ts).toFixed(1)} ms (first ${ts[0].toFixed(1)} ms), stated inversion cdf error ${err.toExponential(2)}`);
}
