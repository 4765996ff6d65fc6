import "server-only";
import { and, desc, eq, inArray, isNull, lte, or, gt, sql } from "drizzle-orm";
import { generateKeyMaterial, hashKey, pepper } from "@/lib/api/key-format";
import { GRACE_PERIODS, type GracePeriod } from "@/lib/api/key-state";
import type { Scope } from "@/lib/api/scopes";
import { getDb } from "./client";
import { recordAudit } from "./audit";
import { apiKeys, organizations, users, type ApiKey } from "./schema";

export type Actor = { type: "user"; userId: number } | { type: "system" };

const actorFields = (a: Actor) => ({ actorType: a.type, actorUserId: a.type === "user" ? a.userId : null });

/** Creates a key; returns the stored row and the secret, which is never available again. */
export async function createKey(input: {
  organizationId: number;
  createdBy: number | null;
  label: string;
  scopes: Scope[];
  expiresAt?: Date | null;
  replacesKeyId?: number | null;
  allowedCidrs?: string[] | null;
  actor: Actor;
}): Promise<{ key: ApiKey; secret: string }> {
  const db = getDb();
  const { secret, prefix } = generateKeyMaterial();
  return db.transaction(async (tx) => {
    const [res] = await tx.insert(apiKeys).values({
      organizationId: input.organizationId,
      createdBy: input.createdBy,
      label: input.label,
      prefix,
      secretHash: hashKey(secret, pepper()),
      scopes: input.scopes,
      expiresAt: input.expiresAt ?? null,
      replacesKeyId: input.replacesKeyId ?? null,
      allowedCidrs: input.allowedCidrs?.length ? input.allowedCidrs : null,
    });
    const [key] = await tx.select().from(apiKeys).where(eq(apiKeys.id, res.insertId));
    await recordAudit(
      {
        organizationId: input.organizationId,
        ...actorFields(input.actor),
        action: input.replacesKeyId ? "key.rotated_in" : "key.created",
        targetType: "api_key",
        targetId: String(key.id),
        detail: { label: key.label, prefix, scopes: input.scopes, ...(input.allowedCidrs?.length ? { allowedCidrs: input.allowedCidrs } : {}) },
      },
      tx,
    );
    return { key, secret };
  });
}

/** The key row for a presented key's hash, with its organisation's plan. */
export async function getKeyByHash({ secretHash }: { secretHash: string }) {
  const rows = await getDb()
    .select({ key: apiKeys, plan: organizations.plan })
    .from(apiKeys)
    .innerJoin(organizations, eq(organizations.id, apiKeys.organizationId))
    .where(eq(apiKeys.secretHash, secretHash))
    .limit(1);
  return rows[0] ?? null;
}

export async function listKeysByOrg({ organizationId, createdBy }: { organizationId: number; createdBy?: number }) {
  return getDb()
    .select({ key: apiKeys, creatorName: users.name, creatorEmail: users.email })
    .from(apiKeys)
    .leftJoin(users, eq(users.id, apiKeys.createdBy))
    .where(and(eq(apiKeys.organizationId, organizationId), createdBy === undefined ? undefined : eq(apiKeys.createdBy, createdBy)))
    .orderBy(desc(apiKeys.createdAt), desc(apiKeys.id));
}

export async function getKeyInOrg({ organizationId, keyId }: { organizationId: number; keyId: number }) {
  const [row] = await getDb().select().from(apiKeys).where(and(eq(apiKeys.id, keyId), eq(apiKeys.organizationId, organizationId)));
  return row ?? null;
}

/** Revokes a key now. Returns false when the key is not in the organisation or already revoked. */
export async function revokeKey({ organizationId, keyId, actor }: { organizationId: number; keyId: number; actor: Actor }): Promise<boolean> {
  return getDb().transaction(async (tx) => {
    const now = new Date();
    const [res] = await tx
      .update(apiKeys)
      .set({ revokedAt: now, graceEndsAt: null })
      .where(
        and(eq(apiKeys.id, keyId), eq(apiKeys.organizationId, organizationId), or(isNull(apiKeys.revokedAt), gt(apiKeys.revokedAt, now))),
      );
    if (res.affectedRows === 0) return false;
    await recordAudit({ organizationId, ...actorFields(actor), action: "key.revoked", targetType: "api_key", targetId: String(keyId) }, tx);
    return true;
  });
}

/**
 * Rotates a key: issues a new key with the same label, scopes and expiry, and lets the old one keep working
 * until the grace period ends (it is then revoked). Returns null when the key cannot be rotated.
 */
