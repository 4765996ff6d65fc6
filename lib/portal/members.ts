import "server-only";
import type { Caller } from "@/lib/auth/session";
import { hashPassword, verifyPassword } from "@/lib/auth/passwords";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { createVerifiedUser } from "@/lib/db/accounts";
import { recordAudit } from "@/lib/db/audit";
import { acceptInvitationFor, changeMembership as changeMembershipRow, createInvitation, listLiveKeysOfMember, renewInvitation, revokeInvitation as revokeInvitationRow, type KeyDisposition } from "@/lib/db/members";
import { getInvitationByHash, getInvitationInOrg, getUserByEmail, listMembersOfOrg, listOpenInvitations } from "@/lib/db/portal";
import type { Role } from "@/lib/db/schema";
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
  const id = await createInvitation({ organizationId: caller.organizationId, email: input.email, role: input.role, tokenHash: hash, invitedBy: caller.userId, expiresAt, sentAt: now });
  await audit(caller, "invitation.created", "invitation", id, { email: input.email, role: input.role });
  await mailInvitation(caller, input.email, input.role, token, expiresAt);
  return { id };
}

/** Sends a fresh link (the old one stops working) and restarts the expiry. */
export async function resendInvitation(caller: Caller, invitationId: number) {
  const inv = await getInvitationInOrg({ organizationId: caller.organizationId, invitationId });
  if (!inv || inv.acceptedAt || inv.revokedAt) throw notFound("This invitation");
  const { token, hash } = newLinkToken();
  const now = new Date();
  const expiresAt = new Date(now.getTime() + INVITATION_TTL_MS);
  await renewInvitation({ invitationId: inv.id, tokenHash: hash, expiresAt, sentAt: now });
  await audit(caller, "invitation.resent", "invitation", inv.id, { email: inv.email });
  await mailInvitation(caller, inv.email, inv.role, token, expiresAt);
}

export async function revokeInvitation(caller: Caller, invitationId: number) {
  if (!(await revokeInvitationRow({ organizationId: caller.organizationId, invitationId }))) throw notFound("This invitation");
  await audit(caller, "invitation.revoked", "invitation", invitationId);
}

/** What happens to the API keys a removed member created: revoked (the default) or handed to another member. */
export type { KeyDisposition };

/** What the removal dialog shows: the member, their working keys, and who could take the keys over. */
export async function removalPreview(caller: Caller, userId: number): Promise<{ member: { userId: number; name: string; email: string; role: Role }; activeKeys: KeyView[]; transferTo: { userId: number; name: string; role: Role }[] }> {
  const members = await listMembersOfOrg({ organizationId: caller.organizationId });
  const m = members.find((x) => x.userId === userId);
  if (!m) throw notFound("This member");
  const now = new Date();
  const keys = await listLiveKeysOfMember({ organizationId: caller.organizationId, userId, now });
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
  return changeMembershipRow({
    organizationId: caller.organizationId,
    actorUserId: caller.userId,
    userId,
    role: next,
    disposition,
    check: (rows, target) => {
      if (!target) throw notFound("This member");
      const admins = rows.filter((r) => r.role === "admin").length;
      if (target.role === "admin" && next !== "admin" && admins <= 1) {
        throw new PortalError(409, next ? "The last admin cannot be given another role: make someone else admin first." : "The last admin cannot be removed: make someone else admin first.");
      }
      if (!next && disposition.keys === "transfer") {
        const heir = rows.find((r) => r.userId === disposition.transferTo);
        if (!heir || heir.userId === userId) throw new PortalError(422, "Choose another member of this organisation to take the keys.", { transferTo: "Choose another member." });
        if (!can(heir.role, "keys.own")) throw new PortalError(422, "Billing contacts cannot hold API keys: choose an admin or a developer.", { transferTo: "Choose an admin or a developer." });
      }
    },
  });
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
  if (user) {
    if (!(await verifyPassword(input.password, user.passwordHash))) throw new PortalError(422, "That password does not match this account.", { password: "That password does not match the account of this address." });
  } else {
    if (!input.name?.trim()) throw new PortalError(422, "Some fields need attention.", { name: "Enter your name." });
    if (input.password.length < 10) throw new PortalError(422, "Some fields need attention.", { password: "Use at least 10 characters." });
    await createVerifiedUser({ email: inv.email, name: input.name.trim(), passwordHash: await hashPassword(input.password) });
    user = (await getUserByEmail({ email: inv.email }))!;
  }
  const userId = user.id;
  if (!(await acceptInvitationFor({ invitationId: inv.id, organizationId: inv.organizationId, userId, role: inv.role }))) {
    throw new PortalError(410, "This invitation has just been used.");
  }
  return { email: inv.email, organizationId: inv.organizationId };
}
