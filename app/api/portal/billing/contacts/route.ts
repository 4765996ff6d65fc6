// GET, POST /api/portal/billing/contacts: addresses that receive receipts, failed-payment notices and plan changes
import { requireCaller } from "@/lib/auth/session";
import { contactSchema } from "@/lib/billing/schemas";
import { addContact, listContacts } from "@/lib/db/billing";
import { handler, ok, parseBody, PortalError } from "@/lib/portal/http";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  return ok({ contacts: await listContacts(caller.organizationId) });
});

export const POST = handler(async (req) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const body = await parseBody(req, contactSchema);
  if (!(await addContact({ organizationId: caller.organizationId, ...body }))) throw new PortalError(409, "This address is already a billing contact.", { email: "Already listed." });
  return ok({ contacts: await listContacts(caller.organizationId) }, 201);
});
