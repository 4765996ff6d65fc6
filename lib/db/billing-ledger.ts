import "server-only";
import { randomUUID } from "node:crypto";
import { and, asc, eq, inArray, lte } from "drizzle-orm";
import { getDb, type Db } from "./client";
import { organizations, users, type Organization } from "./schema";
import { billingAccounts, billingContacts, invoiceLines, invoices, planChanges, processedEvents, type BillingAccount, type Invoice, type InvoiceLine } from "./schema-billing";

// Queries of billing accounts, invoices, plan changes and provider events. Functions that run inside the
// account lock take the transaction as their second argument.

export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
type Q = Pick<Db, "select" | "insert" | "update">;

export async function hasBillingAccount({ organizationId }: { organizationId: number }): Promise<boolean> {
  const [has] = await getDb().select({ id: billingAccounts.organizationId }).from(billingAccounts).where(eq(billingAccounts.organizationId, organizationId));
  return !!has;
}

/** Creates the billing row unless it exists (INSERT IGNORE). */
export async function createBillingAccount(input: { organizationId: number; planCode: string; periodStart: Date; periodEnd: Date }) {
  await getDb().insert(billingAccounts).ignore().values({ ...input, periodPlanCode: input.planCode });
}

export async function getBillingAccount({ organizationId }: { organizationId: number }): Promise<BillingAccount | null> {
  const [acct] = await getDb().select().from(billingAccounts).where(eq(billingAccounts.organizationId, organizationId));
  return acct ?? null;
}

/** Runs `fn` in a transaction with the organisation's billing row locked (SELECT ... FOR UPDATE). */
export async function withBillingAccountLocked<T>({ organizationId }: { organizationId: number }, fn: (locked: { tx: Tx; acct: BillingAccount; org: Organization }) => Promise<T>): Promise<T> {
  return getDb().transaction(async (tx) => {
    const [acct] = await tx.select().from(billingAccounts).where(eq(billingAccounts.organizationId, organizationId)).for("update");
    const [org] = await tx.select().from(organizations).where(eq(organizations.id, organizationId));
    return fn({ tx, acct, org });
  });
}

export async function updateBillingAccount({ organizationId, patch }: { organizationId: number; patch: Partial<BillingAccount> }, db: Q = getDb()) {
  await db.update(billingAccounts).set(patch).where(eq(billingAccounts.organizationId, organizationId));
}

/** Sets the plan whose limits apply to the organisation's keys. */
export async function setOrganizationPlan({ organizationId, plan }: { organizationId: number; plan: string }, db: Q = getDb()) {
  await db.update(organizations).set({ plan }).where(eq(organizations.id, organizationId));
}

export async function listBillingContactEmails({ organizationId }: { organizationId: number }): Promise<string[]> {
  const rows = await getDb().select({ email: billingContacts.email }).from(billingContacts).where(eq(billingContacts.organizationId, organizationId));
  return rows.map((r) => r.email);
}

export async function getUserName({ userId }: { userId: number }, db: Q = getDb()): Promise<string | null> {
  const [who] = await db.select({ name: users.name }).from(users).where(eq(users.id, userId));
  return who?.name ?? null;
}

/**
 * Finds or creates the invoice row for (organisation, kind, dedupeKey), a draft with its lines: the unique key
 * makes a repeated run a no-op. Numbers follow the row id, so they are unique and increasing: SFV-2026-000123.
 */
export async function findOrCreateInvoice(
  p: { organizationId: number; kind: "period" | "proration"; dedupeKey: string; planCode: string; period: { start: Date; end: Date }; currency: string; totalMinor: number; metered: number; year: number; lines: Omit<InvoiceLine, "id" | "invoiceId" | "position">[] },
  db: Q = getDb(),
): Promise<Invoice> {
  const where = and(eq(invoices.organizationId, p.organizationId), eq(invoices.kind, p.kind), eq(invoices.dedupeKey, p.dedupeKey));
  const [existing] = await db.select().from(invoices).where(where);
  if (existing) return existing;
  const [res] = await db.insert(invoices).values({
    organizationId: p.organizationId,
    number: `tmp-${randomUUID()}`.slice(0, 32),
    kind: p.kind,
    dedupeKey: p.dedupeKey,
    planCode: p.planCode,
    periodStart: p.period.start,
    periodEnd: p.period.end,
    currency: p.currency,
    totalMinor: p.totalMinor,
    unitsMetered: p.metered,
    status: "draft",
  });
  await db.update(invoices).set({ number: `SFV-${p.year}-${String(res.insertId).padStart(6, "0")}` }).where(eq(invoices.id, res.insertId));
  await db.insert(invoiceLines).values(p.lines.map((l, i) => ({ invoiceId: res.insertId, position: i + 1, ...l })));
  const [row] = await db.select().from(invoices).where(eq(invoices.id, res.insertId));
  return row;
}

