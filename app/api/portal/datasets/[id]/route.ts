// GET /api/portal/datasets/{id}: a dataset with its versions; PATCH: rename or describe; DELETE: remove (admins or the owner)
import { requireCaller } from "@/lib/auth/session";
import { canChange } from "@/lib/datasets/portal";
import { datasetJson, versionJson } from "@/lib/datasets/present";
import { datasetEditSchema } from "@/lib/datasets/schemas";
import { deleteDatasetInOrg, getDatasetInOrg, updateDatasetInOrg } from "@/lib/db/datasets";
import { PortalError, handler, notFound, ok, parseBody } from "@/lib/portal/http";

export const dynamic = "force-dynamic";

async function load(req: Request, id: string) {
  const caller = await requireCaller(req);
  const found = await getDatasetInOrg({ organizationId: caller.organizationId, publicId: id });
  if (!found) throw notFound("This dataset");
  return { caller, found };
}

export const GET = handler(async (req, params) => {
  const { caller, found } = await load(req, params.id);
  return ok({
    dataset: { ...datasetJson(found.dataset), ownedByYou: found.dataset.ownerId === caller.userId, canChange: canChange(caller, found.dataset.ownerId) },
    versions: found.versions.map(versionJson),
  });
});

export const PATCH = handler(async (req, params) => {
  const { caller, found } = await load(req, params.id);
  if (!canChange(caller, found.dataset.ownerId)) throw new PortalError(403, "Only an admin or the dataset's owner can rename or describe it.");
  const input = await parseBody(req, datasetEditSchema);
  await updateDatasetInOrg({ organizationId: caller.organizationId, publicId: params.id, userId: caller.userId, ...input });
  const again = await getDatasetInOrg({ organizationId: caller.organizationId, publicId: params.id });
  if (!again) throw notFound("This dataset");
  return ok({ dataset: datasetJson(again.dataset) });
});

export const DELETE = handler(async (req, params) => {
  const { caller, found } = await load(req, params.id);
  if (!canChange(caller, found.dataset.ownerId)) throw new PortalError(403, "Only an admin or the dataset's owner can delete it.");
  await deleteDatasetInOrg({ organizationId: caller.organizationId, publicId: params.id, userId: caller.userId });
  return ok({ deleted: params.id });
});
