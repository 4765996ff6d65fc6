// Invoices: the local row, its copy at the payment provider, the charge to the saved card, and what paying or failing
// to pay does to the organisation.
import "server-only";
import { CURRENCY, formatMoney, PLANS } from "@/lib/api/plans";
import { recordAudit } from "@/lib/db/audit";
import {
  findOrCreateInvoice,
  getInvoiceById,
  listInvoiceLines,
  listOpenPeriodInvoices,
  updateInvoice,
} from "@/lib/db/billing-ledger";
import type { Invoice } from "@/lib/db/schema-billing";
import { paymentFailedMail, planRestoredMail, receiptMail } from "@/lib/mail/templates";
import { linesTotal, periodLabel, type Line } from "./money";
import { provider } from "./provider";
import { billingUrl, cardLabel, type Ctx, DAY_MS, GRACE_DAYS, invoiceUrl, mail, planName, setAccount, setEffectivePlan, ensureCustomer, currencyLower } from "./account";

// ---------------------------------------------------------------- invoices

/** Finds or creates the local invoice row for (kind, dedupeKey): the unique key makes a repeated run a no-op. */
export async function claimInvoice(ctx: Ctx, p: { kind: "period" | "proration"; dedupeKey: string; planCode: string; period: { start: Date; end: Date }; lines: Line[]; metered: number }): Promise<Invoice> {
  return findOrCreateInvoice(
    { organizationId: ctx.org.id, kind: p.kind, dedupeKey: p.dedupeKey, planCode: p.planCode, period: p.period, currency: CURRENCY, totalMinor: linesTotal(p.lines), metered: p.metered, year: ctx.now.getUTCFullYear(), lines: p.lines },
    ctx.tx,
  );
}

/** Creates the invoice at the provider (one item per line) and finalises it; every call carries an idempotency key. */
export async function sendToProvider(ctx: Ctx, row: Invoice): Promise<Invoice> {
  if (row.status !== "draft") return row;
  const customer = await ensureCustomer(ctx);
  const lines = await listInvoiceLines({ invoiceId: row.id }, ctx.tx);
  const key = `sumfold-${row.number}`;
  let pinv = await provider().invoices.create(
    {
      customer,
      currency: currencyLower,
      collection_method: "charge_automatically",
      auto_advance: false,
      pending_invoice_items_behavior: "exclude",
      description: `Sumfold ${row.number}`,
      metadata: { organization_id: String(ctx.org.id), invoice_number: row.number },
    },
    { idempotencyKey: `${key}-invoice` },
  );
  for (const l of lines) {
    await provider().invoiceItems.create(
      { customer, invoice: pinv.id, currency: currencyLower, amount: l.amountMinor, description: `${l.description} (${l.quantity.toLocaleString("en-GB")} × ${l.unitLabel})`, metadata: { position: String(l.position) } },
      { idempotencyKey: `${key}-line-${l.position}` },
    );
  }
  if (pinv.status === "draft") pinv = await provider().invoices.finalizeInvoice(pinv.id!, {}, { idempotencyKey: `${key}-finalize` });
  await updateInvoice({ invoiceId: row.id, patch: { providerInvoiceId: pinv.id, status: "open" } }, ctx.tx);
  return { ...row, providerInvoiceId: pinv.id ?? null, status: "open" };
}

export type PayOutcome = { paid: true } | { paid: false; message: string };

/** Charges an open invoice to the saved payment method through the provider. */
export async function charge(ctx: Ctx, row: Invoice): Promise<PayOutcome> {
  if (row.status === "paid") return { paid: true };
  try {
    const pinv = await provider().invoices.pay(row.providerInvoiceId!, ctx.acct.paymentMethodId ? { payment_method: ctx.acct.paymentMethodId } : {});
    if (pinv.status === "paid") {
      await markPaid(ctx, row);
      return { paid: true };
    }
    return { paid: false, message: `The provider reports the invoice as ${pinv.status}.` };
  } catch (e) {
    const err = e as { type?: string; statusCode?: number; message?: string };
    if (err.statusCode === 402 || err.type === "StripeCardError") {
      const message = err.message ?? "The payment was declined.";
      await updateInvoice({ invoiceId: row.id, patch: { lastPaymentError: message.slice(0, 300) } }, ctx.tx);
      return { paid: false, message };
    }
    throw e;
  }
}

export async function markPaid(ctx: Ctx, row: Invoice) {
  const cur = await getInvoiceById({ invoiceId: row.id }, ctx.tx);
  if (cur!.status === "paid") return;
  await updateInvoice({ invoiceId: row.id, patch: { status: "paid", paidAt: ctx.now, lastPaymentError: null } }, ctx.tx);
  mail(ctx, receiptMail({ organization: ctx.org.name, number: row.number, total: formatMoney(row.totalMinor, row.currency), period: periodLabel({ start: row.periodStart, end: row.periodEnd }), card: cardLabel(ctx.acct), url: invoiceUrl(ctx, row.id) }));
  await restoreIfSettled(ctx);
}

/** A past-due or restricted organisation with no open period invoice left gets its plan back. */
export async function restoreIfSettled(ctx: Ctx) {
  if (ctx.acct.status === "active") return;
  const open = await listOpenPeriodInvoices({ organizationId: ctx.org.id }, ctx.tx);
  if (open.length > 0) return;
  await setAccount(ctx, { status: "active", pastDueSince: null });
  await setEffectivePlan(ctx, planName(ctx.acct.planCode));
  await recordAudit({ organizationId: ctx.org.id, actorType: "system", action: "billing.plan_restored", targetType: "organization", targetId: String(ctx.org.id), detail: { plan: ctx.acct.planCode } }, ctx.tx);
  mail(ctx, planRestoredMail({ organization: ctx.org.name, plan: PLANS[planName(ctx.acct.planCode)].label, url: billingUrl(ctx) }));
}

/** A period invoice whose payment failed: the organisation is past due (once), and the billing contacts are told. */
export async function markPastDue(ctx: Ctx, row: Invoice) {
  if (ctx.acct.status !== "active") return;
  await setAccount(ctx, { status: "past_due", pastDueSince: ctx.now });
  await recordAudit({ organizationId: ctx.org.id, actorType: "system", action: "billing.past_due", targetType: "invoice", targetId: row.number }, ctx.tx);
  const restrictOn = new Date(ctx.now.getTime() + GRACE_DAYS * DAY_MS);
  mail(ctx, paymentFailedMail({ organization: ctx.org.name, number: row.number, total: formatMoney(row.totalMinor, row.currency), graceDays: GRACE_DAYS, restrictOn: restrictOn.toUTCString(), url: invoiceUrl(ctx, row.id) }));
}
