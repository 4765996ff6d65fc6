import "server-only";
import { randomBytes } from "node:crypto";
import { ApiError } from "./errors";
import { Redis } from "@upstash/redis";

/**
 * Per-caller cap on computations running or waiting for a compute thread at once (a key or an explorer user; the
 * cap comes from the plan), shared by every server instance through Redis: each computation holds a lease, a member
 * of the caller's sorted set scored by its expiry (Redis's own clock). A lease is given back when the computation
 * ends; one whose instance crashed expires after LEASE_SLACK_MS past the computation's deadline, so no slot leaks.
 * Past the cap the request answers 429 `too_many_concurrent`. When Redis does not answer within LEASE_TIMEOUT_MS,
 * the cap is kept inside this instance instead (as the request limits fall back to a local limiter). The wait is
 * longer than the request limits' (a computation is about to take its time anyway) and is bounded.
 */
export const LEASE_SLACK_MS = 30_000;
export const LEASE_TIMEOUT_MS = 1000;

const g = globalThis as unknown as { __sumfoldSlots?: Map<string, number>; __sumfoldLeaseRedis?: Redis };
const slots = () => (g.__sumfoldSlots ??= new Map());

/** The Redis REST client of the leases (UPSTASH_REDIS_REST_URL/TOKEN, as the limits), with its own timeout. */
export function leaseRedis(): Redis {
  g.__sumfoldLeaseRedis ??= new Redis({
    url: process.env.UPSTASH_REDIS_REST_URL!,
    token: process.env.UPSTASH_REDIS_REST_TOKEN!,
    retry: false,
    signal: () => AbortSignal.timeout(LEASE_TIMEOUT_MS),
  });
  return g.__sumfoldLeaseRedis;
}

// KEYS[1] the caller's leases; ARGV: cap, lease id, lifetime ms. Drops expired leases, then takes one if a slot is free.
const TAKE = `
local t = redis.call('TIME')
local now = tonumber(t[1]) * 1000 + math.floor(tonumber(t[2]) / 1000)
redis.call('ZREMRANGEBYSCORE', KEYS[1], '-inf', now)
if redis.call('ZCARD', KEYS[1]) >= tonumber(ARGV[1]) then return 0 end
redis.call('ZADD', KEYS[1], now + tonumber(ARGV[3]), ARGV[2])
redis.call('PEXPIRE', KEYS[1], tonumber(ARGV[3]))
return 1`;

const leaseKey = (who: string) => `sumfold:conc:${who}`;

const refused = (cap: number) =>
  new ApiError("too_many_concurrent", `This plan allows ${cap} computations at once per caller; one must finish first. Retry shortly, or submit long work as a job.`, {
    headers: { "retry-after": "1" },
  });

function withTimeout<T>(p: Promise<T>): Promise<T> {
  let t: NodeJS.Timeout | undefined;
  return Promise.race([p, new Promise<never>((_, reject) => (t = setTimeout(() => reject(new Error("redis timeout")), LEASE_TIMEOUT_MS)))]).finally(() => clearTimeout(t));
}

/** The in-instance cap (the fallback when Redis is away). */
function localSlot(who: string, cap: number): () => Promise<void> {
  const s = slots();
  const n = s.get(who) ?? 0;
  if (n >= cap) throw refused(cap);
  s.set(who, n + 1);
  let released = false;
  return async () => {
    if (released) return;
    released = true;
    const m = (s.get(who) ?? 1) - 1;
    if (m <= 0) s.delete(who);
    else s.set(who, m);
  };
}

/**
 * Takes one of the caller's `cap` slots for a computation whose deadline is `budgetMs`; resolves with its release
 * (safe to call more than once; never throws) or throws 429 too_many_concurrent.
 */
export async function acquireSlot(who: string, cap: number, budgetMs: number): Promise<() => Promise<void>> {
  const id = `${process.pid}:${randomBytes(6).toString("hex")}`;
  let taken: unknown;
  try {
    taken = await withTimeout(leaseRedis().eval(TAKE, [leaseKey(who)], [String(cap), id, String(Math.ceil(budgetMs + LEASE_SLACK_MS))]));
  } catch (e) {
    console.warn(`[sumfold] concurrency lease not taken in Redis (${(e as Error).message}); capping within this instance`);
    return localSlot(who, cap);
  }
  if (Number(taken) !== 1) throw refused(cap);
  let released = false;
  return async () => {
    if (released) return;
    released = true;
    await withTimeout(leaseRedis().zrem(leaseKey(who), id)).catch((e: unknown) => console.warn(`[sumfold] concurrency lease not returned (${(e as Error).message}); it expires by itself`));
  };
}
