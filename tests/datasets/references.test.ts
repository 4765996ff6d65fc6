// Dataset references: counted against the model's node limit before anything is loaded, looked up and decoded
// once per version per request, capped in the values they bring in, and resolved only after the rate limit.
import { eq } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { MAX_DATASET_REFS } from "@/lib/api/walk";
import { getDb } from "@/lib/db/client";
import { apiKeys } from "@/lib/db/schema";
import { MAX_DATASET_VALUES_PER_REQUEST, resolveDatasets } from "@/lib/datasets/resolve";
import { cookieFor, makeTeam } from "../portal/support";
import { apiServer, orgWithKey } from "../support/api";
import { datasetServer, upload } from "./db-support";

const uploads = datasetServer();
const api = apiServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
let secret: string;
let smallId: string;
let bigId: string;
const BIG = 100_000;

beforeAll(async () => {
  T = await makeTeam("Pemberton Reinsurance");
  const cookie = await cookieFor(T.developer.id);
  const small = await upload(uploads, cookie, "1.5\n2.5\n4\n", { name: "Small losses" });
  smallId = small.body.dataset.id;
  // invented: 100 000 simulated loss amounts
  const big = await upload(uploads, cookie, Array.from({ length: BIG }, (_, i) => ((i * 7919) % 1000) / 10 + 0.1).join("\n") + "\n", { name: "Simulated losses" });
  expect(big.status, JSON.stringify(big.body)).toBe(201);
  bigId = big.body.dataset.id;
  const k = await orgWithKey({ plan: "starter" });
  await getDb().update(apiKeys).set({ organizationId: T.org.id }).where(eq(apiKeys.id, k.key.id));
  secret = k.secret;
}, 120_000);
afterAll(() => new Promise<void>((r) => uploads.close(() => r())));

const post = (path: string, body: unknown) =>
  request(api).post(path).set("authorization", `Bearer ${secret}`).set("content-type", "application/json").send(JSON.stringify(body));

describe("dataset references", () => {
  it("2 000 references to one dataset (a 66 KB body) answer 422 at the node limit, before any load", async () => {
    const body = { model: { sum: Array.from({ length: 2000 }, () => ({ dataset: bigId })) }, order: 2 };
    expect(JSON.stringify(body).length).toBeLessThan(100_000);
    const res = await post("/api/v1/moments", body);
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(422);
    expect(res.body.type).toMatch(/#limit_exceeded$/);
    expect(res.body.errors[0].pointer).toBe(`/model/sum/${MAX_DATASET_REFS}`);
  });

  it("references within the node limit but past the per-request value cap answer 422 with a pointer", async () => {
    const n = Math.floor(MAX_DATASET_VALUES_PER_REQUEST / BIG) + 1;
    const res = await post("/api/v1/moments", { model: { sum: Array.from({ length: n }, () => ({ dataset: bigId })) }, order: 2 });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(422);
    expect(res.body.detail).toContain(String(MAX_DATASET_VALUES_PER_REQUEST));
    expect(res.body.errors[0].pointer).toBe(`/model/sum/${n - 1}`);
  });

  it("repeated references to one version share one decoded sample (one load per version per request)", async () => {
    const out = (await resolveDatasets({ sum: [{ dataset: smallId }, { dataset: smallId, version: 1 }, { dataset: smallId }] }, T.org.id)) as { sum: { sample: number[] }[] };
    expect(out.sum[0].sample).toEqual([1.5, 2.5, 4]);
    expect(out.sum[2].sample).toBe(out.sum[0].sample);
  });

  it("a sum of two references to the same data has twice its mean (linearity of expectation; common practice)", async () => {
    const res = await post("/api/v1/moments", { model: { sum: [{ dataset: smallId }, { dataset: smallId }] }, order: 1 });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    expect(Math.abs(res.body.mean - (2 * (1.5 + 2.5 + 4)) / 3)).toBeLessThan(1e-12);
  });
});
