// GET /api/portal/audit: the organisation's audit log (admins), filtered by period, action and person
import { auditLog } from "@/lib/portal/audit";
import { handler, ok, parseQuery } from "@/lib/portal/http";
import { auditQuerySchema } from "@/lib/portal/schemas";
import { callerFor } from "@/lib/portal/tenancy";

export const GET = handler(async (req) => {
  const caller = await callerFor(req, { anyOf: ["audit.read"] });
  return ok(await auditLog(caller, parseQuery(req, auditQuerySchema)));
});
