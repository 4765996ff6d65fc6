import "server-only";
// Billing operations: period close, dunning, plan changes and checkout, the provider's webhooks, and the reads the portal shows.
import { FREE_PLAN, formatMoney, isPlanName, PLANS, type PlanName } from "@/lib/api/plans";
import { recordAudit } from "@/lib/db/audit";
import {
  claimProcessedEvent,
  getBillingAccount,
  getInvoiceById,
  getInvoiceByProviderId,
  getInvoiceInOrg,
  getUserName,
  isEventProcessed,
  listAccountsDueForClose,
  listAccountsPastDueSince,
  listInvoiceLines,
  listIssuedInvoices,
  listOpenPeriodInvoices,
  recordPlanChange,
  updateInvoice,
  type Tx,
} from "@/lib/db/billing-ledger";
import { sumUnits } from "@/lib/db/portal-usage";
import type { BillingAccount } from "@/lib/db/schema-billing";
import { planChangeMail, restrictedMail } from "@/lib/mail/templates";
import { notFound, PortalError } from "@/lib/portal/http";
import { baseUrl } from "@/lib/portal/tokens";
import { linesTotal, periodLabel, periodLines, periodOf, prorationMinor, type Line } from "./money";
import { provider, type Stripe } from "./provider";
import { billingRecipients, billingUrl, type Ctx, currencyLower, DAY_MS, ensureAccount, ensureCustomer, GRACE_DAYS, mail, planName, setAccount, setEffectivePlan, withAccount } from "./account";
import { charge, claimInvoice, markPaid, markPastDue, sendToProvider, type PayOutcome } from "./invoicing";

export { billingRecipients, ensureAccount, GRACE_DAYS };

// ---------------------------------------------------------------- period close

export interface CloseResult {
  organizationId: number;
  invoices: string[];
}

/**
 * Closes every billing period that has ended by `now`: one invoice per organisation and period (fee of the plan
 * held when the period began, then every compute unit metered in it), created at the provider and charged to the
 * saved card; pending downgrades then take effect. Safe to run again, or twice at once: the row lock and the
 * unique (organisation, kind, period) key make the second run a no-op.
 */
export async function closeDuePeriods(now = new Date()): Promise<CloseResult[]> {
  const due = await listAccountsDueForClose({ now });
  const out: CloseResult[] = [];
  for (const organizationId of due) {
    try {
      out.push(await closeAccount(organizationId, now));
    } catch (e) {
      console.error("[sumfold] period close failed", { organizationId, error: (e as Error).message });
    }
  }
  return out;
}

export async function closeAccount(organizationId: number, now = new Date()): Promise<CloseResult> {
  return withAccount(organizationId, now, async (ctx) => {
    const made: string[] = [];
    while (ctx.acct.periodEnd.getTime() <= now.getTime()) {
      const period = { start: ctx.acct.periodStart, end: ctx.acct.periodEnd };
      const metered = await sumUnits({ organizationId, from: period.start, to: period.end });
      const lines = periodLines({ feePlan: ctx.acct.periodPlanCode, usagePlan: ctx.acct.planCode, metered, period });
      if (linesTotal(lines) > 0) {
        let row = await claimInvoice(ctx, { kind: "period", dedupeKey: period.start.toISOString(), planCode: ctx.acct.planCode, period, lines, metered });
        row = await sendToProvider(ctx, row);
        const paid = await charge(ctx, row);
        if (!paid.paid) await markPastDue(ctx, row);
        made.push(row.number);
      }
      const next = { start: period.end, end: periodOf(period.end).end };
      const pending = ctx.acct.pendingPlanCode;
      const plan = planName(pending ?? ctx.acct.planCode);
      if (pending) {
        const from = ctx.acct.planCode;
        mail(ctx, planChangeMail({ organization: ctx.org.name, actor: "A scheduled change", from: PLANS[planName(from)].label, to: PLANS[plan].label, when: period.end.toUTCString(), url: billingUrl(ctx) }));
      }
      await setAccount(ctx, { periodStart: next.start, periodEnd: next.end, planCode: plan, periodPlanCode: plan, pendingPlanCode: null });
      await setEffectivePlan(ctx, ctx.acct.status === "restricted" ? FREE_PLAN : plan);
    }
    return { organizationId, invoices: made };
  });
}

// ---------------------------------------------------------------- dunning

