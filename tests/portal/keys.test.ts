// Key lifecycle through the portal: secret shown once, rotation with grace, revocation, expiry warnings,
// e-mails to the organisation's admins, and an audit event for every step.
import { and, eq } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { authenticate } from "@/lib/api/gate";
import { getDb } from "@/lib/db/client";
import { apiKeys, auditEvents } from "@/lib/db/schema";
import { createKey } from "@/lib/db/keys";
import { warnExpiringKeys } from "@/lib/portal/keys";
import { cookieFor, mailTo, makeTeam, makeUser, join, portalServer, waitForMail } from "./support";

const server = portalServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
let secondAdmin: Awaited<ReturnType<typeof makeUser>>;
beforeAll(async () => {
  T = await makeTeam("Brackwater Mutual");
  secondAdmin = await makeUser("Second Admin");
  await join(secondAdmin.id, T.org.id, "admin");
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const post = async (userId: number, path: string, body: unknown) =>
  request(server).post(path).set("cookie", await cookieFor(userId)).set("content-type", "application/json").send(JSON.stringify(body));
const bearer = (secret: string) => new Request("http://127.0.0.1/api/v1/moments", { headers: { authorization: `Bearer ${secret}` } });
const audits = (keyId: number) => getDb().select().from(auditEvents).where(and(eq(auditEvents.targetType, "api_key"), eq(auditEvents.targetId, String(keyId))));

describe("key lifecycle", () => {
  let keyId: number;
  let secret: string;

  it("a developer creates a key: the secret is returned once, works, and is never listed", async () => {
    const res = await post(T.developer.id, "/api/portal/keys", { label: "claims nightly", scopes: ["moments", "distribution"], expiresOn: "2099-12-31" });
    expect(res.status).toBe(201);
    secret = res.body.secret;
    keyId = res.body.key.id;
    expect(secret.startsWith(res.body.key.prefix)).toBe(true);
    expect(res.body.key).toMatchObject({ label: "claims nightly", state: "active", createdBy: T.developer.name, expiresAt: "2099-12-31T23:59:59.999Z" });
    expect((await authenticate(bearer(secret))).id).toBe(keyId);
    const list = await request(server).get("/api/portal/keys").set("cookie", await cookieFor(T.developer.id));
    expect(JSON.stringify(list.body)).not.toContain(secret.slice(15));
    expect((await audits(keyId)).map((a) => a.action)).toContain("key.created");
  });

  it("every admin is mailed about the new key", async () => {
    for (const a of [T.admin, secondAdmin]) {
      const m = await waitForMail(a.email);
      expect(m.some((x) => x.subject.includes("claims nightly") && /created/.test(x.subject))).toBe(true);
    }
    expect(await mailTo(T.billing.email)).toHaveLength(0);
  });

  it("rotating with 1 hour grace: both secrets work, the old key is retiring until the grace ends", async () => {
    const t0 = Date.now();
    const res = await post(T.developer.id, `/api/portal/keys/${keyId}/rotate`, { grace: "1h" });
    expect(res.status).toBe(201);
    const ends = new Date(res.body.graceEndsAt).getTime();
    // 1 hour = 3 600 000 ms, allowing 5 s for the request itself.
    expect(Math.abs(ends - (t0 + 3_600_000))).toBeLessThan(5000);
    const fresh = res.body.secret as string;
    expect(fresh).not.toBe(secret);
    expect(res.body.key.replacesKeyId).toBe(keyId);
    await new Promise((r) => setTimeout(r, 1100)); // the gate caches key look-ups for 1 s
    expect((await authenticate(bearer(secret))).id).toBe(keyId);
    expect((await authenticate(bearer(fresh))).id).toBe(res.body.key.id);
    const list = await request(server).get("/api/portal/keys").set("cookie", await cookieFor(T.admin.id));
    const old = list.body.keys.find((k: { id: number }) => k.id === keyId);
    expect(old.state).toBe("retiring");
    expect(new Date(old.retiringUntil).getTime()).toBe(ends);
    expect((await audits(keyId)).map((a) => a.action)).toContain("key.rotated_out");
    expect((await audits(res.body.key.id)).map((a) => a.action)).toContain("key.rotated_in");
    const m = await waitForMail(T.admin.email, 2);
    expect(m.some((x) => /rotated/.test(x.subject))).toBe(true);
  });

  it("revoking the retiring key refuses it at once; revoking again is 409; a revoked key cannot be rotated", async () => {
    const res = await post(T.admin.id, `/api/portal/keys/${keyId}/revoke`, {});
    expect(res.status).toBe(200);
    await new Promise((r) => setTimeout(r, 1100));
    await expect(authenticate(bearer(secret))).rejects.toMatchObject({ status: 401 });
    expect((await post(T.admin.id, `/api/portal/keys/${keyId}/revoke`, {})).status).toBe(409);
    expect((await post(T.admin.id, `/api/portal/keys/${keyId}/rotate`, { grace: "1h" })).status).toBe(409);
    expect((await audits(keyId)).map((a) => a.action)).toContain("key.revoked");
    const m = await waitForMail(T.admin.email, 3);
    expect(m.some((x) => /revoked/.test(x.subject))).toBe(true);
  });

  it("rotating immediately leaves the old key revoked", async () => {
    const res = await post(T.admin.id, `/api/portal/keys/${T.adminKey.id}/rotate`, { grace: "immediately" });
    expect(res.status).toBe(201);
    const list = await request(server).get("/api/portal/keys").set("cookie", await cookieFor(T.admin.id));
    expect(list.body.keys.find((k: { id: number }) => k.id === T.adminKey.id).state).toBe("revoked");
  });

  it("invalid input is 422 per field: no scopes, a past expiry, an unknown grace", async () => {
    const bad = await post(T.admin.id, "/api/portal/keys", { label: "", scopes: [], expiresOn: "2001-01-01" });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.fields).sort()).toEqual(["expiresOn", "label", "scopes"]);
    expect((await post(T.admin.id, `/api/portal/keys/${T.devKey.id}/rotate`, { grace: "2h" })).status).toBe(422);
    expect((await post(T.admin.id, "/api/portal/keys/not-a-number/revoke", {})).status).toBe(404);
  });

  it("an unverified person cannot create keys", async () => {
    const u = await makeUser("Unverified Dev", { verified: false });
    await join(u.id, T.org.id, "developer");
    expect((await post(u.id, "/api/portal/keys", { label: "x", scopes: ["moments"] })).status).toBe(403);
  });
});

