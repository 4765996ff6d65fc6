import "server-only";
import { Ratelimit } from "@upstash/ratelimit";
import { Redis } from "@upstash/redis";
import { withDbDeadline } from "@/lib/db/client";
import { sumUnitsThisMonth } from "@/lib/db/usage";
import { planOf, PLANS, type PlanName } from "./plans";

/**
 * Per-key request limits (fixed one-second windows, so Retry-After is the window's end) and per-organisation
 * monthly compute units, both in Redis through its REST interface (UPSTASH_REDIS_REST_URL/TOKEN).
 *
 * When Redis does not answer within REDIS_TIMEOUT_MS (or errors), the request is decided by an in-process
 * fixed-window limiter at the same per-key rate (per server instance), the monthly quota is not enforced for
 * that request (usage is still metered in the database), and the response carries `Sumfold-Limiter: local`.
 * Availability of the read-only API is preferred to strictness, within a bounded delay.
 */
export const REDIS_TIMEOUT_MS = 250;

export interface LimitDecision {
  allowed: boolean;
  limit: number;
  remaining: number;
  /** epoch ms when the current window ends */
  reset: number;
  source: "redis" | "local";
  /** set when the monthly units are spent */
  quotaExhausted?: { used: number; quota: number; resetsAt: Date };
}

const g = globalThis as unknown as { __sumfoldRedis?: Redis; __sumfoldLimiters?: Map<PlanName, Ratelimit> };

function redis(): Redis {
  if (!g.__sumfoldRedis) {
    g.__sumfoldRedis = new Redis({
      url: process.env.UPSTASH_REDIS_REST_URL!,
      token: process.env.UPSTASH_REDIS_REST_TOKEN!,
      enableAutoPipelining: true,
      retry: false,
      signal: () => AbortSignal.timeout(REDIS_TIMEOUT_MS),
    });
  }
  return g.__sumfoldRedis;
}

function limiter(plan: PlanName): Ratelimit {
  g.__sumfoldLimiters ??= new Map();
  let l = g.__sumfoldLimiters.get(plan);
  if (!l) {
    l = new Ratelimit({
      redis: redis(),
      limiter: Ratelimit.fixedWindow(PLANS[plan].requestsPerSecond, "1 s"),
      prefix: `sumfold:rl:${plan}`,
      timeout: REDIS_TIMEOUT_MS,
      analytics: false,
      ephemeralCache: false,
    });
    g.__sumfoldLimiters.set(plan, l);
  }
  return l;
}

// In-process fallback: key id -> [window start (s), count]
const local = new Map<number, [number, number]>();

function localDecision(keyId: number, rps: number): LimitDecision {
  const second = Math.floor(Date.now() / 1000);
  const cur = local.get(keyId);
  const count = cur && cur[0] === second ? cur[1] + 1 : 1;
  local.set(keyId, [second, count]);
  if (local.size > 10_000) local.clear();
  return { allowed: count <= rps, limit: rps, remaining: Math.max(0, rps - count), reset: (second + 1) * 1000, source: "local" };
}

const monthKey = (orgId: number, d = new Date()) => `sumfold:units:${orgId}:${d.toISOString().slice(0, 7)}`;
const nextMonth = (d = new Date()) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1));

async function withTimeout<T>(p: Promise<T>): Promise<T> {
  let t: NodeJS.Timeout | undefined;
  try {
    return await Promise.race([
      p,
      new Promise<never>((_, reject) => (t = setTimeout(() => reject(new Error("redis timeout")), REDIS_TIMEOUT_MS))),
    ]);
  } finally {
    clearTimeout(t);
  }
}

// Token leases: a request that finds no leased token takes a block of `leaseSize` tokens of the key's current
// window from Redis in one call; the next requests in this process spend them without a round trip. Blocks divide
// the limit exactly, so a window still admits exactly `requestsPerSecond` requests across all instances. The
// monthly units of requests served from a lease are sent to Redis in the next round trip (or within 100 ms).
interface Lease {
  window: number;
  tokens: number;
  remaining: number;
  reset: number;
  limit: number;
  /** the window's tokens are spent: refuse locally until it ends */
  denied: boolean;
}
const leases = new Map<number, Lease>();
// One lease request per key at a time: concurrent requests wait for it and then spend its tokens.
const inflight = new Map<number, Promise<unknown>>();
const orgUnits = new Map<number, { used: number; pending: number; timer: NodeJS.Timeout | null }>();

/** The largest divisor of the per-second limit not above a quarter of it (1 for small limits). */
export function leaseSize(rps: number): number {
  for (let d = Math.floor(rps / 4); d > 1; d--) if (rps % d === 0) return d;
  return 1;
}

function unitsState(orgId: number) {
  let u = orgUnits.get(orgId);
  if (!u) orgUnits.set(orgId, (u = { used: 0, pending: 0, timer: null }));
  return u;
}

