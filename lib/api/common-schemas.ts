import { DATASET_ID } from "@/lib/datasets/schemas";
import { MAX_GRID_POINTS } from "@/lib/cf/limits";
import { OPERATOR_SPECS, OPERATORS } from "@/lib/cf/notation";
import { FamilySchema } from "@/lib/cf/schema";
import { DENSITY_METHODS, QUANTILE_METHODS, describeMethods } from "@/lib/cf/methods";
import { withinLimit, z } from "./zod";

// The model notation for the OpenAPI document, built from the notation's one table (lib/cf/notation.ts) with each
// child referring to the named "Model" component. Validation does not use it: validateModel checks every request.

/** A model node naming an uploaded dataset; resolved to its empirical law before the computation. */
export const DatasetRef = z
  .object({
    dataset: z.string().regex(DATASET_ID).openapi({ description: "a dataset id from GET /api/v1/datasets", example: "ds_7kq2m9x4c1vbt0hz" }),
    version: z.number().int().min(1).optional().openapi({ description: "the version to use; the latest when omitted" }),
  })
  .strict()
  .openapi("DatasetRef", { description: "The empirical law of an uploaded dataset (weighted when it has weights or counts)." });

export const ModelRef: z.ZodType = z
  .lazy(() =>
    z.union([
      FamilySchema,
      ...OPERATOR_SPECS.map((o) => o.zod(ModelRef).openapi(o.name, { description: o.description })),
      DatasetRef,
    ] as unknown as [z.ZodType, z.ZodType, ...z.ZodType[]]),
  )
  .openapi("Model", {
    description: `A model in Sumfold's notation: a named law { family, ...parameters }, or ${OPERATORS.join(", ")} or dataset. See /docs/models.`,
  });

const finite = (what: string) => z.number({ error: `${what} must be a finite number` });

export const GridSpec = z
  .object({
    from: finite("grid.from"),
    to: finite("grid.to"),
    count: withinLimit(
      z.number().int({ error: "grid.count must be an integer" }).min(2, { error: "grid.count must be at least 2" }),
      MAX_GRID_POINTS,
      `grid.count exceeds the limit of ${MAX_GRID_POINTS} points`,
    ),
  })
  .strict()
  .refine((g) => g.to > g.from, { error: "grid.to must be greater than grid.from", path: ["to"] })
  .openapi("GridSpec", { description: "count equally spaced points from `from` to `to`, both included." });

export const Points = withinLimit(z.array(finite("each point")).min(1, { error: "give at least one point" }), MAX_GRID_POINTS, `at most ${MAX_GRID_POINTS} points`);

export const Meta = z
  .object({
    requestId: z.string().openapi({ example: "3b0f0a52-95c3-4f0e-8a4e-8f3f7c0d51a2" }),
    computeUnits: z.number().int().openapi({ example: 1 }),
    engineVersion: z.string().openapi({ example: "0.1.0" }),
    elapsedMs: z.number().openapi({ example: 1.8 }),
    computeMs: z.number().optional().openapi({ example: 1.2, description: "time the engine ran in its worker thread; the units charged are max(1, ceil(computeMs / 10))" }),
  })
  .openapi("Meta");

export const AtomSchema = z.object({ x: z.number(), p: z.number() }).openapi("Atom");

export const Diagnostics = z
  .object({
    method: z.enum(DENSITY_METHODS).openapi({ description: `method used: ${describeMethods(DENSITY_METHODS)}` }),
    gridSize: z.number(),
    terms: z.number(),
    frequencyStep: z.number(),
    maxFrequency: z.number(),
    range: z.object({ from: z.number(), to: z.number() }),
    capturedMass: z.number(),
    error: z
      .object({
        aliasing: z.number(),
        truncation: z.number(),
        rounding: z.number(),
        pdf: z.number().nullable(),
        cdf: z.number(),
      })
      .openapi({ description: "upper estimates of the absolute error over the returned points (pdf: over the points where the density is finite)" }),
    pointError: z
      .object({
        pdf: z.array(z.number().nullable()).optional().openapi({ description: "bound on |pdf - true pdf| (or of the pmf) at each x; null where not finite" }),
        cdf: z.array(z.number().nullable()).openapi({ description: "bound on |cdf - true cdf| at each x" }),
        sf: z.array(z.number().nullable()).openapi({ description: "bound on |sf - true sf| at each x (tight in the upper tail, where sf is computed directly)" }),
      })
      .strict()
      .openapi({
        description:
          "bounds at each returned point, in the order of x: a named law evaluated directly (and a mixture of such laws) bounds every point on its own, so a tail value carries its own, smaller bound; routes that bound the whole answer at once repeat the values of `error` here. Each entry is at most the matching whole-answer bound.",
      }),
    unboundedDensityAt: z
      .array(z.number())
      .optional()
      .openapi({ description: "points x where the density is infinite (its limit there is +infinity, exactly; the pdf entry is null); cdf and sf at those points are finite and bounded as usual" }),
    levels: z.number(),
    notes: z.array(z.string()),
    tolerance: z
      .object({ target: z.number(), met: z.boolean() })
      .strict()
      .optional()
      .openapi({
        description:
          "the absolute error of pdf and cdf the answer was computed to (the request's tolerance, else the default: 1e-10, or 1e-8 for laws with power tails inverted by period doubling, whose error falls only algebraically with the period) and whether the bounds in `error` meet it; where they do not, a note says which bound was reached and why",
      }),
  })
  .strict()
  .openapi("Diagnostics");

export const QuantileDiagnostics = z
  .object({
    method: z.enum(QUANTILE_METHODS).openapi({ description: `method used: ${describeMethods(QUANTILE_METHODS)}` }),
    terms: z.number().openapi({ description: "frequency nodes (or table points) used" }),
    range: z.object({ from: z.number(), to: z.number() }),
    cdfError: z.number().openapi({ description: "bound on |F_computed - F| used by the root finder" }),
    tolerance: z
      .object({ target: z.number(), met: z.boolean() })
      .strict()
      .optional()
      .openapi({
        description:
          "the cdf error the levels were solved to (the request's tolerance, else 1e-10; the routes aim tighter where they can) and whether cdfError meets it and every expected shortfall's bound meets its goal (1e-8 (1 - p) times the scale of the quantile, for power tails inverted by period doubling); where not, a note says which was reached",
      }),
    quantileError: z
      .array(z.number().nullable())
      .openapi({ description: "per level: bound on |x - q_p|, derived from cdfError and the density over the bracket (null: not resolved)" }),
    expectedShortfallError: z
      .array(z.number().nullable())
      .optional()
      .openapi({ description: "per level: bound on the absolute error of the expected shortfall (tail-integral bound plus the quantile's share)" }),
    notes: z.array(z.string()).openapi({ description: "methods used and every approximation made anywhere in the model" }),
  })
  .strict()
  .openapi("QuantileDiagnostics");

export const Problem = z
  .object({
    type: z.string().url(),
    title: z.string(),
    status: z.number().int(),
    detail: z.string(),
    instance: z.string().optional(),
    errors: z.array(z.object({ detail: z.string(), pointer: z.string() })).optional(),
  })
  .openapi("Problem", { description: "RFC 9457 problem details; type URIs are listed at /docs/errors." });
