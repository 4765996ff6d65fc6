import "server-only";
import { and, desc, eq, gt, isNull, lt, ne, or, sql } from "drizzle-orm";
import { getDb, type Db } from "./client";
import { recoveryCodes, userSessions, users } from "./schema";

// Queries of sign-in sessions and two-step sign-in (TOTP secrets, recovery codes).

export async function getSessionVersion({ userId }: { userId: number }): Promise<number> {
  const [u] = await getDb().select({ v: users.sessionVersion }).from(users).where(eq(users.id, userId));
  return u?.v ?? 0;
}

export async function createSession(input: { sid: string; userId: number; version: number; ip: string; userAgent: string; method: string; lastSeenAt: Date }) {
  await getDb().insert(userSessions).values(input);
}

/** The session row with its user's current session version (null when there is no such session). */
export async function getSessionWithVersion({ sid }: { sid: string }) {
  const [row] = await getDb()
    .select({ userId: userSessions.userId, endedAt: userSessions.endedAt, lastSeenAt: userSessions.lastSeenAt, current: users.sessionVersion })
    .from(userSessions)
    .innerJoin(users, eq(users.id, userSessions.userId))
    .where(eq(userSessions.sid, sid));
  return row ?? null;
}

export async function touchSession({ sid, at }: { sid: string; at: Date }) {
  await getDb().update(userSessions).set({ lastSeenAt: at }).where(eq(userSessions.sid, sid));
}

export async function endSessionRow({ sid }: { sid: string }) {
  await getDb().update(userSessions).set({ endedAt: new Date() }).where(and(eq(userSessions.sid, sid), isNull(userSessions.endedAt)));
}

/** Ends the user's open sessions except `keepSid`; returns how many ended. */
export async function endSessionRowsExcept({ userId, keepSid }: { userId: number; keepSid: string }): Promise<number> {
  const [res] = await getDb()
    .update(userSessions)
    .set({ endedAt: new Date() })
    .where(and(eq(userSessions.userId, userId), isNull(userSessions.endedAt), ne(userSessions.sid, keepSid)));
  return res.affectedRows;
}

/** Bumps the user's session version (every token stops) and ends every open session row. */
export async function endAllSessionRows({ userId }: { userId: number }, db: Pick<Db, "update"> = getDb()) {
  await db.update(users).set({ sessionVersion: sql`${users.sessionVersion} + 1` }).where(eq(users.id, userId));
  await db.update(userSessions).set({ endedAt: new Date() }).where(and(eq(userSessions.userId, userId), isNull(userSessions.endedAt)));
}

/** Open sessions of the user's current version seen since `since`, most recently seen first. */
export async function listOpenSessionRows({ userId, version, since }: { userId: number; version: number; since: Date }) {
  return getDb()
    .select({ sid: userSessions.sid, ip: userSessions.ip, userAgent: userSessions.userAgent, method: userSessions.method, createdAt: userSessions.createdAt, lastSeenAt: userSessions.lastSeenAt })
    .from(userSessions)
    .where(and(eq(userSessions.userId, userId), isNull(userSessions.endedAt), eq(userSessions.version, version), gt(userSessions.lastSeenAt, since)))
    .orderBy(desc(userSessions.lastSeenAt));
}

/** Stores a sealed TOTP secret, not yet enabled (enrolment starts again). */
export async function setTotpSecret({ userId, sealed }: { userId: number; sealed: string | null }) {
  await getDb().update(users).set({ totpSecret: sealed, totpEnabledAt: null, totpLastStep: null }).where(eq(users.id, userId));
}

/** Claims a TOTP time step for the user; false when that step (or a later one) was used already. */
export async function claimTotpStep({ userId, step }: { userId: number; step: number }): Promise<boolean> {
  const [res] = await getDb()
    .update(users)
    .set({ totpLastStep: step })
    .where(and(eq(users.id, userId), or(isNull(users.totpLastStep), lt(users.totpLastStep, step))));
  return res.affectedRows === 1;
}

/** Enables two-step sign-in with a fresh set of recovery code hashes (replacing any earlier set). */
export async function enableTotp({ userId, codeHashes }: { userId: number; codeHashes: string[] }) {
  await getDb().transaction(async (tx) => {
    await tx.update(users).set({ totpEnabledAt: new Date() }).where(eq(users.id, userId));
    await tx.delete(recoveryCodes).where(eq(recoveryCodes.userId, userId));
    await tx.insert(recoveryCodes).values(codeHashes.map((codeHash) => ({ userId, codeHash })));
  });
}

export async function disableTotp({ userId }: { userId: number }) {
  const db = getDb();
  await db.update(users).set({ totpSecret: null, totpEnabledAt: null, totpLastStep: null }).where(eq(users.id, userId));
  await db.delete(recoveryCodes).where(eq(recoveryCodes.userId, userId));
}

/** Spends an unused recovery code; false when there is none with this hash. */
export async function spendRecoveryCode({ userId, codeHash }: { userId: number; codeHash: string }): Promise<boolean> {
  const [res] = await getDb()
    .update(recoveryCodes)
    .set({ usedAt: new Date() })
    .where(and(eq(recoveryCodes.userId, userId), eq(recoveryCodes.codeHash, codeHash), isNull(recoveryCodes.usedAt)));
  return res.affectedRows === 1;
}

export async function countUnusedRecoveryCodes({ userId }: { userId: number }): Promise<number> {
  const rows = await getDb().select({ id: recoveryCodes.id }).from(recoveryCodes).where(and(eq(recoveryCodes.userId, userId), isNull(recoveryCodes.usedAt)));
  return rows.length;
}