export async function listInvoiceLines({ invoiceId }: { invoiceId: number }, db: Q = getDb()) {
  return db.select().from(invoiceLines).where(eq(invoiceLines.invoiceId, invoiceId)).orderBy(asc(invoiceLines.position));
}

export async function updateInvoice({ invoiceId, patch }: { invoiceId: number; patch: Partial<Invoice> }, db: Q = getDb()) {
  await db.update(invoices).set(patch).where(eq(invoices.id, invoiceId));
}

export async function getInvoiceById({ invoiceId }: { invoiceId: number }, db: Q = getDb()): Promise<Invoice | null> {
  const [row] = await db.select().from(invoices).where(eq(invoices.id, invoiceId));
  return row ?? null;
}

/** An invoice of this organisation (null when there is no such invoice here). */
export async function getInvoiceInOrg({ organizationId, invoiceId }: { organizationId: number; invoiceId: number }, db: Q = getDb()): Promise<Invoice | null> {
  const [row] = await db.select().from(invoices).where(and(eq(invoices.id, invoiceId), eq(invoices.organizationId, organizationId)));
  return row ?? null;
}

export async function getInvoiceByProviderId({ providerInvoiceId }: { providerInvoiceId: string }): Promise<Invoice | null> {
  const [row] = await getDb().select().from(invoices).where(eq(invoices.providerInvoiceId, providerInvoiceId));
  return row ?? null;
}

/** The organisation's period invoices still open (issued, unpaid). */
export async function listOpenPeriodInvoices({ organizationId }: { organizationId: number }, db: Q = getDb()): Promise<Invoice[]> {
  return db.select().from(invoices).where(and(eq(invoices.organizationId, organizationId), eq(invoices.status, "open"), eq(invoices.kind, "period")));
}

/** The invoices an organisation sees (issued: open, paid or void), oldest period first. */
export async function listIssuedInvoices({ organizationId }: { organizationId: number }): Promise<Invoice[]> {
  return getDb().select().from(invoices).where(and(eq(invoices.organizationId, organizationId), inArray(invoices.status, ["open", "paid", "void"]))).orderBy(asc(invoices.periodStart), asc(invoices.id));
}

/** Organisations whose billing period has ended by `now`. */
export async function listAccountsDueForClose({ now }: { now: Date }): Promise<number[]> {
  const rows = await getDb().select({ organizationId: billingAccounts.organizationId }).from(billingAccounts).where(lte(billingAccounts.periodEnd, now));
  return rows.map((r) => r.organizationId);
}

/** Organisations past due since `since` or earlier. */
export async function listAccountsPastDueSince({ since }: { since: Date }): Promise<number[]> {
  const rows = await getDb()
    .select({ organizationId: billingAccounts.organizationId })
    .from(billingAccounts)
    .where(and(eq(billingAccounts.status, "past_due"), lte(billingAccounts.pastDueSince, since)));
  return rows.map((r) => r.organizationId);
}

export async function recordPlanChange(input: { organizationId: number; actorUserId: number | null; fromPlan: string; toPlan: string; effectiveAt: Date; prorationMinor?: number }, db: Q = getDb()) {
  await db.insert(planChanges).values(input);
}

/** Claims a provider event (or checkout) id once; false when it was claimed before. */
export async function claimProcessedEvent({ eventId, type }: { eventId: string; type: string }, db: Pick<Db, "insert"> = getDb()): Promise<boolean> {
  const [res] = await db.insert(processedEvents).ignore().values({ eventId, type });
  return res.affectedRows > 0;
}

export async function isEventProcessed({ eventId }: { eventId: string }): Promise<boolean> {
  const [seen] = await getDb().select().from(processedEvents).where(eq(processedEvents.eventId, eventId));
  return !!seen;
}
