// Subscriptions through the real provider SDK against the local fake: hosted checkout that succeeds, is
// declined, or needs a second step; upgrades at once with proration; downgrades and cancelling at period end;
// the limiter following the plan (RateLimit-Policy of the next call).
import { and, eq } from "drizzle-orm";
import supertest from "supertest";
import { afterAll, describe, expect, it } from "vitest";
import { flushUsage } from "@/lib/api/metering";
import { PLANS } from "@/lib/api/plans";
import { changePlan, closeAccount, ensureAccount } from "@/lib/billing/service";
import { createKey } from "@/lib/db/keys";
import { getDb } from "@/lib/db/client";
import { invoices, planChanges, processedEvents } from "@/lib/db/schema-billing";
import { apiServer } from "../support/api";
import { makeTeam, waitForMail } from "../portal/support";
import { as, accountOf, billingServer, effectivePlan, payOnHostedPage, sdk, sessionIdOf, setPeriod, TEST_CARDS, withSavedCard } from "./support";

const app = billingServer();
const api = apiServer();
afterAll(async () => {
  await flushUsage();
});

async function startUpgrade(userId: number, orgId: number, plan: string) {
  const res = await supertest(app).post("/api/portal/billing/plan").set(await as(userId, orgId)).send({ plan });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as { action: string; url?: string };
}

const policy = async (secret: string) => {
  const res = await supertest(api).post("/api/v1/cf").set("authorization", `Bearer ${secret}`).send({ model: { family: "normal", mu: 0, sigma: 1 }, t: [0] });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.headers["ratelimit-policy"];
};

