import "server-only";
import { and, desc, eq, or, sql } from "drizzle-orm";
import { recordAudit } from "./audit";
import { getDb } from "./client";
import { savedModels, savedModelVersions, users } from "./schema";

/** Models the person can open in the organisation: the shared ones and their own. */
const visible = (organizationId: number, userId: number) => and(eq(savedModels.organizationId, organizationId), or(eq(savedModels.shared, true), eq(savedModels.createdBy, userId)));

export async function listSavedModels({ organizationId, userId }: { organizationId: number; userId: number }) {
  return getDb()
    .select({
      id: savedModels.id,
      name: savedModels.name,
      description: savedModels.description,
      shared: savedModels.shared,
      latestVersion: savedModels.latestVersion,
      createdBy: savedModels.createdBy,
      createdByName: users.name,
      createdAt: savedModels.createdAt,
      updatedAt: savedModels.updatedAt,
    })
    .from(savedModels)
    .leftJoin(users, eq(users.id, savedModels.createdBy))
    .where(visible(organizationId, userId))
    .orderBy(desc(sql`coalesce(${savedModels.updatedAt}, ${savedModels.createdAt})`));
}

export async function getSavedModel({ organizationId, userId, modelId }: { organizationId: number; userId: number; modelId: number }) {
  const [row] = await getDb().select().from(savedModels).where(and(eq(savedModels.id, modelId), visible(organizationId, userId)));
  return row ?? null;
}

export async function getSavedModelByName({ organizationId, name }: { organizationId: number; name: string }) {
  const [row] = await getDb().select().from(savedModels).where(and(eq(savedModels.organizationId, organizationId), eq(savedModels.name, name)));
  return row ?? null;
}

/** Every version, newest first; a model saved before versions were kept reads as its version 1. */
export async function listSavedModelVersions({ modelId }: { modelId: number }) {
  const rows = await getDb()
    .select({ version: savedModelVersions.version, model: savedModelVersions.model, levels: savedModelVersions.levels, note: savedModelVersions.note, createdAt: savedModelVersions.createdAt, createdByName: users.name })
    .from(savedModelVersions)
    .leftJoin(users, eq(users.id, savedModelVersions.createdBy))
    .where(eq(savedModelVersions.savedModelId, modelId))
    .orderBy(desc(savedModelVersions.version));
  if (rows.length) return rows;
  const [m] = await getDb().select().from(savedModels).where(eq(savedModels.id, modelId));
  return m ? [{ version: 1, model: m.model, levels: null, note: null, createdAt: m.createdAt, createdByName: null }] : [];
}

/** Saves a model: a new named model (version 1), or the next version of an existing one. */
export async function saveModelVersion(input: {
  organizationId: number;
  userId: number;
  existing: { id: number; latestVersion: number } | null;
  name: string;
  description: string;
  shared: boolean;
  model: unknown;
  levels: string | null;
  note: string | null;
}): Promise<{ id: number; version: number }> {
  return getDb().transaction(async (tx) => {
    let id: number;
    let version: number;
    if (input.existing) {
      id = input.existing.id;
      // Lock the row so two saves at once take consecutive versions.
      const [cur] = await tx.select({ v: savedModels.latestVersion }).from(savedModels).where(eq(savedModels.id, id)).for("update");
      version = cur.v + 1;
      await tx.update(savedModels).set({ model: input.model, latestVersion: version, description: input.description, updatedAt: new Date() }).where(eq(savedModels.id, id));
    } else {
      const [r] = await tx.insert(savedModels).values({ organizationId: input.organizationId, name: input.name, description: input.description, model: input.model, shared: input.shared, createdBy: input.userId, latestVersion: 1 });
      id = r.insertId;
      version = 1;
    }
    await tx.insert(savedModelVersions).values({ savedModelId: id, version, model: input.model, levels: input.levels, note: input.note, createdBy: input.userId });
    await recordAudit({ organizationId: input.organizationId, actorType: "user", actorUserId: input.userId, action: "model.saved", targetType: "model", targetId: String(id), detail: { name: input.name, version } }, tx);
    return { id, version };
  });
}

export async function updateSavedModel(input: { organizationId: number; userId: number; modelId: number; shared?: boolean; description?: string }) {
  const set: Partial<typeof savedModels.$inferInsert> = { updatedAt: new Date() };
  if (input.shared !== undefined) set.shared = input.shared;
  if (input.description !== undefined) set.description = input.description;
  await getDb().update(savedModels).set(set).where(and(eq(savedModels.id, input.modelId), eq(savedModels.organizationId, input.organizationId)));
  if (input.shared !== undefined) {
    await recordAudit({ organizationId: input.organizationId, actorType: "user", actorUserId: input.userId, action: input.shared ? "model.shared" : "model.unshared", targetType: "model", targetId: String(input.modelId) });
  }
}

export async function deleteSavedModel(input: { organizationId: number; userId: number; modelId: number; name: string }) {
  await getDb().delete(savedModels).where(and(eq(savedModels.id, input.modelId), eq(savedModels.organizationId, input.organizationId)));
  await recordAudit({ organizationId: input.organizationId, actorType: "user", actorUserId: input.userId, action: "model.deleted", targetType: "model", targetId: String(input.modelId), detail: { name: input.name } });
}
