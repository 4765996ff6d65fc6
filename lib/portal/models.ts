import "server-only";
import { ApiError } from "@/lib/api/errors";
import { checkModel } from "@/lib/api/model-field";
import { hasDatasetRef, resolveDatasets } from "@/lib/datasets/resolve";
import { deleteSavedModel, getSavedModel, getSavedModelByName, listSavedModelVersions, saveModelVersion, updateSavedModel } from "@/lib/db/models";
import { forbidden, notFound, PortalError } from "./http";
import type { Caller } from "./tenancy";

/**
 * The one check a model gets before it is run or saved, as the public API does it: dataset references
 * resolved in the caller's organisation (404 when missing), then the core's validator. Problems come back
 * as a portal error with the API's detail and each field by JSON pointer.
 */
export async function assertRunnable(model: unknown, organizationId: number): Promise<void> {
  try {
    checkModel(hasDatasetRef(model) ? await resolveDatasets(model, organizationId, "/model", "this organisation") : model);
  } catch (e) {
    if (e instanceof ApiError) throw new PortalError(e.status, e.detail, Object.fromEntries((e.errors ?? []).map((x) => [x.pointer, x.detail])));
    throw e;
  }
}

/** Only the creator and admins change a model's sharing or delete it; any member who can open it adds versions. */
const mayManage = (caller: Caller, createdBy: number | null) => caller.role === "admin" || createdBy === caller.userId;

export async function saveModel(caller: Caller, input: { name: string; description: string; shared: boolean; model: unknown; levels?: string; note?: string }) {
  await assertRunnable(input.model, caller.organizationId);
  const existing = await getSavedModelByName({ organizationId: caller.organizationId, name: input.name });
  // Another person's private model with this name reads as a name already taken, never as its content.
  if (existing && !existing.shared && existing.createdBy !== caller.userId) {
    throw new PortalError(409, "That name is taken in this organisation.", { name: "Choose another name." });
  }
  return saveModelVersion({
    organizationId: caller.organizationId,
    userId: caller.userId,
    existing: existing ? { id: existing.id, latestVersion: existing.latestVersion } : null,
    name: input.name,
    description: input.description || existing?.description || "",
    shared: input.shared,
    model: input.model,
    levels: input.levels ?? null,
    note: input.note ?? null,
  });
}

export async function openModel(caller: Caller, modelId: number, version?: number) {
  const m = await getSavedModel({ organizationId: caller.organizationId, userId: caller.userId, modelId });
  if (!m) throw notFound("This model");
  const versions = await listSavedModelVersions({ modelId });
  const v = version === undefined ? versions[0] : versions.find((x) => x.version === version);
  if (!v) throw notFound(`Version ${version} of this model`);
  return {
    model: { id: m.id, name: m.name, description: m.description, shared: m.shared, latestVersion: m.latestVersion, mine: m.createdBy === caller.userId, canManage: mayManage(caller, m.createdBy) },
    version: v,
    versions: versions.map(({ version, note, createdAt, createdByName }) => ({ version, note, createdAt, createdByName })),
  };
}

export async function changeModel(caller: Caller, modelId: number, input: { shared?: boolean; description?: string }) {
  const m = await getSavedModel({ organizationId: caller.organizationId, userId: caller.userId, modelId });
  if (!m) throw notFound("This model");
  if (!mayManage(caller, m.createdBy)) throw forbidden("Only the person who saved this model, or an admin, can change its sharing or description.");
  await updateSavedModel({ organizationId: caller.organizationId, userId: caller.userId, modelId, ...input });
}

export async function removeModel(caller: Caller, modelId: number) {
  const m = await getSavedModel({ organizationId: caller.organizationId, userId: caller.userId, modelId });
  if (!m) throw notFound("This model");
  if (!mayManage(caller, m.createdBy)) throw forbidden("Only the person who saved this model, or an admin, can delete it.");
  await deleteSavedModel({ organizationId: caller.organizationId, userId: caller.userId, modelId, name: m.name });
}
