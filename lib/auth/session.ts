import "server-only";
import { decode } from "next-auth/jwt";
import { callerFor } from "@/lib/portal/tenancy";
import type { Permission } from "./roles";
import { isSessionLive } from "./sessions";

export const sessionCookieName = () =>
  (process.env.NEXTAUTH_URL ?? "").startsWith("https://") ? "__Secure-next-auth.session-token" : "next-auth.session-token";

export function readCookies(header: string | null): Map<string, string> {
  const out = new Map<string, string>();
  for (const part of (header ?? "").split(";")) {
    const i = part.indexOf("=");
    if (i > 0) out.set(part.slice(0, i).trim(), decodeURIComponent(part.slice(i + 1).trim()));
  }
  return out;
}

/** The signed-in user's id from the next-auth session cookie (whole or chunked), or null. */
export async function sessionUserId(cookieHeader: string | null): Promise<number | null> {
  return (await currentSession(cookieHeader))?.userId ?? null;
}

/**
 * The session behind the cookie (whole or chunked): its user and session id, or null when there is no cookie,
 * it does not decode, or its session has ended (sign-out, "sign out everywhere", password reset).
 */
export async function currentSession(cookieHeader: string | null): Promise<{ userId: number; sid: string } | null> {
  const cookies = readCookies(cookieHeader);
  const name = sessionCookieName();
  let token = cookies.get(name);
  if (!token) {
    const chunks = [...cookies.entries()].filter(([k]) => k.startsWith(`${name}.`)).sort(([a], [b]) => Number(a.split(".").pop()) - Number(b.split(".").pop()));
    token = chunks.map(([, v]) => v).join("") || undefined;
  }
  if (!token) return null;
  let jwt;
  try {
    jwt = await decode({ token, secret: process.env.NEXTAUTH_SECRET! });
  } catch {
    return null;
  }
  if (!jwt || !Number.isSafeInteger(jwt.uid) || !(await isSessionLive(jwt))) return null;
  return { userId: jwt.uid, sid: jwt.sid };
}

export type { Caller } from "@/lib/portal/tenancy";

/**
 * The caller in the organisation the request names, with a permission check. A short form of callerFor in
 * lib/portal/tenancy.ts, the one place that decides a portal request's organisation and role.
 */
export const requireCaller = (req: Request, anyOf?: Permission[]) => callerFor(req, { anyOf });
