/**
 * Risk measures of a law, each with an error bound built from the inversion's own bounds: VaR and ES in either
 * tail, stop-loss E[(S - d)+], limited mean E[min(S, u)], layer mean E[min(max(S - d, 0), l)], exceedance P(S > x),
 * return levels (the x with P(S > x) = 1/T) and the probability outside [lsl, usl].
 *
 * Identities used (each exact for any law with the moments named):
 *  - E[(S - d)+] = E[S] - d + int_{-inf}^d F(y) dy (integration by parts; Loss Models, limited expected value);
 *  - E[(u - S)+] = int_{-inf}^u F(y) dy;   E[min(S, u)] = u - E[(u - S)+];
 *  - ES_p (upper) = q_p + E[(S - q_p)+]/(1 - p), ES_p (lower) = q_p - E[(q_p - S)+]/p (Acerbi & Tasche 2002);
 *  - E[(S - d)+] = E[(S - q)+] + int_d^q S(y) dy for any q, used with q the quantile at level F(d).
 * Lattice laws (tabulated or discretised) are summed on their table, whose cdf error bound eps gives
 * |int_a^u (F_table - F)| <= (u - a) eps; other laws use the engine's quantiles and expected shortfall.
 */
import type { CompiledModel, Model } from "./types";
import { compile, type CompileOptions } from "./compile";
import { CfError } from "./errors";
import type { RiskMethod } from "./methods";
import { backendOf, excess, gridSide, type Backend } from "./risk-backend";
import { boundedMeasures, fin } from "./risk-bounds";

export type Tail = "upper" | "lower";

export interface RiskRequest {
  var?: { p: number[]; tail?: Tail };
  es?: { p: number[]; tail?: Tail };
  stopLoss?: number[];
  limitedMean?: number[];
  layerMean?: { deductible: number; limit: number }[];
  exceedance?: number[];
  returnPeriod?: number[];
  outside?: { lsl: number; usl: number };
}

export interface MeasureValues {
  value: (number | null)[];
  error: (number | null)[];
}

export interface RiskResult {
  var?: MeasureValues;
  es?: MeasureValues;
  stopLoss?: MeasureValues;
  limitedMean?: MeasureValues;
  layerMean?: MeasureValues;
  exceedance?: MeasureValues;
  returnPeriod?: MeasureValues;
  outside?: { value: number; ppm: number; error: number };
  notes: string[];
  diagnostics: { method: RiskMethod; cdfError: number };
}

const EPS = Number.EPSILON;

