// Compute isolation: heavy requests run on the worker-thread pool under their plan's deadline, answer
// compute_budget_exceeded instead of holding the server, are capped per key, and are charged by the work done.
import { eq } from "drizzle-orm";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as explore from "@/app/api/portal/explore/[op]/route";
import { flushUsage } from "@/lib/api/metering";
import { PLANS } from "@/lib/api/plans";
import { unitsForWork } from "@/lib/api/units";
import { getDb } from "@/lib/db/client";
import { usageEvents } from "@/lib/db/schema";
import { cookieFor, makeTeam } from "../portal/support";
import { apiServer, orgWithKey } from "../support/api";
import { routeServer, type RouteModule } from "../support/route-server";

const app = apiServer();
const post = (path: string, key: string, body: unknown) =>
  supertest(app).post(path).set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify(body));

// Reproducers: each ran for minutes on the request thread before the pool existed. A single named family now
// has a closed-form route, so the heavy cases are sums: they still need the CF inversion (each measured to run
// for more than a minute without a deadline).
// 32 levels from 1 - 2^-53 down: each takes seconds (one took 9.8 s on an idle machine, close to the dedicated plan's
// 10 s budget), so the whole request stays far past every plan's deadline as the engine gets faster
const PARETO_TAIL = { model: { sum: [{ family: "pareto", alpha: 3, xm: 1 }, { family: "weibull", shape: 0.5, scale: 1 }] }, p: Array.from({ length: 32 }, (_, k) => 1 - (k + 1) * 2 ** -53) };
const WEIBULL_FINE = { model: { sum: [{ family: "weibull", shape: 0.1, scale: 1 }, { family: "pareto", alpha: 3, xm: 1 }] }, tolerance: 1e-14 };
// the same density at 20 000 arbitrary points (each point sums over every frequency node): more than two minutes
// without a deadline on this machine (measured 2026-12-05), far past any plan's budget however the engine speeds up
const WEIBULL_POINTS = { ...WEIBULL_FINE, x: Array.from({ length: 20_000 }, (_, i) => Math.round(1e4 * (1 + 50 * Math.sqrt((i + 0.5) / 20_000))) / 1e4) };

let starter: Awaited<ReturnType<typeof orgWithKey>>;
beforeAll(async () => {
  starter = await orgWithKey({ plan: "starter" });
});