function flushPendingUnits(orgId: number): void {
  const u = unitsState(orgId);
  if (u.timer) clearTimeout(u.timer);
  u.timer = null;
  const n = u.pending;
  if (n <= 0) return;
  u.pending = 0;
  void withTimeout(redis().incrby(monthKey(orgId), n))
    .then((used) => (u.used = used))
    .catch(() => (u.pending += n));
}

type LimitInput = { keyId: number; organizationId: number; plan: string; units: number };

/** Decides a keyed request: one request against the key's per-second limit, `units` against the org's month. */
export async function checkLimits(input: LimitInput): Promise<LimitDecision> {
  for (;;) {
    const local = fromLease(input);
    if (local) return local;
    const pending = inflight.get(input.keyId);
    if (pending) {
      await pending.catch(() => {});
      continue;
    }
    const p = leaseAndDecide(input);
    inflight.set(input.keyId, p);
    try {
      return await p;
    } finally {
      inflight.delete(input.keyId);
    }
  }
}

/** Serves a request from the key's lease for the current window, or null when it has no token left. */
function fromLease(input: LimitInput): LimitDecision | null {
  const plan = planOf(input.plan);
  const lease = leases.get(input.keyId);
  if (!lease || lease.window !== Math.floor(Date.now() / 1000)) return null;
  if (lease.denied) return { allowed: false, limit: lease.limit, remaining: 0, reset: lease.reset, source: "redis" };
  if (lease.tokens <= 0) return null;
  const u = unitsState(input.organizationId);
  const decision: LimitDecision = { allowed: true, limit: lease.limit, remaining: lease.remaining + lease.tokens - 1, reset: lease.reset, source: "redis" };
  if (u.used + u.pending + input.units > plan.monthlyUnits) {
    return { ...decision, allowed: false, quotaExhausted: { used: u.used + u.pending, quota: plan.monthlyUnits, resetsAt: nextMonth() } };
  }
  lease.tokens--;
  u.pending += input.units;
  if (!u.timer) {
    u.timer = setTimeout(() => flushPendingUnits(input.organizationId), 100);
    u.timer.unref?.();
  }
  return decision;
}

async function leaseAndDecide(input: LimitInput): Promise<LimitDecision> {
  const planName = (input.plan in PLANS ? input.plan : "starter") as PlanName;
  const plan = planOf(planName);
  const u = unitsState(input.organizationId);
  try {
    const key = monthKey(input.organizationId);
    const size = leaseSize(plan.requestsPerSecond);
    const sent = input.units + u.pending;
    u.pending = 0;
    // Both calls leave in the same tick, so the client's auto-pipelining sends them in one round trip.
    const [r, charged] = await withTimeout(
      Promise.all([limiter(planName).limit(String(input.keyId), { rate: size }), redis().incrby(key, sent)]),
    ).catch((e) => {
      u.pending += sent - input.units;
      throw e;
    });
    if (r.reason === "timeout") return localDecision(input.keyId, plan.requestsPerSecond);
    const decision: LimitDecision = { allowed: r.success, limit: r.limit, remaining: r.remaining, reset: r.reset, source: "redis" };
    const window = Math.floor(r.reset / 1000) - 1;
    if (!r.success) {
      void redis().decrby(key, input.units).catch(() => {});
      u.used = charged - input.units;
      leases.set(input.keyId, { window, tokens: 0, remaining: 0, reset: r.reset, limit: r.limit, denied: true });
      return decision;
    }
    leases.set(input.keyId, { window, tokens: size - 1, remaining: r.remaining, reset: r.reset, limit: r.limit, denied: false });
    if (leases.size > 50_000) leases.clear();
    let used = charged;
    if (used === sent) {
      // A new month, or Redis lost its counter: start from what the database has recorded this month.
      void redis().expire(key, 40 * 86_400).catch(() => {});
      const recorded = await withDbDeadline(sumUnitsThisMonth({ organizationId: input.organizationId })).catch(() => 0);
      if (recorded > 0) used = await withTimeout(redis().incrby(key, recorded));
    }
    u.used = used;
    if (used > plan.monthlyUnits) {
      void redis().decrby(key, input.units).catch(() => {});
      u.used = used - input.units;
      return { ...decision, allowed: false, quotaExhausted: { used: used - input.units, quota: plan.monthlyUnits, resetsAt: nextMonth() } };
    }
    return decision;
  } catch {
    return localDecision(input.keyId, plan.requestsPerSecond);
  }
}

/** Gives back units admitted for a request that then failed (best effort). */
export function refundUnits(organizationId: number, units: number): void {
  if (units > 0) void redis().decrby(monthKey(organizationId), units).catch(() => {});
}

/** Adds units found after the work (beyond those admitted up front) to the organisation's month. */
export function chargeUnits(organizationId: number, units: number): void {
  if (units <= 0) return;
  const u = unitsState(organizationId);
  u.pending += units;
  if (!u.timer) {
    u.timer = setTimeout(() => flushPendingUnits(organizationId), 100);
    u.timer.unref?.();
  }
}