/** Past-due organisations whose grace period is over fall to the Free plan's limits (their data stays). */
export async function sweepDunning(now = new Date()): Promise<number[]> {
  const limit = new Date(now.getTime() - GRACE_DAYS * DAY_MS);
  const rows = await listAccountsPastDueSince({ since: limit });
  const done: number[] = [];
  for (const organizationId of rows) {
    await withAccount(organizationId, now, async (ctx) => {
      if (ctx.acct.status !== "past_due" || !ctx.acct.pastDueSince || ctx.acct.pastDueSince > limit) return;
      await setAccount(ctx, { status: "restricted" });
      await setEffectivePlan(ctx, FREE_PLAN);
      await recordAudit({ organizationId, actorType: "system", action: "billing.restricted", targetType: "organization", targetId: String(organizationId), detail: { plan: ctx.acct.planCode } }, ctx.tx);
      mail(ctx, restrictedMail({ organization: ctx.org.name, plan: PLANS[planName(ctx.acct.planCode)].label, url: billingUrl(ctx) }));
      done.push(organizationId);
    });
  }
  return done;
}

// ---------------------------------------------------------------- plan changes

export type ChangeOutcome =
  | { action: "upgraded"; plan: PlanName; prorationMinor: number; invoiceId: number | null }
  | { action: "scheduled"; plan: PlanName; effectiveAt: string }
  | { action: "unchanged"; plan: PlanName }
  | { action: "checkout"; url: string }
  | { action: "declined"; message: string };

async function changePlanLocked(ctx: Ctx, target: PlanName, actor: { userId: number | null; name: string }): Promise<ChangeOutcome> {
  if (ctx.acct.status !== "active") throw new PortalError(409, "An invoice is past due: pay it (or update the card) before changing the plan.");
  const current = planName(ctx.acct.planCode);
  const period = { start: ctx.acct.periodStart, end: ctx.acct.periodEnd };
  if (target === current) {
    if (ctx.acct.pendingPlanCode) await setAccount(ctx, { pendingPlanCode: null });
    return { action: "unchanged", plan: current };
  }
  const url = billingUrl(ctx);
  if (PLANS[target].rank > PLANS[current].rank) {
    const amount = prorationMinor(current, target, ctx.now, period);
    let invoiceId: number | null = null;
    if (amount > 0) {
      const lines: Line[] = [
        { description: `${PLANS[current].label} to ${PLANS[target].label} for the rest of ${periodLabel(period)}, from ${ctx.now.toISOString().slice(0, 16).replace("T", " ")} UTC`, quantity: 1, unitLabel: "prorated", amountMinor: amount },
      ];
      let row = await claimInvoice(ctx, { kind: "proration", dedupeKey: `${current}-${target}-${ctx.now.getTime()}`, planCode: target, period, lines, metered: 0 });
      row = await sendToProvider(ctx, row);
      const paid = await charge(ctx, row);
      if (!paid.paid) {
        await provider().invoices.voidInvoice(row.providerInvoiceId!).catch(() => {});
        await updateInvoice({ invoiceId: row.id, patch: { status: "void" } }, ctx.tx);
        return { action: "declined", message: `${paid.message} The plan is unchanged.` };
      }
      invoiceId = row.id;
    }
    await setAccount(ctx, { planCode: target, pendingPlanCode: null });
    await setEffectivePlan(ctx, target);
    await recordPlanChange({ organizationId: ctx.org.id, actorUserId: actor.userId, fromPlan: current, toPlan: target, effectiveAt: ctx.now, prorationMinor: amount }, ctx.tx);
    await recordAudit({ organizationId: ctx.org.id, actorUserId: actor.userId, actorType: "user", action: "billing.plan_upgraded", targetType: "organization", targetId: String(ctx.org.id), detail: { from: current, to: target, prorationMinor: amount } }, ctx.tx);
    mail(ctx, planChangeMail({ organization: ctx.org.name, actor: actor.name, from: PLANS[current].label, to: PLANS[target].label, when: "now", charge: amount > 0 ? formatMoney(amount) : undefined, url }));
    return { action: "upgraded", plan: target, prorationMinor: amount, invoiceId };
  }
  await setAccount(ctx, { pendingPlanCode: target });
  await recordPlanChange({ organizationId: ctx.org.id, actorUserId: actor.userId, fromPlan: current, toPlan: target, effectiveAt: period.end }, ctx.tx);
  await recordAudit({ organizationId: ctx.org.id, actorUserId: actor.userId, actorType: "user", action: "billing.plan_change_scheduled", targetType: "organization", targetId: String(ctx.org.id), detail: { from: current, to: target, effectiveAt: period.end.toISOString() } }, ctx.tx);
  mail(ctx, planChangeMail({ organization: ctx.org.name, actor: actor.name, from: PLANS[current].label, to: PLANS[target].label, when: `at the end of the period (${period.end.toUTCString()})`, url }));
  return { action: "scheduled", plan: target, effectiveAt: period.end.toISOString() };
}

export interface Actor {
  organizationId: number;
  userId: number | null;
  name: string;
}

