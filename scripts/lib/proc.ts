import { spawn, type ChildProcess, type SpawnOptions } from "node:child_process";
import { existsSync, openSync, readFileSync } from "node:fs";

/** Spawns a long-running service with its output appended to a log file. */
export function spawnService(cmd: string, args: string[], logFile: string, opts: SpawnOptions = {}): ChildProcess {
  const out = openSync(logFile, "a");
  return spawn(cmd, args, { stdio: ["ignore", out, out], ...opts });
}

export function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    // A zombie still answers kill(0); treat it as gone.
    const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    return !/^\d+ \(.*\) Z /.test(stat);
  } catch {
    return false;
  }
}

export function readPid(file: string): number | null {
  if (!existsSync(file)) return null;
  const pid = Number(readFileSync(file, "utf8").trim());
  return Number.isInteger(pid) && pid > 0 ? pid : null;
}

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/** Polls `check` until it returns true or `timeoutMs` passes. */
export async function waitFor(check: () => boolean | Promise<boolean>, timeoutMs: number, what: string): Promise<void> {
  const end = Date.now() + timeoutMs;
  while (Date.now() < end) {
    if (await check()) return;
    await sleep(50);
  }
  throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
}

/** Sends SIGTERM to a pid and waits until it is gone, escalating to SIGKILL after `graceMs`. */
export async function stopPid(pid: number, graceMs = 10_000): Promise<void> {
  if (!isAlive(pid)) return;
  try {
    process.kill(pid, "SIGTERM");
  } catch {
    return;
  }
  const end = Date.now() + graceMs;
  while (Date.now() < end && isAlive(pid)) await sleep(50);
  if (isAlive(pid)) {
    try {
      process.kill(pid, "SIGKILL");
    } catch {
      /* already gone */
    }
    while (isAlive(pid)) await sleep(50);
  }
}
