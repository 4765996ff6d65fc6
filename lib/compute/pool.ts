import { availableParallelism } from "node:os";
import { resolve } from "node:path";
import { MessageChannel } from "node:worker_threads";
import { Piscina } from "piscina";
import { ApiError } from "@/lib/api/errors";
import { CfError } from "@/lib/cf/errors";
import type { ComputeOutcome, ComputeTask } from "./types";

/**
 * The compute pool: worker threads (piscina) that run the engine off the request thread, one computation per
 * thread at a time, as many threads as cores (SUMFOLD_COMPUTE_THREADS overrides). Each computation has a deadline
 * counted from when a thread starts it: the engine checks it in its outer loops and stops itself; if it has not
 * returned GRACE_MS later, the thread is terminated (and replaced). Either way the caller gets
 * `compute_budget_exceeded`. Requests wait in a bounded queue for a free thread; past it they get 503.
 */
export const GRACE_MS = 250;
const QUEUE_PER_THREAD = 32;

export const computeThreads = () => Math.max(1, Number(process.env.SUMFOLD_COMPUTE_THREADS) || availableParallelism());
export const computeWorkerFile = () => process.env.SUMFOLD_COMPUTE_WORKER ?? resolve(process.cwd(), "build/compute-worker.cjs");

interface PoolState {
  pool: Piscina | null;
  inflight: Set<AbortController>;
  closing: boolean;
}
const g = globalThis as unknown as { __sumfoldCompute?: PoolState };
const state = (): PoolState => (g.__sumfoldCompute ??= { pool: null, inflight: new Set(), closing: false });

function pool(): Piscina {
  const s = state();
  if (!s.pool) {
    const threads = computeThreads();
    s.pool = new Piscina({
      filename: computeWorkerFile(),
      minThreads: threads,
      maxThreads: threads,
      concurrentTasksPerWorker: 1,
      idleTimeout: 60_000,
      maxQueue: threads * QUEUE_PER_THREAD,
    });
  }
  return s.pool;
}

/**
 * Starts the pool now rather than at the first request, and has each thread run the engine's warm-up once
 * (lib/compute/warm.ts), so that the first requests meet compiled code. A request that arrives meanwhile waits for a
 * thread like any other (its deadline counts from when a thread starts it). SUMFOLD_COMPUTE_WARM=0 skips the warm-up.
 * Resolves when every thread has warmed, with what each did; never rejects.
 */
export async function startCompute(): Promise<{ done: number; failed: string[]; skipped: number; ms: number }[]> {
  const p = pool();
  if (process.env.SUMFOLD_COMPUTE_WARM === "0") return [];
  const runs = Array.from({ length: computeThreads() }, () =>
    p.run(null, { name: "warm" }).catch((e: Error) => ({ done: 0, failed: [`warm-up: ${e.message}`], skipped: 0, ms: 0 })),
  );
  return Promise.all(runs);
}

export interface ComputeRun {
  result: Record<string, unknown>;
  /** time the engine ran in its worker thread */
  computeMs: number;
  /** time the computation waited for a free thread */
  queuedMs: number;
}

export interface RunOptions {
  /** called once with the engine time spent, whatever the outcome (for metering) */
  onWork?: (computeMs: number) => void;
  /** what to advise when the deadline passes (defaults to the synchronous API's advice) */
  advice?: string[];
  /** an outside reason to stop (e.g. a job cancelled) */
  signal?: AbortSignal;
}

export const SYNC_ADVICE = [
  "Loosen the tolerance (a larger value, e.g. 1e-9 instead of 1e-14).",
  "Narrow the range, or ask for fewer points or levels.",
  "Submit the computation as a job (POST /api/v1/jobs), whose deadline is longer.",
];

