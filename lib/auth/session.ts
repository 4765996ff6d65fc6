import "server-only";
import { decode } from "next-auth/jwt";
import { callerFor } from "@/lib/portal/tenancy";
import type { Permission } from "./roles";

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
  const cookies = readCookies(cookieHeader);
  const name = sessionCookieName();
  let token = cookies.get(name);
  if (!token) {
    const chunks = [...cookies.entries()].filter(([k]) => k.startsWith(`${name}.`)).sort(([a], [b]) => Number(a.split(".").pop()) - Number(b.split(".").pop()));
    token = chunks.map(([, v]) => v).join("") || undefined;
  }
  if (!token) return null;
  try {
    const jwt = await decode({ token, secret: process.env.NEXTAUTH_SECRET! });
    return jwt && Number.isSafeInteger(jwt.uid) ? jwt.uid : null;
  } catch {
    return null;
  }
}

export type { Caller } from "@/lib/portal/tenancy";

/**
 * The caller in the organisation the request names, with a permission check. A short form of callerFor in
 * lib/portal/tenancy.ts, the one place that decides a portal request's organisation and role.
 */
export const requireCaller = (req: Request, anyOf?: Permission[]) => callerFor(req, { anyOf });