async function checkoutSession(ctx: Ctx, actor: Actor, purpose: "plan" | "payment_method", plan?: PlanName): Promise<string> {
  const customer = await ensureCustomer(ctx);
  const s = await provider().checkout.sessions.create({
    mode: "setup",
    customer,
    currency: currencyLower,
    // The organisation travels in the addresses, as it does on every portal page.
    success_url: `${baseUrl()}/api/portal/billing/checkout/return?org=${encodeURIComponent(ctx.org.slug)}&session_id={CHECKOUT_SESSION_ID}`,
    cancel_url: `${baseUrl()}/billing?org=${encodeURIComponent(ctx.org.slug)}&checkout=cancelled`,
    metadata: { organization_id: String(ctx.org.id), purpose, plan: plan ?? "", user_id: String(actor.userId ?? "") },
  });
  return s.url!;
}

/**
 * Changes the plan. Upgrades take effect at once and the prorated fee difference is charged to the saved card;
 * without a saved card a paid plan goes through the provider's hosted checkout first. Downgrades (and a change
 * to Free, i.e. cancelling) take effect when the period ends.
 */
export async function changePlan(actor: Actor, target: string, now = new Date()): Promise<ChangeOutcome> {
  if (!isPlanName(target)) throw new PortalError(422, "Choose one of the listed plans.", { plan: "Unknown plan." });
  return withAccount(actor.organizationId, now, async (ctx) => {
    const current = planName(ctx.acct.planCode);
    if (PLANS[target].rank > PLANS[current].rank && !ctx.acct.paymentMethodId && prorationMinor(current, target, now, { start: ctx.acct.periodStart, end: ctx.acct.periodEnd }) > 0) {
      if (ctx.acct.status !== "active") throw new PortalError(409, "An invoice is past due: pay it (or update the card) before changing the plan.");
      return { action: "checkout", url: await checkoutSession(ctx, actor, "plan", target) };
    }
    return changePlanLocked(ctx, target, actor);
  });
}

/** A hosted checkout that only replaces the saved card. */
export async function startCardUpdate(actor: Actor, now = new Date()): Promise<{ url: string }> {
  return withAccount(actor.organizationId, now, async (ctx) => ({ url: await checkoutSession(ctx, actor, "payment_method") }));
}

export type CheckoutOutcome = { status: "open" } | { status: "already"; purpose: string; planInForce: boolean } | { status: "card_saved"; retried: number } | ({ status: "plan" } & ChangeOutcome);

/**
 * Applies a completed checkout (from the return page and from the webhook, whichever comes first; the second is
 * a no-op): saves the card as the customer's default, then performs the plan change it was started for, or
 * retries open invoices after a card update. `organizationId`, when given, must own the session (else 404).
 */
export async function completeCheckout(sessionId: string, opts: { organizationId?: number; now?: Date } = {}): Promise<CheckoutOutcome> {
  const now = opts.now ?? new Date();
  let session: Stripe.Checkout.Session;
  try {
    session = await provider().checkout.sessions.retrieve(sessionId);
  } catch (e) {
    if ((e as { statusCode?: number }).statusCode === 404) throw notFound("This checkout");
    throw e;
  }
  const organizationId = Number(session.metadata?.organization_id);
  if (!Number.isSafeInteger(organizationId) || (opts.organizationId !== undefined && opts.organizationId !== organizationId)) throw notFound("This checkout");
  if (session.status !== "complete") return { status: "open" };
  return withAccount(organizationId, now, async (ctx) => {
    if (ctx.acct.providerCustomerId !== session.customer) throw notFound("This checkout");
    const claimed = await claimProcessedEvent({ eventId: `checkout:${session.id}`, type: "checkout.completed" }, ctx.tx);
    // Applied before (by the webhook or an earlier return): report the state the checkout was for.
    if (!claimed) return { status: "already", purpose: session.metadata?.purpose ?? "", planInForce: ctx.acct.planCode === session.metadata?.plan } as const;
    const si = await provider().setupIntents.retrieve(String(session.setup_intent));
    const pm = await provider().paymentMethods.retrieve(String(si.payment_method));
    await provider().customers.update(session.customer as string, { invoice_settings: { default_payment_method: pm.id } });
    await setAccount(ctx, { paymentMethodId: pm.id, cardBrand: pm.card?.brand ?? null, cardLast4: pm.card?.last4 ?? null, cardExpMonth: pm.card?.exp_month ?? null, cardExpYear: pm.card?.exp_year ?? null });
    const userId = Number(session.metadata?.user_id) || null;
    const target = session.metadata?.plan ?? "";
    if (session.metadata?.purpose === "plan" && isPlanName(target)) {
      const name = (userId ? await getUserName({ userId }, ctx.tx) : null) ?? "A member";
      if (ctx.acct.status !== "active") return { status: "card_saved", retried: await retryOpen(ctx) };
      return { status: "plan", ...(await changePlanLocked(ctx, target, { userId, name })) };
    }
    return { status: "card_saved", retried: await retryOpen(ctx) };
  });
}

