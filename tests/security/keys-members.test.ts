// Key hygiene over the portal's handlers and the public gate (real MariaDB): a removed member's keys are
// revoked by default or handed to another member, recorded in the audit log; keys are edited (label, scopes,
// address ranges) without a new secret; the gate refuses calls from outside a key's ranges; a key made
// without a scope choice may call every endpoint.
import { and, desc, eq } from "drizzle-orm";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as keyOne from "@/app/api/portal/keys/[id]/route";
import * as keysRoute from "@/app/api/portal/keys/route";
import * as member from "@/app/api/portal/members/[userId]/route";
import { addressAllowed, canonicalCidr, clientAddress } from "@/lib/api/cidr";
import { ALL_SCOPES } from "@/lib/api/scopes";
import { getDb } from "@/lib/db/client";
import { createKey } from "@/lib/db/keys";
import { apiKeys, auditEvents } from "@/lib/db/schema";
import { apiServer } from "../support/api";
import { routeServer, type RouteModule } from "../support/route-server";
import { cookieFor, makeTeam, makeUser, join } from "../portal/support";

const portal = routeServer({
  "/api/portal/keys": keysRoute as RouteModule,
  "/api/portal/keys/[id]": keyOne as RouteModule,
  "/api/portal/members/[userId]": member as RouteModule,
});
const api = apiServer();
afterAll(async () => {
  await new Promise<void>((r) => portal.close(() => r()));
  await new Promise<void>((r) => api.close(() => r()));
});

const as = async (userId: number) => cookieFor(userId);
const keyRow = async (id: number) => (await getDb().select().from(apiKeys).where(eq(apiKeys.id, id)))[0];
const lastAudit = async (orgId: number, action: string) =>
  (await getDb().select().from(auditEvents).where(and(eq(auditEvents.organizationId, orgId), eq(auditEvents.action, action))).orderBy(desc(auditEvents.id)).limit(1))[0];

const moments = (secret: string, ip?: string) => {
  let r = request(api).post("/api/v1/moments").set("authorization", `Bearer ${secret}`).set("content-type", "application/json");
  if (ip) r = r.set("x-forwarded-for", ip);
  return r.send(JSON.stringify({ model: { family: "normal", mu: 12, sigma: 0.012 }, order: 2 }));
};

describe("removing a member", () => {
  let T: Awaited<ReturnType<typeof makeTeam>>;
  beforeAll(async () => {
    T = await makeTeam("Kestrel Precision Works");
  });

  it("shows the member's working keys and who may take them", async () => {
    const res = await request(portal).get(`/api/portal/members/${T.developer.id}`).set("cookie", await as(T.admin.id));
    expect(res.status).toBe(200);
    expect(res.body.member).toMatchObject({ userId: T.developer.id, role: "developer" });
    expect(res.body.activeKeys.map((k: { prefix: string }) => k.prefix)).toEqual([T.devKey.prefix]);
    // The billing contact cannot hold keys; the member being removed is not offered either.
    expect(res.body.transferTo.map((t: { userId: number }) => t.userId)).toEqual([T.admin.id]);
    expect((await request(portal).get(`/api/portal/members/${T.developer.id}`).set("cookie", await as(T.developer.id))).status).toBe(403);
  });

  it("revokes their keys by default: a removal without a choice leaves no working key behind", async () => {
    const team = await makeTeam("Harrowgate Mutual");
    const secret = (await createKey({ organizationId: team.org.id, createdBy: team.developer.id, label: "pricing batch", scopes: ["moments"], actor: { type: "system" } })).secret;
    expect((await moments(secret, "198.51.100.7")).status).toBe(200);
    const res = await request(portal).delete(`/api/portal/members/${team.developer.id}`).set("cookie", await as(team.admin.id));
    expect(res.status, res.text).toBe(200);
    expect(res.body.keys).toBe("revoke");
    expect(res.body.keyIds).toHaveLength(2);
    expect((await keyRow(team.devKey.id)).revokedAt).not.toBeNull();
    await new Promise((r) => setTimeout(r, 1100)); // the gate's key cache lives at most one second
    expect((await moments(secret, "198.51.100.7")).status).toBe(401);
    const audit = await lastAudit(team.org.id, "member.removed");
    expect(audit.detail).toMatchObject({ role: "developer", keys: "revoke", keyIds: res.body.keyIds });
    expect((await lastAudit(team.org.id, "key.revoked")).detail).toMatchObject({ reason: "member removed", from: team.developer.id });
    // The admin's own key is untouched.
    expect((await keyRow(team.adminKey.id)).revokedAt).toBeNull();
  });

  it("hands their keys to another member when asked: they keep working, the audit log says to whom", async () => {
    const team = await makeTeam("Brindle Surety");
    const secret = (await createKey({ organizationId: team.org.id, createdBy: team.developer.id, label: "reserving notebook", scopes: ["moments"], actor: { type: "system" } })).secret;
    const bad = await request(portal).delete(`/api/portal/members/${team.developer.id}`).set("cookie", await as(team.admin.id)).set("content-type", "application/json").send(JSON.stringify({ keys: "transfer", transferTo: team.billing.id }));
    expect(bad.status).toBe(422);
    expect(bad.body.error).toMatch(/Billing contacts cannot hold API keys/);
    expect((await keyRow(team.devKey.id)).createdBy).toBe(team.developer.id);
    const res = await request(portal).delete(`/api/portal/members/${team.developer.id}`).set("cookie", await as(team.admin.id)).set("content-type", "application/json").send(JSON.stringify({ keys: "transfer", transferTo: team.admin.id }));
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ removed: true, keys: "transfer", transferTo: team.admin.id });
    expect((await keyRow(team.devKey.id))).toMatchObject({ createdBy: team.admin.id, revokedAt: null });
    expect((await moments(secret, "198.51.100.7")).status).toBe(200);
    expect((await lastAudit(team.org.id, "member.removed")).detail).toMatchObject({ keys: "transfer", transferTo: team.admin.id, keyIds: res.body.keyIds });
    expect((await lastAudit(team.org.id, "key.transferred")).detail).toMatchObject({ from: team.developer.id, to: team.admin.id });
  });

  it("refuses a transfer to someone outside the organisation", async () => {
    const team = await makeTeam("Fenwick Reinsurance");
    const outsider = await makeUser("Outside Person");
    const other = await makeTeam("Other Org");
    await join(outsider.id, other.org.id, "developer");
    const res = await request(portal).delete(`/api/portal/members/${team.developer.id}`).set("cookie", await as(team.admin.id)).set("content-type", "application/json").send(JSON.stringify({ keys: "transfer", transferTo: outsider.id }));
    expect(res.status).toBe(422);
    expect((await keyRow(team.devKey.id)).revokedAt).toBeNull();
  });
});

