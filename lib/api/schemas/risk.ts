import { Meta } from "@/lib/api/common-schemas";
import { DISCRETISE_OPT_IN, RISK_METHODS, describeMethods } from "@/lib/cf/methods";
import { modelRequest } from "@/lib/api/model-field";
import { levelList, withinLimit, z } from "@/lib/api/zod";

const MAX_VALUES = 1000;
const finite = (what: string) => z.number({ error: `${what} must be a finite number` });
const list = (what: string, item: z.ZodNumber, description: string) =>
  withinLimit(z.array(item).min(1, { error: `give at least one ${what}` }), MAX_VALUES, `at most ${MAX_VALUES} values of ${what}`).optional().openapi({ description });

const tail = z
  .enum(["upper", "lower"])
  .optional()
  .openapi({ description: "upper (default): the loss tail of positive losses, p near 1; lower: the loss tail of returns, p near 0 (e.g. 0.01)" });

const Levels = (what: string, description: string) =>
  z
    .object({ p: withinLimit(levelList().min(1, { error: `give at least one level for ${what}` }), MAX_VALUES, `at most ${MAX_VALUES} levels`), tail })
    .strict()
    .optional()
    .openapi({ description });

export const { doc: RiskRequest, body: RiskBody } = modelRequest("RiskRequest", {
  var: Levels("var", "value at risk VaR_p = q_p, the smallest x with F(x) >= p, in either tail"),
  es: Levels("es", "expected shortfall: E[X | X >= q_p] (upper tail) or E[X | X <= q_p] (lower tail)"),
  stopLoss: list("retention", finite("each retention"), "retentions d: the stop-loss premium E[(S - d)+]"),
  limitedMean: list("limit", finite("each limit"), "limits u: the limited expected value E[min(S, u)]"),
  layerMean: withinLimit(
    z
      .array(
        z
          .object({ deductible: finite("layerMean.deductible"), limit: finite("layerMean.limit").gt(0, { error: "layerMean.limit must be > 0" }) })
          .strict(),
      )
      .min(1, { error: "give at least one layer" }),
    MAX_VALUES,
    `at most ${MAX_VALUES} layers`,
  )
    .optional()
    .openapi({ description: "aggregate layers (d, l): E[min(max(S - d, 0), l)]" }),
  exceedance: list("threshold", finite("each threshold"), "thresholds x: the exceedance probability P(S > x)"),
  returnPeriod: list(
    "return period",
    z.number({ error: "each return period must be a number" }).gt(1, { error: "return periods must be greater than 1" }),
    "return periods T (years, or any period): the return level, the x with P(S > x) = 1/T",
  ),
  outside: z
    .object({ lsl: finite("outside.lsl"), usl: finite("outside.usl") })
    .strict()
    .refine((o) => o.usl > o.lsl, { error: "outside.usl must be greater than outside.lsl", path: ["usl"] })
    .optional()
    .openapi({ description: "specification limits: P(S < lsl) + P(S > usl), also in parts per million" }),
  tolerance: z.number().min(1e-14).max(0.1).optional().openapi({ description: "target absolute cdf error of the inversion (default 1e-10)" }),
  method: z
    .enum(["auto", "discretise"])
    .optional()
    .openapi({ description: `auto (default) or discretise: ${DISCRETISE_OPT_IN}` }),
});

const Measure = z
  .object({
    value: z.array(z.number().nullable()).openapi({ description: "one value per input, in order; null where the measure does not exist (see notes)" }),
    error: z.array(z.number().nullable()).openapi({ description: "bound on the absolute error of each value; null where the value is null or no bound could be derived" }),
  })
  .openapi("RiskMeasure");

export const RiskResponse = z
  .object({
    var: Measure.optional(),
    es: Measure.optional(),
    stopLoss: Measure.optional(),
    limitedMean: Measure.optional(),
    layerMean: Measure.optional(),
    exceedance: Measure.optional(),
    returnPeriod: Measure.optional(),
    outside: z
      .object({ value: z.number(), ppm: z.number(), error: z.number() })
      .optional()
      .openapi({ description: "P(S < lsl) + P(S > usl), the same in parts per million, and the error bound of the probability" }),
    notes: z.array(z.string()).openapi({ description: "why a value is null, and every approximation made in the model" }),
    diagnostics: z
      .object({ method: z.enum(RISK_METHODS).openapi({ description: `route: ${describeMethods(RISK_METHODS)}` }), cdfError: z.number() })
      .openapi({ description: "the route and the cdf error bound it works with" }),
    meta: Meta,
  })
  .openapi("RiskResponse");
