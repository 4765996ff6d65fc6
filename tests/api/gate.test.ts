// The gate around every keyed endpoint: keys, scopes, bodies, errors, CORS, limits and metering.
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Redis } from "@upstash/redis";
import { generateKeyMaterial } from "@/lib/api/key-format";
import { PLANS } from "@/lib/api/plans";
import { flushUsage } from "@/lib/api/metering";
import { revokeKey, rotateKey } from "@/lib/db/keys";
import { getPool } from "@/lib/db/client";
import { apiServer, orgWithKey, usageCount } from "../support/api";

const app = apiServer();
const normal = { family: "normal", mu: 0, sigma: 1 };
const cfBody = { model: normal, t: [0, 1] };
let org: Awaited<ReturnType<typeof orgWithKey>>;

beforeAll(async () => {
  org = await orgWithKey();
});
afterAll(async () => {
  await flushUsage();
});

const post = (path: string, key: string | null, body: unknown, type = "application/json") => {
  const r = supertest(app).post(path).set("content-type", type);
  if (key) r.set("authorization", `Bearer ${key}`);
  return r.send(typeof body === "string" ? body : JSON.stringify(body));
};

function expectProblem(res: supertest.Response, status: number, code: string) {
  expect(res.status, JSON.stringify(res.body)).toBe(status);
  expect(res.headers["content-type"]).toMatch(/^application\/problem\+json/);
  expect(res.body.status).toBe(status);
  expect(res.body.type).toMatch(new RegExp(`/docs/errors#${code}$`));
  expect(typeof res.body.title).toBe("string");
  expect(typeof res.body.detail).toBe("string");
  expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts:\d+/); // no stack traces
}

describe("keys", () => {
  it("accepts a live key and answers with meta", async () => {
    const res = await post("/api/v1/cf", org.secret, cfBody);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.meta).toMatchObject({ engineVersion: expect.any(String), requestId: expect.any(String) });
    // units follow the engine time: max(1, ceil(computeMs / 10)) (see /docs/limits)
    expect(res.body.meta.computeUnits).toBe(Math.max(1, Math.ceil(res.body.meta.computeMs / 10)));
    expect(res.headers["sumfold-request-id"]).toBe(res.body.meta.requestId);
  });

  it("refuses a missing, malformed (bad checksum), truncated or unknown key with 401", async () => {
    expectProblem(await post("/api/v1/cf", null, cfBody), 401, "unauthorized");
    const last = org.secret.at(-1) === "a" ? "b" : "a";
    const typo = org.secret.slice(0, -1) + last;
    const bad = await post("/api/v1/cf", typo, cfBody);
    expectProblem(bad, 401, "unauthorized");
    expect(bad.body.detail).toMatch(/malformed/);
    expectProblem(await post("/api/v1/cf", org.secret.slice(0, -3), cfBody), 401, "unauthorized");
    const unknown = await post("/api/v1/cf", generateKeyMaterial().secret, cfBody);
    expectProblem(unknown, 401, "unauthorized");
    expect(unknown.body.detail).toMatch(/not known/);
  });

  it("makes a revocation effective within one second", async () => {
    const o = await orgWithKey();
    expect((await post("/api/v1/cf", o.secret, cfBody)).status).toBe(200);
    await revokeKey({ organizationId: o.organizationId, keyId: o.key.id, actor: { type: "system" } });
    await new Promise((r) => setTimeout(r, 1050));
    const res = await post("/api/v1/cf", o.secret, cfBody);
    expectProblem(res, 401, "unauthorized");
    expect(res.body.detail).toMatch(/revoked/);
  });

  it("keeps a rotated key working through its grace period; 'immediately' retires it at once", async () => {
    const o = await orgWithKey();
    const rotated = await rotateKey({ organizationId: o.organizationId, keyId: o.key.id, grace: "1h", actor: { type: "system" }, createdBy: null });
    expect(rotated).not.toBeNull();
    await new Promise((r) => setTimeout(r, 1050));
    expect((await post("/api/v1/cf", o.secret, cfBody)).status).toBe(200);
    expect((await post("/api/v1/cf", rotated!.secret, cfBody)).status).toBe(200);
    const again = await rotateKey({ organizationId: o.organizationId, keyId: rotated!.key.id, grace: "immediately", actor: { type: "system" }, createdBy: null });
    await new Promise((r) => setTimeout(r, 1050));
    expectProblem(await post("/api/v1/cf", rotated!.secret, cfBody), 401, "unauthorized");
    expect((await post("/api/v1/cf", again!.secret, cfBody)).status).toBe(200);
  });

  it("answers 403 when the key lacks the endpoint's scope", async () => {
    const o = await orgWithKey({ scopes: ["moments"] });
    const res = await post("/api/v1/cf", o.secret, cfBody);
    expectProblem(res, 403, "forbidden");
    expect(res.body.detail).toMatch(/"cf" scope/);
  });
});