describe("key lifecycle", () => {
  let T: Awaited<ReturnType<typeof makeTeam>>;
  beforeAll(async () => {
    T = await makeTeam("Harrowgate Mutual");
  });

  it("a key created without a scope choice gets every scope (all are read-only computation)", async () => {
    const res = await request(portal).post("/api/portal/keys").set("cookie", await as(T.developer.id)).set("content-type", "application/json").send(JSON.stringify({ label: "first try" }));
    expect(res.status, res.text).toBe(201);
    expect([...res.body.key.scopes].sort()).toEqual([...ALL_SCOPES].sort());
    const cf = await request(api).post("/api/v1/cf").set("authorization", `Bearer ${res.body.secret}`).set("content-type", "application/json").send(JSON.stringify({ model: { family: "normal", mu: 0, sigma: 1 }, t: [0.5] }));
    expect(cf.status, cf.text).toBe(200);
  });

  it("edits label and scopes without a new secret; the audit log has before and after", async () => {
    const made = await request(portal).post("/api/portal/keys").set("cookie", await as(T.developer.id)).set("content-type", "application/json").send(JSON.stringify({ label: "claims nightly", scopes: ["moments"] }));
    const id = made.body.key.id;
    const res = await request(portal).patch(`/api/portal/keys/${id}`).set("cookie", await as(T.developer.id)).set("content-type", "application/json").send(JSON.stringify({ label: "claims nightly (EU)", scopes: ["moments", "distribution"] }));
    expect(res.status, res.text).toBe(200);
    expect(res.body.key).toMatchObject({ label: "claims nightly (EU)", scopes: ["moments", "distribution"], prefix: made.body.key.prefix });
    expect((await moments(made.body.secret, "198.51.100.7")).status).toBe(200);
    expect((await lastAudit(T.org.id, "key.updated")).detail).toMatchObject({ from: { label: "claims nightly", scopes: ["moments"] }, to: { label: "claims nightly (EU)", scopes: ["moments", "distribution"] } });
    // A colleague's key is not found for a developer; billing may not edit keys.
    expect((await request(portal).patch(`/api/portal/keys/${T.adminKey.id}`).set("cookie", await as(T.developer.id)).set("content-type", "application/json").send(JSON.stringify({ label: "mine now" }))).status).toBe(404);
    expect((await request(portal).patch(`/api/portal/keys/${id}`).set("cookie", await as(T.billing.id)).set("content-type", "application/json").send(JSON.stringify({ label: "x" }))).status).toBe(403);
    const empty = await request(portal).patch(`/api/portal/keys/${id}`).set("cookie", await as(T.developer.id)).set("content-type", "application/json").send(JSON.stringify({ scopes: [] }));
    expect(empty.status).toBe(422);
  });

  it("address ranges: canonical, validated, and enforced by the gate with a documented problem", async () => {
    const made = await request(portal).post("/api/portal/keys").set("cookie", await as(T.admin.id)).set("content-type", "application/json").send(JSON.stringify({ label: "office only", scopes: ["moments"] }));
    const id = made.body.key.id;
    const secret = made.body.secret as string;
    const bad = await request(portal).patch(`/api/portal/keys/${id}`).set("cookie", await as(T.admin.id)).set("content-type", "application/json").send(JSON.stringify({ allowedCidrs: ["203.0.113.0/33"] }));
    expect(bad.status).toBe(422);
    expect(bad.body.fields.allowedCidrs).toMatch(/“203\.0\.113\.0\/33” is not an address range/);
    const set = await request(portal).patch(`/api/portal/keys/${id}`).set("cookie", await as(T.admin.id)).set("content-type", "application/json").send(JSON.stringify({ allowedCidrs: ["203.0.113.7/24", "2001:db8::1/48"] }));
    expect(set.status, set.text).toBe(200);
    expect(set.body.key.allowedCidrs).toEqual(["203.0.113.0/24", "2001:db8::/48"]);
    await new Promise((r) => setTimeout(r, 1100)); // the gate's key cache lives at most one second
    expect((await moments(secret, "203.0.113.200")).status).toBe(200);
    expect((await moments(secret, "2001:db8:0:ffff::9")).status).toBe(200);
    expect((await moments(secret, "::ffff:203.0.113.9")).status).toBe(200);
    const out = await moments(secret, "198.51.100.7");
    expect(out.status).toBe(403);
    expect(out.headers["content-type"]).toContain("application/problem+json");
    expect(out.body.type).toMatch(/\/docs\/errors#address_not_allowed$/);
    expect(out.body.detail).toBe("This API key accepts calls only from 203.0.113.0/24, 2001:db8::/48; this call came from 198.51.100.7.");
    // The address the nearest proxy saw is the right-most entry: a client cannot prepend its way in.
    expect((await moments(secret, "203.0.113.5, 198.51.100.7")).status).toBe(403);
    const cleared = await request(portal).patch(`/api/portal/keys/${id}`).set("cookie", await as(T.admin.id)).set("content-type", "application/json").send(JSON.stringify({ allowedCidrs: [] }));
    expect(cleared.body.key.allowedCidrs).toEqual([]);
    await new Promise((r) => setTimeout(r, 1100));
    expect((await moments(secret, "198.51.100.7")).status).toBe(200);
  });

  it("cidr helpers (ipaddr.js): canonical form, matching, proxy hops", () => {
    expect(canonicalCidr("10.1.2.3/8")).toBe("10.0.0.0/8");
    expect(canonicalCidr("192.0.2.4")).toBe("192.0.2.4/32");
    expect(canonicalCidr("not an ip")).toBeNull();
    expect(addressAllowed("10.200.0.1", ["10.0.0.0/8"])).toBe(true);
    expect(addressAllowed("11.0.0.1", ["10.0.0.0/8"])).toBe(false);
    expect(addressAllowed(null, ["10.0.0.0/8"])).toBe(false);
    expect(addressAllowed(null, [])).toBe(true);
    const h = new Headers({ "x-forwarded-for": "1.1.1.1, 2.2.2.2, 3.3.3.3" });
    expect(clientAddress(h)).toBe("3.3.3.3");
    process.env.SUMFOLD_PROXY_HOPS = "2";
    try {
      expect(clientAddress(h)).toBe("2.2.2.2");
    } finally {
      delete process.env.SUMFOLD_PROXY_HOPS;
    }
  });

  it("the list tells when a key expires within a week", async () => {
    const soon = (await createKey({ organizationId: T.org.id, createdBy: T.admin.id, label: "expiring", scopes: ["moments"], expiresAt: new Date(Date.now() + 3.5 * 86_400_000), actor: { type: "system" } })).key;
    const res = await request(portal).get("/api/portal/keys").set("cookie", await as(T.admin.id));
    const view = res.body.keys.find((k: { id: number }) => k.id === soon.id);
    expect(view.expiresInDays).toBe(3);
    expect(res.body.keys.find((k: { id: number }) => k.id === T.adminKey.id).expiresInDays).toBeNull();
  });
});
