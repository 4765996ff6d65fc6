import { Meta } from "@/lib/api/common-schemas";
import { withinLimit, z } from "@/lib/api/zod";
import { MAX_LATTICE } from "@/lib/cf/limits";

const LatticeTable = z
  .object({
    origin: z.number({ error: "origin must be a finite number" }),
    step: z.number({ error: "step must be a finite number" }).positive({ error: "step must be positive" }),
    p: withinLimit(
      z.array(z.number({ error: "each probability must be a number" }).min(0, { error: "probabilities must be non-negative" })).min(1, { error: "p needs at least one value" }),
      MAX_LATTICE,
      `p exceeds the limit of ${MAX_LATTICE} values`,
    ),
  })
  .strict()
  .openapi("LatticeTable", { description: "probabilities p[k] at origin + k * step" });

export const ConvolveRequest = z
  .object({
    terms: withinLimit(z.array(LatticeTable).min(1, { error: "give at least one term" }), 256, "at most 256 terms"),
    power: withinLimit(z.number().int({ error: "power must be an integer" }).min(1, { error: "power must be at least 1" }), 1_000_000, "power exceeds the limit of 1000000")
      .optional()
      .openapi({ description: "n-fold power of the convolution of the terms (default 1)" }),
  })
  .strict()
  .openapi("ConvolveRequest");

export const ConvolveResponse = z
  .object({
    origin: z.number(),
    step: z.number(),
    p: z.array(z.number()),
    pError: z.array(z.number().nullable()).openapi({
      description: "a bound on each p[k]'s floating-point error (the terms as given taken as exact; the FFT's rounding where the products are long); null where none is derived",
    }),
    tailMass: z.number().openapi({ description: "mass dropped past the end of the table (0 unless the terms carried some)" }),
    meta: Meta,
  })
  .openapi("ConvolveResponse");
