// The portal's small things, each as its users met it: who may download raw claim files, a From after To,
// messages that speak of the organisation (not of a key nobody used), and the API's advice when a scope is missing.
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiServer, orgWithKey } from "../support/api";
import { datasetServer, upload } from "../datasets/db-support";
import { cookieFor, makeTeam, portalServer } from "./support";
import * as explore from "@/app/api/portal/explore/[op]/route";
import { routeServer, type RouteModule } from "../support/route-server";

const portal = portalServer();
const data = datasetServer();
const ex = routeServer({ "/api/portal/explore/[op]": explore as RouteModule });
const api = apiServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
beforeAll(async () => {
  T = await makeTeam("Harrowgate Mutual");
});
afterAll(async () => {
  for (const s of [portal, data, ex, api]) await new Promise<void>((r) => s.close(() => r()));
});

describe("small fixes", () => {
  it("raw claim files are for developers and admins; a billing contact sees the summary but not the file", async () => {
    const up = await upload(data, await cookieFor(T.developer.id), "amount\n120.5\n88\n", { name: "Hail claims" });
    expect(up.status).toBe(201);
    const path = `/api/portal/datasets/${up.body.dataset.id}/versions/1/raw`;
    expect((await request(data).get(path).set("cookie", await cookieFor(T.admin.id))).status).toBe(200);
    expect((await request(data).get(path).set("cookie", await cookieFor(T.billing.id))).status).toBe(403);
    expect((await request(data).get(`/api/portal/datasets/${up.body.dataset.id}`).set("cookie", await cookieFor(T.billing.id))).status).toBe(200);
  });

  it("a usage period whose From is after its To is refused with a message, not shown empty", async () => {
    const res = await request(portal).get("/api/portal/usage?from=2026-12-10&to=2026-12-01").set("cookie", await cookieFor(T.admin.id));
    expect(res.status).toBe(422);
    expect(res.body.error).toMatch(/“From” is after “To”/);
    expect(res.body.fields.to).toBeTruthy();
  });

  it("the explorer speaks of the organisation when a dataset is missing (no key is involved)", async () => {
    const res = await request(ex)
      .post("/api/portal/explore/moments")
      .set("cookie", await cookieFor(T.developer.id))
      .set("content-type", "application/json")
      .send(JSON.stringify({ model: { dataset: "ds_0000000000000000" } }));
    expect(res.status).toBe(404);
    expect(res.body.detail).toBe("No dataset ds_0000000000000000 in this organisation.");
    expect(res.body.detail).not.toMatch(/key/);
  });

  it("a key without the scope is told how to get one, without assuming the caller's role", async () => {
    const o = await orgWithKey({ scopes: ["moments"] });
    const res = await request(api).post("/api/v1/cf").set("authorization", `Bearer ${o.secret}`).set("content-type", "application/json").send(JSON.stringify({ model: { family: "normal", mu: 0, sigma: 1 }, t: [1] }));
    expect(res.status).toBe(403);
    expect(res.body.detail).toMatch(/lacks the "cf" scope/);
    expect(res.body.detail).not.toMatch(/an admin can issue/);
  });
});
