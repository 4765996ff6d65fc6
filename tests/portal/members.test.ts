// Members and invitations: signed single-use expiring links through the SMTP sink, resend and withdraw,
// role changes, removal, and the last-admin rule.
import { and, eq } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashPassword } from "@/lib/auth/passwords";
import { getDb } from "@/lib/db/client";
import { auditEvents, invitations, memberships, users } from "@/lib/db/schema";
import { cookieFor, join, linkToken, makeTeam, makeUser, portalServer, uniq, waitForMail } from "./support";

const server = portalServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
beforeAll(async () => {
  T = await makeTeam("Grayling Assurance");
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const send = async (method: "post" | "patch" | "delete", path: string, body?: unknown, userId?: number) => {
  let r = request(server)[method](path);
  if (userId) r = r.set("cookie", await cookieFor(userId));
  if (body !== undefined) r = r.set("content-type", "application/json").send(JSON.stringify(body));
  return r;
};
const roleOf = async (userId: number, orgId: number) =>
  (await getDb().select().from(memberships).where(and(eq(memberships.userId, userId), eq(memberships.organizationId, orgId))))[0]?.role ?? null;

describe("invitations", () => {
  it("invite a billing contact: the mail carries a link that works once and creates a verified account", async () => {
    const email = `ines.karlsson.${uniq()}@grayling.example`;
    const res = await send("post", "/api/portal/invitations", { email, role: "billing" }, T.admin.id);
    expect(res.status).toBe(201);
    const [mail] = await waitForMail(email);
    expect(mail.subject).toContain("Grayling Assurance");
    const token = linkToken(mail, "/invite");
    const look = await request(server).get(`/api/portal/invitations/lookup?token=${token}`);
    expect(look.body).toEqual({ organization: "Grayling Assurance", email, role: "billing", hasAccount: false });
    const missingName = await send("post", "/api/portal/invitations/accept", { token, password: "billing-pass-2026" });
    expect(missingName.status).toBe(422);
    expect(missingName.body.fields.name).toBeTruthy();
    const ok = await send("post", "/api/portal/invitations/accept", { token, name: "Ines Karlsson", password: "billing-pass-2026" });
    expect(ok.status).toBe(200);
    const [u] = await getDb().select().from(users).where(eq(users.email, email));
    expect(u.emailVerifiedAt).toBeInstanceOf(Date);
    expect(await roleOf(u.id, T.org.id)).toBe("billing");
    expect((await send("post", "/api/portal/invitations/accept", { token, name: "Again", password: "billing-pass-2026" })).status).toBe(410);
    expect((await request(server).get(`/api/portal/invitations/lookup?token=${token}`)).status).toBe(410);
    const actions = (await getDb().select().from(auditEvents).where(eq(auditEvents.organizationId, T.org.id))).map((a) => a.action);
    expect(actions).toEqual(expect.arrayContaining(["invitation.created", "invitation.accepted"]));
  });

  it("an existing account accepts with its own password, and only with it", async () => {
    const other = await makeTeam("Harlow Pumps");
    await getDb().update(users).set({ passwordHash: await hashPassword("harlow-dev-pass") }).where(eq(users.id, other.developer.id));
    await send("post", "/api/portal/invitations", { email: other.developer.email, role: "developer" }, T.admin.id);
    const [mail] = await waitForMail(other.developer.email);
    const token = linkToken(mail, "/invite");
    expect((await request(server).get(`/api/portal/invitations/lookup?token=${token}`)).body.hasAccount).toBe(true);
    expect((await send("post", "/api/portal/invitations/accept", { token, password: "wrong-password" })).status).toBe(422);
    expect((await send("post", "/api/portal/invitations/accept", { token, password: "harlow-dev-pass" })).status).toBe(200);
    expect(await roleOf(other.developer.id, T.org.id)).toBe("developer");
    expect(await roleOf(other.developer.id, other.org.id)).toBe("developer");
  });

  it("resending replaces the link (the old one stops working); withdrawing ends it; duplicates are 409", async () => {
    const email = `resend.${uniq()}@grayling.example`;
    const { body } = await send("post", "/api/portal/invitations", { email, role: "developer" }, T.admin.id);
    expect((await send("post", "/api/portal/invitations", { email, role: "developer" }, T.admin.id)).status).toBe(409);
    expect((await send("post", "/api/portal/invitations", { email: T.developer.email, role: "developer" }, T.admin.id)).status).toBe(409);
    const first = linkToken((await waitForMail(email))[0], "/invite");
    expect((await send("post", `/api/portal/invitations/${body.id}/resend`, {}, T.admin.id)).status).toBe(200);
    const mails = await waitForMail(email, 2);
    const second = linkToken(mails[0], "/invite");
    expect(second).not.toBe(first);
    expect((await request(server).get(`/api/portal/invitations/lookup?token=${first}`)).status).toBe(410);
    expect((await request(server).get(`/api/portal/invitations/lookup?token=${second}`)).status).toBe(200);
    expect((await send("delete", `/api/portal/invitations/${body.id}`, undefined, T.admin.id)).status).toBe(200);
    expect((await request(server).get(`/api/portal/invitations/lookup?token=${second}`)).status).toBe(410);
    expect((await send("delete", `/api/portal/invitations/${body.id}`, undefined, T.admin.id)).status).toBe(404);
  });

  it("an expired link is refused", async () => {
    const email = `late.${uniq()}@grayling.example`;
    const { body } = await send("post", "/api/portal/invitations", { email, role: "developer" }, T.admin.id);
    const token = linkToken((await waitForMail(email))[0], "/invite");
    await getDb().update(invitations).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(invitations.id, body.id));
    expect((await send("post", "/api/portal/invitations/accept", { token, name: "Late", password: "late-password-1" })).status).toBe(410);
  });

  it("a made-up token is refused", async () => {
    expect((await request(server).get(`/api/portal/invitations/lookup?token=${"x".repeat(43)}`)).status).toBe(410);
  });
});

describe("members", () => {
  it("lists people and open invitations for admins", async () => {
    const res = await request(server).get("/api/portal/members").set("cookie", await cookieFor(T.admin.id));
    expect(res.status).toBe(200);
    expect(res.body.members.map((m: { userId: number }) => m.userId)).toEqual(expect.arrayContaining([T.admin.id, T.developer.id, T.billing.id]));
    expect(res.body.members.find((m: { userId: number }) => m.userId === T.admin.id).you).toBe(true);
  });

  it("changes a role and removes a member, with audit events", async () => {
    expect((await send("patch", `/api/portal/members/${T.developer.id}`, { role: "billing" }, T.admin.id)).status).toBe(200);
    expect(await roleOf(T.developer.id, T.org.id)).toBe("billing");
    expect((await send("patch", `/api/portal/members/${T.developer.id}`, { role: "owner" }, T.admin.id)).status).toBe(422);
    expect((await send("delete", `/api/portal/members/${T.developer.id}`, undefined, T.admin.id)).status).toBe(200);
    expect(await roleOf(T.developer.id, T.org.id)).toBeNull();
    const actions = (await getDb().select().from(auditEvents).where(and(eq(auditEvents.organizationId, T.org.id), eq(auditEvents.targetId, String(T.developer.id))))).map((a) => a.action);
    expect(actions).toEqual(expect.arrayContaining(["member.role_changed", "member.removed"]));
  });

  it("the last admin can be neither demoted nor removed; with a second admin both work", async () => {
    const team = await makeTeam("Penhallow Freight");
    expect((await send("patch", `/api/portal/members/${team.admin.id}`, { role: "developer" }, team.admin.id)).status).toBe(409);
    expect((await send("delete", `/api/portal/members/${team.admin.id}`, undefined, team.admin.id)).status).toBe(409);
    expect(await roleOf(team.admin.id, team.org.id)).toBe("admin");
    const second = await makeUser("Second Admin");
    await join(second.id, team.org.id, "admin");
    expect((await send("patch", `/api/portal/members/${team.admin.id}`, { role: "developer" }, team.admin.id)).status).toBe(200);
    // The demoted admin's very next request runs with the new role.
    expect((await request(server).get("/api/portal/members").set("cookie", await cookieFor(team.admin.id))).status).toBe(403);
    expect((await send("delete", `/api/portal/members/${second.id}`, undefined, second.id)).status).toBe(409);
  });

  it("two admins demoting each other at once leave one admin", async () => {
    const team = await makeTeam("Tollbridge Mills");
    const second = await makeUser("Other Admin");
    await join(second.id, team.org.id, "admin");
    const [a, b] = await Promise.all([
      send("patch", `/api/portal/members/${second.id}`, { role: "developer" }, team.admin.id),
      send("patch", `/api/portal/members/${team.admin.id}`, { role: "developer" }, second.id),
    ]);
    const statuses = [a.status, b.status].sort();
    const admins = (await getDb().select().from(memberships).where(and(eq(memberships.organizationId, team.org.id), eq(memberships.role, "admin")))).length;
    expect(admins).toBe(1);
    // One of the two wins; the other is refused, either as the last admin (409) or as no longer an admin (403).
    expect(statuses[0]).toBe(200);
    expect([403, 409]).toContain(statuses[1]);
  });
});
