// DELETE /api/portal/billing/contacts/:id: remove a billing contact
import { requireCaller } from "@/lib/auth/session";
import { removeContact } from "@/lib/db/billing";
import { handler, idParam, notFound, ok } from "@/lib/portal/http";

export const DELETE = handler(async (req, params) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  if (!(await removeContact({ organizationId: caller.organizationId, id: idParam(params, "id") }))) throw notFound("This contact");
  return ok({ removed: true });
});
