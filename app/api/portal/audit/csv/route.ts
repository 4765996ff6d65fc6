// GET /api/portal/audit/csv: the filtered audit log as CSV (up to 5 000 rows)
import { auditCsv, auditLog } from "@/lib/portal/audit";
import { handler, parseQuery } from "@/lib/portal/http";
import { auditQuerySchema } from "@/lib/portal/schemas";
import { callerFor } from "@/lib/portal/tenancy";

export const GET = handler(async (req) => {
  const caller = await callerFor(req, { anyOf: ["audit.read"] });
  const q = parseQuery(req, auditQuerySchema);
  const { rows } = await auditLog(caller, { ...q, limit: Math.max(q.limit, 5000) });
  return new Response(auditCsv(rows), {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="sumfold-audit-${caller.organizationSlug}.csv"`,
      "cache-control": "no-store",
    },
  });
});