/** After a new card: charge the open period invoices again (paying the last one restores a lapsed plan). */
async function retryOpen(ctx: Ctx): Promise<number> {
  const open = await listOpenPeriodInvoices({ organizationId: ctx.org.id }, ctx.tx);
  let n = 0;
  for (const row of open) if ((await charge(ctx, row)).paid) n++;
  return n;
}

/** Pays one open invoice with the saved card now (the portal's "Pay now"). */
export async function payInvoice(actor: Actor, invoiceId: number, now = new Date()): Promise<PayOutcome> {
  return withAccount(actor.organizationId, now, async (ctx) => {
    const row = await getInvoiceInOrg({ organizationId: actor.organizationId, invoiceId }, ctx.tx);
    if (!row) throw notFound("This invoice");
    if (row.status === "paid") return { paid: true } as const;
    if (row.status !== "open") throw new PortalError(409, `This invoice is ${row.status} and cannot be paid.`);
    if (!ctx.acct.paymentMethodId) throw new PortalError(409, "Add a card first.");
    return charge(ctx, row);
  });
}

// ---------------------------------------------------------------- webhooks

export type EventOutcome = "applied" | "duplicate" | "ignored";

/**
 * Applies a verified provider event once (processed_events by event id, claimed in the same transaction as the
 * change). Invoice events are not trusted for their snapshot: the invoice is read back from the provider, so a
 * late or out-of-order event (a failure delivered after the payment) cannot undo a newer state.
 */
export async function applyEvent(event: Stripe.Event, now = new Date()): Promise<EventOutcome> {
  const claim = (tx?: Tx) => claimProcessedEvent({ eventId: event.id, type: event.type }, tx);
  if (event.type === "checkout.session.completed") {
    const s = event.data.object as Stripe.Checkout.Session;
    if (await isEventProcessed({ eventId: event.id })) return "duplicate";
    await completeCheckout(s.id, { now }).catch((e) => {
      if (!(e instanceof PortalError && e.status === 404)) throw e;
    });
    return (await claim()) ? "applied" : "duplicate";
  }
  if (event.type.startsWith("invoice.")) {
    const snapshot = event.data.object as Stripe.Invoice;
    const row = snapshot.id ? await getInvoiceByProviderId({ providerInvoiceId: snapshot.id }) : null;
    if (!row) return (await claim()) ? "ignored" : "duplicate";
    return withAccount(row.organizationId, now, async (ctx) => {
      if (!(await claim(ctx.tx))) return "duplicate" as const;
      const current = await provider().invoices.retrieve(snapshot.id!);
      const local = (await getInvoiceById({ invoiceId: row.id }, ctx.tx))!;
      if (current.status === "paid") await markPaid(ctx, local);
      else if (current.status === "void" && local.status !== "void") await updateInvoice({ invoiceId: local.id, patch: { status: "void" } }, ctx.tx);
      else if (event.type === "invoice.payment_failed" && current.status === "open" && local.kind === "period" && local.status === "open") await markPastDue(ctx, local);
      return "applied" as const;
    });
  }
  return (await claim()) ? "ignored" : "duplicate";
}

// ---------------------------------------------------------------- reads

export async function getAccount(organizationId: number, now = new Date()): Promise<BillingAccount> {
  await ensureAccount(organizationId, now);
  return (await getBillingAccount({ organizationId }))!;
}

export const graceEndsAt = (a: BillingAccount) => (a.pastDueSince ? new Date(a.pastDueSince.getTime() + GRACE_DAYS * DAY_MS) : null);

export async function listInvoices(organizationId: number) {
  return listIssuedInvoices({ organizationId });
}

export async function getInvoice(organizationId: number, id: number) {
  const row = await getInvoiceInOrg({ organizationId, invoiceId: id });
  if (!row) throw notFound("This invoice");
  const lines = await listInvoiceLines({ invoiceId: id });
  return { invoice: row, lines };
}

/** Usage so far this period, the bill it makes, and a straight-line projection to the period's end. */
export async function upcoming(acct: BillingAccount, now = new Date()) {
  const period = { start: acct.periodStart, end: acct.periodEnd };
  const metered = await sumUnits({ organizationId: acct.organizationId, from: period.start, to: period.end });
  const toDate = periodLines({ feePlan: acct.periodPlanCode, usagePlan: acct.planCode, metered, period });
  const elapsed = Math.max(1, Math.min(now.getTime(), period.end.getTime()) - period.start.getTime());
  const projectedUnits = Math.round((metered * (period.end.getTime() - period.start.getTime())) / elapsed);
  const projected = periodLines({ feePlan: acct.periodPlanCode, usagePlan: acct.planCode, metered: projectedUnits, period });
  return { period, metered, lines: toDate, totalMinor: linesTotal(toDate), projectedUnits, projectedTotalMinor: linesTotal(projected) };
}
