// GET /api/portal/models/:id[?version=n]: a saved model with one version's content and the list of versions;
// PATCH: share or unshare, describe; DELETE: remove it with every version
import { handler, idParam, notFound, ok, parseBody } from "@/lib/portal/http";
import { changeModel, openModel, removeModel } from "@/lib/portal/models";
import { changeModelSchema } from "@/lib/portal/schemas";
import { callerFor } from "@/lib/portal/tenancy";

export const GET = handler(async (req, params) => {
  const caller = await callerFor(req, { anyOf: ["models.read"] });
  const v = new URL(req.url).searchParams.get("version");
  const version = v === null ? undefined : Number(v);
  if (version !== undefined && !(Number.isSafeInteger(version) && version > 0)) throw notFound(`Version ${v} of this model`);
  return ok(await openModel(caller, idParam(params, "id"), version));
});

export const PATCH = handler(async (req, params) => {
  const caller = await callerFor(req, { anyOf: ["models.read"] });
  await changeModel(caller, idParam(params, "id"), await parseBody(req, changeModelSchema));
  return ok({ ok: true });
});

export const DELETE = handler(async (req, params) => {
  const caller = await callerFor(req, { anyOf: ["models.read"] });
  await removeModel(caller, idParam(params, "id"));
  return ok({ ok: true });
});
