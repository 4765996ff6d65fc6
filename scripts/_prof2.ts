import { compile } from "@/lib/cf/compile";
import { validateModel } from "@/lib/cf/validate";
const model = validateModel({
  compound: { count: { family: "poisson", lambda: 100 }, each: { layer: { deductible: 1, limit: 10 }, of: { family: "lognormal", mu: 0, sigma: 1.5 } } },
});
for (let i = 0; i < 30; i++) compile(model).bounds!();
