import "server-only";
import { Ratelimit } from "@upstash/ratelimit";
import { Redis } from "@upstash/redis";
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

/** Decides a keyed request: one request against the key's per-second limit, `units` against the org's month. */
export async function checkLimits(input: { keyId: number; organizationId: number; plan: string; units: number }): Promise<LimitDecision> {
  const planName = (input.plan in PLANS ? input.plan : "starter") as PlanName;
  const plan = planOf(planName);
  try {
    const key = monthKey(input.organizationId);
    // Both calls leave in the same tick, so the client's auto-pipelining sends them in one round trip.
    const [r, charged] = await withTimeout(Promise.all([limiter(planName).limit(String(input.keyId)), redis().incrby(key, input.units)]));
    if (r.reason === "timeout") return localDecision(input.keyId, plan.requestsPerSecond);
    const decision: LimitDecision = { allowed: r.success, limit: r.limit, remaining: r.remaining, reset: r.reset, source: "redis" };
    if (!r.success) {
      void redis().decrby(key, input.units).catch(() => {});
      return decision;
    }
    let used = charged;
    if (used === input.units) {
      // A new month, or Redis lost its counter: start from what the database has recorded this month.
      void redis().expire(key, 40 * 86_400).catch(() => {});
      const recorded = await sumUnitsThisMonth({ organizationId: input.organizationId }).catch(() => 0);
      if (recorded > 0) used = await withTimeout(redis().incrby(key, recorded));
    }
    if (used > plan.monthlyUnits) {
      void redis().decrby(key, input.units).catch(() => {});
      return { ...decision, allowed: false, quotaExhausted: { used: used - input.units, quota: plan.monthlyUnits, resetsAt: nextMonth() } };
    }
    return decision;
  } catch {
    return localDecision(input.keyId, plan.requestsPerSecond);
  }
}

/** Units an organisation has used this month according to Redis (null when Redis is unavailable). */
export async function unitsUsedThisMonth(organizationId: number): Promise<number | null> {
  try {
    return Number((await withTimeout(redis().get<number>(monthKey(organizationId)))) ?? 0);
  } catch {
    return null;
  }
}

/** Gives back units admitted for a request that then failed (best effort). */
export function refundUnits(organizationId: number, units: number): void {
  if (units > 0) void redis().decrby(monthKey(organizationId), units).catch(() => {});
}
