import "server-only";
import { appendFileSync, existsSync, mkdirSync, readdirSync, readFileSync, renameSync, unlinkSync } from "node:fs";
import { join } from "node:path";
import { withDbDeadline } from "@/lib/db/client";
import { touchKeys } from "@/lib/db/keys";
import type { NewUsageEvent } from "@/lib/db/schema";
import { insertUsageEvents } from "@/lib/db/usage";

/**
 * Usage metering: exactly one usage_events row per authenticated request, keyed by its request id.
 * Events queue in memory and are written in batches off the response path (every FLUSH_MS or BATCH rows).
 * When the database refuses a batch, it is appended to a spool file (JSON lines) and replayed when the
 * database answers again; INSERT IGNORE on the unique request id makes a replay count nothing twice.
 */
const FLUSH_MS = 500;
const BATCH = 300;

type Listener = (organizationIds: number[]) => void | Promise<void>;

interface State {
  queue: NewUsageEvent[];
  timer: NodeJS.Timeout | null;
  flushing: Promise<void> | null;
  lastUsed: Map<number, Date>;
  listeners: Listener[];
}

const g = globalThis as unknown as { __sumfoldMeter?: State };
const state = (): State => (g.__sumfoldMeter ??= { queue: [], timer: null, flushing: null, lastUsed: new Map(), listeners: [] });

const spoolDir = () => process.env.SUMFOLD_SPOOL_DIR ?? join(process.cwd(), ".data", "spool");
const ownSpool = () => join(spoolDir(), `usage-${process.pid}.jsonl`);

/** Called with the organisations whose usage was just written (quota notices hook in here). */
export function onUsageWritten(listener: Listener): void {
  state().listeners.push(listener);
}

export function recordUsage(event: Omit<NewUsageEvent, "createdAt"> & { createdAt?: Date }): void {
  const s = state();
  const row = { ...event, createdAt: event.createdAt ?? new Date() };
  s.queue.push(row);
  const prev = s.lastUsed.get(row.keyId);
  if (!prev || prev < row.createdAt) s.lastUsed.set(row.keyId, row.createdAt);
  if (s.queue.length >= BATCH) void flushUsage();
  else if (!s.timer) {
    s.timer = setTimeout(() => void flushUsage(), FLUSH_MS);
    s.timer.unref?.();
  }
}

async function insertRows(rows: NewUsageEvent[]): Promise<void> {
  for (let i = 0; i < rows.length; i += BATCH) {
    // A database that stops answering must not hold the flush: the batch is spooled, and INSERT IGNORE on the
    // request id keeps a late-finishing insert and the replay from counting twice.
    await withDbDeadline(insertUsageEvents({ rows: rows.slice(i, i + BATCH) }), 3000);
  }
}

function spool(rows: NewUsageEvent[]): void {
  mkdirSync(spoolDir(), { recursive: true });
  appendFileSync(ownSpool(), rows.map((r) => JSON.stringify(r)).join("\n") + "\n");
}

const isAlive = (pid: number) => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};

/** Replays this process's spool and those left by processes that are gone. */
async function replaySpool(): Promise<number> {
  const dir = spoolDir();
  if (!existsSync(dir)) return 0;
  let replayed = 0;
  for (const f of readdirSync(dir)) {
    const m = /^usage-(\d+)\.jsonl$/.exec(f);
    if (!m || (Number(m[1]) !== process.pid && isAlive(Number(m[1])))) continue;
    const path = join(dir, f);
    const claimed = join(dir, `replaying-${process.pid}-${Date.now()}-${f}`);
    renameSync(path, claimed);
    const rows = readFileSync(claimed, "utf8")
      .split("\n")
      .filter(Boolean)
      .map((l) => {
        const r = JSON.parse(l) as NewUsageEvent & { createdAt: string };
        return { ...r, createdAt: new Date(r.createdAt) };
      });
    try {
      await insertRows(rows);
      unlinkSync(claimed);
      replayed += rows.length;
    } catch (e) {
      renameSync(claimed, path);
      throw e;
    }
  }
  // Claimed files of a crashed replay go back into the spool.
  for (const f of readdirSync(dir)) {
    const m = /^replaying-(\d+)-\d+-(usage-\d+\.jsonl)$/.exec(f);
    if (m && Number(m[1]) !== process.pid && !isAlive(Number(m[1]))) {
      appendFileSync(join(dir, m[2]), readFileSync(join(dir, f)));
      unlinkSync(join(dir, f));
    }
  }
  return replayed;
}

/** Writes what is queued (and any spool); safe to call at any time, concurrent calls share one flush. */
export function flushUsage(): Promise<void> {
  const s = state();
  if (s.flushing) return s.flushing.then(() => (s.queue.length ? flushUsage() : undefined));
  if (s.timer) {
    clearTimeout(s.timer);
    s.timer = null;
  }
  const rows = s.queue.splice(0, s.queue.length);
  const lastUsed = new Map(s.lastUsed);
  s.lastUsed.clear();
  s.flushing = (async () => {
    let written = false;
    try {
      if (rows.length) await insertRows(rows);
      written = true;
      await replaySpool();
    } catch (e) {
      if (!written && rows.length) spool(rows);
      console.error(`[sumfold] usage metering: database unavailable, ${written ? 0 : rows.length} events spooled (${(e as Error).message})`);
    }
    try {
      await withDbDeadline(touchKeys(lastUsed), 3000);
    } catch {
      for (const [k, v] of lastUsed) if (!s.lastUsed.has(k)) s.lastUsed.set(k, v);
    }
    if (written && rows.length) {
      const orgs = [...new Set(rows.map((r) => r.organizationId))];
      for (const l of s.listeners) {
        try {
          await l(orgs);
        } catch (e) {
          console.error("[sumfold] usage listener failed", e);
        }
      }
    }
  })().finally(() => {
    s.flushing = null;
    // Keep retrying the spool while the database is away.
    if (s.queue.length || (existsSync(ownSpool()) && !s.timer)) {
      s.timer = setTimeout(() => void flushUsage(), Math.max(FLUSH_MS, 1000));
      s.timer.unref?.();
    }
  });
  return s.flushing;
}

