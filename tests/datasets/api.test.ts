// The public API's dataset endpoints (GET, key-scoped, 404 across organisations) and resolveDatasets: a
// computation on a dataset equals the same computation on the same values sent inline.
import jStatDefault from "jstat";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ApiError } from "@/lib/api/errors";
import { runCf, runDensity, runMoments, runQuantiles } from "@/lib/api/operations";
import { resolveDatasets, hasDatasetRef } from "@/lib/datasets/resolve";
import { cookieFor, makeTeam } from "../portal/support";
import { orgWithKey } from "../support/api";
import { datasetServer, upload } from "./db-support";
import { near } from "./support";

const jStat = jStatDefault as unknown as { mean(x: number[]): number; stdev(x: number[], sample?: boolean): number };

const server = datasetServer();
// Demo data (invented): Harrowgate Mutual's hail claims in thousands of euros, and a claim-count table.
const HAIL = [3.2, 1.7, 8.9, 2.4, 0.6, 12.5, 4.1, 2.2, 5.8, 1.1, 3.3, 7.4, 0.9, 2.8, 6.1, 4.4, 1.9, 9.7, 2.6, 3.9];
let A: { organizationId: number; secret: string };
let B: { organizationId: number; secret: string };
let hailId: string;
let countsId: string;
let otherId: string;

async function datasetIn(team: Awaited<ReturnType<typeof makeTeam>>, body: string, fields: Record<string, string>) {
  const res = await upload(server, await cookieFor(team.developer.id), body, fields);
  if (res.status !== 201) throw new Error(`upload failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.dataset.id as string;
}

beforeAll(async () => {
  const tA = await makeTeam("Harrowgate Mutual");
  const tB = await makeTeam("Kestrel Fasteners");
  hailId = await datasetIn(tA, `claim,amount_keur\n${HAIL.map((v, i) => `C${i},${v}`).join("\n")}\n`, { name: "Hail claims", column: "amount_keur" });
  countsId = await datasetIn(tA, "claims,policies\n0,812\n1,143\n2,38\n3,7\n", { name: "Claim counts", column: "claims", weights: "policies" });
  otherId = await datasetIn(tB, "1\n2\n3\n", { name: "Kestrel private" });
  const kA = await orgWithKey();
  const kB = await orgWithKey();
  // the keys' organisations are the teams' organisations: move each key to its team
  const { getDb } = await import("@/lib/db/client");
  const { apiKeys } = await import("@/lib/db/schema");
  const { eq } = await import("drizzle-orm");
  await getDb().update(apiKeys).set({ organizationId: tA.org.id }).where(eq(apiKeys.id, kA.key.id));
  await getDb().update(apiKeys).set({ organizationId: tB.org.id }).where(eq(apiKeys.id, kB.key.id));
  A = { organizationId: tA.org.id, secret: kA.secret };
  B = { organizationId: tB.org.id, secret: kB.secret };
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const get = (path: string, secret: string) => request(server).get(path).set("authorization", `Bearer ${secret}`);

describe("GET /api/v1/datasets", () => {
  it("lists the key's organisation's datasets with the latest summary", async () => {
    const res = await get("/api/v1/datasets", A.secret);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const names = res.body.datasets.map((d: { name: string }) => d.name);
    expect(names).toEqual(expect.arrayContaining(["Hail claims", "Claim counts"]));
    expect(names).not.toContain("Kestrel private");
    const hail = res.body.datasets.find((d: { id: string }) => d.id === hailId);
    near("mean (jStat.mean)", hail.latest.summary.mean, jStat.mean(HAIL), 1e-12);
    near("sd (jStat.stdev(x, true))", hail.latest.summary.sd, jStat.stdev(HAIL, true), 1e-12);
    expect(res.body.meta.computeUnits).toBe(1);
  });

  it("GET /api/v1/datasets/{id} gives every version; another organisation's id answers 404 like a missing one", async () => {
    const mine = await get(`/api/v1/datasets/${hailId}`, A.secret);
    expect(mine.status).toBe(200);
    expect(mine.body.dataset).toMatchObject({ id: hailId, name: "Hail claims", latestVersion: 1 });
    expect(mine.body.dataset.versions[0]).toMatchObject({ version: 1, rows: HAIL.length, valueColumn: "amount_keur" });
    const cross = await get(`/api/v1/datasets/${otherId}`, A.secret);
    const missing = await get("/api/v1/datasets/ds_0000000000000000", A.secret);
    const junk = await get("/api/v1/datasets/not-an-id", A.secret);
    for (const r of [cross, missing, junk]) {
      expect(r.status).toBe(404);
      expect(r.headers["content-type"]).toMatch(/application\/problem\+json/);
    }
    expect(cross.body.detail).toBe(`No dataset "${otherId}" in this key's organisation.`);
    expect((await get(`/api/v1/datasets/${otherId}`, B.secret)).status).toBe(200);
  });

  it("needs a key with the catalogue scope", async () => {
    expect((await request(server).get("/api/v1/datasets")).status).toBe(401);
    const narrow = await orgWithKey({ scopes: ["moments"] });
    expect((await get("/api/v1/datasets", narrow.secret)).status).toBe(403);
  });
});

