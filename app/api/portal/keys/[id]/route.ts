// PATCH /api/portal/keys/:id: change a key's label, scopes or allowed client address ranges (the secret stays)
import { requireCaller } from "@/lib/auth/session";
import { handler, idParam, ok, parseBody } from "@/lib/portal/http";
import { updatePortalKey } from "@/lib/portal/keys";
import { keyUpdateSchema } from "@/lib/portal/schemas";

export const PATCH = handler(async (req, params) => {
  const caller = await requireCaller(req, ["keys.own"]);
  const input = await parseBody(req, keyUpdateSchema);
  return ok({ key: await updatePortalKey(caller, idParam(params, "id"), input) });
});