describe("hosted checkout", () => {
  it("succeeds: the card is saved, the plan applies at once and the prorated fee is paid through the provider", async () => {
    const t = await makeTeam("Lowther Gauges", "free");
    const { secret } = await createKey({ organizationId: t.org.id, createdBy: t.admin.id, label: "probe", scopes: ["cf"], actor: { type: "system" } });
    expect(await policy(secret)).toBe(`"per-key";q=${PLANS.free.requestsPerSecond};w=1`);
    const t0 = Date.now();
    const start = await startUpgrade(t.billing.id, t.org.id, "team");
    expect(start.action).toBe("checkout");
    expect(start.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/pay\/cs_test_/);
    const done = await payOnHostedPage(start.url!, TEST_CARDS.succeeds);
    expect(done.status).toBe(303);
    expect(done.location).toMatch(/\/api\/portal\/billing\/checkout\/return\?org=[\w-]+&session_id=cs_test_/);
    const back = await supertest(app).get(`/api/portal/billing/checkout/return?session_id=${sessionIdOf(done.location!)}`).set(await as(t.billing.id, t.org.id));
    const t1 = Date.now();
    expect(back.status).toBe(303);
    expect(back.headers.location).toMatch(/\/billing\?org=[\w-]+&checkout=upgraded$/);

    const acct = await accountOf(t.org.id);
    expect(acct.planCode).toBe("team");
    expect(acct.cardLast4).toBe("4242");
    expect(await effectivePlan(t.org.id)).toBe("team");
    // The proration: the Team fee for the part of the month left, between the instants before and after the change.
    const [inv] = await getDb().select().from(invoices).where(and(eq(invoices.organizationId, t.org.id), eq(invoices.kind, "proration")));
    const len = acct.periodEnd.getTime() - acct.periodStart.getTime();
    const bound = (at: number) => (PLANS.team.monthlyFeeMinor * (acct.periodEnd.getTime() - at)) / len;
    expect(inv.totalMinor).toBeGreaterThanOrEqual(Math.floor(bound(t1)));
    expect(inv.totalMinor).toBeLessThanOrEqual(Math.ceil(bound(t0)));
    expect(inv.status).toBe("paid");
    const remote = await sdk().invoices.retrieve(inv.providerInvoiceId!);
    expect(remote.status).toBe("paid");
    expect(remote.amount_paid).toBe(inv.totalMinor);
    // A second return to the same session (and the provider's webhook, whichever came first) changes nothing.
    const again = await supertest(app).get(`/api/portal/billing/checkout/return?session_id=${sessionIdOf(done.location!)}`).set(await as(t.billing.id, t.org.id));
    expect(again.headers.location).toMatch(/checkout=upgraded$/);
    expect(await getDb().select().from(processedEvents).where(eq(processedEvents.eventId, `checkout:${sessionIdOf(done.location!)}`))).toHaveLength(1);
    expect((await getDb().select().from(invoices).where(eq(invoices.organizationId, t.org.id))).length).toBe(1);
    // The limiter follows within the key cache's second.
    await new Promise((r) => setTimeout(r, 1100));
    expect(await policy(secret)).toBe(`"per-key";q=${PLANS.team.requestsPerSecond};w=1`);
    const mails = await waitForMail(t.billing.email, 2);
    expect(mails.map((m) => m.subject)).toEqual(expect.arrayContaining([expect.stringMatching(/Plan change: Free → Team/), expect.stringMatching(/Receipt for invoice SFV-/)]));
  });

  it("declined: the page says so, the session stays open and nothing changes", async () => {
    const t = await makeTeam("Carrow Dials", "free");
    const start = await startUpgrade(t.admin.id, t.org.id, "starter");
    const out = await payOnHostedPage(start.url!, TEST_CARDS.declined);
    expect(out.status).toBe(402);
    expect(out.html).toMatch(/Your card was declined/);
    const session = await sdk().checkout.sessions.retrieve(new URL(start.url!).pathname.split("/").pop()!);
    expect(session.status).toBe("open");
    const acct = await accountOf(t.org.id);
    expect(acct.planCode).toBe("free");
    expect(acct.paymentMethodId).toBeNull();
    expect(await effectivePlan(t.org.id)).toBe("free");
  });

  it("needs a second step: completing it saves the card and upgrades; failing it changes nothing", async () => {
    const t = await makeTeam("Pellow Springs", "free");
    const failed = await payOnHostedPage((await startUpgrade(t.billing.id, t.org.id, "starter")).url!, TEST_CARDS.authenticates, "fail");
    expect(failed.status).toBe(402);
    expect(failed.html).toMatch(/could not be confirmed/);
    expect((await accountOf(t.org.id)).planCode).toBe("free");

    const ok = await payOnHostedPage((await startUpgrade(t.billing.id, t.org.id, "starter")).url!, TEST_CARDS.authenticates, "complete");
    expect(ok.status).toBe(303);
    const back = await supertest(app).get(`/api/portal/billing/checkout/return?session_id=${sessionIdOf(ok.location!)}`).set(await as(t.billing.id, t.org.id));
    expect(back.headers.location).toMatch(/checkout=upgraded$/);
    const acct = await accountOf(t.org.id);
    expect(acct.planCode).toBe("starter");
    expect(acct.cardLast4).toBe("3155");
  });
});

