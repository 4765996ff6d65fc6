import "server-only";
import { randomBytes } from "node:crypto";
import { FREE_PLAN } from "@/lib/api/plans";
import { hashPassword } from "@/lib/auth/passwords";
import { endAllSessions } from "@/lib/auth/sessions";
import { createOrganizationForUser, createUserWithOrganization, markEmailVerified, replaceEmailToken, setPasswordHash, spendEmailToken } from "@/lib/db/accounts";
import { recordAudit } from "@/lib/db/audit";
import { getLiveEmailToken, getUserByEmail, getUserById } from "@/lib/db/portal";
import type { User } from "@/lib/db/schema";
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
  // A new link replaces any earlier live link of the same purpose.
  await replaceEmailToken({ userId, purpose, tokenHash: hash, expiresAt: new Date(Date.now() + ttl) });
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
  const slug = `${slugify(input.organization)}-${randomBytes(3).toString("hex")}`;
  const ids = await createUserWithOrganization({ email: input.email, name: input.name, passwordHash, organization: input.organization, slug, plan: FREE_PLAN });
  await sendVerification({ id: ids.userId, name: input.name, email: input.email });
  return ids;
}

/** Marks the address behind a live verification link as verified; the link is spent. */
export async function verifyEmail(token: string): Promise<{ email: string; userId: number; name: string }> {
  const row = await getLiveEmailToken({ tokenHash: hashLinkToken(token), purpose: "verify" });
  if (!row) throw new PortalError(410, "This confirmation link is used or expired. Sign in to ask for a new one.");
  if (!(await spendEmailToken({ tokenId: row.id }))) throw new PortalError(410, "This confirmation link is used or expired.");
  await markEmailVerified({ userId: row.userId });
  const u = (await getUserById({ userId: row.userId }))!;
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
  if (!(await spendEmailToken({ tokenId: row.id }))) throw new PortalError(410, "This reset link is used or expired.");
  const passwordHash = await hashPassword(password);
  await setPasswordHash({ userId: row.userId, passwordHash });
  await markEmailVerified({ userId: row.userId });
  // Whoever held a session (perhaps the reason for the reset) is signed out everywhere.
  await endAllSessions(row.userId);
  const u = (await getUserById({ userId: row.userId }))!;
  await recordAudit({ actorType: "user", actorUserId: row.userId, action: "user.password_reset", targetType: "user", targetId: String(row.userId) });
  return { email: u.email };
}

/** A signed-in person creates a further organisation (or their first, after leaving every other): they are its admin. */
export async function createOrganization(input: { userId: number; name: string }): Promise<{ organizationId: number; slug: string }> {
  const slug = `${slugify(input.name)}-${randomBytes(3).toString("hex")}`;
  const organizationId = await createOrganizationForUser({ userId: input.userId, name: input.name, slug, plan: FREE_PLAN });
  return { organizationId, slug };
}
