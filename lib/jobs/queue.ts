import { randomBytes } from "node:crypto";
import { Queue, type Job } from "bullmq";
import { PROBLEMS, problemType } from "@/lib/api/errors";
import type { OperationName } from "@/lib/compute/types";

/**
 * Long computations on a distributed queue: BullMQ over Redis (SUMFOLD_REDIS_URL, the Redis protocol port, not the
 * REST stand-in). Any number of worker processes (`npm run worker`, on any machine that reaches the same Redis and
 * MariaDB) take jobs from it. A job holds a validated request body (datasets already resolved), its organisation
 * and key, and its deadline; the result (or the problem) is kept RESULT_TTL_S after it finishes.
 */
export const QUEUE_NAME = "sumfold-jobs";
export const RESULT_TTL_S = 24 * 3600;

export interface JobData {
  op: OperationName;
  body: unknown;
  organizationId: number;
  /** the submitting key (0 for the portal's explorer) */
  keyId: number;
  userId?: number;
  plan: string;
  budgetMs: number;
  submittedAt: string;
}

export interface JobProgress {
  stage: "running";
  startedAt: string;
  elapsedMs: number;
  budgetMs: number;
  /** share of the deadline used so far (a clock, not a measure of the work left) */
  deadlineUsed: number;
}

export type JobOutcome =
  | { ok: true; result: Record<string, unknown>; computeMs: number; computeUnits: number; worker: string; finishedAt: string }
  | { ok: false; problem: Record<string, unknown>; computeMs: number; computeUnits: number; worker: string; finishedAt: string };

export const redisConnection = () => {
  const url = process.env.SUMFOLD_REDIS_URL;
  if (!url) throw new Error("SUMFOLD_REDIS_URL is not set");
  const u = new URL(url);
  return { host: u.hostname, port: Number(u.port || 6379), password: u.password || undefined, maxRetriesPerRequest: null };
};

const g = globalThis as unknown as { __sumfoldQueue?: Queue };
export function jobsQueue(): Queue {
  g.__sumfoldQueue ??= new Queue(QUEUE_NAME, { connection: redisConnection() });
  return g.__sumfoldQueue;
}

export const newJobId = () => `job_${randomBytes(12).toString("base64url")}`;

export async function submitJob(data: JobData): Promise<string> {
  const id = newJobId();
  await jobsQueue().add(data.op, data, {
    jobId: id,
    attempts: 1,
    removeOnComplete: { age: RESULT_TTL_S },
    removeOnFail: { age: RESULT_TTL_S },
  });
  return id;
}

export type JobStatus = "queued" | "running" | "succeeded" | "failed";

export interface JobView {
  id: string;
  operation: OperationName;
  status: JobStatus;
  submittedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  expiresAt: string | null;
  progress: JobProgress | null;
  result?: Record<string, unknown>;
  problem?: Record<string, unknown>;
  computeMs?: number;
  computeUnits?: number;
}

/** The job as its organisation sees it; null when it does not exist, has expired, or belongs to another one. */
export async function getJobView(id: string, organizationId: number): Promise<JobView | null> {
  if (!/^job_[A-Za-z0-9_-]{16}$/.test(id)) return null;
  // The state first, then the job: read the other way round, a job finishing in between would look completed
  // without its result.
  const state = await jobsQueue().getJobState(id);
  const job = (await jobsQueue().getJob(id)) as Job<JobData, JobOutcome> | undefined;
  if (!job || job.data.organizationId !== organizationId) return null;
  const outcome = job.returnvalue as JobOutcome | null;
  const done = state === "completed" || state === "failed";
  const finishedAt = job.finishedOn ? new Date(job.finishedOn).toISOString() : null;
  const status: JobStatus = state === "active" ? "running" : state === "completed" ? (outcome?.ok ? "succeeded" : "failed") : state === "failed" ? "failed" : "queued";
  const view: JobView = {
    id,
    operation: job.data.op,
    status,
    submittedAt: job.data.submittedAt,
    startedAt: job.processedOn ? new Date(job.processedOn).toISOString() : null,
    finishedAt,
    expiresAt: done && job.finishedOn ? new Date(job.finishedOn + RESULT_TTL_S * 1000).toISOString() : null,
    progress: state === "active" && job.progress && typeof job.progress === "object" ? (job.progress as JobProgress) : null,
  };
  if (status === "succeeded" && outcome?.ok) Object.assign(view, { result: outcome.result, computeMs: outcome.computeMs, computeUnits: outcome.computeUnits });
  if (status === "failed") {
    if (outcome && !outcome.ok) Object.assign(view, { problem: outcome.problem, computeMs: outcome.computeMs, computeUnits: outcome.computeUnits });
    else {
      console.error(`[sumfold] job ${id} failed in its worker: ${job.failedReason}`);
      view.problem = { type: problemType("internal"), title: PROBLEMS.internal.title, status: 500, detail: "The job's worker stopped unexpectedly; submit it again." };
    }
  }
  return view;
}