describe("plan changes with a saved card", () => {
  it("upgrade: takes effect at once and charges the fee difference for the rest of the period, to the pence", async () => {
    const t = await makeTeam("Ashby Collets", "starter");
    await withSavedCard(t.org.id);
    // March 2027 has 31 days; from the 22nd at 00:00 UTC, 10 of them are left.
    await setPeriod(t.org.id, "2027-03-01T00:00:00Z", "2027-04-01T00:00:00Z");
    const out = await changePlan({ organizationId: t.org.id, userId: t.admin.id, name: t.admin.name }, "team", new Date("2027-03-22T00:00:00Z"));
    // (39000 - 4900) pence x 10/31 = 11000 pence exactly.
    expect(out).toMatchObject({ action: "upgraded", plan: "team", prorationMinor: 11_000 });
    const [inv] = await getDb().select().from(invoices).where(and(eq(invoices.organizationId, t.org.id), eq(invoices.kind, "proration")));
    expect(inv.totalMinor).toBe(11_000);
    expect((await sdk().invoices.retrieve(inv.providerInvoiceId!)).amount_paid).toBe(11_000);
    expect((await accountOf(t.org.id)).planCode).toBe("team");
    expect(await effectivePlan(t.org.id)).toBe("team");
    // From the 31st at 12:00, 12 of 744 hours are left: 34100 x 12/744 = 550 pence exactly (starter -> team).
    const t2 = await makeTeam("Ashby Collets Two", "starter");
    await withSavedCard(t2.org.id);
    await setPeriod(t2.org.id, "2027-03-01T00:00:00Z", "2027-04-01T00:00:00Z");
    const out2 = await changePlan({ organizationId: t2.org.id, userId: t2.admin.id, name: "x" }, "team", new Date("2027-03-31T12:00:00Z"));
    expect(out2).toMatchObject({ action: "upgraded", prorationMinor: 550 });
  });

  it("an upgrade whose charge is declined leaves the plan as it was", async () => {
    const t = await makeTeam("Brisco Shims", "starter");
    await withSavedCard(t.org.id, "pm_card_chargeCustomerFail");
    const res = await supertest(app).post("/api/portal/billing/plan").set(await as(t.admin.id, t.org.id)).send({ plan: "scale" });
    expect(res.status).toBe(402);
    expect(res.body.error).toMatch(/declined.*plan is unchanged/);
    expect((await accountOf(t.org.id)).planCode).toBe("starter");
    expect(await effectivePlan(t.org.id)).toBe("starter");
    const [inv] = await getDb().select().from(invoices).where(eq(invoices.organizationId, t.org.id));
    expect(inv.status).toBe("void");
  });

  it("downgrade and cancel: nothing changes until the period ends, then the new plan applies", async () => {
    const t = await makeTeam("Dunmore Bevel", "team");
    await withSavedCard(t.org.id);
    await setPeriod(t.org.id, "2027-05-01T00:00:00Z", "2027-06-01T00:00:00Z");
    const out = await changePlan({ organizationId: t.org.id, userId: t.billing.id, name: t.billing.name }, "starter", new Date("2027-05-10T00:00:00Z"));
    expect(out).toEqual({ action: "scheduled", plan: "starter", effectiveAt: "2027-06-01T00:00:00.000Z" });
    expect((await accountOf(t.org.id)).planCode).toBe("team");
    expect(await effectivePlan(t.org.id)).toBe("team");
    // The period closes: May is invoiced at the Team fee (no usage), then Starter applies.
    await closeAccount(t.org.id, new Date("2027-06-01T00:00:05Z"));
    const acct = await accountOf(t.org.id);
    expect(acct).toMatchObject({ planCode: "starter", periodPlanCode: "starter", pendingPlanCode: null });
    expect(acct.periodStart.toISOString()).toBe("2027-06-01T00:00:00.000Z");
    expect(await effectivePlan(t.org.id)).toBe("starter");
    const [may] = await getDb().select().from(invoices).where(and(eq(invoices.organizationId, t.org.id), eq(invoices.kind, "period")));
    expect(may).toMatchObject({ totalMinor: PLANS.team.monthlyFeeMinor, status: "paid", unitsMetered: 0 });

    // Cancel: back to Free at the end of June.
    const cancel = await changePlan({ organizationId: t.org.id, userId: t.billing.id, name: t.billing.name }, "free", new Date("2027-06-03T00:00:00Z"));
    expect(cancel).toMatchObject({ action: "scheduled", plan: "free" });
    expect(await effectivePlan(t.org.id)).toBe("starter");
    await closeAccount(t.org.id, new Date("2027-07-01T00:00:00Z"));
    expect(await effectivePlan(t.org.id)).toBe("free");
    const changes = await getDb().select().from(planChanges).where(eq(planChanges.organizationId, t.org.id));
    expect(changes.map((c) => `${c.fromPlan}->${c.toPlan}`)).toEqual(["team->starter", "starter->free"]);
  });
});

describe("new organisations", () => {
  it("start on the free tier", async () => {
    const { signUp } = await import("@/lib/portal/accounts");
    const { organizationId } = await signUp({ name: "Ines Hale", email: `ines.${Date.now()}@fixture.example`, password: "a-long-enough-password-1", organization: "Hale Rigging" });
    expect(await effectivePlan(organizationId)).toBe("free");
    await ensureAccount(organizationId);
    expect((await accountOf(organizationId)).planCode).toBe("free");
  });
});