describe("resolveDatasets", () => {
  const inline = { sample: HAIL };
  const TOL = 1e-12;

  it("a model naming the dataset computes what the inline sample computes (moments, cf, quantiles, density)", async () => {
    const ref = { sum: [{ dataset: hailId }, { family: "normal", mu: 0, sigma: 0.5 }] };
    const same = { sum: [inline, { family: "normal", mu: 0, sigma: 0.5 }] };
    const model = await resolveDatasets(ref, A.organizationId);
    expect(model).toEqual(same);
    const m1 = runMoments({ model, order: 4 });
    const m2 = runMoments({ model: same, order: 4 });
    expect(m1).toEqual(m2);
    near("mean of the sum = sample mean + 0 (jStat.mean)", m1.mean, jStat.mean(HAIL), TOL);
    // variance of the sum = population variance of the sample + 0.5^2 (independent terms, common practice)
    near("variance of the sum (jStat.stdev(x)^2 + 0.25)", m1.variance, jStat.stdev(HAIL) ** 2 + 0.25, TOL);
    expect(runCf({ model, t: [0.1, 1, 3] })).toEqual(runCf({ model: same, t: [0.1, 1, 3] }));
    expect(runQuantiles({ model, p: [0.5, 0.99] })).toEqual(runQuantiles({ model: same, p: [0.5, 0.99] }));
    expect(runDensity({ model, grid: { from: -2, to: 20, count: 64 } })).toEqual(runDensity({ model: same, grid: { from: -2, to: 20, count: 64 } }));
  });

  it("resolves every reference, at any depth, the latest version unless one is named; leaves other nodes alone", async () => {
    const family = { family: "gamma", shape: 2, rate: 1 };
    const model = { mix: [{ weight: 0.5, of: { scale: 2, of: { dataset: hailId, version: 1 } } }, { weight: 0.5, of: family }] };
    const out = (await resolveDatasets(model, A.organizationId)) as { mix: { of: unknown }[] };
    expect(out.mix[0].of).toEqual({ scale: 2, of: inline });
    expect(out.mix[1].of).toBe(family);
    const plain = { family: "normal", mu: 0, sigma: 1 };
    expect(await resolveDatasets(plain, A.organizationId)).toBe(plain);
    expect(hasDatasetRef(model)).toBe(true);
    expect(hasDatasetRef(plain)).toBe(false);
  });

  it("a frequency table resolves to sample + weights (the counts)", async () => {
    expect(await resolveDatasets({ dataset: countsId }, A.organizationId)).toEqual({ sample: [0, 1, 2, 3], weights: [812, 143, 38, 7] });
  });

  it("a frequency table computes what its expanded sample computes", async () => {
    const model = await resolveDatasets({ dataset: countsId }, A.organizationId);
    const expanded = { sample: [0, 1, 2, 3].flatMap((v, i) => Array<number>([812, 143, 38, 7][i]).fill(v)) };
    const m1 = runMoments({ model, order: 4 });
    const m2 = runMoments({ model: expanded, order: 4 });
    for (let k = 0; k < 4; k++) near(`raw moment ${k + 1}`, m1.raw[k], m2.raw[k] as number, 1e-12);
    near("mean (jStat.mean of the expanded sample)", m1.mean, jStat.mean(expanded.sample), 1e-12);
    const q1 = runQuantiles({ model, p: [0.5, 0.9, 0.99] });
    const q2 = runQuantiles({ model: expanded, p: [0.5, 0.9, 0.99] });
    q1.x.forEach((x, i) => near(`quantile ${[0.5, 0.9, 0.99][i]}`, x, q2.x[i], 1e-9));
  });

  const cases: { name: string; model: () => unknown; status: number; pointer: string; detail: RegExp }[] = [
    { name: "another organisation's dataset", model: () => ({ sum: [{ dataset: otherId }] }), status: 404, pointer: "/model/sum/0/dataset", detail: /^No dataset ds_\w+ in this key's organisation\.$/ },
    { name: "an unknown id", model: () => ({ dataset: "ds_0000000000000000" }), status: 404, pointer: "/model/dataset", detail: /No dataset/ },
    { name: "a version that does not exist", model: () => ({ dataset: hailId, version: 9 }), status: 404, pointer: "/model/version", detail: /has no version 9; its latest is 1/ },
    { name: "a malformed id", model: () => ({ dataset: 42 }), status: 422, pointer: "/model/dataset", detail: /must be a dataset id/ },
    { name: "a bad version", model: () => ({ dataset: hailId, version: 0 }), status: 422, pointer: "/model/version", detail: /whole number from 1/ },
    { name: "an extra key", model: () => ({ dataset: hailId, rows: 3 }), status: 422, pointer: "/model/rows", detail: /remove "rows"/ },
  ];
  for (const c of cases) {
    it(`refuses ${c.name} with ${c.status} and a pointer`, async () => {
      const e = await resolveDatasets(c.model(), A.organizationId).then(
        () => null,
        (x: unknown) => x,
      );
      expect(e).toBeInstanceOf(ApiError);
      const err = e as ApiError;
      expect(err.status).toBe(c.status);
      expect(err.detail).toMatch(c.detail);
      expect(err.errors?.[0].pointer).toBe(c.pointer);
    });
  }
});
