import { compile, density, quantiles } from "../lib/cf";
const m = { compound: { count: { family: "poisson", lambda: 2 }, each: { family: "lognormal", mu: 0, sigma: 1 } } };
const c = compile(m, { discretise: false });
for (const tol of [1e-8, 1e-10]) {
let t0 = performance.now();
const d = density(c, { x: [1, 5, 10, 20], tolerance: tol });
console.log("pts", tol, (performance.now() - t0).toFixed(0), d.diagnostics.terms, d.diagnostics.maxFrequency, d.diagnostics.range, d.diagnostics.error, d.diagnostics.notes);
t0 = performance.now();
const g = density(c, { grid: { from: 0, to: 40, count: 1000 }, tolerance: tol });
console.log("grid", (performance.now() - t0).toFixed(0), g.diagnostics.gridSize, g.diagnostics.maxFrequency, g.diagnostics.range, g.diagnostics.error);
}
