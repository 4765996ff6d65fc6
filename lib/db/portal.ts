import "server-only";
import { and, asc, eq, gt, isNull } from "drizzle-orm";
import { getDb } from "./client";
import { emailTokens, invitations, memberships, organizations, users, type Role } from "./schema";

// Queries of the portal: people, memberships, single-use e-mail tokens and invitations.

export async function getUserByEmail({ email }: { email: string }) {
  const [row] = await getDb().select().from(users).where(eq(users.email, email.trim().toLowerCase()));
  return row ?? null;
}

export async function getUserById({ userId }: { userId: number }) {
  const [row] = await getDb().select().from(users).where(eq(users.id, userId));
  return row ?? null;
}

/** Every organisation the user belongs to, with the role, oldest membership first. */
export async function listMembershipsOfUser({ userId }: { userId: number }) {
  return getDb()
    .select({ organizationId: organizations.id, slug: organizations.slug, name: organizations.name, plan: organizations.plan, role: memberships.role })
    .from(memberships)
    .innerJoin(organizations, eq(organizations.id, memberships.organizationId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(memberships.createdAt), asc(organizations.id));
}

export async function getMembership({ userId, organizationId }: { userId: number; organizationId: number }) {
  const [row] = await getDb()
    .select({ role: memberships.role, organizationId: organizations.id, name: organizations.name, slug: organizations.slug, plan: organizations.plan })
    .from(memberships)
    .innerJoin(organizations, eq(organizations.id, memberships.organizationId))
    .where(and(eq(memberships.userId, userId), eq(memberships.organizationId, organizationId)));
  return row ?? null;
}

export async function listMembersOfOrg({ organizationId }: { organizationId: number }) {
  return getDb()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.organizationId, organizationId))
    .orderBy(asc(users.name));
}

/** E-mail addresses of the organisation's members holding one of the roles. */
export async function listEmailsByRole({ organizationId, roles }: { organizationId: number; roles: Role[] }) {
  const rows = await listMembersOfOrg({ organizationId });
  return rows.filter((r) => roles.includes(r.role)).map((r) => r.email);
}

export async function getOrgById({ organizationId }: { organizationId: number }) {
  const [row] = await getDb().select().from(organizations).where(eq(organizations.id, organizationId));
  return row ?? null;
}

/** A live (unused, unexpired) e-mail token by its hash. */
export async function getLiveEmailToken({ tokenHash, purpose }: { tokenHash: string; purpose: "verify" | "reset" }) {
  const [row] = await getDb()
    .select()
    .from(emailTokens)
    .where(and(eq(emailTokens.tokenHash, tokenHash), eq(emailTokens.purpose, purpose), isNull(emailTokens.usedAt), gt(emailTokens.expiresAt, new Date())));
  return row ?? null;
}

export async function getInvitationByHash({ tokenHash }: { tokenHash: string }) {
  const [row] = await getDb()
    .select({ invitation: invitations, organizationName: organizations.name })
    .from(invitations)
    .innerJoin(organizations, eq(organizations.id, invitations.organizationId))
    .where(eq(invitations.tokenHash, tokenHash));
  return row ?? null;
}

export async function getInvitationInOrg({ organizationId, invitationId }: { organizationId: number; invitationId: number }) {
  const [row] = await getDb()
    .select()
    .from(invitations)
    .where(and(eq(invitations.id, invitationId), eq(invitations.organizationId, organizationId)));
  return row ?? null;
}

export async function listOpenInvitations({ organizationId }: { organizationId: number }) {
  return getDb()
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, sentAt: invitations.sentAt, invitedByName: users.name })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(and(eq(invitations.organizationId, organizationId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
    .orderBy(asc(invitations.createdAt));
}
