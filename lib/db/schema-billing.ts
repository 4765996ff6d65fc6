import { sql } from "drizzle-orm";
import { bigint, char, datetime, index, int, json, mysqlEnum, mysqlTable, primaryKey, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { organizations, users } from "./schema";

const id = () => bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey();
const ref = (name: string) => bigint(name, { mode: "number", unsigned: true });
const money = (name: string) => bigint(name, { mode: "number" });
const createdAt = () => datetime("created_at", { mode: "date", fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`);
const at = (name: string) => datetime(name, { mode: "date", fsp: 3 });

/** The plan catalogue as rows, copied from lib/api/plans.ts at start-up (the code is the source). */
export const plans = mysqlTable("plans", {
  code: varchar("code", { length: 32 }).primaryKey(),
  label: varchar("label", { length: 64 }).notNull(),
  rank: int("rank").notNull(),
  currency: char("currency", { length: 3 }).notNull(),
  monthlyFeeMinor: money("monthly_fee_minor").notNull(),
  includedUnits: bigint("included_units", { mode: "number", unsigned: true }).notNull(),
  overagePerMillionMinor: money("overage_per_million_minor").notNull(),
  requestsPerSecond: int("requests_per_second", { unsigned: true }).notNull(),
  monthlyUnits: bigint("monthly_units", { mode: "number", unsigned: true }).notNull(),
  limits: json("limits").$type<Record<string, unknown>>().notNull(),
  updatedAt: datetime("updated_at", { mode: "date", fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
});

export const BILLING_STATUSES = ["active", "past_due", "restricted"] as const;
export type BillingStatus = (typeof BILLING_STATUSES)[number];

/**
 * An organisation's subscription and its customer at the payment provider. `organizations.plan` holds the plan
 * whose limits apply now; `planCode` the plan subscribed to (they differ while a lapsed payment restricts the org).
 */
export const billingAccounts = mysqlTable(
  "billing_accounts",
  {
    organizationId: ref("organization_id").primaryKey().references(() => organizations.id, { onDelete: "cascade" }),
    providerCustomerId: varchar("provider_customer_id", { length: 64 }),
    planCode: varchar("plan_code", { length: 32 }).notNull(),
    /** the plan in force when the current period began: its fee is billed at the period's end */
    periodPlanCode: varchar("period_plan_code", { length: 32 }).notNull(),
    /** a downgrade or cancellation that takes effect when the current period ends */
    pendingPlanCode: varchar("pending_plan_code", { length: 32 }),
    periodStart: at("period_start").notNull(),
    periodEnd: at("period_end").notNull(),
    status: mysqlEnum("status", BILLING_STATUSES).notNull().default("active"),
    pastDueSince: at("past_due_since"),
    /** the saved payment method at the provider and how it is shown */
    paymentMethodId: varchar("payment_method_id", { length: 64 }),
    cardBrand: varchar("card_brand", { length: 24 }),
    cardLast4: char("card_last4", { length: 4 }),
    cardExpMonth: int("card_exp_month"),
    cardExpYear: int("card_exp_year"),
    /** printed on invoices */
    billingName: varchar("billing_name", { length: 160 }),
    billingAddress: varchar("billing_address", { length: 500 }),
    taxId: varchar("tax_id", { length: 40 }),
    createdAt: createdAt(),
    updatedAt: datetime("updated_at", { mode: "date", fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index("billing_accounts_customer_idx").on(t.providerCustomerId)],
);

/** Addresses that receive receipts, failed-payment notices and plan changes (besides billing members). */
export const billingContacts = mysqlTable(
  "billing_contacts",
  {
    id: id(),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    email: varchar("email", { length: 254 }).notNull(),
    name: varchar("name", { length: 160 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("billing_contacts_org_email_uq").on(t.organizationId, t.email)],
);

export const INVOICE_KINDS = ["period", "proration"] as const;
export const INVOICE_STATUSES = ["draft", "open", "paid", "void"] as const;
export type InvoiceStatus = (typeof INVOICE_STATUSES)[number];

/** One invoice: a closed period (fee + usage), or a proration charged at once on an upgrade. */
export const invoices = mysqlTable(
  "invoices",
  {
    id: id(),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    number: varchar("number", { length: 32 }).notNull(),
    kind: mysqlEnum("kind", INVOICE_KINDS).notNull(),
    /** period invoices: the period's start; proration invoices: a unique key of the change */
    dedupeKey: varchar("dedupe_key", { length: 80 }).notNull(),
    providerInvoiceId: varchar("provider_invoice_id", { length: 64 }),
    planCode: varchar("plan_code", { length: 32 }).notNull(),
    periodStart: at("period_start").notNull(),
    periodEnd: at("period_end").notNull(),
    currency: char("currency", { length: 3 }).notNull(),
    totalMinor: money("total_minor").notNull(),
    unitsMetered: bigint("units_metered", { mode: "number", unsigned: true }).notNull().default(0),
    status: mysqlEnum("status", INVOICE_STATUSES).notNull().default("draft"),
    paidAt: at("paid_at"),
    lastPaymentError: varchar("last_payment_error", { length: 300 }),
    /** the provider's event time of the last status we applied (older events are ignored) */
    providerUpdatedAt: int("provider_updated_at", { unsigned: true }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("invoices_org_dedupe_uq").on(t.organizationId, t.kind, t.dedupeKey),
    uniqueIndex("invoices_number_uq").on(t.number),
    index("invoices_provider_idx").on(t.providerInvoiceId),
  ],
);

export const invoiceLines = mysqlTable(
  "invoice_lines",
  {
    invoiceId: ref("invoice_id").notNull().references(() => invoices.id, { onDelete: "cascade" }),
    position: int("position", { unsigned: true }).notNull(),
    description: varchar("description", { length: 300 }).notNull(),
    quantity: bigint("quantity", { mode: "number", unsigned: true }).notNull(),
    /** shown as the unit price's text (e.g. "£3.00 per million"); the amount is the authoritative figure */
    unitLabel: varchar("unit_label", { length: 80 }).notNull(),
    amountMinor: money("amount_minor").notNull(),
  },
  (t) => [primaryKey({ columns: [t.invoiceId, t.position] })],
);

/** Provider events already applied, by id: a redelivered event is acknowledged and not applied again. */
export const processedEvents = mysqlTable("processed_events", {
  eventId: varchar("event_id", { length: 80 }).primaryKey(),
  type: varchar("type", { length: 80 }).notNull(),
  createdAt: createdAt(),
});

/** Plan changes as they happened (who, from, to, when effective), for the portal and the e-mails. */
export const planChanges = mysqlTable(
  "plan_changes",
  {
    id: id(),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    actorUserId: ref("actor_user_id").references(() => users.id, { onDelete: "set null" }),
    fromPlan: varchar("from_plan", { length: 32 }).notNull(),
    toPlan: varchar("to_plan", { length: 32 }).notNull(),
    effectiveAt: at("effective_at").notNull(),
    prorationMinor: money("proration_minor").notNull().default(0),
    createdAt: createdAt(),
  },
  (t) => [index("plan_changes_org_idx").on(t.organizationId, t.createdAt)],
);

export type BillingAccount = typeof billingAccounts.$inferSelect;
export type Invoice = typeof invoices.$inferSelect;
export type InvoiceLine = typeof invoiceLines.$inferSelect;
export type BillingContact = typeof billingContacts.$inferSelect;
