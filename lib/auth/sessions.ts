import "server-only";
import { randomBytes } from "node:crypto";
import { and, desc, eq, gt, isNull, ne, sql } from "drizzle-orm";
import { getDb } from "@/lib/db/client";
import { userSessions, users } from "@/lib/db/schema";

/**
 * Server-side sessions behind next-auth's JWT cookie. The token carries a session id (sid) and the user's
 * session version (sv) at sign-in; a token is honoured only while its session row is open and the user's
 * version is unchanged. Sign-out ends the row; "sign out everywhere" and a password reset bump the version
 * (and end every row). Checks are cached per process for CHECK_CACHE_MS; a change made by this process
 * drops its cache at once, so elsewhere a revocation takes effect within that time.
 */
export const CHECK_CACHE_MS = 2000;
/** Same as next-auth's session maxAge (lib/auth/options.ts): an idle session is not listed after this. */
export const SESSION_MAX_AGE_S = 7 * 24 * 3600;
/** last_seen_at is written at most this often per session. */
const TOUCH_MS = 60_000;

export type SignInMethod = "password" | "password+totp" | "password+recovery" | "email-link";

type Check = { at: number; ok: boolean; touchedAt: number };
const g = globalThis as unknown as { __sumfoldSessionChecks?: Map<string, Check> };
const checks = () => (g.__sumfoldSessionChecks ??= new Map());

/** Drops cached checks (all, or those of one session id). */
export function forgetSessionChecks(sid?: string) {
  if (sid) checks().delete(sid);
  else checks().clear();
}

export async function openSession(input: { userId: number; ip: string; userAgent: string; method: SignInMethod }): Promise<{ sid: string; sv: number }> {
  const db = getDb();
  const [u] = await db.select({ v: users.sessionVersion }).from(users).where(eq(users.id, input.userId));
  const sid = randomBytes(24).toString("base64url");
  const now = new Date();
  await db.insert(userSessions).values({
    sid,
    userId: input.userId,
    version: u?.v ?? 0,
    ip: input.ip.slice(0, 64),
    userAgent: input.userAgent.slice(0, 255),
    method: input.method,
    lastSeenAt: now,
  });
  return { sid, sv: u?.v ?? 0 };
}

/** True while the token's session is open and the user's version is the token's. Cached briefly. */
export async function isSessionLive(token: { uid?: unknown; sid?: unknown; sv?: unknown }): Promise<boolean> {
  const { uid, sid, sv } = token;
  if (typeof uid !== "number" || typeof sid !== "string" || typeof sv !== "number") return false;
  const now = Date.now();
  const hit = checks().get(sid);
  if (hit && now - hit.at < CHECK_CACHE_MS) return hit.ok;
  const db = getDb();
  const [row] = await db
    .select({ userId: userSessions.userId, endedAt: userSessions.endedAt, lastSeenAt: userSessions.lastSeenAt, current: users.sessionVersion })
    .from(userSessions)
    .innerJoin(users, eq(users.id, userSessions.userId))
    .where(eq(userSessions.sid, sid));
  const ok = !!row && row.userId === uid && !row.endedAt && row.current === sv;
  let touchedAt = hit?.touchedAt ?? row?.lastSeenAt.getTime() ?? 0;
  if (ok && now - touchedAt > TOUCH_MS) {
    touchedAt = now;
    await db.update(userSessions).set({ lastSeenAt: new Date(now) }).where(eq(userSessions.sid, sid));
  }
  if (checks().size > 50_000) checks().clear();
  checks().set(sid, { at: now, ok, touchedAt });
  return ok;
}

/** Ends one session (sign-out). */
export async function endSession(sid: string): Promise<void> {
  await getDb().update(userSessions).set({ endedAt: new Date() }).where(and(eq(userSessions.sid, sid), isNull(userSessions.endedAt)));
  forgetSessionChecks(sid);
}

/** Ends the user's other sessions, keeping `keepSid`. Returns how many ended. */
export async function endOtherSessions(userId: number, keepSid: string): Promise<number> {
  const [res] = await getDb()
    .update(userSessions)
    .set({ endedAt: new Date() })
    .where(and(eq(userSessions.userId, userId), isNull(userSessions.endedAt), ne(userSessions.sid, keepSid)));
  forgetSessionChecks();
  return res.affectedRows;
}

/** Ends every session of the user: bumps the version (so any token, listed or not, stops) and closes the rows. */
export async function endAllSessions(userId: number, db: Pick<ReturnType<typeof getDb>, "update"> = getDb()): Promise<void> {
  await db.update(users).set({ sessionVersion: sql`${users.sessionVersion} + 1` }).where(eq(users.id, userId));
  await db.update(userSessions).set({ endedAt: new Date() }).where(and(eq(userSessions.userId, userId), isNull(userSessions.endedAt)));
  forgetSessionChecks();
}

/** The user's open sessions, most recently seen first. */
export async function listOpenSessions(userId: number) {
  const since = new Date(Date.now() - SESSION_MAX_AGE_S * 1000);
  const [u] = await getDb().select({ v: users.sessionVersion }).from(users).where(eq(users.id, userId));
  return getDb()
    .select({ sid: userSessions.sid, ip: userSessions.ip, userAgent: userSessions.userAgent, method: userSessions.method, createdAt: userSessions.createdAt, lastSeenAt: userSessions.lastSeenAt })
    .from(userSessions)
    .where(and(eq(userSessions.userId, userId), isNull(userSessions.endedAt), eq(userSessions.version, u?.v ?? 0), gt(userSessions.lastSeenAt, since)))
    .orderBy(desc(userSessions.lastSeenAt));
}