describe("deadlines", () => {
  it("pareto sum quantiles at 32 levels from p = 1 - 2^-53 answer 422 compute_budget_exceeded with the work done and advice, while health keeps answering", async () => {
    const order: string[] = [];
    const heavy = post("/api/v1/quantiles", starter.secret, PARETO_TAIL).then((r) => (order.push("heavy"), r));
    await new Promise((r) => setTimeout(r, 200));
    const health = await supertest(app).get("/api/v1/health");
    order.push("health");
    expect(health.status).toBe(200);
    const res = await heavy;
    // health was answered while the computation was still running (it runs off the request thread)
    expect(order).toEqual(["health", "heavy"]);
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.headers["content-type"]).toMatch(/application\/problem\+json/);
    expect(res.body.type).toMatch(/#compute_budget_exceeded$/);
    expect(res.body.budgetMs).toBe(PLANS.starter.computeBudgetMs);
    expect(res.body.elapsedMs).toBeGreaterThan(0);
    expect(res.body.workDone).toHaveProperty("lastStage");
    expect(res.body.advice.join(" ")).toMatch(/tolerance/);
    expect(res.body.advice.join(" ")).toMatch(/range/);
    expect(res.body.advice.join(" ")).toMatch(/job/);
    // charged for the time it ran: ceil(elapsed / 10 ms)
    expect(res.body.computeUnits).toBe(unitsForWork(res.body.elapsedMs));
  });

  it("a weibull(shape 0.1) sum density at tolerance 1e-14 stops at the deadline with 422, not after minutes", async () => {
    const res = await post("/api/v1/density", starter.secret, WEIBULL_FINE);
    expect(res.status, JSON.stringify(res.body)).toBe(422);
    expect(res.body.type).toMatch(/#compute_budget_exceeded$/);
    expect(res.body.budgetMs).toBe(PLANS.starter.computeBudgetMs);
  });

  it("a longer plan deadline is used for a dedicated key", async () => {
    const dedicated = await orgWithKey({ plan: "dedicated" });
    // not the 1024-point default grid: the engine's term cap now ends that in 7-9 s, below the dedicated plan's 10 s
    const res = await post("/api/v1/density", dedicated.secret, WEIBULL_POINTS);
    expect(res.status).toBe(422);
    expect(res.body.budgetMs).toBe(PLANS.dedicated.computeBudgetMs);
  }, 40_000);
});

describe("per-key concurrency", () => {
  it("a starter key with its computations running gets 429 too_many_concurrent for one more", async () => {
    const o = await orgWithKey({ plan: "starter" });
    const cap = PLANS.starter.concurrentComputations;
    // .then() sends a supertest request now (it is lazy otherwise)
    const running = Array.from({ length: cap }, () => post("/api/v1/quantiles", o.secret, PARETO_TAIL).then((r) => r));
    await new Promise((r) => setTimeout(r, 300));
    const extra = await post("/api/v1/moments", o.secret, { model: { family: "normal", mu: 0, sigma: 1 } });
    expect(extra.status, JSON.stringify(extra.body)).toBe(429);
    expect(extra.body.type).toMatch(/#too_many_concurrent$/);
    expect(Number(extra.headers["retry-after"])).toBeGreaterThan(0);
    const done = await Promise.all(running);
    expect(done.map((r) => r.status)).toEqual(Array(cap).fill(422));
    // the slots are free again
    expect((await post("/api/v1/moments", o.secret, { model: { family: "normal", mu: 0, sigma: 1 } })).status).toBe(200);
  });
});

describe("units follow the work", () => {
  it("a computation is charged max(1, ceil(computeMs / 10)), reported in meta and in its usage row", async () => {
    const o = await orgWithKey();
    const res = await post("/api/v1/density", o.secret, { model: { sum: [{ family: "gamma", shape: 2, rate: 1 }, { family: "lognormal", mu: 0, sigma: 0.5 }] }, grid: { from: 0, to: 12, count: 200 } });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    expect(res.body.meta.computeMs).toBeGreaterThan(0);
    expect(res.body.meta.computeUnits).toBe(Math.max(1, Math.ceil(res.body.meta.computeMs / 10)));
    await flushUsage();
    const [row] = await getDb().select().from(usageEvents).where(eq(usageEvents.requestId, res.body.meta.requestId));
    expect(row.computeUnits).toBe(res.body.meta.computeUnits);
  });

  it("a catalogue call costs 1 and reports no compute time", async () => {
    const o = await orgWithKey();
    const res = await supertest(app).get("/api/v1/families").set("authorization", `Bearer ${o.secret}`);
    expect(res.status).toBe(200);
    expect(res.body.meta.computeUnits).toBe(1);
    expect(res.body.meta.computeMs).toBeUndefined();
  });
});

describe("the explorer is metered, limited and isolated like the API", () => {
  const server = routeServer({ "/api/portal/explore/[op]": explore as RouteModule });
  afterAll(() => new Promise<void>((r) => server.close(() => r())));
  const run = async (userId: number, op: string, body: unknown) =>
    supertest(server).post(`/api/portal/explore/${op}`).set("content-type", "application/json").set("cookie", await cookieFor(userId)).send(JSON.stringify(body));

  it("writes a usage row marked as the explorer's (key 0, explorer path) with the units of its work", async () => {
    const T = await makeTeam("Lindqvist Foundry");
    const res = await run(T.developer.id, "moments", { model: { family: "normal", mu: 1, sigma: 2 }, order: 2 });
    expect(res.status).toBe(200);
    expect(res.body.computeUnits).toBe(unitsForWork(res.body.computeMs));
    await flushUsage();
    const rows = await getDb().select().from(usageEvents).where(eq(usageEvents.organizationId, T.org.id));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ keyId: 0, endpoint: "POST /api/portal/explore/moments", status: 200, computeUnits: res.body.computeUnits });
  });

  it("a heavy explorer run stops at the deadline with 422 and is charged for its time", async () => {
    const T = await makeTeam("Vasquez Gauges");
    const res = await run(T.developer.id, "quantiles", PARETO_TAIL);
    expect(res.status).toBe(422);
    expect(res.body.type).toMatch(/#compute_budget_exceeded$/);
    expect(res.body.advice.join(" ")).toMatch(/job/);
    await flushUsage();
    const rows = await getDb().select().from(usageEvents).where(eq(usageEvents.organizationId, T.org.id));
    expect(rows[0]).toMatchObject({ keyId: 0, status: 422 });
    expect(rows[0].computeUnits).toBeGreaterThanOrEqual(PLANS.starter.computeBudgetMs / 10);
  });

  it("is rate-limited per user at the plan's rate", async () => {
    const T = await makeTeam("Okonkwo Castings");
    const n = 3 * PLANS.starter.requestsPerSecond + 5;
    // start in a fresh one-second window so all requests share it
    await new Promise((r) => setTimeout(r, 1000 - (Date.now() % 1000) + 5));
    const cookie = await cookieFor(T.developer.id);
    const start = Date.now();
    const statuses = await Promise.all(
      Array.from({ length: n }, () =>
        supertest(server).post("/api/portal/explore/moments").set("content-type", "application/json").set("cookie", cookie).send(JSON.stringify({ model: { family: "normal", mu: 0, sigma: 1 }, order: 1 })).then((r) => r.status),
      ),
    );
    // on a busy machine the burst may straddle a window boundary: at most the rate per window touched
    const windows = Math.floor(Date.now() / 1000) - Math.floor(start / 1000) + 1;
    expect(statuses.filter((s) => s === 200).length).toBeLessThanOrEqual(PLANS.starter.requestsPerSecond * windows);
    expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(n - PLANS.starter.requestsPerSecond * windows);
  });
});
