// GET /api/portal/keys: keys the caller may see (admin: all; developer: own); POST: create a key, secret shown once
import { requireCaller } from "@/lib/auth/session";
import { handler, ok, parseBody } from "@/lib/portal/http";
import { createPortalKey, listKeys, warnExpiringKeys } from "@/lib/portal/keys";
import { keyCreateSchema } from "@/lib/portal/schemas";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req, ["keys.own"]);
  // Expiry warnings go out when anyone of the organisation looks at keys, besides any scheduled scan.
  await warnExpiringKeys({ organizationId: caller.organizationId }).catch((e) => console.error("[sumfold] expiry warnings failed", e));
  return ok({ keys: await listKeys(caller) });
});

export const POST = handler(async (req) => {
  const caller = await requireCaller(req, ["keys.own"]);
  const input = await parseBody(req, keyCreateSchema);
  return ok(await createPortalKey(caller, input), 201);
});
