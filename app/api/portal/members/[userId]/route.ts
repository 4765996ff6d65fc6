// PATCH /api/portal/members/:userId: change a member's role; DELETE: remove them (never the last admin)
import { requireCaller } from "@/lib/auth/session";
import { handler, idParam, ok, parseBody } from "@/lib/portal/http";
import { changeRole, removeMember } from "@/lib/portal/members";
import { roleChangeSchema } from "@/lib/portal/schemas";

export const PATCH = handler(async (req, params) => {
  const caller = await requireCaller(req, ["members.manage"]);
  const userId = idParam(params, "userId");
  const { role } = await parseBody(req, roleChangeSchema);
  await changeRole(caller, userId, role);
  return ok({ userId, role });
});

export const DELETE = handler(async (req, params) => {
  const caller = await requireCaller(req, ["members.manage"]);
  await removeMember(caller, idParam(params, "userId"));
  return ok({ removed: true });
});
