// The per-caller concurrency cap is shared by every server instance through Redis leases: computations held
// through one instance count on another, and a lease whose instance stopped without giving it back expires.
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { acquireSlot, leaseRedis } from "@/lib/api/concurrency";
import { PLANS } from "@/lib/api/plans";
import { apiServer, orgWithKey } from "../support/api";

const app = apiServer();
const base = process.env.SUMFOLD_TEST_BASE_URL;
// heavy: a sum that still needs the CF inversion, stopped at the plan's deadline (see isolation.test.ts)
// 32 levels from 1 - 2^-53 down: far past every plan's deadline (see tests/api/isolation.test.ts)
const HEAVY = { model: { sum: [{ family: "pareto", alpha: 3, xm: 1 }, { family: "weibull", shape: 0.5, scale: 1 }] }, p: Array.from({ length: 32 }, (_, k) => 1 - (k + 1) * 2 ** -53) };
const CHEAP = { model: { family: "normal", mu: 0, sigma: 1 } };

describe("the concurrency cap across instances", () => {
  it.skipIf(!base)("computations running through one instance (in-process) fill the key's slots on another (next start)", async () => {
    const o = await orgWithKey({ plan: "starter" });
    const cap = PLANS.starter.concurrentComputations;
    const running = Array.from({ length: cap }, () =>
      supertest(app).post("/api/v1/quantiles").set("authorization", `Bearer ${o.secret}`).set("content-type", "application/json").send(JSON.stringify(HEAVY)).then((r) => r),
    );
    // wait until both computations hold their leases (a fixed pause raced the in-process requests on a loaded machine)
    const held = `sumfold:conc:key:${o.key.id}`;
    for (let i = 0; i < 200 && Number(await leaseRedis().zcard(held)) < cap; i++) await new Promise((r) => setTimeout(r, 25));
    expect(Number(await leaseRedis().zcard(held)), "the running computations hold the key's slots").toBe(cap);
    const other = await fetch(`${base}/api/v1/moments`, { method: "POST", headers: { authorization: `Bearer ${o.secret}`, "content-type": "application/json" }, body: JSON.stringify(CHEAP) });
    const body = (await other.json()) as { type?: string };
    expect(other.status, JSON.stringify(body)).toBe(429);
    expect(body.type).toMatch(/#too_many_concurrent$/);
    expect((await Promise.all(running)).map((r) => r.status)).toEqual(Array(cap).fill(422));
    // the leases were given back: the other instance computes again
    const after = await fetch(`${base}/api/v1/moments`, { method: "POST", headers: { authorization: `Bearer ${o.secret}`, "content-type": "application/json" }, body: JSON.stringify(CHEAP) });
    expect(after.status).toBe(200);
  }, 30_000);

  it("a lease left by an instance that stopped expires by itself; a returned one frees its slot at once", async () => {
    const who = `test:${Date.now()}:${Math.random()}`;
    // an instance that crashed holding both slots: leases expiring 400 ms from now (Redis's clock)
    const [sec, micro] = (await leaseRedis().time()) as [number, number];
    const now = Number(sec) * 1000 + Math.floor(Number(micro) / 1000);
    await leaseRedis().zadd(`sumfold:conc:${who}`, { score: now + 400, member: "crashed:1" }, { score: now + 400, member: "crashed:2" });
    await expect(acquireSlot(who, 2, 1000)).rejects.toMatchObject({ code: "too_many_concurrent" });
    await new Promise((r) => setTimeout(r, 600));
    const a = await acquireSlot(who, 2, 1000);
    const b = await acquireSlot(who, 2, 1000);
    await expect(acquireSlot(who, 2, 1000)).rejects.toMatchObject({ code: "too_many_concurrent" });
    await a();
    const c = await acquireSlot(who, 2, 1000);
    await b();
    await c();
  });
});
