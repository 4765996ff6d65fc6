import { AtomSchema, Diagnostics, GridSpec, Meta, Points } from "@/lib/api/common-schemas";
import { modelRequest } from "@/lib/api/model-field";
import { z } from "@/lib/api/zod";
import { DISCRETISE_OPT_IN } from "@/lib/cf/methods";

export const { doc: DensityRequest, body: DensityBody } = modelRequest("DensityRequest", {
  x: Points.optional().openapi({ description: "arbitrary points, evaluated pointwise (good for tails); or give grid; neither: an automatic grid" }),
  grid: GridSpec.optional(),
  method: z
    .enum(["auto", "fft", "gil-pelaez", "discretise"])
    .optional()
    .openapi({ description: `default auto: a single named family directly, aggregate laws bounded below by the damped transform, others by FFT on grids and Gil-Pelaez at points; fft / gil-pelaez ask for that inversion; discretise: ${DISCRETISE_OPT_IN}` }),
  tolerance: z
    .number()
    .min(1e-14, { error: "tolerance below 1e-14 cannot be met in double precision" })
    .max(0.1, { error: "tolerance must be at most 0.1" })
    .optional()
    .openapi({ description: "target absolute error of pdf and cdf (default 1e-10; 1e-8 for laws with power tails inverted by period doubling); diagnostics.tolerance says whether it was met" }),
  range: z
    .object({ from: z.number(), to: z.number() })
    .strict()
    .optional()
    .openapi({ description: "override of the window [from, to) the inversion periodises over" }),
  maxFrequency: z.number().positive().optional().openapi({ description: "override of the largest |t| used" }),
});

export const DensityResponse = z
  .object({
    x: z.array(z.number()),
    pdf: z
      .array(z.number().nullable())
      .optional()
      .openapi({
        description:
          "density of the continuous part (absent for lattice or discrete laws); null where the density is unbounded at that very point (a power singularity at an end of the support, e.g. gamma with shape < 1 at 0): JSON has no infinity, and those points are listed in diagnostics.unboundedDensityAt",
      }),
    pmf: z.array(z.number()).optional().openapi({ description: "probability at each x (lattice and discrete laws)" }),
    cdf: z.array(z.number()),
    sf: z.array(z.number()).openapi({ description: "P(X > x), computed directly: accurate in relative terms in the upper tail" }),
    atoms: z.array(AtomSchema),
    diagnostics: Diagnostics,
    meta: Meta,
  })
  .openapi("DensityResponse");
