// GET /api/portal/billing: the plan and quota (every role); for admins and billing contacts also the period's usage and projected bill, the catalogue, card, details, contacts and invoices
import { CURRENCY, PLAN_NAMES, PLANS, planOf } from "@/lib/api/plans";
import { can } from "@/lib/auth/roles";
import { requireCaller } from "@/lib/auth/session";
import { getAccount, graceEndsAt, listInvoices, upcoming } from "@/lib/billing/service";
import { listContacts } from "@/lib/db/billing";
import { handler, ok } from "@/lib/portal/http";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req, ["plan.read"]);
  const acct = await getAccount(caller.organizationId);
  const now = new Date();
  const next = await upcoming(acct, now);
  const effective = planOf(caller.plan);
  const base = {
    role: caller.role,
    organization: caller.organizationName,
    plan: { code: acct.planCode, label: planOf(acct.planCode).label },
    limits: { label: effective.label, requestsPerSecond: effective.requestsPerSecond, monthlyUnits: effective.monthlyUnits },
    quota: { monthlyUnits: effective.monthlyUnits, usedUnits: next.metered },
    status: acct.status,
  };
  if (!can(caller.role, "billing.manage")) return ok(base);
  const invoices = await listInvoices(caller.organizationId);
  return ok({
    ...base,
    currency: CURRENCY,
    pendingPlan: acct.pendingPlanCode ? { code: acct.pendingPlanCode, label: planOf(acct.pendingPlanCode).label, effectiveAt: acct.periodEnd } : null,
    period: { start: acct.periodStart, end: acct.periodEnd },
    graceEndsAt: graceEndsAt(acct),
    card: acct.cardLast4 ? { brand: acct.cardBrand, last4: acct.cardLast4, expMonth: acct.cardExpMonth, expYear: acct.cardExpYear } : null,
    details: { billingName: acct.billingName ?? caller.organizationName, billingAddress: acct.billingAddress ?? "", taxId: acct.taxId ?? "" },
    upcoming: { lines: next.lines, totalMinor: next.totalMinor, projectedUnits: next.projectedUnits, projectedTotalMinor: next.projectedTotalMinor },
    plans: PLAN_NAMES.map((code) => ({ code, ...PLANS[code] })),
    contacts: await listContacts(caller.organizationId),
    invoices: invoices.reverse().map((i) => ({ id: i.id, number: i.number, kind: i.kind, periodStart: i.periodStart, periodEnd: i.periodEnd, totalMinor: i.totalMinor, currency: i.currency, status: i.status, createdAt: i.createdAt })),
  });
});
