// DELETE /api/portal/account/sessions/:sid: end one of the signed-in person's sessions (by the short id the list shows)
import { handler, ok } from "@/lib/portal/http";
import { endOneSession, requireAccount } from "@/lib/portal/account";

export const DELETE = handler(async (req, params) => {
  const a = await requireAccount(req);
  await endOneSession(a, String(params.sid ?? ""));
  return ok({ ended: 1 });
});
