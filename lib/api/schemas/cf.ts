import { GridSpec, Meta, Points } from "@/lib/api/common-schemas";
import { modelRequest } from "@/lib/api/model-field";
import { z } from "@/lib/api/zod";

export const { doc: CfRequest, body: CfBody } = modelRequest("CfRequest", {
  t: z.union([Points, GridSpec]).openapi({ description: "the arguments t: a list, or { from, to, count }" }),
});

export const CfResponse = z
  .object({
    t: z.array(z.number()),
    re: z.array(z.number()).openapi({ description: "Re phi(t)" }),
    im: z.array(z.number()).openapi({ description: "Im phi(t)" }),
    error: z.array(z.number().nullable()).openapi({
      description: "a bound on |computed phi(t) - phi(t)| at each t (rounding, the declared error of numerical CFs, the rounding of scaled frequencies); null where the model derives none (the notes say why)",
    }),
    notes: z.array(z.string()),
    meta: Meta,
  })
  .openapi("CfResponse");