describe("bodies and errors", () => {
  it("415 for a body that is not JSON", async () => {
    expectProblem(await post("/api/v1/cf", org.secret, "model=normal", "text/plain"), 415, "unsupported_media_type");
  });
  it("400 for malformed JSON", async () => {
    expectProblem(await post("/api/v1/cf", org.secret, '{"model": {'), 400, "bad_request");
  });
  it("413 past 1 MiB", async () => {
    const big = JSON.stringify({ model: { sample: new Array(200_000).fill(12345.678) }, t: [0] });
    expect(big.length).toBeGreaterThan(1024 * 1024);
    expectProblem(await post("/api/v1/cf", org.secret, big), 413, "payload_too_large");
  });
  it("422 with a pointer for an unknown field", async () => {
    const res = await post("/api/v1/cf", org.secret, { ...cfBody, colour: "teal" });
    expectProblem(res, 422, "validation");
    expect(res.body.errors).toContainEqual({ detail: expect.stringContaining("colour"), pointer: "/colour" });
  });
  it("422 with a pointer into the model for a bad parameter", async () => {
    const res = await post("/api/v1/cf", org.secret, { model: { sum: [normal, { scale: 2, of: { family: "normal", mu: 0, sigma: -1 } }] }, t: [1] });
    expectProblem(res, 422, "validation");
    expect(res.body.errors[0].pointer).toBe("/model/sum/1/of/sigma");
    expect(res.body.errors[0].detail).toMatch(/sigma/);
  });
  it("422 limit_exceeded naming the limit for a grid beyond the engine's limits (as /docs/limits promises)", async () => {
    const res = await post("/api/v1/cf", org.secret, { model: normal, t: { from: 0, to: 1, count: 2 ** 20 + 1 } });
    expectProblem(res, 422, "limit_exceeded");
    expect(res.body.errors[0].pointer).toBe("/t/count");
    expect(res.body.errors[0].detail).toMatch(/1048576/);
  });
  it("422 limit_exceeded for a model beyond the node limit", async () => {
    const res = await post("/api/v1/cf", org.secret, { model: { sum: new Array(300).fill(normal) }, t: [1] });
    expectProblem(res, 422, "limit_exceeded");
  });
  it("405 with Allow for a wrong method", async () => {
    const res = await supertest(app).get("/api/v1/cf").set("authorization", `Bearer ${org.secret}`);
    expectProblem(res, 405, "method_not_allowed");
    expect(res.headers.allow).toContain("POST");
  });
  it("answers CORS preflight without a key", async () => {
    const res = await supertest(app).options("/api/v1/density").set("origin", "https://tools.harrowgate.example").set("access-control-request-method", "POST");
    expect(res.status).toBe(204);
    expect(res.headers["access-control-allow-origin"]).toBe("*");
    expect(res.headers["access-control-allow-headers"]).toMatch(/authorization/);
    expect(res.headers["access-control-allow-methods"]).toMatch(/POST/);
  });
});

