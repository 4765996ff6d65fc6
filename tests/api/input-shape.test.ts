// Bodies are walked without recursion before validation: deep nesting and huge node counts answer 422 with a
// pointer, never 500 (stack overflow), and are refused before the rate limit spends anything.
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import { checkBodyShape, MAX_JSON_CONTAINERS, MAX_JSON_DEPTH } from "@/lib/api/walk";
import { apiServer, orgWithKey } from "../support/api";

const app = apiServer();
const post = (path: string, key: string, raw: string) =>
  supertest(app).post(path).set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(raw);

const nestedArrays = (n: number) => `{"model":${"[".repeat(n)}${"]".repeat(n)},"p":[0.5]}`;
const nestedObjects = (n: number) => `{"model":${'{"sum":'.repeat(n)}{"family":"normal","mu":0,"sigma":1}${"}".repeat(n)},"p":[0.5]}`;
const nestedScale = (n: number) => `{"model":${'{"scale":2,"of":'.repeat(n)}{"family":"normal","mu":0,"sigma":1}${"}".repeat(n)},"order":2}`;

describe("deep and wide bodies", () => {
  it("5 000-deep arrays answer 422 limit_exceeded with a pointer into the body", async () => {
    const o = await orgWithKey();
    const res = await post("/api/v1/quantiles", o.secret, nestedArrays(5000));
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(422);
    expect(res.body.type).toMatch(/#limit_exceeded$/);
    expect(res.body.errors[0].pointer).toMatch(/^\/model(\/0)+$/);
    expect(res.body.errors[0].pointer.split("/").length - 1).toBe(MAX_JSON_DEPTH);
  });

  it("5 000-deep objects answer 422, on every computation endpoint", async () => {
    const o = await orgWithKey();
    for (const path of ["/api/v1/quantiles", "/api/v1/density", "/api/v1/cf", "/api/v1/moments"]) {
      const res = await post(path, o.secret, nestedObjects(5000));
      expect(res.status, `${path}: ${JSON.stringify(res.body).slice(0, 200)}`).toBe(422);
      expect(res.body.errors[0].pointer).toMatch(/^\/model(\/sum)+$/);
    }
    const res = await post("/api/v1/moments", o.secret, nestedScale(5000));
    expect(res.status).toBe(422);
  });

  it("a body just under 1 MiB of 300 000-deep nesting still answers 422 (JSON.parse and the walker use no recursion)", async () => {
    const o = await orgWithKey();
    const raw = nestedArrays(300_000);
    expect(raw.length).toBeLessThan(1024 * 1024);
    const res = await post("/api/v1/cf", o.secret, raw);
    expect(res.status).toBe(422);
  });

  it("too many arrays and objects answer 422 with the limit named", async () => {
    const o = await orgWithKey();
    const raw = JSON.stringify({ model: { family: "normal", mu: 0, sigma: 1 }, t: Array.from({ length: MAX_JSON_CONTAINERS + 1 }, () => []) });
    const res = await post("/api/v1/cf", o.secret, raw);
    expect(res.status).toBe(422);
    expect(res.body.detail).toContain(String(MAX_JSON_CONTAINERS));
  });

  it("the walker reports depth, containers and dataset references of an ordinary model", () => {
    const shape = checkBodyShape({ model: { sum: [{ dataset: "ds_a" }, { dataset: "ds_a" }, { family: "normal", mu: 0, sigma: 1 }] }, p: [0.5] });
    expect(shape).toEqual({ depth: 4, containers: 7, datasetRefs: 2 });
  });
});
