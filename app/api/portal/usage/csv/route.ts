// GET /api/portal/usage/csv: the filtered usage table as CSV (every page, up to 100 000 rows)
import { z } from "zod";
import { requireCaller } from "@/lib/auth/session";
import { handler, parseQuery } from "@/lib/portal/http";
import { usageQuerySchema } from "@/lib/portal/schemas";
import { usageCsv, usageTable } from "@/lib/portal/usage";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req, ["usage.own"]);
  const q = parseQuery(req, usageQuerySchema.extend({ pageSize: z.coerce.number().int().min(1).max(100_000).default(100_000) }));
  const t = await usageTable(caller, { ...q, page: 1 });
  return new Response(usageCsv(t.rows), {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="sumfold-usage-${t.from}-to-${t.to}.csv"`,
      "cache-control": "no-store",
    },
  });
});
