// GET /api/portal/models: the models this person can open (shared in the organisation, and their own);
// POST: save a model (a new name is version 1; an existing name gets its next version)
import { listSavedModels } from "@/lib/db/models";
import { handler, ok, parseBody } from "@/lib/portal/http";
import { saveModel } from "@/lib/portal/models";
import { saveModelSchema } from "@/lib/portal/schemas";
import { callerFor } from "@/lib/portal/tenancy";

export const GET = handler(async (req) => {
  const caller = await callerFor(req, { anyOf: ["models.read"] });
  const rows = await listSavedModels({ organizationId: caller.organizationId, userId: caller.userId });
  return ok({ models: rows.map((r) => ({ ...r, mine: r.createdBy === caller.userId })) });
});

export const POST = handler(async (req) => {
  const caller = await callerFor(req, { anyOf: ["models.read"] });
  const body = await parseBody(req, saveModelSchema);
  const saved = await saveModel(caller, body);
  return ok({ model: { id: saved.id, name: body.name, version: saved.version } }, saved.version === 1 ? 201 : 200);
});
