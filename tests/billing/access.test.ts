// Role x organisation on every billing route: admins and billing contacts manage; developers read the plan name
// and quota only (403 elsewhere); another organisation's objects are 404; the role is re-read from the database.
import { and, eq } from "drizzle-orm";
import supertest from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import { changePlan } from "@/lib/billing/service";
import { getDb } from "@/lib/db/client";
import { memberships } from "@/lib/db/schema";
import { billingContacts, invoices } from "@/lib/db/schema-billing";
import { cookieFor, join, makeTeam } from "../portal/support";
import { as, billingServer, withSavedCard } from "./support";

const app = billingServer();
type Team = Awaited<ReturnType<typeof makeTeam>>;
let A: Team;
let B: Team;
let invoiceA: number;
let invoiceB: number;
let sessionA: string;

async function contact(orgId: number) {
  const [r] = await getDb().insert(billingContacts).values({ organizationId: orgId, email: `c${Math.random().toString(36).slice(2)}@fixture.example`, name: "C" });
  return r.insertId;
}

beforeAll(async () => {
  A = await makeTeam("Quarry Axles", "starter");
  B = await makeTeam("Rook Linkages", "starter");
  for (const t of [A, B]) await withSavedCard(t.org.id);
  await changePlan({ organizationId: A.org.id, userId: A.admin.id, name: "a" }, "team");
  await changePlan({ organizationId: B.org.id, userId: B.admin.id, name: "b" }, "team");
  [{ id: invoiceA }] = await getDb().select({ id: invoices.id }).from(invoices).where(eq(invoices.organizationId, A.org.id));
  [{ id: invoiceB }] = await getDb().select({ id: invoices.id }).from(invoices).where(eq(invoices.organizationId, B.org.id));
  const start = await supertest(app).post("/api/portal/billing/payment-method").set(await as(A.admin.id, A.org.id)).send({});
  sessionA = new URL(start.body.url).pathname.split("/").pop()!;
});

type Call = { name: string; method: "get" | "post" | "patch" | "delete"; path: (own: { invoice: number; contact: number; session: string }) => string; body?: unknown; ok: number[] };
const CALLS: Call[] = [
  { name: "change plan", method: "post", path: () => "/api/portal/billing/plan", body: { plan: "team" }, ok: [200] },
  { name: "new card", method: "post", path: () => "/api/portal/billing/payment-method", body: {}, ok: [200] },
  { name: "checkout return", method: "get", path: (o) => `/api/portal/billing/checkout/return?session_id=${o.session}`, ok: [303] },
  { name: "invoice list", method: "get", path: () => "/api/portal/billing/invoices", ok: [200] },
  { name: "invoice", method: "get", path: (o) => `/api/portal/billing/invoices/${o.invoice}`, ok: [200] },
  { name: "invoice PDF", method: "get", path: (o) => `/api/portal/billing/invoices/${o.invoice}/pdf`, ok: [200] },
  { name: "pay invoice", method: "post", path: (o) => `/api/portal/billing/invoices/${o.invoice}/pay`, body: {}, ok: [200] },
  { name: "contacts", method: "get", path: () => "/api/portal/billing/contacts", ok: [200] },
  { name: "add contact", method: "post", path: () => "/api/portal/billing/contacts", body: { name: "X", email: "x@fixture.example" }, ok: [201, 409] },
  { name: "remove contact", method: "delete", path: (o) => `/api/portal/billing/contacts/${o.contact}`, ok: [200] },
  { name: "billing details", method: "patch", path: () => "/api/portal/billing/details", body: { billingName: "N", billingAddress: "", taxId: "" }, ok: [200] },
];

async function call(c: Call, headers: Record<string, string>, own: { invoice: number; contact: number; session: string }) {
  const r = supertest(app)[c.method](c.path(own)).set(headers);
  return c.body === undefined ? r : r.send(c.body as object);
}

describe("billing routes by role", () => {
  for (const c of CALLS) {
    it(`${c.name}: admin and billing allowed, developer 403, not signed in 401`, async () => {
      for (const who of [A.admin, A.billing]) {
        const res = await call(c, await as(who.id, A.org.id), { invoice: invoiceA, contact: await contact(A.org.id), session: sessionA });
        expect(c.ok, `${who.name}: ${res.status} ${JSON.stringify(res.body)}`).toContain(res.status);
      }
      const dev = await call(c, await as(A.developer.id, A.org.id), { invoice: invoiceA, contact: await contact(A.org.id), session: sessionA });
      expect(dev.status).toBe(403);
      const anon = await call(c, {}, { invoice: invoiceA, contact: await contact(A.org.id), session: sessionA });
      expect(anon.status).toBe(401);
    });
  }

  it("summary: developers see the plan name and quota only", async () => {
    const dev = await supertest(app).get("/api/portal/billing").set(await as(A.developer.id, A.org.id));
    expect(dev.status).toBe(200);
    expect(dev.body.plan).toEqual({ code: "team", label: "Team" });
    expect(dev.body.quota.monthlyUnits).toBeGreaterThan(0);
    for (const hidden of ["invoices", "card", "contacts", "details", "upcoming", "plans"]) expect(dev.body).not.toHaveProperty(hidden);
    const billing = await supertest(app).get("/api/portal/billing").set(await as(A.billing.id, A.org.id));
    expect(billing.body.invoices.length).toBeGreaterThan(0);
    expect(billing.body.card.last4).toBe("4242");
  });
});

describe("billing routes across organisations", () => {
  for (const c of CALLS.filter((x) => ["invoice", "invoice PDF", "pay invoice", "remove contact", "checkout return"].includes(x.name))) {
    it(`${c.name}: another organisation's object is 404 for its admin and billing contact`, async () => {
      for (const who of [B.admin, B.billing]) {
        const res = await call(c, await as(who.id, B.org.id), { invoice: invoiceA, contact: await contact(A.org.id), session: sessionA });
        expect(res.status, `${who.name} on ${c.name}`).toBe(404);
      }
      // Their own objects work, so the 404 is about ownership.
      const own = await call(c, await as(B.admin.id, B.org.id), { invoice: invoiceB, contact: await contact(B.org.id), session: sessionA });
      if (c.name !== "checkout return") expect(c.ok).toContain(own.status);
    });
  }

  it("naming an organisation one is not a member of is 404 on every route", async () => {
    for (const c of CALLS) {
      const res = await call(c, await as(B.admin.id, A.org.id), { invoice: invoiceA, contact: await contact(A.org.id), session: sessionA });
      expect(res.status, c.name).toBe(404);
    }
    expect((await supertest(app).get("/api/portal/billing").set(await as(B.admin.id, A.org.id))).status).toBe(404);
  });

  it("the role is re-read from the database on each request", async () => {
    const t = await makeTeam("Sutter Cams", "starter");
    const headers = await as(t.billing.id, t.org.id);
    expect((await supertest(app).get("/api/portal/billing/invoices").set(headers)).status).toBe(200);
    await getDb().update(memberships).set({ role: "developer" }).where(and(eq(memberships.userId, t.billing.id), eq(memberships.organizationId, t.org.id)));
    expect((await supertest(app).get("/api/portal/billing/invoices").set(headers)).status).toBe(403);
    await join(t.developer.id, B.org.id, "billing");
    expect((await supertest(app).get("/api/portal/billing/invoices").set({ cookie: await cookieFor(t.developer.id), "x-sumfold-org": String(B.org.id) })).status).toBe(200);
  });
});