export async function rotateKey(input: { organizationId: number; keyId: number; grace: GracePeriod; actor: Actor; createdBy: number | null }) {
  const old = await getKeyInOrg(input);
  const now = new Date();
  if (!old || (old.revokedAt && old.revokedAt <= now) || (old.expiresAt && old.expiresAt <= now)) return null;
  const end = new Date(now.getTime() + GRACE_PERIODS[input.grace]);
  const created = await createKey({
    organizationId: input.organizationId,
    createdBy: input.createdBy,
    label: old.label,
    scopes: old.scopes as Scope[],
    expiresAt: old.expiresAt,
    allowedCidrs: old.allowedCidrs,
    replacesKeyId: old.id,
    actor: input.actor,
  });
  await getDb().update(apiKeys).set({ revokedAt: end, graceEndsAt: end }).where(eq(apiKeys.id, old.id));
  await recordAudit({
    organizationId: input.organizationId,
    ...actorFields(input.actor),
    action: "key.rotated_out",
    targetType: "api_key",
    targetId: String(old.id),
    detail: { graceEndsAt: end.toISOString(), replacedBy: created.key.id },
  });
  return { ...created, graceEndsAt: end };
}

/**
 * Changes a key's label, scopes or address ranges (the secret stays). Records what changed, from what to what.
 * Returns the updated row, or null when the key is not in the organisation.
 */
export async function updateKey(input: {
  organizationId: number;
  keyId: number;
  changes: { label?: string; scopes?: Scope[]; allowedCidrs?: string[] };
  actor: Actor;
}): Promise<ApiKey | null> {
  return getDb().transaction(async (tx) => {
    const [old] = await tx.select().from(apiKeys).where(and(eq(apiKeys.id, input.keyId), eq(apiKeys.organizationId, input.organizationId))).for("update");
    if (!old) return null;
    const set: Partial<typeof apiKeys.$inferInsert> = {};
    const from: Record<string, unknown> = {};
    const to: Record<string, unknown> = {};
    const c = input.changes;
    if (c.label !== undefined && c.label !== old.label) (set.label = c.label), (from.label = old.label), (to.label = c.label);
    if (c.scopes !== undefined && JSON.stringify([...c.scopes].sort()) !== JSON.stringify([...old.scopes].sort())) (set.scopes = c.scopes), (from.scopes = old.scopes), (to.scopes = c.scopes);
    const oldCidrs = old.allowedCidrs ?? [];
    if (c.allowedCidrs !== undefined && JSON.stringify(c.allowedCidrs) !== JSON.stringify(oldCidrs)) {
      set.allowedCidrs = c.allowedCidrs.length ? c.allowedCidrs : null;
      from.allowedCidrs = oldCidrs;
      to.allowedCidrs = c.allowedCidrs;
    }
    if (Object.keys(set).length === 0) return old;
    await tx.update(apiKeys).set(set).where(eq(apiKeys.id, old.id));
    await recordAudit(
      { organizationId: input.organizationId, ...actorFields(input.actor), action: "key.updated", targetType: "api_key", targetId: String(old.id), detail: { prefix: old.prefix, from, to } },
      tx,
    );
    const [row] = await tx.select().from(apiKeys).where(eq(apiKeys.id, old.id));
    return row;
  });
}

/** Writes last-used times gathered in memory (one statement per flush, not per request). */
export async function touchKeys(lastUsed: Map<number, Date>): Promise<void> {
  if (lastUsed.size === 0) return;
  const ids = [...lastUsed.keys()];
  const cases = sql.join(
    ids.map((id) => sql`WHEN ${id} THEN ${lastUsed.get(id)!}`),
    sql` `,
  );
  await getDb()
    .update(apiKeys)
    .set({ lastUsedAt: sql`GREATEST(COALESCE(${apiKeys.lastUsedAt}, '1970-01-01'), CASE ${apiKeys.id} ${cases} END)` })
    .where(inArray(apiKeys.id, ids));
}

export async function getOrgBySlug({ slug }: { slug: string }) {
  const [row] = await getDb().select().from(organizations).where(eq(organizations.slug, slug));
  return row ?? null;
}

/**
 * Keys that expire after `now` and by `until`, still working and not yet warned about, with their organisation's
 * name and their creator's address; one organisation's, or every organisation's when none is named.
 */
export async function listKeysToWarnOfExpiry({ organizationId, now, until }: { organizationId?: number; now: Date; until: Date }) {
  return getDb()
    .select({ key: apiKeys, orgName: organizations.name, creatorEmail: users.email })
    .from(apiKeys)
    .innerJoin(organizations, eq(organizations.id, apiKeys.organizationId))
    .leftJoin(users, eq(users.id, apiKeys.createdBy))
    .where(
      and(
        organizationId ? eq(apiKeys.organizationId, organizationId) : undefined,
        isNull(apiKeys.expiryWarnedAt),
        gt(apiKeys.expiresAt, now),
        lte(apiKeys.expiresAt, until),
        or(isNull(apiKeys.revokedAt), gt(apiKeys.revokedAt, now)),
      ),
    );
}

/** Claims the expiry warning of a key (so two servers never both send it); false when it was claimed before. */
export async function claimExpiryWarning({ keyId, at }: { keyId: number; at: Date }): Promise<boolean> {
  const [res] = await getDb().update(apiKeys).set({ expiryWarnedAt: at }).where(and(eq(apiKeys.id, keyId), isNull(apiKeys.expiryWarnedAt)));
  return res.affectedRows > 0;
}
