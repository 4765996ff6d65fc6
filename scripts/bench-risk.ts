// npm run bench:risk — POST /api/v1/risk's engine work with ten measures on a Poisson(100) count of layered
// lognormal claims (each claim's 10 xs 1 layer of lognormal(0, 1.5)): wall and CPU time per request (median and
// minimum of 15 runs after 3 warm-ups), split into the model's compile and the whole request. Pure lib/cf; no server.
import { riskMeasures, type RiskRequest } from "@/lib/cf/risk";
import { compile } from "@/lib/cf/compile";
import { validateModel } from "@/lib/cf/validate";

const model = validateModel({
  compound: { count: { family: "poisson", lambda: 100 }, each: { layer: { deductible: 1, limit: 10 }, of: { family: "lognormal", mu: 0, sigma: 1.5 } } },
});
// ten measures: two VaR levels, two ES levels, a stop-loss, a limited mean, a layer, an exceedance, a return period, spec limits
const req: RiskRequest = {
  var: { p: [0.99, 0.995] },
  es: { p: [0.99, 0.995] },
  stopLoss: [250],
  limitedMean: [200],
  layerMean: [{ deductible: 200, limit: 100 }],
  exceedance: [250],
  returnPeriod: [200],
  outside: { lsl: 50, usl: 400 },
};

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
};

function measure(fn: () => unknown, runs = 15, warm = 3) {
  for (let i = 0; i < warm; i++) fn();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    fn();
    wall.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  return { wall: median(wall), wallMin: Math.min(...wall), cpu: median(cpu), cpuMin: Math.min(...cpu) };
}

const f = (x: number) => x.toFixed(1).padStart(7);
const compiled = measure(() => compile(model));
const all = measure(() => riskMeasures(model, req));
const r = riskMeasures(model, req);
console.log("risk bench: Poisson(100) x layer(10 xs 1) of lognormal(0, 1.5), ten measures");
console.log("                                   wall median    wall min   cpu median    cpu min   (ms)");
console.log(`compile                            ${f(compiled.wall)}     ${f(compiled.wallMin)}    ${f(compiled.cpu)}    ${f(compiled.cpuMin)}`);
console.log(`whole request (ten measures)       ${f(all.wall)}     ${f(all.wallMin)}    ${f(all.cpu)}    ${f(all.cpuMin)}`);
console.log(`target: <= 50 ms in the engine; cdf error bound of the route (${r.diagnostics.method}): ${r.diagnostics.cdfError.toExponential(2)}`);
const show = (name: string, m: { value: (number | null)[]; error: (number | null)[] } | undefined) =>
  m && console.log(`  ${name.padEnd(14)} ${m.value.map((v, i) => `${v === null ? "null" : Number(v.toPrecision(8))} ± ${m.error[i] === null ? "no bound" : m.error[i]!.toExponential(2)}`).join("   ")}`);
console.log("values with their error bounds:");
show("VaR", r.var);
show("ES", r.es);
show("stop-loss", r.stopLoss);
show("limited mean", r.limitedMean);
show("layer mean", r.layerMean);
show("exceedance", r.exceedance);
show("1-in-200", r.returnPeriod);
if (r.outside) console.log(`  ${"ppm outside".padEnd(14)} ${Number(r.outside.ppm.toPrecision(8))} ± ${(r.outside.error * 1e6).toExponential(2)}`);
console.log(`load average at the end: ${(await import("node:os")).loadavg().map((x) => x.toFixed(1)).join(" ")} on ${(await import("node:os")).cpus().length} cores`);