describe("expiry warnings", () => {
  it("warn the admins and the creator once, within 7 days of expiry; later and revoked keys are not warned", async () => {
    const team = await makeTeam("Sablewick Tools");
    const now = new Date();
    const soon = (await createKey({ organizationId: team.org.id, createdBy: team.developer.id, label: "expiring soon", scopes: ["moments"], expiresAt: new Date(now.getTime() + 3 * 86_400_000), actor: { type: "system" } })).key;
    const later = (await createKey({ organizationId: team.org.id, createdBy: team.developer.id, label: "expiring later", scopes: ["moments"], expiresAt: new Date(now.getTime() + 30 * 86_400_000), actor: { type: "system" } })).key;
    const gone = (await createKey({ organizationId: team.org.id, createdBy: team.developer.id, label: "gone", scopes: ["moments"], expiresAt: new Date(now.getTime() + 86_400_000), actor: { type: "system" } })).key;
    await getDb().update(apiKeys).set({ revokedAt: now }).where(eq(apiKeys.id, gone.id));
    expect(await warnExpiringKeys({ organizationId: team.org.id, now })).toBe(1);
    expect(await warnExpiringKeys({ organizationId: team.org.id, now })).toBe(0);
    const adminMail = await waitForMail(team.admin.email);
    const devMail = await waitForMail(team.developer.email);
    for (const m of [adminMail, devMail]) expect(m.filter((x) => /expires soon/.test(x.subject)).map((x) => x.subject)).toEqual([`[Sablewick Tools] API key "expiring soon" expires soon`]);
    const [row] = await getDb().select().from(apiKeys).where(eq(apiKeys.id, later.id));
    expect(row.expiryWarnedAt).toBeNull();
    expect((await audits(soon.id)).map((a) => a.action)).toContain("key.expiry_warned");
  });
});
