// The bound audit's risk-measure set: what POST /api/v1/risk answers (stop-loss, limited and layer means, VaR, ES,
// exceedance) against closed forms: normal stop-loss (tests/fixtures/reference-risk, scipy), compound Poisson with
// exponential claims and with layered exponential claims (Erlang mixtures in mpmath at 40 digits,
// tests/fixtures/reference-risk and tests/fixtures/reference-layered). The layered compounds run both routes: the
// default (continuous) and the bracket of method discretise.
import { compiled, guarded, push, read, type Quantity } from "./bound-audit-core";
import type { Model } from "@/lib/cf/types";
import { riskMeasures, type RiskRequest } from "@/lib/cf/risk";
import type { CompileOptions } from "@/lib/cf/compile";

type Pt<K extends string> = { [k in K]: number } & { value: number };
interface RiskCase {
  model: Model;
  mean?: number;
  var?: Pt<"p">[];
  es?: Pt<"p">[];
  exceedance?: Pt<"x">[];
  stopLoss?: Pt<"d">[];
  limitedMean?: Pt<"u">[];
  layerMean?: { deductible: number; limit: number; value: number }[];
}

function audit(set: string, k: RiskCase, options: CompileOptions) {
  if (!compiled(set, k.model)) return;
  const req: RiskRequest = {};
  if (k.var) req.var = { p: k.var.map((v) => v.p) };
  if (k.es) req.es = { p: k.es.map((v) => v.p) };
  if (k.exceedance) req.exceedance = k.exceedance.map((v) => v.x);
  if (k.stopLoss) req.stopLoss = k.stopLoss.map((v) => v.d);
  // E[min(S, u)] = E[S] - E[(S - u)+]: the normal and Erlang fixtures give the stop-loss and the mean in closed form
  const limits = k.limitedMean ?? (k.stopLoss && k.mean !== undefined ? k.stopLoss.map((v) => ({ u: v.d, value: k.mean! - v.value })) : undefined);
  if (limits) req.limitedMean = limits.map((v) => v.u);
  if (k.layerMean) req.layerMean = k.layerMean.map(({ deductible, limit }) => ({ deductible, limit }));
  const r = guarded(`${set} ${JSON.stringify(k.model)}`, () => riskMeasures(k.model, req, options));
  if (!r) return;
  const add = (q: Quantity, what: string, refs: { value: number }[] | undefined, got: { value: (number | null)[]; error: (number | null)[] } | undefined, at: (i: number) => number) =>
    refs?.forEach((ref, i) => {
      const v = got?.value[i];
      const e = got?.error[i];
      // a missing value or bound where the measure exists is reported as an infinite bound (honest, bounds nothing)
      push(set, q, `${JSON.stringify(k.model)} ${what} ${at(i)}`, v ?? NaN, ref.value, 1e-14 * Math.abs(ref.value) + 1e-16, e ?? Infinity);
    });
  add("quantile", "VaR p=", k.var, r.var, (i) => k.var![i].p);
  add("ES", "ES p=", k.es, r.es, (i) => k.es![i].p);
  add("sf", "exceedance x=", k.exceedance, r.exceedance, (i) => k.exceedance![i].x);
  add("stopLoss", "E[(S - d)+] d=", k.stopLoss, r.stopLoss, (i) => k.stopLoss![i].d);
  add("limitedMean", "E[min(S, u)] u=", limits, r.limitedMean, (i) => limits![i].u);
  add("layerMean", "layer mean at", k.layerMean, r.layerMean, (i) => k.layerMean![i].deductible);
}

export function riskSet() {
  const f = read<{ normal: (RiskCase & { model: { mu: number } })[]; compoundPoissonExponential: RiskCase[] }>("reference-risk/risk.json");
  for (const k of f.normal) audit("risk-measures", { ...k, mean: k.model.mu }, {});
  for (const k of f.compoundPoissonExponential) {
    const m = k.model as unknown as { compound: { count: { lambda: number }; each: { rate: number } } };
    audit("risk-measures", { ...k, mean: m.compound.count.lambda / m.compound.each.rate }, {});
  }
  const g = read<{ exponential: RiskCase[] }>("reference-layered/layered.json");
  for (const k of g.exponential) {
    audit("risk-measures/layered", k, {});
    audit("risk-measures/layered bracket", k, { layeredCompounds: "bracket" });
  }
}
