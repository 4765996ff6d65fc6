import { hostname } from "node:os";
import { Worker, type Job } from "bullmq";
import { problemBody, toApiError } from "@/lib/api/errors";
import { recordUsage } from "@/lib/api/metering";
import { chargeUnits } from "@/lib/api/rate-limit";
import { unitsForWork } from "@/lib/api/units";
import { computeThreads, runCompute } from "@/lib/compute/pool";
import { QUEUE_NAME, redisConnection, type JobData, type JobOutcome, type JobProgress } from "./queue";

const JOB_ADVICE = ["Loosen the tolerance (a larger value, e.g. 1e-9 instead of 1e-14).", "Narrow the range, or ask for fewer points or levels, and split the work over several jobs."];

export const workerName = () => `${hostname()}:${process.pid}`;

/** Runs one job on this process's compute pool under the job deadline; meters it like a request. */
export async function processJob(job: Job<JobData, JobOutcome>): Promise<JobOutcome> {
  const t0 = performance.now();
  const startedAt = new Date();
  let computeMs = 0;
  const progress = () => {
    const elapsedMs = Math.round(performance.now() - t0);
    const p: JobProgress = { stage: "running", startedAt: startedAt.toISOString(), elapsedMs, budgetMs: job.data.budgetMs, deadlineUsed: Math.min(1, elapsedMs / job.data.budgetMs) };
    return job.updateProgress(p as never).catch(() => {});
  };
  await progress();
  const timer = setInterval(() => void progress(), 500);
  let outcome: JobOutcome;
  let status = 200;
  try {
    const r = await runCompute({ op: job.data.op, body: job.data.body, budgetMs: job.data.budgetMs }, { advice: JOB_ADVICE, onWork: (ms) => (computeMs += ms) });
    outcome = { ok: true, result: r.result, computeMs: r.computeMs, computeUnits: unitsForWork(r.computeMs), worker: workerName(), finishedAt: new Date().toISOString() };
  } catch (e) {
    const err = toApiError(e, job.data.op === "convolve" ? "" : "/body/model");
    status = err.status;
    // A job stopped at its deadline is charged for the time it ran, like a request; other failures charge nothing.
    const units = err.code === "compute_budget_exceeded" ? unitsForWork(computeMs) : 0;
    if (units) err.extra.computeUnits = units;
    outcome = { ok: false, problem: problemBody(err, `urn:sumfold:job:${job.id}`), computeMs, computeUnits: units, worker: workerName(), finishedAt: new Date().toISOString() };
  } finally {
    clearInterval(timer);
  }
  if (outcome.computeUnits > 0) chargeUnits(job.data.organizationId, outcome.computeUnits);
  recordUsage({
    requestId: String(job.id),
    keyId: job.data.keyId,
    organizationId: job.data.organizationId,
    endpoint: `JOB ${job.data.op}`,
    status,
    durationMs: Math.round(performance.now() - t0),
    computeUnits: outcome.computeUnits,
  });
  return outcome;
}

/** A BullMQ worker taking as many jobs at once as this process has compute threads. */
export function startJobWorker(): Worker<JobData, JobOutcome> {
  return new Worker<JobData, JobOutcome>(QUEUE_NAME, processJob, { connection: redisConnection(), concurrency: computeThreads(), lockDuration: 30_000 });
}
