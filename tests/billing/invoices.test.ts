// Invoices at period end: units billed equal units metered, to the unit (a generated month with failed and
// refunded requests, and requests through the real gate), one invoice however often the close runs, the PDF.
import { randomBytes } from "node:crypto";
import { and, eq } from "drizzle-orm";
import supertest from "supertest";
import { extractText, getDocumentProxy } from "unpdf";
import { afterAll, describe, expect, it } from "vitest";
import { flushUsage } from "@/lib/api/metering";
import { PLANS } from "@/lib/api/plans";
import { closeAccount, getAccount, upcoming } from "@/lib/billing/service";
import { getDb } from "@/lib/db/client";
import { createKey } from "@/lib/db/keys";
import { usageEvents } from "@/lib/db/schema";
import { invoiceLines, invoices } from "@/lib/db/schema-billing";
import { apiServer } from "../support/api";
import { makeTeam } from "../portal/support";
import { as, billingServer, fakeEvents, sdk, setPeriod, withSavedCard } from "./support";

const app = billingServer();
const api = apiServer();
afterAll(async () => {
  await flushUsage();
});

/** A deterministic generator (mulberry32), so a failure can be replayed from its seed. */
function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * A month of usage as the gate records it: successful calls carry their units; failed calls (4xx/5xx) and
 * requests whose units were refunded carry 0. Plus one row just before and one at the end instant, outside.
 */
function generateMonth(organizationId: number, start: Date, end: Date, seed: number) {
  const r = rng(seed);
  const span = end.getTime() - start.getTime();
  const rows = Array.from({ length: 2400 }, (_, i) => {
    const failed = r() < 0.15;
    return {
      requestId: `gen-${seed}-${i}-${randomBytes(3).toString("hex")}`,
      keyId: 1,
      organizationId,
      endpoint: "POST /api/v1/density",
      status: failed ? [422, 429, 500, 503][Math.floor(r() * 4)] : 200,
      durationMs: 5 + Math.floor(r() * 200),
      computeUnits: failed ? 0 : 1 + Math.floor(r() * r() * 60_000),
      createdAt: new Date(start.getTime() + Math.floor(r() * span)),
    };
  });
  rows.push({ ...rows[0], requestId: `gen-${seed}-before`, computeUnits: 777_777, status: 200, createdAt: new Date(start.getTime() - 1) });
  rows.push({ ...rows[0], requestId: `gen-${seed}-after`, computeUnits: 888_888, status: 200, createdAt: new Date(end.getTime()) });
  return rows;
}

