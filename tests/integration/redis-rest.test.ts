// The Redis REST stand-in serves @upstash/redis and @upstash/ratelimit through their real clients.
import { Ratelimit } from "@upstash/ratelimit";
import { Redis } from "@upstash/redis";
import { describe, expect, it } from "vitest";

const redis = new Redis({ url: process.env.UPSTASH_REDIS_REST_URL!, token: process.env.UPSTASH_REDIS_REST_TOKEN!, enableAutoPipelining: true });

describe("Redis REST stand-in", () => {
  it("answers plain and pipelined commands, binary-safe with base64 encoding", async () => {
    const key = `t:${Date.now()}`;
    await redis.set(key, "Kestrel ✓ 42");
    const [a, b] = await Promise.all([redis.get<string>(key), redis.incr(`${key}:n`)]);
    expect(a).toBe("Kestrel ✓ 42");
    expect(b).toBe(1);
  });

  it("runs the rate limiter's scripts: a 3-per-10 s sliding window allows 3 then refuses", async () => {
    const limiter = new Ratelimit({ redis, limiter: Ratelimit.slidingWindow(3, "10 s"), prefix: `rl-test-${Date.now()}` });
    const results = [];
    let before = 0;
    for (let i = 0; i < 5; i++) {
      before = Date.now();
      results.push(await limiter.limit("key-a"));
    }
    expect(results.map((r) => r.success)).toEqual([true, true, true, false, false]);
    expect(results[4].remaining).toBe(0);
    // reset is the end of the window the last call fell in: after that call began, at most one window later (compared
    // with the clock before the call, not after it: the window may end in the millisecond between)
    expect(results[4].reset).toBeGreaterThan(before);
    expect(results[4].reset).toBeLessThanOrEqual(before + 10_000 + 1_000);
    // another identifier has its own window
    expect((await limiter.limit("key-b")).success).toBe(true);
  });

  it("refuses a wrong token", async () => {
    const res = await fetch(process.env.UPSTASH_REDIS_REST_URL!, {
      method: "POST",
      headers: { authorization: "Bearer wrong" },
      body: JSON.stringify(["PING"]),
    });
    expect(res.status).toBe(401);
  });
});
