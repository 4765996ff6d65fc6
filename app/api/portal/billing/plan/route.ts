// POST /api/portal/billing/plan: change the plan (upgrade now with proration, downgrade or cancel at period end, or a hosted checkout URL)
import { requireCaller } from "@/lib/auth/session";
import { planChangeSchema } from "@/lib/billing/schemas";
import { changePlan } from "@/lib/billing/service";
import { handler, ok, parseBody, PortalError } from "@/lib/portal/http";

export const POST = handler(async (req) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  const { plan } = await parseBody(req, planChangeSchema);
  const out = await changePlan({ organizationId: caller.organizationId, userId: caller.userId, name: caller.name }, plan);
  if (out.action === "declined") throw new PortalError(402, out.message);
  return ok(out);
});
