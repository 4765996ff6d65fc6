// What the API does when its database or its limiter's Redis goes away, and that no usage is lost.
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { flushUsage, recordUsage } from "@/lib/api/metering";
import { startMariaDb, stopMariaDb } from "../../scripts/lib/mariadb";
import { startRedis, stopRedis } from "../../scripts/lib/redis";
import { apiServer, orgWithKey, usageCount } from "../support/api";
import { testLayout } from "../support/layout";

const layout = testLayout();
const app = apiServer();
const body = { model: { family: "normal", mu: 0, sigma: 1 }, t: [0.5] };
const call = (key: string) => supertest(app).post("/api/v1/cf").set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify(body));

describe("database outage", () => {
  it("answers 503 with Retry-After while keys cannot be checked, spools usage, and replays it exactly once", async () => {
    const o = await orgWithKey();
    const before = (await call(o.secret)).status;
    expect(before).toBe(200);
    await flushUsage();
    expect(await usageCount({ organizationId: o.organizationId })).toBe(1);

    await stopMariaDb(layout.db);
    try {
      await new Promise((r) => setTimeout(r, 1100)); // past the key cache
      const down = await call(o.secret);
      expect(down.status).toBe(503);
      expect(down.headers["content-type"]).toMatch(/problem\+json/);
      expect(Number(down.headers["retry-after"])).toBeGreaterThan(0);
      // Events of requests answered just before the outage are queued; the flush fails and spools them.
      for (let i = 0; i < 5; i++) {
        recordUsage({ requestId: `outage-${o.organizationId}-${i}`, keyId: o.key.id, organizationId: o.organizationId, endpoint: "POST /api/v1/cf", status: 200, durationMs: 3, computeUnits: 1 });
      }
      await flushUsage();
    } finally {
      await startMariaDb(layout.db, () => {});
    }
    await flushUsage(); // replays the spool
    await flushUsage(); // a second replay finds nothing to add
    expect(await usageCount({ organizationId: o.organizationId })).toBe(6);
    expect((await call(o.secret)).status).toBe(200);
    await flushUsage();
    expect(await usageCount({ organizationId: o.organizationId })).toBe(7);
  });
});

describe("Redis outage", () => {
  it("falls back to the in-process limiter within the bounded timeout, and still limits", async () => {
    const o = await orgWithKey({ plan: "starter" });
    expect((await call(o.secret)).headers["sumfold-limiter"]).toBeUndefined();
    await stopRedis(layout.redis);
    try {
      // Tokens leased from Redis stay valid for their one-second window; start in a fresh window.
      await new Promise((r) => setTimeout(r, 1000 - (Date.now() % 1000) + 5));
      const t0 = performance.now();
      const res = await call(o.secret);
      const ms = performance.now() - t0;
      expect(res.status).toBe(200);
      expect(res.headers["sumfold-limiter"]).toBe("local");
      expect(ms).toBeLessThan(1500);
      await new Promise((r) => setTimeout(r, 1000 - (Date.now() % 1000) + 5));
      const burst = await Promise.all(Array.from({ length: 14 }, () => call(o.secret)));
      const statuses = burst.map((r) => r.status);
      expect(statuses.filter((s) => s === 200).length).toBeLessThanOrEqual(10);
      expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(4);
    } finally {
      await startRedis(layout.redis);
    }
    // once Redis answers again (the REST stand-in reconnects; on a loaded machine this can take a few seconds),
    // calls are limited through it again
    let back = await call(o.secret);
    await expect
      .poll(async () => ((back = await call(o.secret)), back.headers["sumfold-limiter"]), { timeout: 15_000, interval: 300 })
      .toBeUndefined();
    expect(back.status).toBe(200);
  });
});
