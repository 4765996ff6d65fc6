// GET /api/portal/billing/invoices: the organisation's invoices, newest first
import { requireCaller } from "@/lib/auth/session";
import { listInvoices } from "@/lib/billing/service";
import { handler, ok } from "@/lib/portal/http";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const rows = await listInvoices(caller.organizationId);
  return ok({ invoices: rows.reverse() });
});
