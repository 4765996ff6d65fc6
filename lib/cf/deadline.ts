/**
 * A cooperative deadline for one computation. The caller (a worker thread running one computation at a time)
 * sets it; the engine's outer loops call checkDeadline(stage), which throws DeadlineExceeded once the clock has
 * passed it, so a computation stops at the next loop turn instead of running on. No deadline is set by default.
 */
let until = Number.POSITIVE_INFINITY;
let checks = 0;
let lastStage = "";

export class DeadlineExceeded extends Error {
  readonly stage: string;
  readonly checks: number;
  constructor(stage: string, count: number) {
    super(`the computation passed its deadline (in ${stage})`);
    this.name = "DeadlineExceeded";
    this.stage = stage;
    this.checks = count;
  }
}

/** Sets the deadline as an epoch time in ms (Date.now() scale) and resets the progress counters. */
export function setDeadline(epochMs: number): void {
  until = epochMs;
  checks = 0;
  lastStage = "";
}

export function clearDeadline(): void {
  until = Number.POSITIVE_INFINITY;
}

/** Throws DeadlineExceeded when the deadline has passed; `stage` names the loop, for the report. */
export function checkDeadline(stage: string): void {
  checks++;
  lastStage = stage;
  if (Date.now() > until) throw new DeadlineExceeded(stage, checks);
}

/** What the computation got through so far: the number of checks passed and the last loop that checked. */
export function deadlineProgress(): { checks: number; stage: string } {
  return { checks, stage: lastStage };
}

export const isDeadlineExceeded = (e: unknown): e is DeadlineExceeded => e instanceof DeadlineExceeded;
