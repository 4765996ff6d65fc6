// POST /api/portal/billing/payment-method: a hosted checkout URL that replaces the saved card
import { requireCaller } from "@/lib/auth/session";
import { startCardUpdate } from "@/lib/billing/service";
import { handler, ok } from "@/lib/portal/http";

export const POST = handler(async (req) => {
  const caller = await requireCaller(req, ["billing.manage"]);
  return ok(await startCardUpdate({ organizationId: caller.organizationId, userId: caller.userId, name: caller.name }));
});
