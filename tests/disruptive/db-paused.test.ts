// A database that stops answering (SIGSTOP: connections stay open, nothing comes back) must not hold keyed
// requests: they answer 503 with Retry-After after the bounded wait, and usage recorded meanwhile is spooled and
// replayed exactly once when the database answers again.
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { flushUsage, recordUsage } from "@/lib/api/metering";
import { DB_DEADLINE_MS } from "@/lib/db/client";
import { runningPid } from "../../scripts/lib/mariadb";
import { apiServer, orgWithKey, usageCount } from "../support/api";
import { CHECK_CACHE_MS } from "@/lib/auth/sessions";
import { cookieFor, makeTeam, ORG, portalServer } from "../portal/support";
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

describe("paused database, portal", () => {
  it("a signed-in portal call and page answer within seconds (503 / an unavailable notice) and work again after", async () => {
    const T = await makeTeam("Harrowgate Paused Ledger");
    const cookie = await cookieFor(T.admin.id);
    const portal = portalServer();
    const me = () => supertest(portal).get("/api/portal/me").set("cookie", cookie).set(ORG, String(T.org.id));
    const base = process.env.SUMFOLD_TEST_BASE_URL;
    const page = () => fetch(`${base}/dashboard?org=${T.org.id}`, { headers: { cookie }, redirect: "manual", signal: AbortSignal.timeout(15_000) });
    expect((await me()).status).toBe(200);
    const pid = runningPid(layout.db)!;
    process.kill(pid, "SIGSTOP");
    const waits: number[] = [];
    try {
      await new Promise((r) => setTimeout(r, CHECK_CACHE_MS + 100)); // past the session-check cache
      let t0 = performance.now();
      const res = await me();
      waits.push(Math.round(performance.now() - t0));
      expect(res.status, JSON.stringify(res.body)).toBe(503);
      expect(Number(res.headers["retry-after"])).toBeGreaterThan(0);
      expect(res.body.error).toMatch(/database/);
      if (base) {
        t0 = performance.now();
        const p = await page();
        const html = await p.text();
        waits.push(Math.round(performance.now() - t0));
        expect(html).toMatch(/briefly unavailable/);
      }
    } finally {
      process.kill(pid, "SIGCONT");
    }
    console.log(`[paused database] portal call and page answered after ${waits.join(", ")} ms (deadline ${DB_DEADLINE_MS} ms)`);
    // the session check waits DB_DEADLINE_MS, the organisation look-up at most as long again
    for (const w of waits) expect(w).toBeLessThan(2 * DB_DEADLINE_MS + 2000);
    await new Promise((r) => setTimeout(r, 500));
    expect((await me()).status).toBe(200);
    if (base) expect((await page()).status).toBe(200);
  }, 60_000);
});
