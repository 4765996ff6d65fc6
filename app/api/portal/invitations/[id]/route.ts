// DELETE /api/portal/invitations/:id: withdraw an open invitation (admins only)
import { requireCaller } from "@/lib/auth/session";
import { handler, idParam, ok } from "@/lib/portal/http";
import { revokeInvitation } from "@/lib/portal/members";

export const DELETE = handler(async (req, params) => {
  const caller = await requireCaller(req, ["members.manage"]);
  await revokeInvitation(caller, idParam(params, "id"));
  return ok({ revoked: true });
});
