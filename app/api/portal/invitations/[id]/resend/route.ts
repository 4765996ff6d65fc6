// POST /api/portal/invitations/:id/resend: mail a fresh link; the previous one stops working (admins only)
import { requireCaller } from "@/lib/auth/session";
import { handler, idParam, ok } from "@/lib/portal/http";
import { resendInvitation } from "@/lib/portal/members";

export const POST = handler(async (req, params) => {
  const caller = await requireCaller(req, ["members.manage"]);
  await resendInvitation(caller, idParam(params, "id"));
  return ok({ sent: true });
});
