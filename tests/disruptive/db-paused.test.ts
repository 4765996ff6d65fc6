// A database that stops answering (SIGSTOP: connections stay open, nothing comes back) must not hold keyed
// requests: they answer 503 with Retry-After after the bounded wait, and usage recorded meanwhile is spooled and
// replayed exactly once when the database answers again.
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { flushUsage, recordUsage } from "@/lib/api/metering";
import { DB_DEADLINE_MS } from "@/lib/db/client";
import { runningPid } from "../../scripts/lib/mariadb";
import { apiServer, orgWithKey, usageCount } from "../support/api";
import { testLayout } from "../support/layout";

const layout = testLayout();
const app = apiServer();
const body = { model: { family: "normal", mu: 0, sigma: 1 }, t: [0.5] };
const call = (key: string) => supertest(app).post("/api/v1/cf").set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify(body));

describe("paused database", () => {
  it("keyed requests answer 503 with Retry-After instead of hanging; usage is spooled and replayed once", async () => {
    const o = await orgWithKey();
    expect((await call(o.secret)).status).toBe(200);
    await flushUsage();
    expect(await usageCount({ organizationId: o.organizationId })).toBe(1);
    const pid = runningPid(layout.db);
    expect(pid).not.toBeNull();
    process.kill(pid!, "SIGSTOP");
    const waits: number[] = [];
    try {
      await new Promise((r) => setTimeout(r, 1100)); // past the key cache
      for (let i = 0; i < 3; i++) {
        const t0 = performance.now();
        const res = await call(o.secret);
        waits.push(Math.round(performance.now() - t0));
        expect(res.status).toBe(503);
        expect(res.headers["content-type"]).toMatch(/problem\+json/);
        expect(Number(res.headers["retry-after"])).toBeGreaterThan(0);
      }
      for (let i = 0; i < 4; i++) {
        recordUsage({ requestId: `paused-${o.organizationId}-${i}`, keyId: o.key.id, organizationId: o.organizationId, endpoint: "POST /api/v1/cf", status: 200, durationMs: 2, computeUnits: 1 });
      }
      await flushUsage(); // the insert does not come back: the batch goes to the spool
    } finally {
      process.kill(pid!, "SIGCONT");
    }
    console.log(`[paused database] keyed request answered 503 after ${waits.join(", ")} ms (deadline ${DB_DEADLINE_MS} ms)`);
    await new Promise((r) => setTimeout(r, 500));
    await flushUsage(); // replays the spool
    await flushUsage();
    // 1 before + 4 recorded during the pause, each once (the 503s could not check the key, so they charge nothing)
    expect(await usageCount({ organizationId: o.organizationId })).toBe(5);
    expect((await call(o.secret)).status).toBe(200);
  }, 60_000);
});
