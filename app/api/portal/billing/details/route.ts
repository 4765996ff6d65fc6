// PATCH /api/portal/billing/details: the name, address and tax id printed on invoices
import { requireCaller } from "@/lib/auth/session";
import { detailsSchema } from "@/lib/billing/schemas";
import { getAccount } from "@/lib/billing/service";
import { updateBillingDetails } from "@/lib/db/billing";
import { handler, ok, parseBody } from "@/lib/portal/http";

export const PATCH = handler(async (req) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const body = await parseBody(req, detailsSchema);
  await getAccount(caller.organizationId);
  await updateBillingDetails({ organizationId: caller.organizationId, ...body });
  return ok({ details: body });
});
