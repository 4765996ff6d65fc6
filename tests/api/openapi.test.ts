// The committed OpenAPI document equals what the code generates, and the served one matches it.
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { buildOpenApiDocument } from "@/lib/api/openapi";
import { apiServer } from "../support/api";

const committed = JSON.parse(readFileSync(resolve(import.meta.dirname, "../../openapi/sumfold-v1.json"), "utf8"));

describe("OpenAPI document", () => {
  it("is committed as generated (run `npm run openapi` after changing a schema)", async () => {
    expect(JSON.parse(JSON.stringify(await buildOpenApiDocument()))).toEqual(committed);
  });

  it("is served without a key at /api/v1/openapi.json, version 3.1, with every endpoint of the contract", async () => {
    const res = await supertest(apiServer()).get("/api/v1/openapi.json");
    expect(res.status).toBe(200);
    expect(res.body.openapi).toBe("3.1.0");
    for (const p of ["/api/v1/cf", "/api/v1/density", "/api/v1/quantiles", "/api/v1/moments", "/api/v1/convolve", "/api/v1/families", "/api/v1/health", "/api/v1/openapi.json"]) {
      expect(res.body.paths[p], p).toBeDefined();
    }
    expect(res.body.components.securitySchemes.apiKey).toMatchObject({ type: "http", scheme: "bearer" });
  });

  it("documents a demo request and response for each computation, the problem responses and the rate-limit headers", () => {
    for (const p of ["/api/v1/cf", "/api/v1/density", "/api/v1/quantiles", "/api/v1/moments", "/api/v1/convolve"]) {
      const op = committed.paths[p].post;
      expect(op.requestBody.content["application/json"].examples.demo.value, p).toBeDefined();
      expect(op.responses["200"].content["application/json"].examples.demo.value.meta, p).toBeDefined();
      expect(op.responses["200"].headers.RateLimit, p).toBeDefined();
      expect(op.responses["422"].content["application/problem+json"], p).toBeDefined();
      expect(op.responses["429"].headers["Retry-After"], p).toBeDefined();
    }
  });
});

describe("responses match their documented schemas", () => {
  it("each computation's live response parses with the response schema the OpenAPI document is built from", async () => {
    const { orgWithKey } = await import("../support/api");
    const { CfResponse } = await import("@/lib/api/schemas/cf");
    const { DensityResponse } = await import("@/lib/api/schemas/density");
    const { QuantilesResponse } = await import("@/lib/api/schemas/quantiles");
    const { MomentsResponse } = await import("@/lib/api/schemas/moments");
    const { ConvolveResponse } = await import("@/lib/api/schemas/convolve");
    const { RiskResponse } = await import("@/lib/api/schemas/risk");
    const { FamiliesResponse } = await import("@/lib/api/schemas/families");
    const { endpointExamples } = await import("@/lib/api/examples");
    const schemas = { cf: CfResponse, density: DensityResponse, quantiles: QuantilesResponse, moments: MomentsResponse, convolve: ConvolveResponse, risk: RiskResponse, families: FamiliesResponse } as const;
    const { secret } = await orgWithKey();
    const app = apiServer();
    for (const e of endpointExamples) {
      const req = e.method === "GET" ? supertest(app).get(e.path) : supertest(app).post(e.path).set("content-type", "application/json").send(JSON.stringify(e.body));
      const res = await req.set("authorization", `Bearer ${secret}`);
      expect(res.status, `${e.path}: ${JSON.stringify(res.body).slice(0, 300)}`).toBe(200);
      const parsed = schemas[e.id as keyof typeof schemas].safeParse(res.body);
      expect(parsed.success, `${e.path}: ${parsed.success ? "" : JSON.stringify(parsed.error.issues.slice(0, 3))}`).toBe(true);
    }
  });
});
