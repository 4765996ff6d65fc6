import "server-only";
import { and, eq, gt, inArray, isNull, or, sql } from "drizzle-orm";
import { recordAudit } from "./audit";
import { getDb, type Db } from "./client";
import { apiKeys, invitations, memberships, users, type Role } from "./schema";

// Queries of membership changes and invitations.

export async function createInvitation(input: { organizationId: number; email: string; role: Role; tokenHash: string; invitedBy: number; expiresAt: Date; sentAt: Date }): Promise<number> {
  const [res] = await getDb().insert(invitations).values(input);
  return res.insertId;
}

/** A fresh link for an invitation (the old one stops working) with a new expiry. */
export async function renewInvitation({ invitationId, tokenHash, expiresAt, sentAt }: { invitationId: number; tokenHash: string; expiresAt: Date; sentAt: Date }) {
  await getDb().update(invitations).set({ tokenHash, expiresAt, sentAt }).where(eq(invitations.id, invitationId));
}

/** Withdraws an open invitation of the organisation; false when there is none. */
export async function revokeInvitation({ organizationId, invitationId }: { organizationId: number; invitationId: number }): Promise<boolean> {
  const [res] = await getDb()
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(and(eq(invitations.id, invitationId), eq(invitations.organizationId, organizationId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
  return res.affectedRows > 0;
}

/** Keys of the organisation created by the person that still work (active, or retiring in a grace period). */
export function listLiveKeysOfMember({ organizationId, userId, now }: { organizationId: number; userId: number; now: Date }, db: Pick<Db, "select"> = getDb()) {
  return db
    .select()
    .from(apiKeys)
    .where(
      and(
        eq(apiKeys.organizationId, organizationId),
        eq(apiKeys.createdBy, userId),
        or(isNull(apiKeys.revokedAt), gt(apiKeys.revokedAt, now)),
        or(isNull(apiKeys.expiresAt), gt(apiKeys.expiresAt, now)),
      ),
    );
}

export type KeyDisposition = { keys: "revoke" } | { keys: "transfer"; transferTo: number };
export type Settlement = { keys: "revoke" | "transfer"; keyIds: number[]; transferTo?: number };
type MemberRow = { userId: number; role: Role };

/**
 * Changes a member's role (`role`) or removes them (`role: null`), inside a transaction that locks the
 * organisation's membership rows. `check` sees those rows and the target (undefined when not a member) under the
 * lock and throws to refuse the change, so rules that span members (the last admin) hold under concurrency. A
 * removal settles the keys the person created: revoked now, or handed to `disposition.transferTo`. Audited.
 */
export async function changeMembership(input: {
  organizationId: number;
  actorUserId: number;
  userId: number;
  role: Role | null;
  disposition: KeyDisposition;
  check: (rows: MemberRow[], target: MemberRow | undefined) => void;
}): Promise<Settlement | null> {
  const { organizationId, actorUserId, userId, role: next, disposition } = input;
  let settled: Settlement | null = null;
  await getDb().transaction(async (tx) => {
    const rows = await tx.select({ userId: memberships.userId, role: memberships.role }).from(memberships).where(eq(memberships.organizationId, organizationId)).for("update");
    const target = rows.find((r) => r.userId === userId);
    input.check(rows, target);
    if (!target) throw new Error("changeMembership: check accepted a person who is not a member");
    const where = and(eq(memberships.organizationId, organizationId), eq(memberships.userId, userId));
    if (next) {
      await tx.update(memberships).set({ role: next }).where(where);
    } else {
      const now = new Date();
      const keys = await listLiveKeysOfMember({ organizationId, userId, now }, tx);
      const ids = keys.map((k) => k.id);
      if (disposition.keys === "transfer") {
        if (ids.length) await tx.update(apiKeys).set({ createdBy: disposition.transferTo }).where(inArray(apiKeys.id, ids));
        settled = { keys: "transfer", keyIds: ids, transferTo: disposition.transferTo };
      } else {
        if (ids.length) await tx.update(apiKeys).set({ revokedAt: now, graceEndsAt: null }).where(inArray(apiKeys.id, ids));
        settled = { keys: "revoke", keyIds: ids };
      }
      for (const k of keys) {
        await recordAudit(
          {
            organizationId,
            actorType: "user",
            actorUserId,
            action: disposition.keys === "transfer" ? "key.transferred" : "key.revoked",
            targetType: "api_key",
            targetId: String(k.id),
            detail: { prefix: k.prefix, label: k.label, reason: "member removed", from: userId, ...(disposition.keys === "transfer" ? { to: disposition.transferTo } : {}) },
          },
          tx,
        );
      }
      await tx.delete(memberships).where(where);
    }
    await recordAudit(
      {
        organizationId,
        actorType: "user",
        actorUserId,
        action: next ? "member.role_changed" : "member.removed",
        targetType: "user",
        targetId: String(userId),
        detail: next ? { from: target.role, to: next } : { role: target.role, ...settled! },
      },
      tx,
    );
  });
  return settled;
}

/**
 * Accepts an invitation once: marks it accepted, makes the person a member with its role (keeping a role they
 * hold already), and counts their address as proved. False when the invitation was used or withdrawn meanwhile.
 */
export async function acceptInvitationFor({ invitationId, organizationId, userId, role }: { invitationId: number; organizationId: number; userId: number; role: Role }): Promise<boolean> {
  return getDb().transaction(async (tx) => {
    const [res] = await tx
      .update(invitations)
      .set({ acceptedAt: new Date() })
      .where(and(eq(invitations.id, invitationId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    if (res.affectedRows === 0) return false;
    await tx.insert(memberships).values({ userId, organizationId, role }).onDuplicateKeyUpdate({ set: { role: sql`role` } });
    await tx.update(users).set({ emailVerifiedAt: new Date() }).where(and(eq(users.id, userId), isNull(users.emailVerifiedAt)));
    await recordAudit({ organizationId, actorType: "user", actorUserId: userId, action: "invitation.accepted", targetType: "invitation", targetId: String(invitationId), detail: { role } }, tx);
    return true;
  });
}