export function budgetExceeded(budgetMs: number, elapsedMs: number, work: { stage: string; checks: number } | null, advice: string[]): ApiError {
  return new ApiError("compute_budget_exceeded", `The computation did not finish within its deadline of ${budgetMs} ms and was stopped.`, {
    extra: {
      budgetMs,
      // rounded up, as the units are: a client recomputes max(1, ceil(elapsedMs / 10)) and gets the units charged
      elapsedMs: Math.ceil(elapsedMs),
      workDone: work ? { lastStage: work.stage, loopTurns: work.checks } : { lastStage: null, loopTurns: null, stoppedBy: "thread terminated" },
      advice,
    },
  });
}

/** Runs one computation on the pool; resolves with its result or throws the ApiError/CfError the client sees. */
export async function runCompute(task: ComputeTask, opts: RunOptions = {}): Promise<ComputeRun> {
  const s = state();
  if (s.closing) throw new ApiError("unavailable", "The server is shutting down; retry on another instance.", { headers: { "retry-after": "1" } });
  const advice = opts.advice ?? SYNC_ADVICE;
  const ac = new AbortController();
  const { port1, port2 } = new MessageChannel();
  const submitted = performance.now();
  let started = 0;
  let killTimer: NodeJS.Timeout | undefined;
  let killed = false;
  port1.on("message", () => {
    started = performance.now();
    killTimer = setTimeout(() => {
      killed = true;
      ac.abort();
    }, task.budgetMs + GRACE_MS);
  });
  const onOuterAbort = () => ac.abort();
  opts.signal?.addEventListener("abort", onOuterAbort, { once: true });
  s.inflight.add(ac);
  let outcome: ComputeOutcome;
  try {
    outcome = (await pool().run({ ...task, port: port2 }, { transferList: [port2] as never, signal: ac.signal })) as ComputeOutcome;
  } catch (e) {
    const ran = started ? performance.now() - started : 0;
    opts.onWork?.(ran);
    if (killed) throw budgetExceeded(task.budgetMs, ran, null, advice);
    if (ac.signal.aborted) {
      throw new ApiError("unavailable", s.closing ? "The server is shutting down; the computation was stopped. Retry on another instance." : "The computation was stopped.", {
        headers: { "retry-after": "1" },
      });
    }
    if (/queue is at limit/i.test((e as Error).message ?? "")) {
      throw new ApiError("unavailable", "Every compute thread is busy and the queue is full; retry in a moment.", { headers: { "retry-after": "1" } });
    }
    throw e;
  } finally {
    clearTimeout(killTimer);
    port1.close();
    s.inflight.delete(ac);
    opts.signal?.removeEventListener("abort", onOuterAbort);
  }
  const queuedMs = Math.max(0, (started || performance.now()) - submitted - 0);
  opts.onWork?.(outcome.computeMs);
  if (outcome.ok) return { result: outcome.result, computeMs: outcome.computeMs, queuedMs };
  const err = outcome.error;
  switch (err.kind) {
    case "deadline":
      throw budgetExceeded(task.budgetMs, outcome.computeMs, err, advice);
    case "api":
      throw new ApiError(err.code, err.detail, { errors: err.errors, extra: err.extra });
    case "cf":
      throw new CfError(err.code, err.pointer, err.detail, err.issues);
    default:
      throw new Error(`compute worker failed: ${err.message}`);
  }
}

/** Stops every computation in flight (their callers answer 503) and closes the pool; for shutdown. */
export async function stopCompute(): Promise<number> {
  const s = state();
  s.closing = true;
  const n = s.inflight.size;
  for (const ac of s.inflight) ac.abort();
  const p = s.pool;
  s.pool = null;
  if (p) await p.destroy().catch(() => {});
  return n;
}

/** Threads busy and computations waiting, for health and benchmarks. */
export function computeLoad(): { threads: number; queued: number; running: number } {
  const p = state().pool;
  return { threads: computeThreads(), queued: p?.queueSize ?? 0, running: state().inflight.size - (p?.queueSize ?? 0) };
}
