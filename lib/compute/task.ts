// The body of one compute worker thread (bundled to build/compute-worker.mjs by scripts/build-worker.ts): runs
// one computation at a time under a cooperative deadline and returns a plain, cloneable outcome.
import { setPriority } from "node:os";
import { isMainThread, type MessagePort } from "node:worker_threads";
import { ApiError } from "@/lib/api/errors";
import { finiteResult, refuseOverflow } from "@/lib/api/finite";
import { runCf, runConvolve, runDensity, runMoments, runQuantiles, runRisk } from "@/lib/api/operations";
import { clearDeadline, deadlineProgress, isDeadlineExceeded, setDeadline } from "@/lib/cf/deadline";
import { isCfError } from "@/lib/cf/errors";
import type { ComputeOutcome, ComputeTask, OperationName } from "./types";
import { warmEngine, type WarmReport } from "./warm";

// When the engine and the request thread (health, key checks, metering) or the database compete for the cores,
// the engine yields: this thread alone runs at a lower priority (on Linux a nice value belongs to one thread).
// SUMFOLD_COMPUTE_NICE sets it (0 to 19; default 10; 0 keeps the process's priority).
const NICE = Math.min(19, Math.max(0, Math.trunc(Number(process.env.SUMFOLD_COMPUTE_NICE ?? 10)) || 0));
if (NICE > 0 && !isMainThread) {
  try {
    setPriority(0, NICE);
  } catch {
    /* not permitted here: keep the default priority */
  }
}

const OPS: Record<OperationName, (body: never) => Record<string, unknown>> = {
  cf: runCf,
  density: runDensity,
  quantiles: runQuantiles,
  moments: runMoments,
  convolve: runConvolve,
  risk: runRisk,
};

export default function compute(task: ComputeTask & { port?: MessagePort }): ComputeOutcome {
  const startedAt = Date.now();
  task.port?.postMessage({ startedAt });
  task.port?.close();
  const t0 = performance.now();
  const ms = () => Math.round((performance.now() - t0) * 100) / 100;
  setDeadline(startedAt + task.budgetMs);
  try {
    const op = OPS[task.op];
    if (!op) throw new ApiError("not_found", `No computation named "${task.op}".`);
    refuseOverflow(task.op, task.body as Record<string, unknown>);
    const result = finiteResult(task.op, task.body as Record<string, unknown>, op(task.body as never));
    return { ok: true, result, computeMs: ms() };
  } catch (e) {
    const computeMs = ms();
    if (isDeadlineExceeded(e)) return { ok: false, computeMs, error: { kind: "deadline", stage: e.stage, checks: e.checks } };
    if (e instanceof ApiError) return { ok: false, computeMs, error: { kind: "api", code: e.code, detail: e.detail, errors: e.errors, extra: e.extra } };
    if (isCfError(e)) return { ok: false, computeMs, error: { kind: "cf", code: e.code, pointer: e.pointer, detail: e.detail, issues: e.issues } };
    const err = e as Error;
    return { ok: false, computeMs, error: { kind: "internal", message: String(err?.stack ?? err?.message ?? e), progress: deadlineProgress() } };
  } finally {
    clearDeadline();
  }
}

/** The pool's `warm` task (lib/compute/warm.ts): run once per thread when the pool starts. */
export function warm(): WarmReport {
  return warmEngine();
}
