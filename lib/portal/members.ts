import "server-only";
import { and, eq, gt, inArray, isNull, or, sql } from "drizzle-orm";
import type { Caller } from "@/lib/auth/session";
import { hashPassword, verifyPassword } from "@/lib/auth/passwords";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { recordAudit } from "@/lib/db/audit";
import { getDb } from "@/lib/db/client";
import { getInvitationByHash, getInvitationInOrg, getUserByEmail, listMembersOfOrg, listOpenInvitations } from "@/lib/db/portal";
import { apiKeys, invitations, memberships, users, type Role } from "@/lib/db/schema";
import { can } from "@/lib/auth/roles";
import { toKeyView, type KeyView } from "./keys";
import { invitationMail } from "@/lib/mail/templates";
import { sendMail } from "@/lib/mail/transport";
import { notFound, PortalError } from "./http";
import { baseUrl, hashLinkToken, newLinkToken } from "./tokens";

export const INVITATION_TTL_MS = 7 * 86_400_000;

const audit = (caller: Caller, action: string, targetType: string, targetId: number | string, detail?: Record<string, unknown>) =>
  recordAudit({ organizationId: caller.organizationId, actorType: "user", actorUserId: caller.userId, action, targetType, targetId: String(targetId), detail });

export async function listMembersAndInvitations(caller: Caller) {
  const [members, open] = await Promise.all([listMembersOfOrg({ organizationId: caller.organizationId }), listOpenInvitations({ organizationId: caller.organizationId })]);
  const now = new Date();
  return {
    members: members.map((m) => ({ ...m, joinedAt: m.joinedAt.toISOString(), you: m.userId === caller.userId })),
    invitations: open.map((i) => ({ ...i, expiresAt: i.expiresAt.toISOString(), sentAt: i.sentAt.toISOString(), expired: i.expiresAt <= now })),
  };
}

async function mailInvitation(caller: Caller, email: string, role: Role, token: string, expiresAt: Date) {
  await sendMail(
    email,
    invitationMail({ organization: caller.organizationName, inviter: caller.name, role: ROLE_LABELS[role].toLowerCase(), url: `${baseUrl()}/invite?token=${token}`, expiresAt }),
  );
}

export async function invite(caller: Caller, input: { email: string; role: Role }) {
  const members = await listMembersOfOrg({ organizationId: caller.organizationId });
  if (members.some((m) => m.email === input.email)) throw new PortalError(409, "This person is a member already.", { email: "Already a member of this organisation." });
  const open = await listOpenInvitations({ organizationId: caller.organizationId });
  if (open.some((i) => i.email === input.email && i.expiresAt > new Date())) {
    throw new PortalError(409, "An invitation to this address is open already.", { email: "Already invited: resend that invitation instead." });
  }
  const { token, hash } = newLinkToken();
  const now = new Date();
  const expiresAt = new Date(now.getTime() + INVITATION_TTL_MS);
  const [res] = await getDb()
    .insert(invitations)
    .values({ organizationId: caller.organizationId, email: input.email, role: input.role, tokenHash: hash, invitedBy: caller.userId, expiresAt, sentAt: now });
  await audit(caller, "invitation.created", "invitation", res.insertId, { email: input.email, role: input.role });
  await mailInvitation(caller, input.email, input.role, token, expiresAt);
  return { id: res.insertId };
}

/** Sends a fresh link (the old one stops working) and restarts the expiry. */
export async function resendInvitation(caller: Caller, invitationId: number) {
  const inv = await getInvitationInOrg({ organizationId: caller.organizationId, invitationId });
  if (!inv || inv.acceptedAt || inv.revokedAt) throw notFound("This invitation");
  const { token, hash } = newLinkToken();
  const now = new Date();
  const expiresAt = new Date(now.getTime() + INVITATION_TTL_MS);
  await getDb().update(invitations).set({ tokenHash: hash, expiresAt, sentAt: now }).where(eq(invitations.id, inv.id));
  await audit(caller, "invitation.resent", "invitation", inv.id, { email: inv.email });
  await mailInvitation(caller, inv.email, inv.role, token, expiresAt);
}

