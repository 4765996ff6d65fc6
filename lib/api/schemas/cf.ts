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
    meta: Meta,
  })
  .openapi("CfResponse");