describe("rate limits", () => {
  it("sends RateLimit headers, then 429 with Retry-After and a problem body once the second is spent", async () => {
    const o = await orgWithKey({ plan: "starter" }); // 10 requests per second, fixed one-second windows
    await post("/api/v1/cf", o.secret, cfBody); // warm the key cache
    await new Promise((r) => setTimeout(r, 1000 - (Date.now() % 1000) + 5));
    const start = Date.now();
    const results = await Promise.all(Array.from({ length: 30 }, () => post("/api/v1/cf", o.secret, cfBody)));
    const end = Date.now();
    // On a busy machine the burst may straddle a window boundary: at most 10 successes per window touched.
    const windows = Math.floor(end / 1000) - Math.floor(start / 1000) + 1;
    const ok = results.filter((r) => r.status === 200);
    // admitted by the rate limit but refused by the per-key cap on computations at once (2 on Starter)
    const capped = results.filter((r) => r.status === 429 && r.body.type.endsWith("#too_many_concurrent"));
    const limited = results.filter((r) => r.status === 429 && !capped.includes(r));
    expect(ok.length + capped.length + limited.length).toBe(30);
    expect(ok.length + capped.length).toBeLessThanOrEqual(10 * windows);
    expect(ok.length + capped.length).toBeGreaterThanOrEqual(10);
    expect(ok.length).toBeGreaterThanOrEqual(1);
    expect(limited.length).toBeGreaterThanOrEqual(30 - 10 * windows);
    expect(ok[0].headers["ratelimit-policy"]).toBe('"per-key";q=10;w=1');
    expect(ok[0].headers.ratelimit).toMatch(/^"per-key";r=\d+;t=1$/);
    for (const r of limited) {
      expectProblem(r, 429, "rate_limited");
      expect(Number(r.headers["retry-after"])).toBeGreaterThanOrEqual(1);
    }
  });

  it("never lets requests with a bad key consume a real key's quota", async () => {
    const o = await orgWithKey({ plan: "starter" });
    const forged = o.secret.slice(0, -1) + (o.secret.at(-1) === "a" ? "b" : "a");
    await new Promise((r) => setTimeout(r, 1000 - (Date.now() % 1000) + 5));
    const bad = await Promise.all(Array.from({ length: 20 }, () => post("/api/v1/cf", forged, cfBody)));
    expect(bad.every((r) => r.status === 401)).toBe(true);
    // one after another: a starter key may only run a couple of computations at once (per-key concurrency cap)
    const good = [];
    for (let i = 0; i < 10; i++) good.push(await post("/api/v1/cf", o.secret, cfBody));
    expect(good.map((r) => r.status)).toEqual(new Array(10).fill(200));
  });
});

describe("monthly compute units", () => {
  it("refuses with 429 quota_exhausted once the plan's units are spent, Retry-After pointing to next month", async () => {
    const o = await orgWithKey({ plan: "starter" });
    const redis = new Redis({ url: process.env.UPSTASH_REDIS_REST_URL!, token: process.env.UPSTASH_REDIS_REST_TOKEN! });
    const month = new Date().toISOString().slice(0, 7);
    await redis.set(`sumfold:units:${o.organizationId}:${month}`, PLANS.starter.monthlyUnits - 1);
    expect((await post("/api/v1/cf", o.secret, cfBody)).status).toBe(200);
    const res = await post("/api/v1/cf", o.secret, cfBody);
    expectProblem(res, 429, "quota_exhausted");
    const now = new Date();
    const nextMonth = Date.UTC(now.getUTCFullYear(), now.getUTCMonth() + 1, 1);
    expect(Number(res.headers["retry-after"]) * 1000).toBeGreaterThanOrEqual(nextMonth - Date.now() - 2000);
  });
});

describe("metering", () => {
  it("writes exactly one usage row per authenticated request, concurrent or not", async () => {
    const o = await orgWithKey();
    const sequential = 7;
    for (let i = 0; i < sequential; i++) await post("/api/v1/cf", o.secret, cfBody);
    const concurrent = await Promise.all(Array.from({ length: 25 }, (_, i) => post("/api/v1/cf", o.secret, i % 5 === 0 ? { bad: true } : cfBody)));
    await post("/api/v1/cf", null, cfBody); // unauthenticated: no row
    await flushUsage();
    expect(await usageCount({ organizationId: o.organizationId })).toBe(sequential + concurrent.length);
    const [rows] = await getPool().query("SELECT status, compute_units AS units FROM usage_events WHERE organization_id=? AND status=422", [o.organizationId]);
    expect((rows as { units: number }[]).length).toBe(5);
    expect((rows as { units: number }[]).every((r) => Number(r.units) === 0)).toBe(true);
  });
});
