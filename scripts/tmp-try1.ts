import { compile, density, quantiles } from "../lib/cf";
const models: any[] = [
  { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "lognormal", mu: 0, sigma: 1 } } },
  { compound: { count: { family: "poisson", lambda: 25 }, each: { family: "lognormal", mu: 8, sigma: 1.2 } } },
  { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "pareto", alpha: 3, scale: 1 } } },
  { compound: { count: { family: "poisson", lambda: 1000 }, each: { family: "lognormal", mu: 0, sigma: 2 } } },
  { compound: { count: { family: "negbinomial", r: 1.5, p: 0.3 }, each: { family: "weibull", shape: 0.7, scale: 1 } } },
];
for (const m of models) {
  const c = compile(m, { discretise: false });
  let t0 = performance.now();
  const q = quantiles(c, [0.001, 0.01, 0.5, 0.95, 0.99, 0.995, 0.999], { expectedShortfall: true });
  const tq = performance.now() - t0;
  console.log(JSON.stringify(m), c.kind.type, "q ms", tq.toFixed(0), Array.from(q.x).map((v) => v.toPrecision(8)).join(" "), "err", Array.from(q.diagnostics.quantileError).map((v) => v.toExponential(1)).join(" "));
  console.log("  ES", Array.from(q.expectedShortfall!).map((v) => v.toPrecision(8)).join(" "), Array.from(q.diagnostics.expectedShortfallError!).map((v) => v.toExponential(1)).join(" "), q.diagnostics.method);
  t0 = performance.now();
  const d = density(c, { grid: { from: 0, to: q.x[6], count: 1000 } });
  console.log("  density ms", (performance.now() - t0).toFixed(0), d.diagnostics.method, d.diagnostics.error.cdf.toExponential(2), d.diagnostics.error.pdf.toExponential(2), d.atoms);
}
