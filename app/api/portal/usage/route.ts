// GET /api/portal/usage: usage by day x key x endpoint (filters, sorting, paging); org-wide for admin/billing, own keys for developers
import { requireCaller } from "@/lib/auth/session";
import { handler, ok, parseQuery } from "@/lib/portal/http";
import { usageQuerySchema } from "@/lib/portal/schemas";
import { usageTable } from "@/lib/portal/usage";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req, ["usage.own"]);
  return ok(await usageTable(caller, parseQuery(req, usageQuerySchema)));
});