describe("period close", () => {
  it("bills exactly the units metered in a generated month, to the unit", { timeout: 60_000 }, async () => {
    const t = await makeTeam("Hobart Fettling", "starter");
    await withSavedCard(t.org.id);
    const start = new Date("2027-01-01T00:00:00Z");
    const end = new Date("2027-02-01T00:00:00Z");
    await setPeriod(t.org.id, start.toISOString(), end.toISOString());
    const rows = generateMonth(t.org.id, start, end, 20_270_101);
    for (let i = 0; i < rows.length; i += 500) await getDb().insert(usageEvents).values(rows.slice(i, i + 500));
    // Expected from the generated rows themselves, not from the database.
    const inMonth = rows.filter((x) => x.createdAt >= start && x.createdAt < end);
    const metered = inMonth.reduce((s, x) => s + x.computeUnits, 0);
    expect(inMonth.some((x) => x.status >= 400 && x.computeUnits === 0)).toBe(true);
    expect(metered).toBeGreaterThan(PLANS.starter.includedUnits); // the month runs into overage

    await closeAccount(t.org.id, new Date("2027-02-01T00:00:00Z"));
    const [inv] = await getDb().select().from(invoices).where(and(eq(invoices.organizationId, t.org.id), eq(invoices.kind, "period")));
    const lines = await getDb().select().from(invoiceLines).where(eq(invoiceLines.invoiceId, inv.id));
    expect(inv.unitsMetered).toBe(metered);
    expect(lines[1].quantity + lines[2].quantity).toBe(metered);
    expect(lines[1].quantity).toBe(PLANS.starter.includedUnits);
    // Overage: extra x 400 pence per million, rounded half up to the penny (computed here with BigInt).
    const extra = BigInt(metered - PLANS.starter.includedUnits);
    const overage = Number((extra * 400n * 2n + 1_000_000n) / 2_000_000n);
    expect(lines[2].amountMinor).toBe(overage);
    expect(inv.totalMinor).toBe(PLANS.starter.monthlyFeeMinor + overage);
    expect(inv.status).toBe("paid");
    // The provider's invoice carries the same lines and total, and was paid by the saved card.
    const remote = await sdk().invoices.retrieve(inv.providerInvoiceId!);
    expect(remote.status).toBe("paid");
    expect(remote.total).toBe(inv.totalMinor);
    expect(remote.lines.data.map((l) => l.amount)).toEqual(lines.map((l) => l.amountMinor));
  });

  it("run twice, or twice at once, gives one invoice here and one at the provider", async () => {
    const t = await makeTeam("Ivell Jigs", "team");
    const { customer } = await withSavedCard(t.org.id);
    await setPeriod(t.org.id, "2027-08-01T00:00:00Z", "2027-09-01T00:00:00Z");
    const at = new Date("2027-09-01T00:10:00Z");
    await Promise.all([closeAccount(t.org.id, at), closeAccount(t.org.id, at), closeAccount(t.org.id, at)]);
    await closeAccount(t.org.id, at);
    const rows = await getDb().select().from(invoices).where(eq(invoices.organizationId, t.org.id));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ totalMinor: PLANS.team.monthlyFeeMinor, status: "paid" });
    expect(await fakeEvents({ type: "invoice.finalized", customer })).toHaveLength(1);
    expect(await fakeEvents({ type: "invoice.paid", customer })).toHaveLength(1);
  });

  it("requests through the real gate, failed ones included, are metered and billed unit for unit", async () => {
    const t = await makeTeam("Jessop Knurling", "scale");
    const { secret } = await createKey({ organizationId: t.org.id, createdBy: t.admin.id, label: "probe", scopes: ["cf", "moments"], actor: { type: "system" } });
    let reported = 0;
    for (let i = 0; i < 6; i++) {
      const ok = await supertest(api).post("/api/v1/cf").set("authorization", `Bearer ${secret}`).send({ model: { family: "normal", mu: i, sigma: 1 }, t: [0, 0.5, 1] });
      expect(ok.status).toBe(200);
      reported += ok.body.meta.computeUnits;
      const bad = await supertest(api).post("/api/v1/cf").set("authorization", `Bearer ${secret}`).send({ model: { family: "normal", mu: 0, sigma: -1 }, t: [0] });
      expect(bad.status).toBeGreaterThanOrEqual(400); // refused (422), or limited (429): either way 0 units
    }
    await flushUsage();
    const acct = await getAccount(t.org.id);
    const next = await upcoming(acct);
    expect(next.metered).toBe(reported);
    expect(next.lines[1].quantity + next.lines[2].quantity).toBe(reported);
  });
});

describe("invoice PDF", () => {
  it("downloads with the billing details, the lines, the total and the caution", async () => {
    const t = await makeTeam("Kilner Lapping", "team");
    await withSavedCard(t.org.id);
    const cookie = await as(t.billing.id, t.org.id);
    await supertest(app).patch("/api/portal/billing/details").set(cookie).send({ billingName: "Kilner Lapping Ltd", billingAddress: "3 Weir Lane, Kilner KL2 8RR", taxId: "GB 111 2222 33" }).expect(200);
    await setPeriod(t.org.id, "2027-10-01T00:00:00Z", "2027-11-01T00:00:00Z");
    await closeAccount(t.org.id, new Date("2027-11-01T00:00:00Z"));
    const [inv] = await getDb().select().from(invoices).where(eq(invoices.organizationId, t.org.id));
    const res = await supertest(app).get(`/api/portal/billing/invoices/${inv.id}/pdf`).set(cookie).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on("data", (c: Buffer) => chunks.push(c));
      r.on("end", () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/pdf");
    expect(res.headers["content-disposition"]).toContain(`${inv.number}.pdf`);
    const pdf = await getDocumentProxy(new Uint8Array(res.body as Buffer));
    const { text } = await extractText(pdf, { mergePages: true });
    for (const s of [inv.number, "Kilner Lapping Ltd", "3 Weir Lane", "GB 111 2222 33", "Team plan", "£390.00", "Caution", "licensed practice and local regulation"]) expect(text).toContain(s);
  });
});
