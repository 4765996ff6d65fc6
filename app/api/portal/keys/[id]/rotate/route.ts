// POST /api/portal/keys/:id/rotate: issue a new secret; the old one retires after the chosen grace period
import { requireCaller } from "@/lib/auth/session";
import { handler, idParam, ok, parseBody } from "@/lib/portal/http";
import { rotatePortalKey } from "@/lib/portal/keys";
import { rotateSchema } from "@/lib/portal/schemas";

export const POST = handler(async (req, params) => {
  const caller = await requireCaller(req, ["keys.own"]);
  const id = idParam(params, "id");
  const { grace } = await parseBody(req, rotateSchema);
  return ok(await rotatePortalKey(caller, id, grace), 201);
});
