// GET /api/portal/usage/month: daily compute units of this month against the plan's monthly quota
import { requireCaller } from "@/lib/auth/session";
import { handler, ok } from "@/lib/portal/http";
import { usageMonth } from "@/lib/portal/usage";

export const GET = handler(async (req) => ok(await usageMonth(await requireCaller(req, ["usage.own"]))));
