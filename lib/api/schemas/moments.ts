import { Meta } from "@/lib/api/common-schemas";
import { modelRequest } from "@/lib/api/model-field";
import { withinLimit, z } from "@/lib/api/zod";
import { MAX_MOMENT_ORDER } from "@/lib/cf/limits";

export const { doc: MomentsRequest, body: MomentsBody } = modelRequest("MomentsRequest", {
  order: withinLimit(z.number().int({ error: "order must be an integer" }).min(1, { error: "order must be at least 1" }), MAX_MOMENT_ORDER, `order exceeds the limit of ${MAX_MOMENT_ORDER}`)
    .optional()
    .openapi({ description: "highest order wanted (default 4)" }),
});

const orders = z.array(z.number().nullable()).openapi({ description: "index 0 is order 1; null where the order does not exist" });
const errors = (of: string) =>
  z.array(z.number().nullable()).openapi({
    description: `bound on the absolute error of each entry of ${of} (same indices), derived by running error analysis through the model and the conversions; null where the value is null or no bound is derived (a note says so)`,
  });
const error = (of: string) => z.number().nullable().openapi({ description: `bound on the absolute error of ${of}; null where ${of} is null or no bound is derived` });

export const MomentsResponse = z
  .object({
    raw: orders,
    central: orders,
    cumulants: orders,
    mean: z.number().nullable(),
    variance: z.number().nullable(),
    skewness: z.number().nullable(),
    excessKurtosis: z.number().nullable(),
    rawError: errors("raw"),
    centralError: errors("central"),
    cumulantError: errors("cumulants"),
    meanError: error("mean"),
    varianceError: error("variance"),
    skewnessError: error("skewness"),
    excessKurtosisError: error("excessKurtosis"),
    exists: z.array(z.boolean()).openapi({ description: "whether E|X|^n is finite, for n = 1..order" }),
    momentIndex: z.number().nullable().openapi({ description: "sup{ r : E|X|^r < inf }; null when every moment exists" }),
    notes: z.array(z.string()),
    meta: Meta,
  })
  .openapi("MomentsResponse");
