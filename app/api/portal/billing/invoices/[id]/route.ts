// GET /api/portal/billing/invoices/:id: one invoice with its lines
import { requireCaller } from "@/lib/auth/session";
import { getAccount, getInvoice } from "@/lib/billing/service";
import { handler, idParam, ok } from "@/lib/portal/http";

export const GET = handler(async (req, params) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const { invoice, lines } = await getInvoice(caller.organizationId, idParam(params, "id"));
  const acct = await getAccount(caller.organizationId);
  return ok({ invoice, lines, billedTo: { name: acct.billingName ?? caller.organizationName, address: acct.billingAddress ?? "", taxId: acct.taxId ?? "" } });
});
