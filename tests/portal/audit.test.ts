// The audit log: admins only, who/what/when/from where, filters by action, person and period, CSV.
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cookieFor, makeTeam, portalServer } from "./support";

const server = portalServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
let admin: string;
beforeAll(async () => {
  T = await makeTeam("Harrowgate Mutual");
  admin = await cookieFor(T.admin.id);
  // Two recorded actions from known addresses: a key revoked by the admin, a key made by the developer.
  await request(server).post(`/api/portal/keys/${T.devKey.id}/revoke`).set("cookie", admin).set("x-forwarded-for", "203.0.113.7, 10.0.0.1").set("user-agent", "Fixture/1.0").set("content-type", "application/json").send({});
  await request(server).post("/api/portal/keys").set("cookie", await cookieFor(T.developer.id)).set("x-forwarded-for", "198.51.100.23").set("content-type", "application/json").send({ label: "pricing batch", scopes: ["moments"] });
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

describe("audit log", () => {
  it("lists who did what to which object, and from which address, newest first", async () => {
    const res = await request(server).get("/api/portal/audit").set("cookie", admin);
    expect(res.status).toBe(200);
    const revoked = res.body.rows.find((r: { action: string }) => r.action === "key.revoked");
    expect(revoked).toMatchObject({ who: `${T.admin.name}`, whoEmail: T.admin.email, ip: "203.0.113.7", userAgent: "Fixture/1.0" });
    expect(revoked.target).toMatch(/^key sfk_/);
    const created = res.body.rows.find((r: { action: string }) => r.action === "key.created");
    expect(created).toMatchObject({ who: T.developer.name, ip: "198.51.100.23" });
    expect(res.body.rows.indexOf(created)).toBeLessThan(res.body.rows.indexOf(revoked));
    expect(res.body.facets.actions).toEqual(expect.arrayContaining(["key.created", "key.revoked"]));
  });

  it("filters by action family, exact action, person and period; a From after To is explained", async () => {
    const q = (s: string) => request(server).get(`/api/portal/audit?${s}`).set("cookie", admin);
    expect((await q("action=key")).body.rows.every((r: { action: string }) => r.action.startsWith("key."))).toBe(true);
    expect((await q("action=key.revoked")).body.rows.map((r: { action: string }) => r.action)).toEqual(["key.revoked"]);
    expect((await q(`actorUserId=${T.developer.id}`)).body.rows.every((r: { who: string }) => r.who === T.developer.name)).toBe(true);
    expect((await q("from=2020-01-01&to=2020-01-02")).body.rows).toEqual([]);
    const today = new Date().toISOString().slice(0, 10);
    expect((await q(`from=${today}&to=${today}`)).body.rows.length).toBeGreaterThanOrEqual(2);
    const swapped = await q("from=2026-12-10&to=2026-12-01");
    expect(swapped.status).toBe(422);
    expect(swapped.body.fields.to).toMatch(/after/);
  });

  it("downloads as CSV with a header and one line per event", async () => {
    const res = await request(server).get("/api/portal/audit/csv?action=key").set("cookie", admin);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/text\/csv/);
    const lines = res.text.trim().split("\r\n");
    expect(lines[0]).toBe("time_utc,who,email,action,target,detail,ip,user_agent");
    expect(lines.some((l) => l.includes("key.revoked") && l.includes("203.0.113.7"))).toBe(true);
  });

  it("is for admins only", async () => {
    expect((await request(server).get("/api/portal/audit").set("cookie", await cookieFor(T.developer.id))).status).toBe(403);
    expect((await request(server).get("/api/portal/audit/csv").set("cookie", await cookieFor(T.billing.id))).status).toBe(403);
  });
});
