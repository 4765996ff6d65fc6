// POST /api/portal/billing/invoices/:id/pay: charge an open invoice to the saved card now
import { requireCaller } from "@/lib/auth/session";
import { payInvoice } from "@/lib/billing/service";
import { handler, idParam, ok, PortalError } from "@/lib/portal/http";

export const POST = handler(async (req, params) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const out = await payInvoice({ organizationId: caller.organizationId, userId: caller.userId, name: caller.name }, idParam(params, "id"));
  if (!out.paid) throw new PortalError(402, out.message);
  return ok({ paid: true });
});
