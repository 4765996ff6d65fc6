// Provider webhooks (signed by the fake as the provider signs, verified with the SDK), processed once per event
// id, robust to out-of-order delivery; and the failed-payment path: past due -> mail -> grace -> Free limits ->
// payment -> plan restored.
import { eq } from "drizzle-orm";
import supertest from "supertest";
import { afterAll, describe, expect, it } from "vitest";
import { flushUsage } from "@/lib/api/metering";
import { PLANS } from "@/lib/api/plans";
import { closeAccount, GRACE_DAYS, sweepDunning } from "@/lib/billing/service";
import { getDb } from "@/lib/db/client";
import { createKey } from "@/lib/db/keys";
import { apiKeys } from "@/lib/db/schema";
import { invoices, processedEvents } from "@/lib/db/schema-billing";
import { apiServer } from "../support/api";
import { makeTeam, mailTo, waitForMail } from "../portal/support";
import { accountOf, as, billingServer, effectivePlan, eventually, fakeEvents, payOnHostedPage, sdk, sessionIdOf, setPeriod, sign, TEST_CARDS, withSavedCard } from "./support";

const app = billingServer();
const api = apiServer();
afterAll(async () => {
  await flushUsage();
});

const deliver = (payload: string, signature: string) => supertest(app).post("/api/billing/webhook").set("content-type", "application/json").set("stripe-signature", signature).send(payload);

/** An event as the provider would send it: a fresh id and the invoice's snapshot. */
function eventFor(type: string, invoice: object, created = Math.floor(Date.now() / 1000)) {
  const id = `evt_test_${Math.random().toString(36).slice(2)}${Date.now().toString(36)}`;
  return { id, payload: JSON.stringify({ id, object: "event", api_version: "2026-10-28.endive", created, livemode: false, pending_webhooks: 1, type, data: { object: invoice }, request: { id: null, idempotency_key: null } }) };
}

async function policyOf(secret: string) {
  const res = await supertest(api).post("/api/v1/cf").set("authorization", `Bearer ${secret}`).send({ model: { family: "normal", mu: 0, sigma: 1 }, t: [0] });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.headers["ratelimit-policy"] as string;
}
const q = (plan: keyof typeof PLANS) => `"per-key";q=${PLANS[plan].requestsPerSecond};w=1`;

/** An organisation on Team whose saved card is declined on every later charge, with last period's invoice open. */
async function pastDueOrg(name: string) {
  const t = await makeTeam(name, "team");
  await withSavedCard(t.org.id, "pm_card_chargeCustomerFail");
  await setPeriod(t.org.id, "2027-01-01T00:00:00Z", "2027-02-01T00:00:00Z");
  await closeAccount(t.org.id, new Date("2027-02-01T00:00:00Z"));
  const [inv] = await getDb().select().from(invoices).where(eq(invoices.organizationId, t.org.id));
  return { ...t, invoice: inv };
}

describe("webhook signatures", () => {
  it("a bad signature is refused with 400 and changes nothing", async () => {
    const t = await pastDueOrg("Lamb Ferrules");
    const remote = await sdk().invoices.retrieve(t.invoice.providerInvoiceId!);
    const ev = eventFor("invoice.paid", { ...remote, status: "paid" });
    const bad = sign(ev.payload, "whsec_not_the_secret");
    expect((await deliver(ev.payload, bad)).status).toBe(400);
    expect((await deliver(ev.payload, "t=1,v1=deadbeef")).status).toBe(400);
    expect((await deliver(ev.payload, "")).status).toBe(400);
    // A good signature over another body does not verify this one either.
    expect((await deliver(ev.payload.replace('"invoice.paid"', '"invoice.voided"'), sign(ev.payload))).status).toBe(400);
    expect(await getDb().select().from(processedEvents).where(eq(processedEvents.eventId, ev.id))).toHaveLength(0);
    const [inv] = await getDb().select().from(invoices).where(eq(invoices.id, t.invoice.id));
    expect(inv.status).toBe("open");
    expect((await accountOf(t.org.id)).status).toBe("past_due");
  });

  it("the fake's own deliveries verify and are recorded once per event id", async () => {
    const t = await makeTeam("Mercer Grommets", "starter");
    const { customer } = await withSavedCard(t.org.id);
    await setPeriod(t.org.id, "2027-02-01T00:00:00Z", "2027-03-01T00:00:00Z");
    await closeAccount(t.org.id, new Date("2027-03-01T00:00:00Z"));
    const [paid] = await fakeEvents({ type: "invoice.paid", customer });
    // Delivered twice more by the fake (signed afresh each time), then twice by hand: one row, one receipt.
    for (let i = 0; i < 2; i++) expect((await (await fetch(`${process.env.SUMFOLD_PAYMENTS_CONTROL_URL}/_fake/events/${paid.id}/deliver`, { method: "POST" })).json()).status).toBe(200);
    const payload = JSON.stringify(paid);
    const first = await deliver(payload, sign(payload));
    const second = await deliver(payload, sign(payload));
    expect([first.status, second.status]).toEqual([200, 200]);
    expect(second.body.outcome).toBe("duplicate");
    expect(await getDb().select().from(processedEvents).where(eq(processedEvents.eventId, paid.id))).toHaveLength(1);
    const receipts = (await mailTo(t.billing.email)).filter((m) => /Receipt/.test(m.subject));
    expect(receipts).toHaveLength(1);
  });
});

