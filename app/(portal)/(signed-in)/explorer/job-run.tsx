"use client";

import { useEffect, useRef, useState } from "react";
import { orgHeaders } from "../../_components/fetch";
import { buttonClass } from "../../_components/ui";

type Op = "density" | "quantiles" | "moments";
interface JobView {
  id: string;
  operation: Op;
  status: "queued" | "running" | "succeeded" | "failed";
  progress: { elapsedMs: number; budgetMs: number; deadlineUsed: number } | null;
  result?: Record<string, unknown>;
  problem?: { detail?: string };
}

const POLL_MS = 700;

/**
 * Runs the explorer's three computations as jobs on the queue (for models past a request's deadline) and shows
 * each job's state; the bar is the share of the job's deadline used so far, not a forecast of the work left.
 */
export function JobRun({ bodies, onDone }: { bodies: Record<Op, unknown>; onDone: (results: Record<Op, Record<string, unknown>>) => void }) {
  const [jobs, setJobs] = useState<JobView[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  const stopped = useRef(false);
  useEffect(
    () => () => {
      stopped.current = true;
    },
    [],
  );

  async function start() {
    setError(null);
    stopped.current = false;
    try {
      const submitted: JobView[] = [];
      for (const op of ["density", "quantiles", "moments"] as const) {
        const res = await fetch("/api/portal/explore/jobs", {
          method: "POST",
          headers: { "content-type": "application/json", ...orgHeaders() },
          body: JSON.stringify({ operation: op, body: bodies[op] }),
        });
        const data = await res.json().catch(() => ({}));
        if (res.status !== 202) throw new Error(data.detail ?? data.error ?? `Submitting the ${op} job failed (${res.status}).`);
        submitted.push(data as JobView);
      }
      setJobs(submitted);
      let current = submitted;
      while (!stopped.current) {
        await new Promise((r) => setTimeout(r, POLL_MS));
        current = await Promise.all(
          current.map(async (j) => {
            if (j.status === "succeeded" || j.status === "failed") return j;
            const res = await fetch(`/api/portal/explore/jobs/${j.id}`, { headers: orgHeaders() });
            return res.ok ? ((await res.json()) as JobView) : j;
          }),
        );
        setJobs(current);
        const failed = current.find((j) => j.status === "failed");
        if (failed) {
          setError(`The ${failed.operation} job failed: ${failed.problem?.detail ?? "no detail"}`);
          return;
        }
        if (current.every((j) => j.status === "succeeded")) {
          onDone(Object.fromEntries(current.map((j) => [j.operation, j.result!])) as Record<Op, Record<string, unknown>>);
          return;
        }
      }
    } catch (e) {
      setError((e as Error).message);
    }
  }

  return (
    <section aria-label="Run as a job" className="space-y-3 rounded-xl border border-paper-line bg-white p-4">
      <p className="text-sm text-ink-soft">
        This model needs more time than a request allows. Run it as a job on the queue: the page follows each job until it is done.
      </p>
      {jobs ? (
        <ul className="space-y-2">
          {jobs.map((j) => {
            const share = j.status === "succeeded" || j.status === "failed" ? 1 : (j.progress?.deadlineUsed ?? 0);
            return (
              <li key={j.id} className="text-sm">
                <div className="flex justify-between">
                  <span className="font-medium">{j.operation}</span>
                  <span data-testid={`job-${j.operation}`}>
                    {j.status}
                    {j.status === "running" && j.progress ? ` — ${(j.progress.elapsedMs / 1000).toFixed(1)} s of ${(j.progress.budgetMs / 1000).toFixed(0)} s allowed` : ""}
                  </span>
                </div>
                <div className="mt-1 h-1.5 rounded bg-paper-line" role="progressbar" aria-label={`${j.operation} job: share of its deadline used`} aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(share * 100)}>
                  <div className={`h-1.5 rounded ${j.status === "failed" ? "bg-red-600" : "bg-fold-500"}`} style={{ width: `${Math.round(share * 100)}%` }} />
                </div>
              </li>
            );
          })}
        </ul>
      ) : (
        <button type="button" className={buttonClass} onClick={() => void start()}>
          Run as a job
        </button>
      )}
      {error ? <p className="text-sm text-red-700" role="alert">{error}</p> : null}
    </section>
  );
}
