import "server-only";
import { Ratelimit } from "@upstash/ratelimit";
import { Redis } from "@upstash/redis";

/**
 * Sign-in throttling: at most PER_EMAIL attempts per e-mail address and PER_IP attempts per client address in
 * a sliding 15-minute window, counted in Redis (REST). When Redis does not answer, an in-process window with
 * the same limits decides, so throttling never switches off.
 */
export const PER_EMAIL = 10;
export const PER_IP = 60;
const WINDOW_MS = 15 * 60_000;

const g = globalThis as unknown as { __sumfoldSignInLimits?: { email: Ratelimit; ip: Ratelimit } | null; __sumfoldSignInLocal?: Map<string, number[]> };

function limiters() {
  if (g.__sumfoldSignInLimits === undefined) {
    const url = process.env.UPSTASH_REDIS_REST_URL;
    const token = process.env.UPSTASH_REDIS_REST_TOKEN;
    if (!url || !token) {
      g.__sumfoldSignInLimits = null;
    } else {
      const redis = new Redis({ url, token, retry: false, signal: () => AbortSignal.timeout(300) });
      const make = (n: number, prefix: string) =>
        new Ratelimit({ redis, limiter: Ratelimit.slidingWindow(n, "15 m"), prefix, timeout: 300, analytics: false, ephemeralCache: false });
      g.__sumfoldSignInLimits = { email: make(PER_EMAIL, "sumfold:signin:email"), ip: make(PER_IP, "sumfold:signin:ip") };
    }
  }
  return g.__sumfoldSignInLimits;
}

function localAllow(key: string, limit: number, now = Date.now()): boolean {
  const m = (g.__sumfoldSignInLocal ??= new Map<string, number[]>());
  const hits = (m.get(key) ?? []).filter((t) => t > now - WINDOW_MS);
  hits.push(now);
  m.set(key, hits);
  if (m.size > 20_000) m.clear();
  return hits.length <= limit;
}

/** Counts one sign-in attempt; false when the address or the client has made too many. */
export async function allowSignInAttempt(email: string, ip: string): Promise<boolean> {
  const e = email.trim().toLowerCase();
  const l = limiters();
  if (l) {
    try {
      const [a, b] = await Promise.all([l.email.limit(e), l.ip.limit(ip)]);
      // Ratelimit answers success=true with reason "timeout" when Redis is slow: fall back to the local window.
      if (a.reason !== "timeout" && b.reason !== "timeout") return a.success && b.success;
    } catch {
      /* fall through to the local window */
    }
  }
  return localAllow(`e:${e}`, PER_EMAIL) && localAllow(`i:${ip}`, PER_IP);
}
