import { Meta } from "@/lib/api/common-schemas";
import { z } from "@/lib/api/zod";

export const FamilyParameter = z
  .object({
    name: z.string(),
    description: z.string(),
    range: z.string().openapi({ description: "the allowed values, e.g. (0, inf)" }),
    default: z.union([z.number(), z.string()]).optional(),
  })
  .openapi("FamilyParameter");

export const Family = z
  .object({
    family: z.string(),
    title: z.string(),
    parameters: z.array(FamilyParameter),
    support: z.string(),
    kind: z.string().openapi({ description: "continuous, lattice or point" }),
    cf: z.string().openapi({ description: "the characteristic function as text" }),
    cfMethod: z.string().openapi({ description: "how the engine evaluates the CF: closed form, or numerical quadrature (with its error bound)" }),
    moments: z.string().openapi({ description: "which moments exist" }),
    momentExistence: z.string().openapi({ description: 'machine-readable: "all", "none", or "below:<parameter expression>"' }),
    tailIndex: z.string().openapi({ description: 'right-tail index: P(X > x) ~ x^-index; "none" when lighter than any power, "bounded" for bounded support' }),
    source: z.string().openapi({ description: "the reference the CF and parameter ranges are taken from (book and chapter)" }),
  })
  .openapi("Family");

export const FamiliesResponse = z.object({ families: z.array(Family), meta: Meta }).openapi("FamiliesResponse");
