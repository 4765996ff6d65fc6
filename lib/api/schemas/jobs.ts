import { Meta } from "@/lib/api/common-schemas";
import { z } from "@/lib/api/zod";
import type { Scope } from "@/lib/api/scopes";
import { OPERATIONS, type OperationName } from "@/lib/compute/types";
import { CfBody } from "./cf";
import { ConvolveRequest } from "./convolve";
import { DensityBody } from "./density";
import { MomentsBody } from "./moments";
import { QuantilesBody } from "./quantiles";
import { RiskBody } from "./risk";

/** Each operation's request schema and the scope a key needs for it, as on its synchronous endpoint. */
export const JOB_OPERATIONS: Record<OperationName, { schema: z.ZodType; scope: Scope }> = {
  cf: { schema: CfBody, scope: "cf" },
  density: { schema: DensityBody, scope: "distribution" },
  quantiles: { schema: QuantilesBody, scope: "distribution" },
  moments: { schema: MomentsBody, scope: "moments" },
  convolve: { schema: ConvolveRequest, scope: "lattice" },
  risk: { schema: RiskBody, scope: "distribution" },
};

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
    result: z.record(z.string(), z.unknown()).optional().openapi({ description: "when succeeded: the body the synchronous endpoint answers, without its meta" }),
    problem: z.record(z.string(), z.unknown()).optional().openapi({ description: "when failed: the problem document the synchronous endpoint would answer" }),
    computeMs: z.number().optional(),
    computeUnits: z.number().optional().openapi({ description: "units charged for the job's work: max(1, ceil(computeMs / 10))" }),
    meta: Meta,
  })
  .openapi("JobResponse");
