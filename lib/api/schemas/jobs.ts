import { Meta, Problem } from "@/lib/api/common-schemas";
import { z } from "@/lib/api/zod";
import type { Scope } from "@/lib/api/scopes";
import { OPERATIONS, type OperationName } from "@/lib/compute/types";
import { CfBody, CfResponse } from "./cf";
import { ConvolveRequest, ConvolveResponse } from "./convolve";
import { DensityBody, DensityResponse } from "./density";
import { MomentsBody, MomentsResponse } from "./moments";
import { QuantilesBody, QuantilesResponse } from "./quantiles";
import { RiskBody, RiskResponse } from "./risk";

/** Each operation's request schema and the scope a key needs for it, as on its synchronous endpoint. */
export const JOB_OPERATIONS: Record<OperationName, { schema: z.ZodType; scope: Scope }> = {
  cf: { schema: CfBody, scope: "cf" },
  density: { schema: DensityBody, scope: "distribution" },
  quantiles: { schema: QuantilesBody, scope: "distribution" },
  moments: { schema: MomentsBody, scope: "moments" },
  convolve: { schema: ConvolveRequest, scope: "lattice" },
  risk: { schema: RiskBody, scope: "distribution" },
};

/** Each operation's result as a job keeps it: the synchronous endpoint's answer without its meta (strict, so that
 * exactly one of them matches a given result). */
export const JOB_RESULTS = {
  cf: CfResponse.omit({ meta: true }).strict().openapi("CfJobResult"),
  density: DensityResponse.omit({ meta: true }).strict().openapi("DensityJobResult"),
  quantiles: QuantilesResponse.omit({ meta: true }).strict().openapi("QuantilesJobResult"),
  moments: MomentsResponse.omit({ meta: true }).strict().openapi("MomentsJobResult"),
  convolve: ConvolveResponse.omit({ meta: true }).strict().openapi("ConvolveJobResult"),
  risk: RiskResponse.omit({ meta: true }).strict().openapi("RiskJobResult"),
} satisfies Record<OperationName, z.ZodType>;

export const JobRequest = z
  .object({
    operation: z.enum(OPERATIONS).openapi({ description: "the computation, named as its endpoint: cf, density, quantiles, moments, convolve or risk" }),
    body: z.record(z.string(), z.unknown()).openapi({ description: "the request body the synchronous endpoint takes (e.g. a DensityRequest)" }),
  })
  .strict()
  .openapi("JobRequest");

export const JobProgressSchema = z
  .object({
    stage: z.literal("running"),
    startedAt: z.string(),
    elapsedMs: z.number(),
    budgetMs: z.number(),
    deadlineUsed: z.number().openapi({ description: "share of the job's deadline used so far (0..1): a clock, not a measure of the work left" }),
  })
  .openapi("JobProgress");

export const JobResponse = z
  .object({
    id: z.string().openapi({ example: "job_Q2x8m1Zr0bV7c4Kp9sT3" }),
    url: z.string().openapi({ description: "where to poll: GET this URL" }),
    operation: z.enum(OPERATIONS),
    status: z.enum(["queued", "running", "succeeded", "failed"]),
    submittedAt: z.string(),
    startedAt: z.string().nullable(),
    finishedAt: z.string().nullable(),
    expiresAt: z.string().nullable().openapi({ description: "when the result is deleted (24 hours after the job finished)" }),
    progress: JobProgressSchema.nullable(),
    result: z
      .union([JOB_RESULTS.cf, JOB_RESULTS.density, JOB_RESULTS.quantiles, JOB_RESULTS.moments, JOB_RESULTS.convolve, JOB_RESULTS.risk])
      .optional()
      .openapi({ description: "when succeeded: the body the synchronous endpoint answers for the job's operation, without its meta" }),
    problem: Problem.catchall(z.unknown())
      .optional()
      .openapi({ description: "when failed: the problem document the synchronous endpoint would answer (with its extension members, e.g. budgetMs)" }),
    computeMs: z.number().optional(),
    computeUnits: z.number().optional().openapi({ description: "units charged for the job's work: max(1, ceil(computeMs / 10))" }),
    meta: Meta,
  })
  .openapi("JobResponse");
