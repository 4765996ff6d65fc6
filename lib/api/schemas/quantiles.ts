import { Meta, QuantileDiagnostics } from "@/lib/api/common-schemas";
import { DISCRETISE_OPT_IN } from "@/lib/cf/methods";
import { modelRequest } from "@/lib/api/model-field";
import { levelList, withinLimit, z } from "@/lib/api/zod";

export const { doc: QuantilesRequest, body: QuantilesBody } = modelRequest("QuantilesRequest", {
  p: withinLimit(
    levelList().min(1, { error: "give at least one level p" }),
    1000,
    "at most 1000 levels per request",
  ).openapi({ description: "levels in (0, 1); the quantile is the smallest x with F(x) >= p" }),
  expectedShortfall: z
    .boolean()
    .optional()
    .openapi({ description: "also return the expected shortfall at each level: E[X | X >= q_p] for the upper tail (default), E[X | X <= q_p] for the lower tail" }),
  tail: z
    .enum(["upper", "lower"])
    .optional()
    .openapi({ description: "which tail the expected shortfall averages: upper (default; losses as positive values, p near 1) or lower (returns, p near 0, e.g. 0.01)" }),
  tolerance: z.number().min(1e-14).max(0.1).optional().openapi({ description: "target absolute error of the cdf used (default 1e-10)" }),
  method: z
    .enum(["auto", "discretise"])
    .optional()
    .openapi({ description: `auto (default): the law is evaluated directly or inverted from its CF (damped for aggregate laws bounded below); discretise: ${DISCRETISE_OPT_IN}` }),
});

export const QuantilesResponse = z
  .object({
    p: z.array(z.number()),
    x: z.array(z.number()),
    expectedShortfall: z.array(z.number().nullable()).optional(),
    diagnostics: QuantileDiagnostics,
    meta: Meta,
  })
  .openapi("QuantilesResponse");
