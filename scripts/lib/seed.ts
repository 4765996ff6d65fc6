import bcrypt from "bcryptjs";
import { and, eq } from "drizzle-orm";
import { drizzle, type MySql2Database } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import Stripe from "stripe";
import * as schema from "../../lib/db/schema";
import * as billing from "../../lib/db/schema-billing";
import { periodOf } from "../../lib/billing/money";
import { DEMO_PASSWORD, demoBilling, demoModels, demoOrganizations, demoPeople } from "../../lib/demo/scenario";

/**
 * Seeds the demo scenario. Idempotent: rows that exist (by their natural keys) are left untouched.
 * Returns how many rows it inserted.
 */
export async function seedDemo(databaseUrl: string, env: Record<string, string> = {}): Promise<number> {
  const conn = await mysql.createConnection({ uri: databaseUrl });
  const db = drizzle(conn, { schema, mode: "default" });
  let inserted = 0;
  const count = (r: unknown) => (inserted += (r as [{ affectedRows: number }])[0].affectedRows);
  try {
    const orgIds = new Map<string, number>();
    for (const o of demoOrganizations) {
      count(await db.insert(schema.organizations).ignore().values({ slug: o.slug, name: o.name, plan: o.plan }));
      const [row] = await db.select({ id: schema.organizations.id }).from(schema.organizations).where(eq(schema.organizations.slug, o.slug));
      orgIds.set(o.slug, row.id);
    }
    const hash = await bcrypt.hash(DEMO_PASSWORD, 10);
    const userIds = new Map<string, number>();
    for (const p of demoPeople) {
      const [existing] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, p.email));
      if (!existing) {
        count(
          await db.insert(schema.users).values({ email: p.email, name: p.name, passwordHash: hash, emailVerifiedAt: new Date("2026-11-02T09:00:00Z") }),
        );
      }
      const [row] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, p.email));
      userIds.set(p.email, row.id);
      for (const [org, role] of p.memberships) {
        count(await db.insert(schema.memberships).ignore().values({ userId: row.id, organizationId: orgIds.get(org)!, role }));
      }
    }
    for (const m of demoModels) {
      const orgId = orgIds.get(m.org)!;
      const [existing] = await db
        .select({ id: schema.savedModels.id })
        .from(schema.savedModels)
        .where(and(eq(schema.savedModels.organizationId, orgId), eq(schema.savedModels.name, m.name)));
      if (!existing) {
        const [r] = await db.insert(schema.savedModels).values({ organizationId: orgId, name: m.name, description: m.description, model: m.model, shared: true });
        count([r]);
        await db.insert(schema.savedModelVersions).values({ savedModelId: r.insertId, version: 1, model: m.model });
      }
    }
    inserted += await seedBilling(db, orgIds, env);
  } finally {
    await conn.end();
  }
  return inserted;
}

/**
 * The demo organisations' subscriptions: a customer with a saved test card at the payment provider (the local
 * fake), billing details and contacts, and last month's usage. Their billing period is last month, so the
 * server's first period close (at start-up) issues last month's invoice through the provider and charges the
 * card; this month's bill so far is the upcoming one.
 */
async function seedBilling(db: MySql2Database<typeof schema>, orgIds: Map<string, number>, env: Record<string, string>): Promise<number> {
  if (!env.STRIPE_SECRET_KEY || !env.STRIPE_API_HOST) return 0;
  const stripe = new Stripe(env.STRIPE_SECRET_KEY, { host: env.STRIPE_API_HOST, port: Number(env.STRIPE_API_PORT), protocol: env.STRIPE_API_PROTOCOL as "http" | "https" });
  let inserted = 0;
  const now = new Date();
  const last = periodOf(new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1)));
  for (const b of demoBilling) {
    const organizationId = orgIds.get(b.org)!;
    const plan = demoOrganizations.find((o) => o.slug === b.org)!.plan;
    const [res] = await db.insert(billing.billingAccounts).ignore().values({
      organizationId, planCode: plan, periodPlanCode: plan, periodStart: last.start, periodEnd: last.end,
      billingName: b.billingName, billingAddress: b.billingAddress, taxId: b.taxId || null,
    });
    if (res.affectedRows === 0) continue;
    inserted++;
    const customer = await stripe.customers.create({ name: b.billingName, email: b.contacts[0]?.email, metadata: { organization_id: String(organizationId) } });
    const pm = await stripe.paymentMethods.attach("pm_card_visa", { customer: customer.id });
    await stripe.customers.update(customer.id, { invoice_settings: { default_payment_method: pm.id } });
    await db.update(billing.billingAccounts).set({ providerCustomerId: customer.id, paymentMethodId: pm.id, cardBrand: pm.card?.brand ?? null, cardLast4: pm.card?.last4 ?? null, cardExpMonth: pm.card?.exp_month ?? null, cardExpYear: pm.card?.exp_year ?? null }).where(eq(billing.billingAccounts.organizationId, organizationId));
    for (const c of b.contacts) inserted += (await db.insert(billing.billingContacts).ignore().values({ organizationId, ...c }))[0].affectedRows;
    // Last month's units, one row per day, summing exactly to lastMonthUnits.
    const days = Math.round((last.end.getTime() - last.start.getTime()) / 86_400_000);
    const rows = Array.from({ length: days }, (_, d) => ({
      requestId: `demo-${b.org}-${d + 1}`.slice(0, 40),
      keyId: 0,
      organizationId,
      endpoint: "POST /api/v1/density",
      status: 200,
      durationMs: 40,
      computeUnits: Math.floor(b.lastMonthUnits / days) + (d < b.lastMonthUnits % days ? 1 : 0),
      createdAt: new Date(last.start.getTime() + d * 86_400_000 + 12 * 3_600_000),
    }));
    inserted += (await db.insert(schema.usageEvents).ignore().values(rows))[0].affectedRows;
  }
  return inserted;
}
