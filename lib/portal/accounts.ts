import "server-only";
import { randomBytes } from "node:crypto";
import { and, eq, isNull } from "drizzle-orm";
import { FREE_PLAN } from "@/lib/api/plans";
import { hashPassword } from "@/lib/auth/passwords";
import { endAllSessions } from "@/lib/auth/sessions";
import { recordAudit } from "@/lib/db/audit";
import { getDb } from "@/lib/db/client";
import { getLiveEmailToken, getUserByEmail } from "@/lib/db/portal";
import { emailTokens, memberships, organizations, users, type User } from "@/lib/db/schema";
import { sendMail } from "@/lib/mail/transport";
import { resetPasswordMail, verifyEmailMail } from "@/lib/mail/templates";
import { PortalError } from "./http";
import { baseUrl, hashLinkToken, newLinkToken } from "./tokens";

const VERIFY_TTL_MS = 24 * 3600_000;
const RESET_TTL_MS = 3600_000;

export const slugify = (name: string) =>
  name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 48) || "org";

async function issueEmailToken(userId: number, purpose: "verify" | "reset", ttl: number): Promise<string> {
  const { token, hash } = newLinkToken();
  const db = getDb();
  // A new link replaces any earlier live link of the same purpose.
  await db.update(emailTokens).set({ usedAt: new Date() }).where(and(eq(emailTokens.userId, userId), eq(emailTokens.purpose, purpose), isNull(emailTokens.usedAt)));
  await db.insert(emailTokens).values({ userId, purpose, tokenHash: hash, expiresAt: new Date(Date.now() + ttl) });
  return token;
}

export async function sendVerification(user: Pick<User, "id" | "name" | "email">): Promise<void> {
  const token = await issueEmailToken(user.id, "verify", VERIFY_TTL_MS);
  await sendMail(user.email, verifyEmailMail({ name: user.name, url: `${baseUrl()}/verify?token=${token}` }));
}

/** Creates a person, their organisation (they are its admin) and sends the verification link. */
export async function signUp(input: { name: string; email: string; password: string; organization: string }): Promise<{ userId: number; organizationId: number }> {
  if (await getUserByEmail({ email: input.email })) {
    throw new PortalError(409, "An account with this e-mail exists already.", { email: "This address already has an account: sign in, or reset the password." });
  }
  const passwordHash = await hashPassword(input.password);
  const db = getDb();
  const ids = await db.transaction(async (tx) => {
    const [u] = await tx.insert(users).values({ email: input.email, name: input.name, passwordHash });
    const slug = `${slugify(input.organization)}-${randomBytes(3).toString("hex")}`;
    const [o] = await tx.insert(organizations).values({ slug, name: input.organization, plan: FREE_PLAN });
    await tx.insert(memberships).values({ userId: u.insertId, organizationId: o.insertId, role: "admin" });
    await recordAudit(
      { organizationId: o.insertId, actorType: "user", actorUserId: u.insertId, action: "organization.created", targetType: "organization", targetId: String(o.insertId), detail: { name: input.organization } },
      tx,
    );
    return { userId: u.insertId, organizationId: o.insertId };
  });
  await sendVerification({ id: ids.userId, name: input.name, email: input.email });
  return ids;
}

/** Marks the address behind a live verification link as verified; the link is spent. */
export async function verifyEmail(token: string): Promise<{ email: string; userId: number; name: string }> {
  const row = await getLiveEmailToken({ tokenHash: hashLinkToken(token), purpose: "verify" });
  if (!row) throw new PortalError(410, "This confirmation link is used or expired. Sign in to ask for a new one.");
  const db = getDb();
  const [res] = await db.update(emailTokens).set({ usedAt: new Date() }).where(and(eq(emailTokens.id, row.id), isNull(emailTokens.usedAt)));
  if (res.affectedRows === 0) throw new PortalError(410, "This confirmation link is used or expired.");
  await db.update(users).set({ emailVerifiedAt: new Date() }).where(and(eq(users.id, row.userId), isNull(users.emailVerifiedAt)));
  const [u] = await db.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, row.userId));
  await recordAudit({ actorType: "user", actorUserId: row.userId, action: "user.email_verified", targetType: "user", targetId: String(row.userId) });
  return { email: u.email, userId: row.userId, name: u.name };
}

/** Sends a new verification link to an unverified address; silent for unknown or verified addresses. */
export async function resendVerification(email: string): Promise<void> {
  const user = await getUserByEmail({ email });
  if (user && !user.emailVerifiedAt) await sendVerification(user);
}

/** Sends a reset link when the address has an account; the answer never says whether it does. */
export async function requestPasswordReset(email: string): Promise<void> {
  const user = await getUserByEmail({ email });
  if (!user) return;
  const token = await issueEmailToken(user.id, "reset", RESET_TTL_MS);
  await sendMail(user.email, resetPasswordMail({ name: user.name, url: `${baseUrl()}/reset?token=${token}` }));
}

/** Sets a new password through a live reset link (which also proves the address) and ends every session of the person. */
export async function resetPassword(token: string, password: string): Promise<{ email: string }> {
  const row = await getLiveEmailToken({ tokenHash: hashLinkToken(token), purpose: "reset" });
  if (!row) throw new PortalError(410, "This reset link is used or expired. Ask for a new one.");
  const db = getDb();
  const [res] = await db.update(emailTokens).set({ usedAt: new Date() }).where(and(eq(emailTokens.id, row.id), isNull(emailTokens.usedAt)));
  if (res.affectedRows === 0) throw new PortalError(410, "This reset link is used or expired.");
  const passwordHash = await hashPassword(password);
  const now = new Date();
  await db.update(users).set({ passwordHash }).where(eq(users.id, row.userId));
  await db.update(users).set({ emailVerifiedAt: now }).where(and(eq(users.id, row.userId), isNull(users.emailVerifiedAt)));
  // Whoever held a session (perhaps the reason for the reset) is signed out everywhere.
  await endAllSessions(row.userId);
  const [u] = await db.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, row.userId));
  await recordAudit({ actorType: "user", actorUserId: row.userId, action: "user.password_reset", targetType: "user", targetId: String(row.userId) });
  return { email: u.email };
}

/** A signed-in person creates a further organisation (or their first, after leaving every other): they are its admin. */
export async function createOrganization(input: { userId: number; name: string }): Promise<{ organizationId: number; slug: string }> {
  return getDb().transaction(async (tx) => {
    const slug = `${slugify(input.name)}-${randomBytes(3).toString("hex")}`;
    const [o] = await tx.insert(organizations).values({ slug, name: input.name, plan: FREE_PLAN });
    await tx.insert(memberships).values({ userId: input.userId, organizationId: o.insertId, role: "admin" });
    await recordAudit(
      { organizationId: o.insertId, actorType: "user", actorUserId: input.userId, action: "organization.created", targetType: "organization", targetId: String(o.insertId), detail: { name: input.name } },
      tx,
    );
    return { organizationId: o.insertId, slug };
  });
}
