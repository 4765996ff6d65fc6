// Every endpoint's live answer parses with the response schema the OpenAPI document is built from, in strict
// mode: parsing must keep every key of the answer (a key the schema does not list would be stripped, and the
// parsed value would then differ from the answer). Typed arrays must reach JSON as arrays, never as objects keyed
// "0", "1", ... (what JSON.stringify makes of a Float64Array), in the answers and in the published document.
import { eq } from "drizzle-orm";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { z } from "zod";
import * as jobsRoute from "@/app/api/v1/jobs/route";
import { buildOpenApiDocument } from "@/lib/api/openapi";
import { endpointExamples } from "@/lib/api/examples";
import { getDb } from "@/lib/db/client";
import { apiKeys } from "@/lib/db/schema";
import { CfResponse } from "@/lib/api/schemas/cf";
import { ConvolveResponse } from "@/lib/api/schemas/convolve";
import { DatasetResponse, DatasetsResponse } from "@/lib/api/schemas/datasets";
import { DensityResponse } from "@/lib/api/schemas/density";
import { FamiliesResponse } from "@/lib/api/schemas/families";
import { JobResponse } from "@/lib/api/schemas/jobs";
import { MomentsResponse } from "@/lib/api/schemas/moments";
import { QuantilesResponse } from "@/lib/api/schemas/quantiles";
import { RiskResponse } from "@/lib/api/schemas/risk";
import { datasetServer, upload } from "../datasets/db-support";
import { cookieFor, makeTeam } from "../portal/support";
import { apiServer, orgWithKey } from "../support/api";
import { routeServer, type RouteModule } from "../support/route-server";

/** Paths to objects whose keys are exactly "0", "1", ..., "n-1": a typed array serialised as an object. */
function indexKeyed(v: unknown, at = ""): string[] {
  if (Array.isArray(v)) return v.flatMap((x, i) => indexKeyed(x, `${at}/${i}`));
  if (!v || typeof v !== "object") return [];
  const keys = Object.keys(v);
  if (keys.length > 0 && keys.every((k, i) => k === String(i))) return [at || "/"];
  return keys.flatMap((k) => indexKeyed((v as Record<string, unknown>)[k], `${at}/${k}`));
}

/** Parses strictly: fails on a schema error, and on any key the schema would strip. */
function expectExact(schema: z.ZodType, body: unknown, what: string) {
  const parsed = schema.safeParse(body);
  expect(parsed.success, `${what}: ${parsed.success ? "" : JSON.stringify(parsed.error.issues.slice(0, 3))}`).toBe(true);
  expect(parsed.data, `${what}: keys the schema does not list`).toEqual(body);
  expect(indexKeyed(body), `${what}: typed arrays serialised as objects`).toEqual([]);
}

const RESPONSES: Record<string, z.ZodType> = {
  cf: CfResponse,
  density: DensityResponse,
  quantiles: QuantilesResponse,
  risk: RiskResponse,
  moments: MomentsResponse,
  convolve: ConvolveResponse,
  families: FamiliesResponse,
};

let secret: string;
let dsSecret: string;
let datasetId: string;
const datasets = datasetServer();
const jobs = routeServer({ "/api/v1/jobs": jobsRoute as RouteModule });

beforeAll(async () => {
  secret = (await orgWithKey()).secret;
  // A dataset of the key's organisation (invented: Kestrel's bore diameters in mm).
  const team = await makeTeam("Kestrel Precision Works");
  const res = await upload(datasets, await cookieFor(team.developer.id), "bore_mm\n12.01\n11.98\n12.03\n12.00\n11.99\n", { name: "Bore diameters", column: "bore_mm" });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  datasetId = res.body.dataset.id;
  const k = await orgWithKey();
  await getDb().update(apiKeys).set({ organizationId: team.org.id }).where(eq(apiKeys.id, k.key.id));
  dsSecret = k.secret;
});
afterAll(() => new Promise<void>((r) => datasets.close(() => r())));

describe("live responses parse exactly with their response schemas", () => {
  it("covers every endpoint of the examples (the table is complete)", () => {
    expect(endpointExamples.map((e) => e.id).sort()).toEqual(Object.keys(RESPONSES).sort());
  });

  for (const e of endpointExamples) {
    it(`${e.method} ${e.path}`, async () => {
      const app = apiServer();
      const req = e.method === "GET" ? supertest(app).get(e.path) : supertest(app).post(e.path).set("content-type", "application/json").send(JSON.stringify(e.body));
      const res = await req.set("authorization", `Bearer ${secret}`);
      expect(res.status, `${e.path}: ${JSON.stringify(res.body).slice(0, 300)}`).toBe(200);
      expectExact(RESPONSES[e.id], res.body, e.path);
    });
  }

  it("GET /api/v1/datasets and GET /api/v1/datasets/{id}", async () => {
    const list = await supertest(datasets).get("/api/v1/datasets").set("authorization", `Bearer ${dsSecret}`);
    expect(list.status, JSON.stringify(list.body)).toBe(200);
    expect(list.body.datasets.length).toBeGreaterThan(0);
    expectExact(DatasetsResponse, list.body, "GET /api/v1/datasets");
    const one = await supertest(datasets).get(`/api/v1/datasets/${datasetId}`).set("authorization", `Bearer ${dsSecret}`);
    expect(one.status, JSON.stringify(one.body)).toBe(200);
    expectExact(DatasetResponse, one.body, "GET /api/v1/datasets/{id}");
  });

  it("POST /api/v1/jobs (the queued job)", async () => {
    const body = { operation: "moments", body: { model: { family: "normal", mu: 0, sigma: 1 }, order: 2 } };
    const res = await supertest(jobs).post("/api/v1/jobs").set("authorization", `Bearer ${secret}`).set("content-type", "application/json").send(JSON.stringify(body));
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    expectExact(JobResponse, res.body, "POST /api/v1/jobs");
  });
});

describe("the OpenAPI document", () => {
  it("holds no typed array serialised as an object (examples are plain JSON)", async () => {
    expect(indexKeyed(JSON.parse(JSON.stringify(await buildOpenApiDocument())))).toEqual([]);
  });

  it("the check finds a Float64Array that reached JSON (the check can fail)", () => {
    expect(indexKeyed(JSON.parse(JSON.stringify({ x: Float64Array.of(1, 2) })))).toEqual(["/x"]);
  });
});