/** All requested measures of `model` (validated notation). Measures that do not exist come back null with a note. */
export function riskMeasures(model: Model, req: RiskRequest, optionsIn: CompileOptions = {}): RiskResult {
  // layered compounds stay continuous as on /density and /quantiles (the same law on every endpoint); method
  // "discretise" (an explicit discretise object) brackets them between the claims rounded down and up
  const options: CompileOptions = optionsIn;
  const c = compile(model, options);
  const bounds = c.bounds?.();
  if (bounds) return boundedMeasures(c, bounds, req, []);
  const be = backendOf(c);
  const notes: string[] = [];
  let negC: CompiledModel | null = null;
  let negBe: Backend | null = null;
  const neg = () => {
    if (!negBe) {
      negC = compile({ scale: -1, of: model } as Model, options);
      negBe = backendOf(negC);
    }
    return { c: negC as unknown as CompiledModel, be: negBe };
  };
  const hasRightMean = c.tails.right > 1 || Number.isFinite(c.support[1]);
  const hasLeftMean = c.tails.left > 1 || Number.isFinite(c.support[0]);
  const out: RiskResult = { notes, diagnostics: { method: be.method, cdfError: 0 } };
  const mv = (vals: { value: number | null; error: number | null }[]): MeasureValues => ({
    value: vals.map((v) => fin(v.value)),
    error: vals.map((v) => (fin(v.value) === null ? null : v.error === null || !Number.isFinite(v.error) ? null : v.error)),
  });

  if (req.var) {
    const r = be.quant(req.var.p, false);
    out.var = mv(req.var.p.map((_, i) => ({ value: r.q[i], error: r.qErr[i] })));
  }
  if (req.es) {
    const tail = req.es.tail ?? "upper";
    if (tail === "upper") {
      if (!hasRightMean) {
        out.es = { value: req.es.p.map(() => null), error: req.es.p.map(() => null) };
        notes.push(`es: E[X | X >= q_p] is infinite: the right tail decays like x^-${c.tails.right}, so the mean of the upper tail does not exist.`);
      } else {
        const r = be.quant(req.es.p, true);
        out.es = mv(req.es.p.map((_, i) => ({ value: r.es[i], error: r.esErr[i] ?? null })));
      }
    } else if (!hasLeftMean) {
      out.es = { value: req.es.p.map(() => null), error: req.es.p.map(() => null) };
      notes.push(`es: E[X | X <= q_p] is infinite: the left tail decays like |x|^-${c.tails.left}, so the mean of the lower tail does not exist.`);
    } else {
      // lower tail: ES_p(X) = -ES_{1-p}(-X) (upper tail of the negated law)
      const n = neg();
      const r = n.be.quant(req.es.p.map((p) => 1 - p), true);
      out.es = mv(req.es.p.map((_, i) => ({ value: r.es[i] === undefined ? null : -r.es[i], error: r.esErr[i] ?? null })));
    }
  }
  const upperExcess = (ds: number[]) => (hasRightMean ? excess(c, be, ds) : null);
  const lowerExcess = (us: number[]) => {
    // E[(u - X)+] = E[(-X - (-u))+]
    if (!hasLeftMean) return null;
    const left = be.leftIntegral(us) ?? gridSide(c, us, "lower");
    if (left) return left;
    const n = neg();
    return excess(n.c, n.be, us.map((u) => -u));
  };
  if (req.stopLoss) {
    const r = upperExcess(req.stopLoss);
    if (!r) {
      out.stopLoss = { value: req.stopLoss.map(() => null), error: req.stopLoss.map(() => null) };
      notes.push(`stopLoss: E[(S - d)+] is infinite: the right tail decays like x^-${c.tails.right} (the mean does not exist).`);
    } else out.stopLoss = mv(r);
  }
  if (req.limitedMean) {
    const us = req.limitedMean;
    // with a mean, E[min(S, u)] = E[S] - E[(S - u)+]; else (or where that bound is above 1e-8 of the value)
    // u - E[(u - S)+]; each point keeps the smaller of the bounds, all of which hold
    const up = hasRightMean && hasLeftMean ? upperExcess(us) : null;
    const m = up ? (c.cumulants(1)[0] as number) : 0;
    const vals: { value: number; error: number }[] = us.map((_, i) =>
      up ? { value: m - up[i].value, error: up[i].error + 4 * EPS * (Math.abs(m) + Math.abs(up[i].value)) } : { value: NaN, error: Infinity },
    );
    const need = us.flatMap((_, i) => (vals[i].error <= 1e-8 * (1 + Math.abs(vals[i].value)) ? [] : [i]));
    const r = need.length ? lowerExcess(need.map((i) => us[i])) : [];
    if (!r && !up) {
      out.limitedMean = { value: us.map(() => null), error: us.map(() => null) };
      notes.push(`limitedMean: E[min(S, u)] is minus infinity: the left tail decays like |x|^-${c.tails.left}.`);
    } else {
      if (r)
        need.forEach((i, j) => {
          const l = { value: us[i] - r[j].value, error: r[j].error + 4 * EPS * Math.abs(us[i]) };
          if (l.error < vals[i].error) vals[i] = l;
        });
      out.limitedMean = mv(vals);
    }
  }
  if (req.layerMean) {
    const L = req.layerMean;
    const ends = [...L.map((x) => x.deductible), ...L.map((x) => x.deductible + x.limit)];
    let r: { value: number; error: number }[] | null = null;
    if (hasRightMean) {
      const e = excess(c, be, ends);
      r = L.map((_, i) => ({ value: e[i].value - e[i + L.length].value, error: e[i].error + e[i + L.length].error }));
    } else if (hasLeftMean) {
      const e = lowerExcess(ends)!;
      // int_d^{d+l} S = l - (E[(d+l - X)+] - E[(d - X)+])
      r = L.map((x, i) => ({ value: x.limit - (e[i + L.length].value - e[i].value), error: e[i].error + e[i + L.length].error + 4 * EPS * x.limit }));
    }
    if (!r) {
      out.layerMean = { value: L.map(() => null), error: L.map(() => null) };
      notes.push("layerMean: neither tail of this law has a mean, and the layer mean is computed through one of them; not available.");
    } else out.layerMean = mv(r.map((x, i) => ({ value: Math.min(Math.max(x.value, 0), L[i].limit), error: x.error })));
  }
  if (req.exceedance) {
    const r = be.at(req.exceedance);
    out.exceedance = mv(req.exceedance.map((_, i) => ({ value: r.S[i], error: r.err })));
  }
  if (req.returnPeriod) {
    const r = be.quant(req.returnPeriod.map((T) => 1 - 1 / T), false);
    out.returnPeriod = mv(req.returnPeriod.map((_, i) => ({ value: r.q[i], error: r.qErr[i] })));
  }
  if (req.outside) {
    const { lsl, usl } = req.outside;
    if (!(usl > lsl)) throw new CfError("invalid_model", "/outside/usl", `outside.usl (${usl}) must be greater than outside.lsl (${lsl}).`);
    const r = be.at([lsl, usl]);
    // P(S < lsl) = F(lsl) - P(S = lsl)
    const v = Math.max(0, r.F[0] - r.atom[0]) + r.S[1];
    const e = 2 * r.err + 4 * EPS;
    out.outside = { value: v, ppm: v * 1e6, error: e };
  }
  out.diagnostics = { method: be.method, cdfError: be.cdfError };
  out.notes.push(...c.notes);
  return out;
}
