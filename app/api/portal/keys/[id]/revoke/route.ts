// POST /api/portal/keys/:id/revoke: revoke a key now
import { requireCaller } from "@/lib/auth/session";
import { handler, idParam, ok } from "@/lib/portal/http";
import { revokePortalKey } from "@/lib/portal/keys";

export const POST = handler(async (req, params) => {
  const caller = await requireCaller(req, ["keys.own"]);
  await revokePortalKey(caller, idParam(params, "id"));
  return ok({ revoked: true });
});
