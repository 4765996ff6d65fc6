// The billing row of an organisation and what every locked billing operation shares: the lock, the row updates, the
// provider customer and the mail that waits for the commit.
import "server-only";
import { CURRENCY, FREE_PLAN, isPlanName, type PlanName } from "@/lib/api/plans";
import {
  createBillingAccount,
  hasBillingAccount,
  listBillingContactEmails,
  setOrganizationPlan,
  updateBillingAccount,
  withBillingAccountLocked,
  type Tx,
} from "@/lib/db/billing-ledger";
import { getOrgById, listEmailsByRole } from "@/lib/db/portal";
import type { Organization } from "@/lib/db/schema";
import type { BillingAccount } from "@/lib/db/schema-billing";
import { type MailContent } from "@/lib/mail/templates";
import { sendMail } from "@/lib/mail/transport";
import { notFound } from "@/lib/portal/http";
import { baseUrl } from "@/lib/portal/tokens";
import { periodOf } from "./money";
import { provider } from "./provider";


/** Days an invoice may stay unpaid after a failed payment before the organisation drops to the Free plan's limits. */
export const GRACE_DAYS = 7;
export const DAY_MS = 86_400_000;

/** What a locked operation works on; mails wait in `after` until the transaction has committed. */
export interface Ctx {
  tx: Tx;
  acct: BillingAccount;
  org: Organization;
  now: Date;
  after: (() => Promise<unknown>)[];
}

export const planName = (code: string): PlanName => (isPlanName(code) ? code : FREE_PLAN);
export const currencyLower = CURRENCY.toLowerCase();

/** The billing row of an organisation, created on first use (on the plan the organisation holds, this month). */
export async function ensureAccount(organizationId: number, now = new Date()): Promise<void> {
  // A plain read first: INSERT IGNORE on a row another transaction holds locked would wait on (and can deadlock with) it.
  if (await hasBillingAccount({ organizationId })) return;
  const org = await getOrgById({ organizationId });
  if (!org) throw notFound("This organisation");
  const p = periodOf(now);
  await createBillingAccount({ organizationId, planCode: planName(org.plan), periodStart: p.start, periodEnd: p.end });
}

export const isDeadlock = (e: unknown) => {
  for (let c: unknown = e; c; c = (c as { cause?: unknown }).cause) if ((c as { errno?: number }).errno === 1213 || (c as { code?: string }).code === "ER_LOCK_DEADLOCK") return true;
  return false;
};

/**
 * Runs `fn` with the organisation's billing row locked (SELECT ... FOR UPDATE), then sends the queued mail. A
 * deadlock (the database picked this transaction to undo) is retried; the provider calls inside carry
 * idempotency keys or are no-ops when repeated (paying a paid invoice).
 */
export async function withAccount<T>(organizationId: number, now: Date, fn: (ctx: Ctx) => Promise<T>): Promise<T> {
  await ensureAccount(organizationId, now);
  for (let attempt = 1; ; attempt++) {
    const after: Ctx["after"] = [];
    try {
      const out = await withBillingAccountLocked({ organizationId }, ({ tx, acct, org }) => fn({ tx, acct, org, now, after }));
      for (const job of after) await job().catch((e) => console.error("[sumfold] billing follow-up failed", e));
      return out;
    } catch (e) {
      if (attempt >= 3 || !isDeadlock(e)) throw e;
      await new Promise((r) => setTimeout(r, 50 * attempt + Math.random() * 50));
    }
  }
}

export async function setAccount(ctx: Ctx, patch: Partial<BillingAccount>) {
  await updateBillingAccount({ organizationId: ctx.acct.organizationId, patch: { ...patch, updatedAt: ctx.now } }, ctx.tx);
  Object.assign(ctx.acct, patch);
}

/** Sets the plan whose limits apply (read by the key gate, so the limiter follows within its one-second cache). */
export async function setEffectivePlan(ctx: Ctx, plan: PlanName) {
  if (ctx.org.plan === plan) return;
  await setOrganizationPlan({ organizationId: ctx.org.id, plan }, ctx.tx);
  ctx.org.plan = plan;
}

/** Who receives billing mail: the billing contacts and the billing members, or the admins when there are none. */
export async function billingRecipients(organizationId: number): Promise<string[]> {
  const contacts = await listBillingContactEmails({ organizationId });
  const billing = await listEmailsByRole({ organizationId, roles: ["billing"] });
  const all = [...new Set([...contacts, ...billing])];
  return all.length > 0 ? all : listEmailsByRole({ organizationId, roles: ["admin"] });
}

export function mail(ctx: Ctx, content: MailContent) {
  const organizationId = ctx.org.id;
  ctx.after.push(async () => sendMail(await billingRecipients(organizationId), content));
}

export async function ensureCustomer(ctx: Ctx): Promise<string> {
  if (ctx.acct.providerCustomerId) return ctx.acct.providerCustomerId;
  const [email] = await billingRecipients(ctx.org.id);
  const c = await provider().customers.create(
    { name: ctx.acct.billingName ?? ctx.org.name, email, metadata: { organization_id: String(ctx.org.id) } },
    { idempotencyKey: `sumfold-customer-${ctx.org.id}-${ctx.acct.createdAt.getTime()}` },
  );
  await setAccount(ctx, { providerCustomerId: c.id });
  return c.id;
}

export const cardLabel = (a: BillingAccount) => (a.cardLast4 ? `${a.cardBrand ?? "card"} ending ${a.cardLast4}` : "the saved card");
export const invoiceUrl = (ctx: Ctx, id: number) => `${baseUrl()}/billing/invoices/${id}?org=${encodeURIComponent(ctx.org.slug)}`;
export const billingUrl = (ctx: Ctx) => `${baseUrl()}/billing?org=${encodeURIComponent(ctx.org.slug)}`;
