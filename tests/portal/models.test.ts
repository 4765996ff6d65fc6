// Saved models: versions, sharing inside the organisation, private models, and the same model check as the API.
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/lib/db/client";
import { auditEvents } from "@/lib/db/schema";
import { and, eq } from "drizzle-orm";
import { cookieFor, makeTeam, portalServer } from "./support";

const server = portalServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
let O: Awaited<ReturnType<typeof makeTeam>>;
const c: Record<string, string> = {};
beforeAll(async () => {
  T = await makeTeam("Harrowgate Mutual");
  O = await makeTeam("Kestrel Precision Works");
  c.dev = await cookieFor(T.developer.id);
  c.admin = await cookieFor(T.admin.id);
  c.billing = await cookieFor(T.billing.id);
  c.other = await cookieFor(O.admin.id);
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const save = (cookie: string, body: unknown) => request(server).post("/api/portal/models").set("cookie", cookie).set("content-type", "application/json").send(JSON.stringify(body));
const hail = { compound: { count: { family: "poisson", lambda: 42 }, each: { family: "gamma", shape: 1.8, rate: 0.12 } } };

describe("saved models", () => {
  it("a name saved twice has two versions; both open; the audit log records each save", async () => {
    const first = await save(c.dev, { name: "Hail book", model: hail, levels: "0.5, 0.995" });
    expect(first.status).toBe(201);
    expect(first.body.model.version).toBe(1);
    const second = await save(c.dev, { name: "Hail book", model: { ...hail, compound: { ...hail.compound, count: { family: "poisson", lambda: 45 } } }, note: "2027 exposure" });
    expect(second.status).toBe(200);
    expect(second.body.model.version).toBe(2);
    const id = first.body.model.id;
    const v1 = await request(server).get(`/api/portal/models/${id}?version=1`).set("cookie", c.admin);
    expect(v1.body.version.model.compound.count.lambda).toBe(42);
    expect(v1.body.version.levels).toBe("0.5, 0.995");
    const latest = await request(server).get(`/api/portal/models/${id}`).set("cookie", c.admin);
    expect(latest.body.version.version).toBe(2);
    expect(latest.body.versions.map((v: { version: number }) => v.version)).toEqual([2, 1]);
    const audit = await getDb().select().from(auditEvents).where(and(eq(auditEvents.organizationId, T.org.id), eq(auditEvents.action, "model.saved")));
    expect(audit.length).toBe(2);
  });

  it("a private model is its creator's only; another organisation never sees either kind; billing has no models", async () => {
    const mine = await save(c.dev, { name: "Scratch", model: { family: "normal", mu: 0, sigma: 1 }, shared: false });
    const id = mine.body.model.id;
    expect((await request(server).get(`/api/portal/models/${id}`).set("cookie", c.admin)).status).toBe(404);
    const listed = await request(server).get("/api/portal/models").set("cookie", c.admin);
    expect(listed.body.models.map((m: { name: string }) => m.name)).not.toContain("Scratch");
    expect((await save(c.admin, { name: "Scratch", model: { family: "normal", mu: 1, sigma: 1 } })).status).toBe(409);
    expect((await request(server).get(`/api/portal/models/${id}`).set("cookie", c.other)).status).toBe(404);
    expect((await request(server).get("/api/portal/models").set("cookie", c.billing)).status).toBe(403);
    // Sharing is the creator's (or an admin's) decision.
    const share = await request(server).patch(`/api/portal/models/${id}`).set("cookie", c.dev).set("content-type", "application/json").send({ shared: true });
    expect(share.status).toBe(200);
    expect((await request(server).get(`/api/portal/models/${id}`).set("cookie", c.admin)).status).toBe(200);
  });

  it("a model is checked as the API checks it: a bad parameter by pointer, an unknown dataset 404; nothing is stored", async () => {
    const bad = await save(c.dev, { name: "Broken", model: { family: "normal", mu: 0, sigma: -1 } });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.fields)).toContain("/model/sigma");
    const missing = await save(c.dev, { name: "Ghost data", model: { compound: { count: { family: "poisson", lambda: 2 }, each: { dataset: "ds_0000000000000000", version: 1 } } } });
    expect(missing.status).toBe(404);
    const listed = await request(server).get("/api/portal/models").set("cookie", c.dev);
    expect(listed.body.models.map((m: { name: string }) => m.name)).not.toContain("Broken");
    expect(listed.body.models.map((m: { name: string }) => m.name)).not.toContain("Ghost data");
  });
});