export async function revokeInvitation(caller: Caller, invitationId: number) {
  const [res] = await getDb()
    .update(invitations)
    .set({ revokedAt: new Date() })
    .where(and(eq(invitations.id, invitationId), eq(invitations.organizationId, caller.organizationId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
  if (res.affectedRows === 0) throw notFound("This invitation");
  await audit(caller, "invitation.revoked", "invitation", invitationId);
}

/** What happens to the API keys a removed member created: revoked (the default) or handed to another member. */
export type KeyDisposition = { keys: "revoke" } | { keys: "transfer"; transferTo: number };

/** Keys of the organisation created by the person that still work (active, or retiring in a grace period). */
function liveKeysOf(db: Pick<ReturnType<typeof getDb>, "select">, organizationId: number, userId: number, now: Date) {
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

/** What the removal dialog shows: the member, their working keys, and who could take the keys over. */
export async function removalPreview(caller: Caller, userId: number): Promise<{ member: { userId: number; name: string; email: string; role: Role }; activeKeys: KeyView[]; transferTo: { userId: number; name: string; role: Role }[] }> {
  const members = await listMembersOfOrg({ organizationId: caller.organizationId });
  const m = members.find((x) => x.userId === userId);
  if (!m) throw notFound("This member");
  const now = new Date();
  const keys = await liveKeysOf(getDb(), caller.organizationId, userId, now);
  return {
    member: { userId: m.userId, name: m.name, email: m.email, role: m.role },
    activeKeys: keys.map((k) => toKeyView(k, m.name, now)),
    transferTo: members.filter((x) => x.userId !== userId && can(x.role, "keys.own")).map((x) => ({ userId: x.userId, name: x.name, role: x.role })),
  };
}

/**
 * Changes a member's role or removes them, inside a transaction that locks the organisation's admin rows, so
 * two admins demoting each other at once cannot leave the organisation without one. A removal also settles
 * the keys the person created: revoked now, or handed to another member who may hold keys.
 */
async function changeMembership(caller: Caller, userId: number, next: Role | null, disposition: KeyDisposition = { keys: "revoke" }) {
  const db = getDb();
  let settled: { keys: "revoke" | "transfer"; keyIds: number[]; transferTo?: number } | null = null;
  await db.transaction(async (tx) => {
    const rows = await tx
      .select({ userId: memberships.userId, role: memberships.role })
      .from(memberships)
      .where(eq(memberships.organizationId, caller.organizationId))
      .for("update");
    const target = rows.find((r) => r.userId === userId);
    if (!target) throw notFound("This member");
    const admins = rows.filter((r) => r.role === "admin").length;
    if (target.role === "admin" && next !== "admin" && admins <= 1) {
      throw new PortalError(409, next ? "The last admin cannot be given another role: make someone else admin first." : "The last admin cannot be removed: make someone else admin first.");
    }
    const where = and(eq(memberships.organizationId, caller.organizationId), eq(memberships.userId, userId));
    if (next) {
      await tx.update(memberships).set({ role: next }).where(where);
    } else {
      const now = new Date();
      const keys = await liveKeysOf(tx, caller.organizationId, userId, now);
      const ids = keys.map((k) => k.id);
      if (disposition.keys === "transfer") {
        const heir = rows.find((r) => r.userId === disposition.transferTo);
        if (!heir || heir.userId === userId) throw new PortalError(422, "Choose another member of this organisation to take the keys.", { transferTo: "Choose another member." });
        if (!can(heir.role, "keys.own")) throw new PortalError(422, "Billing contacts cannot hold API keys: choose an admin or a developer.", { transferTo: "Choose an admin or a developer." });
        if (ids.length) await tx.update(apiKeys).set({ createdBy: heir.userId }).where(inArray(apiKeys.id, ids));
        settled = { keys: "transfer", keyIds: ids, transferTo: heir.userId };
      } else {
        if (ids.length) await tx.update(apiKeys).set({ revokedAt: now, graceEndsAt: null }).where(inArray(apiKeys.id, ids));
        settled = { keys: "revoke", keyIds: ids };
      }
      for (const k of keys) {
        await recordAudit(
          {
            organizationId: caller.organizationId,
            actorType: "user",
            actorUserId: caller.userId,
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
        organizationId: caller.organizationId,
        actorType: "user",
        actorUserId: caller.userId,
        action: next ? "member.role_changed" : "member.removed",
        targetType: "user",
        targetId: String(userId),
        detail: next ? { from: target.role, to: next } : { role: target.role, ...settled! },
      },
      tx,
    );
  });
  return settled as { keys: "revoke" | "transfer"; keyIds: number[]; transferTo?: number } | null;
}

export const changeRole = (caller: Caller, userId: number, role: Role) => changeMembership(caller, userId, role);
export const removeMember = (caller: Caller, userId: number, disposition: KeyDisposition = { keys: "revoke" }) => changeMembership(caller, userId, null, disposition);

/** What the invitation page shows before the person accepts. */
export async function describeInvitation(token: string) {
  const row = await getInvitationByHash({ tokenHash: hashLinkToken(token) });
  if (!row || row.invitation.acceptedAt || row.invitation.revokedAt || row.invitation.expiresAt <= new Date()) {
    throw new PortalError(410, "This invitation is used, withdrawn or expired. Ask the admin who invited you to send a new one.");
  }
  const existing = await getUserByEmail({ email: row.invitation.email });
  return { organization: row.organizationName, email: row.invitation.email, role: row.invitation.role, hasAccount: !!existing };
}

/**
 * Accepts an invitation once: an existing account proves itself with its password; a new account is created
 * with the invited address (the link proves the address, so it counts as verified).
 */
export async function acceptInvitation(input: { token: string; name?: string; password: string }) {
  const row = await getInvitationByHash({ tokenHash: hashLinkToken(input.token) });
  const inv = row?.invitation;
  if (!inv || inv.acceptedAt || inv.revokedAt || inv.expiresAt <= new Date()) {
    throw new PortalError(410, "This invitation is used, withdrawn or expired. Ask the admin who invited you to send a new one.");
  }
  let user = await getUserByEmail({ email: inv.email });
  const db = getDb();
  if (user) {
    if (!(await verifyPassword(input.password, user.passwordHash))) throw new PortalError(422, "That password does not match this account.", { password: "That password does not match the account of this address." });
  } else {
    if (!input.name?.trim()) throw new PortalError(422, "Some fields need attention.", { name: "Enter your name." });
    if (input.password.length < 10) throw new PortalError(422, "Some fields need attention.", { password: "Use at least 10 characters." });
    await db.insert(users).values({ email: inv.email, name: input.name.trim(), passwordHash: await hashPassword(input.password), emailVerifiedAt: new Date() });
    user = (await getUserByEmail({ email: inv.email }))!;
  }
  const userId = user.id;
  await db.transaction(async (tx) => {
    const [res] = await tx
      .update(invitations)
      .set({ acceptedAt: new Date() })
      .where(and(eq(invitations.id, inv.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    if (res.affectedRows === 0) throw new PortalError(410, "This invitation has just been used.");
    await tx
      .insert(memberships)
      .values({ userId, organizationId: inv.organizationId, role: inv.role })
      .onDuplicateKeyUpdate({ set: { role: sql`role` } });
    await tx.update(users).set({ emailVerifiedAt: new Date() }).where(and(eq(users.id, userId), isNull(users.emailVerifiedAt)));
    await recordAudit(
      { organizationId: inv.organizationId, actorType: "user", actorUserId: userId, action: "invitation.accepted", targetType: "invitation", targetId: String(inv.id), detail: { role: inv.role } },
      tx,
    );
  });
  return { email: inv.email, organizationId: inv.organizationId };
}
