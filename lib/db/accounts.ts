import "server-only";
import { and, eq, isNull } from "drizzle-orm";
import { recordAudit } from "./audit";
import { getDb } from "./client";
import { emailTokens, memberships, organizations, users } from "./schema";

// Queries of sign-up, e-mail links and organisations a person creates.

/** Stores a new single-use e-mail link; any earlier live link of the same purpose stops working. */
export async function replaceEmailToken({ userId, purpose, tokenHash, expiresAt }: { userId: number; purpose: "verify" | "reset"; tokenHash: string; expiresAt: Date }) {
  const db = getDb();
  await db.update(emailTokens).set({ usedAt: new Date() }).where(and(eq(emailTokens.userId, userId), eq(emailTokens.purpose, purpose), isNull(emailTokens.usedAt)));
  await db.insert(emailTokens).values({ userId, purpose, tokenHash, expiresAt });
}

/** Marks a live e-mail link used; false when it was used already (by a concurrent request). */
export async function spendEmailToken({ tokenId }: { tokenId: number }): Promise<boolean> {
  const [res] = await getDb().update(emailTokens).set({ usedAt: new Date() }).where(and(eq(emailTokens.id, tokenId), isNull(emailTokens.usedAt)));
  return res.affectedRows > 0;
}

/** Records that the person proved their address (kept at the first time). */
export async function markEmailVerified({ userId, at = new Date() }: { userId: number; at?: Date }) {
  await getDb().update(users).set({ emailVerifiedAt: at }).where(and(eq(users.id, userId), isNull(users.emailVerifiedAt)));
}

export async function setPasswordHash({ userId, passwordHash }: { userId: number; passwordHash: string }) {
  await getDb().update(users).set({ passwordHash }).where(eq(users.id, userId));
}

/** Creates a person whose address is proved (an accepted invitation link); returns the user id. */
export async function createVerifiedUser({ email, name, passwordHash }: { email: string; name: string; passwordHash: string }): Promise<number> {
  const [res] = await getDb().insert(users).values({ email, name, passwordHash, emailVerifiedAt: new Date() });
  return res.insertId;
}

/** Creates an organisation with the person as its admin, audited, in one transaction. */
export async function createOrganizationWithAdmin(
  { userId, name, slug, plan }: { userId: number; name: string; slug: string; plan: string },
  db: Pick<ReturnType<typeof getDb>, "insert"> = getDb(),
): Promise<number> {
  const [o] = await db.insert(organizations).values({ slug, name, plan });
  await db.insert(memberships).values({ userId, organizationId: o.insertId, role: "admin" });
  await recordAudit(
    { organizationId: o.insertId, actorType: "user", actorUserId: userId, action: "organization.created", targetType: "organization", targetId: String(o.insertId), detail: { name } },
    db,
  );
  return o.insertId;
}

/** A sign-up: the person and their organisation (they are its admin), in one transaction. */
export async function createUserWithOrganization(input: { email: string; name: string; passwordHash: string; organization: string; slug: string; plan: string }) {
  return getDb().transaction(async (tx) => {
    const [u] = await tx.insert(users).values({ email: input.email, name: input.name, passwordHash: input.passwordHash });
    const organizationId = await createOrganizationWithAdmin({ userId: u.insertId, name: input.organization, slug: input.slug, plan: input.plan }, tx);
    return { userId: u.insertId, organizationId };
  });
}

/** A signed-in person's further organisation (they are its admin). */
export async function createOrganizationForUser(input: { userId: number; name: string; slug: string; plan: string }): Promise<number> {
  return getDb().transaction((tx) => createOrganizationWithAdmin(input, tx));
}
