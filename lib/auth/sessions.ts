import "server-only";
import { randomBytes } from "node:crypto";
import {
  createSession,
  endAllSessionRows,
  endSessionRow,
  endSessionRowsExcept,
  getSessionVersion,
  getSessionWithVersion,
  listOpenSessionRows,
  touchSession,
} from "@/lib/db/auth";
import { withDbDeadline } from "@/lib/db/client";

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
  const version = await getSessionVersion({ userId: input.userId });
  const sid = randomBytes(24).toString("base64url");
  await createSession({ sid, userId: input.userId, version, ip: input.ip.slice(0, 64), userAgent: input.userAgent.slice(0, 255), method: input.method, lastSeenAt: new Date() });
  return { sid, sv: version };
}

/** True while the token's session is open and the user's version is the token's. Cached briefly. */
export async function isSessionLive(token: { uid?: unknown; sid?: unknown; sv?: unknown }): Promise<boolean> {
  const { uid, sid, sv } = token;
  if (typeof uid !== "number" || typeof sid !== "string" || typeof sv !== "number") return false;
  const now = Date.now();
  const hit = checks().get(sid);
  if (hit && now - hit.at < CHECK_CACHE_MS) return hit.ok;
  // under the request path's database deadline: a database that stops answering makes this throw
  // DbUnavailableError (a 503 for the caller) after DB_DEADLINE_MS instead of holding the page
  const row = await withDbDeadline(getSessionWithVersion({ sid }));
  const ok = !!row && row.userId === uid && !row.endedAt && row.current === sv;
  let touchedAt = hit?.touchedAt ?? row?.lastSeenAt.getTime() ?? 0;
  if (ok && now - touchedAt > TOUCH_MS) {
    touchedAt = now;
    // last-seen is bookkeeping: written beside the request, never waited for
    void touchSession({ sid, at: new Date(now) }).catch((e: unknown) => console.error("[sumfold] session last-seen update failed", e));
  }
  if (checks().size > 50_000) checks().clear();
  checks().set(sid, { at: now, ok, touchedAt });
  return ok;
}

/** Ends one session (sign-out). */
export async function endSession(sid: string): Promise<void> {
  await endSessionRow({ sid });
  forgetSessionChecks(sid);
}

/** Ends the user's other sessions, keeping `keepSid`. Returns how many ended. */
export async function endOtherSessions(userId: number, keepSid: string): Promise<number> {
  const ended = await endSessionRowsExcept({ userId, keepSid });
  forgetSessionChecks();
  return ended;
}

/** Ends every session of the user: bumps the version (so any token, listed or not, stops) and closes the rows. */
export async function endAllSessions(userId: number): Promise<void> {
  await endAllSessionRows({ userId });
  forgetSessionChecks();
}

/** The user's open sessions, most recently seen first. */
export async function listOpenSessions(userId: number) {
  const since = new Date(Date.now() - SESSION_MAX_AGE_S * 1000);
  return listOpenSessionRows({ userId, version: await getSessionVersion({ userId }), since });
}
