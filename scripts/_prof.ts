import { riskMeasures } from "@/lib/cf/risk";
import { compile } from "@/lib/cf/compile";
import { validateModel } from "@/lib/cf/validate";
const model = validateModel({
  compound: { count: { family: "poisson", lambda: 100 }, each: { layer: { deductible: 1, limit: 10 }, of: { family: "lognormal", mu: 0, sigma: 1.5 } } },
});
const req = { var: { p: [0.99, 0.995] }, es: { p: [0.99, 0.995] }, stopLoss: [250], limitedMean: [200], layerMean: [{ deductible: 200, limit: 100 }], exceedance: [250], returnPeriod: [200], outside: { lsl: 50, usl: 400 } };
const cpu = (f: () => unknown) => { const c0 = process.cpuUsage(); f(); const c = process.cpuUsage(c0); return (c.user + c.system) / 1000; };
for (let i = 0; i < 5; i++) riskMeasures(model, req);
const med = (f: () => unknown) => { const xs = Array.from({ length: 15 }, () => cpu(f)).sort((a, b) => a - b); return xs[7].toFixed(1); };
console.log("compile only", med(() => compile(model)));
console.log("compile+bounds", med(() => compile(model).bounds!()));
console.log("all", med(() => riskMeasures(model, req)));
