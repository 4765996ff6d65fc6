import { compile, quantiles, density } from "@/lib/cf";
const lambda = Number(process.argv[2] ?? 10), sigma = Number(process.argv[3] ?? 1.5);
const model: any = { compound: { count: { family: "poisson", lambda }, each: { family: "lognormal", mu: 0, sigma } } };
const hi = quantiles(compile(model), [0.9999]).x[0];
const xs = Array.from({ length: 1000 }, (_, i) => (hi * (i + 0.5)) / 1000);
for (let i = 0; i < Number(process.argv[4] ?? 6); i++) {
  const c = compile(model);
  const c0 = process.cpuUsage();
  const r: any = density(c, { x: xs, tolerance: 1e-9 });
  const d = process.cpuUsage(c0);
  console.log(i, ((d.user + d.system) / 1000).toFixed(1), r.method, r.diagnostics.error.cdf.toExponential(2), r.diagnostics.notes?.length);
}
