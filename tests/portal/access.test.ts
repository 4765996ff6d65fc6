// Every portal route across roles and organisations: the session is required, the role is re-read from the
// database on each request, and another organisation's object answers 404.
import { eq, and } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/lib/db/client";
import { invitations, memberships } from "@/lib/db/schema";
import { cookieFor, join, makeTeam, makeUser, portalServer } from "./support";

const server = portalServer();
let A: Awaited<ReturnType<typeof makeTeam>>;
let B: Awaited<ReturnType<typeof makeTeam>>;
let bInvitationId: number;

beforeAll(async () => {
  A = await makeTeam("Fernhill Re");
  B = await makeTeam("Quillon Gauges");
  const [r] = await getDb()
    .insert(invitations)
    .values({ organizationId: B.org.id, email: "someone@quillon.example", role: "developer", tokenHash: "b".repeat(64), invitedBy: B.admin.id, expiresAt: new Date(Date.now() + 86_400_000), sentAt: new Date() });
  bInvitationId = r.insertId;
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

type Who = "anonymous" | "admin" | "developer" | "billing";
const cookie = async (who: Who) => (who === "anonymous" ? "" : cookieFor(A[who].id));

// [method, path (function of the fixtures), body, expected status for anonymous/admin/developer/billing]
const table: [string, string, () => string, unknown, Record<Who, number>][] = [
  ["me", "GET", () => "/api/portal/me", undefined, { anonymous: 401, admin: 200, developer: 200, billing: 200 }],
  ["list keys", "GET", () => "/api/portal/keys", undefined, { anonymous: 401, admin: 200, developer: 200, billing: 403 }],
  ["create key", "POST", () => "/api/portal/keys", { label: "matrix", scopes: ["moments"] }, { anonymous: 401, admin: 201, developer: 201, billing: 403 }],
  ["rotate other org's key", "POST", () => `/api/portal/keys/${B.adminKey.id}/rotate`, { grace: "1h" }, { anonymous: 401, admin: 404, developer: 404, billing: 403 }],
  ["revoke other org's key", "POST", () => `/api/portal/keys/${B.devKey.id}/revoke`, {}, { anonymous: 401, admin: 404, developer: 404, billing: 403 }],
  ["rotate a colleague's key", "POST", () => `/api/portal/keys/${A.adminKey.id}/rotate`, { grace: "1h" }, { anonymous: 401, admin: 201, developer: 404, billing: 403 }],
  ["list members", "GET", () => "/api/portal/members", undefined, { anonymous: 401, admin: 200, developer: 403, billing: 403 }],
  ["change other org's member", "PATCH", () => `/api/portal/members/${B.developer.id}`, { role: "billing" }, { anonymous: 401, admin: 404, developer: 403, billing: 403 }],
  ["remove other org's member", "DELETE", () => `/api/portal/members/${B.billing.id}`, undefined, { anonymous: 401, admin: 404, developer: 403, billing: 403 }],
  ["invite", "POST", () => "/api/portal/invitations", { email: "new.person@fernhill.example", role: "billing" }, { anonymous: 401, admin: 201, developer: 403, billing: 403 }],
  ["withdraw other org's invitation", "DELETE", () => `/api/portal/invitations/${bInvitationId}`, undefined, { anonymous: 401, admin: 404, developer: 403, billing: 403 }],
  ["resend other org's invitation", "POST", () => `/api/portal/invitations/${bInvitationId}/resend`, {}, { anonymous: 401, admin: 404, developer: 403, billing: 403 }],
  ["usage table", "GET", () => "/api/portal/usage", undefined, { anonymous: 401, admin: 200, developer: 200, billing: 200 }],
  ["usage month", "GET", () => "/api/portal/usage/month", undefined, { anonymous: 401, admin: 200, developer: 200, billing: 200 }],
  ["usage csv", "GET", () => "/api/portal/usage/csv", undefined, { anonymous: 401, admin: 200, developer: 200, billing: 200 }],
];

describe("portal routes by role (organisation A) and against organisation B's objects", () => {
  for (const [name, method, path, body, expected] of table) {
    for (const who of Object.keys(expected) as Who[]) {
      it(`${name}: ${who} -> ${expected[who]}`, async () => {
        let r = request(server)[method.toLowerCase() as "get"](path()).set("cookie", await cookie(who));
        if (body !== undefined) r = r.set("content-type", "application/json").send(JSON.stringify(body));
        const res = await r;
        if (res.status !== expected[who]) console.error({ name, who, method, path: path(), status: res.status, expected: expected[who], body: res.body });
        expect(res.status).toBe(expected[who]);
      });
    }
  }
  it("leaves organisation B's objects untouched", async () => {
    const [inv] = await getDb().select().from(invitations).where(eq(invitations.id, bInvitationId));
    expect(inv.revokedAt).toBeNull();
    const [m] = await getDb().select().from(memberships).where(and(eq(memberships.userId, B.developer.id), eq(memberships.organizationId, B.org.id)));
    expect(m.role).toBe("developer");
  });
});

describe("what each role sees", () => {
  it("an admin lists every key of the organisation, a developer only their own, and neither sees B's keys or any hash", async () => {
    const admin = await request(server).get("/api/portal/keys").set("cookie", await cookieFor(A.admin.id));
    const dev = await request(server).get("/api/portal/keys").set("cookie", await cookieFor(A.developer.id));
    const adminIds = admin.body.keys.map((k: { id: number }) => k.id);
    expect(adminIds).toEqual(expect.arrayContaining([A.adminKey.id, A.devKey.id]));
    expect(adminIds).not.toContain(B.adminKey.id);
    expect(dev.body.keys.every((k: { createdById: number }) => k.createdById === A.developer.id)).toBe(true);
    expect(dev.body.keys.map((k: { id: number }) => k.id)).toContain(A.devKey.id);
    expect(JSON.stringify(admin.body)).not.toMatch(/secret_?hash/i);
    expect(JSON.stringify(admin.body)).not.toContain(A.adminKey.secretHash);
  });
});

describe("the role is re-read from the database, not taken from the session", () => {
  it("a developer demoted to billing loses keys on the next request with the same cookie", async () => {
    const u = await makeUser("Demoted Dev");
    await join(u.id, A.org.id, "developer");
    const c = await cookieFor(u.id);
    expect((await request(server).get("/api/portal/keys").set("cookie", c)).status).toBe(200);
    await getDb().update(memberships).set({ role: "billing" }).where(and(eq(memberships.userId, u.id), eq(memberships.organizationId, A.org.id)));
    expect((await request(server).get("/api/portal/keys").set("cookie", c)).status).toBe(403);
  });
  it("a removed member is refused with the same cookie", async () => {
    const u = await makeUser("Removed Dev");
    await join(u.id, A.org.id, "developer");
    const c = await cookieFor(u.id);
    expect((await request(server).get("/api/portal/me").set("cookie", c)).status).toBe(200);
    await getDb().delete(memberships).where(eq(memberships.userId, u.id));
    expect((await request(server).get("/api/portal/me").set("cookie", c)).status).toBe(403);
  });
  it("a forged or foreign-secret cookie is not a session", async () => {
    const res = await request(server).get("/api/portal/me").set("cookie", "next-auth.session-token=eyJhbGciOiJkaXIiLCJlbmMiOiJBMjU2R0NNIn0..x.y.z");
    expect(res.status).toBe(401);
  });
});

describe("cross-site requests", () => {
  it("a mutation with a foreign Origin is refused before anything happens", async () => {
    const res = await request(server)
      .post("/api/portal/keys")
      .set("cookie", await cookieFor(A.admin.id))
      .set("origin", "https://evil.example")
      .set("content-type", "application/json")
      .send({ label: "csrf", scopes: ["moments"] });
    expect(res.status).toBe(403);
  });
  it("a form-encoded body is refused (415), so no cross-site form can post", async () => {
    const res = await request(server).post("/api/portal/keys").set("cookie", await cookieFor(A.admin.id)).type("form").send("label=x&scopes=moments");
    expect(res.status).toBe(415);
  });
});