describe("processing", () => {
  it("the same event delivered twice is applied once", async () => {
    const t = await pastDueOrg("Nettle Bushings");
    await eventually(async () => (await waitForMail(t.billing.email, 1)).length > 0);
    const remote = await sdk().invoices.retrieve(t.invoice.providerInvoiceId!);
    const ev = eventFor("invoice.payment_failed", remote);
    const a = await deliver(ev.payload, sign(ev.payload));
    const b = await deliver(ev.payload, sign(ev.payload));
    expect(a.status).toBe(200);
    expect(a.body.outcome).toBe("applied");
    expect(b.body.outcome).toBe("duplicate");
    expect(await getDb().select().from(processedEvents).where(eq(processedEvents.eventId, ev.id))).toHaveLength(1);
    await new Promise((r) => setTimeout(r, 500));
    expect((await mailTo(t.billing.email)).filter((m) => /Payment failed/.test(m.subject))).toHaveLength(1);
  });

  it("out of order: a payment failure delivered after the payment does not make the invoice past due again", async () => {
    const t = await pastDueOrg("Osgood Pawls");
    const failedSnapshot = await sdk().invoices.retrieve(t.invoice.providerInvoiceId!);
    // The customer pays with a working card (through the provider), then events arrive newest first.
    const pm = await sdk().paymentMethods.attach("pm_card_visa", { customer: failedSnapshot.customer as string });
    const paidSnapshot = await sdk().invoices.pay(t.invoice.providerInvoiceId!, { payment_method: pm.id });
    expect(paidSnapshot.status).toBe("paid");
    const paid = eventFor("invoice.paid", paidSnapshot);
    const lateFailure = eventFor("invoice.payment_failed", failedSnapshot, failedSnapshot.created);
    expect((await deliver(paid.payload, sign(paid.payload))).body.outcome).toMatch(/applied|duplicate/);
    expect((await deliver(lateFailure.payload, sign(lateFailure.payload))).body.outcome).toBe("applied");
    const [inv] = await getDb().select().from(invoices).where(eq(invoices.id, t.invoice.id));
    expect(inv.status).toBe("paid");
    expect((await accountOf(t.org.id)).status).toBe("active");
    expect(await effectivePlan(t.org.id)).toBe("team");
  });
});

describe("failed payment", () => {
  it("past due -> mail -> grace -> Free limits (data kept) -> payment -> plan restored", { timeout: 60_000 }, async () => {
    const t = await pastDueOrg("Pryor Castings");
    const { secret } = await createKey({ organizationId: t.org.id, createdBy: t.admin.id, label: "pricing", scopes: ["cf"], actor: { type: "system" } });
    expect(t.invoice.status).toBe("open");
    const acct = await accountOf(t.org.id);
    expect(acct.status).toBe("past_due");
    expect(acct.pastDueSince!.toISOString()).toBe("2027-02-01T00:00:00.000Z");
    const failedMail = (await waitForMail(t.billing.email, 1)).find((m) => /Payment failed/.test(m.subject));
    expect(failedMail?.text).toContain(t.invoice.number);
    expect(failedMail?.text).toContain(`within ${GRACE_DAYS} days`);
    // During the grace period the plan's limits stay.
    expect(await policyOf(secret)).toBe(q("team"));
    expect(await sweepDunning(new Date("2027-02-07T23:59:59Z"))).not.toContain(t.org.id);
    expect(await effectivePlan(t.org.id)).toBe("team");
    // After it, the Free plan's limits apply; the keys and the subscription stay.
    expect(await sweepDunning(new Date("2027-02-08T00:00:01Z"))).toContain(t.org.id);
    expect((await accountOf(t.org.id)).status).toBe("restricted");
    expect((await accountOf(t.org.id)).planCode).toBe("team");
    expect(await effectivePlan(t.org.id)).toBe("free");
    await new Promise((r) => setTimeout(r, 1100));
    expect(await policyOf(secret)).toBe(q("free"));
    expect(await getDb().select().from(apiKeys).where(eq(apiKeys.organizationId, t.org.id))).toHaveLength(3);
    expect((await waitForMail(t.billing.email, 2)).some((m) => /limits lowered to the Free plan/.test(m.subject))).toBe(true);
    // Summary shows the state to the billing contact.
    const summary = await supertest(app).get("/api/portal/billing").set(await as(t.billing.id, t.org.id));
    expect(summary.body).toMatchObject({ status: "restricted", plan: { code: "team" }, limits: { label: "Free" } });

    // Paying: the billing contact saves a working card through the hosted checkout; the open invoice is charged.
    const start = await supertest(app).post("/api/portal/billing/payment-method").set(await as(t.billing.id, t.org.id)).send({});
    expect(start.status).toBe(200);
    const done = await payOnHostedPage(start.body.url, TEST_CARDS.succeeds);
    const back = await supertest(app).get(`/api/portal/billing/checkout/return?session_id=${sessionIdOf(done.location!)}`).set(await as(t.billing.id, t.org.id));
    expect(back.headers.location).toMatch(/checkout=card_saved$/);
    const [inv] = await getDb().select().from(invoices).where(eq(invoices.id, t.invoice.id));
    expect(inv.status).toBe("paid");
    expect((await accountOf(t.org.id)).status).toBe("active");
    expect(await effectivePlan(t.org.id)).toBe("team");
    await new Promise((r) => setTimeout(r, 1100));
    expect(await policyOf(secret)).toBe(q("team"));
    const mails = await waitForMail(t.billing.email, 4);
    expect(mails.map((m) => m.subject)).toEqual(expect.arrayContaining([expect.stringMatching(/Receipt for invoice/), expect.stringMatching(/Team plan restored/)]));
  });
});
