import "server-only";
import { decode } from "next-auth/jwt";
import { getMembership, getUserById, listMembershipsOfUser } from "@/lib/db/portal";
import type { Role } from "@/lib/db/schema";
import { PortalError, forbidden } from "@/lib/portal/http";
import { can, type Permission } from "./roles";

/** The cookie that remembers which organisation the user is working in (validated on every request). */
export const ORG_COOKIE = "sumfold-org";

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

export interface Caller {
  userId: number;
  email: string;
  name: string;
  organizationId: number;
  organizationName: string;
  plan: string;
  /** re-read from the database on this request */
  role: Role;
  emailVerified: boolean;
}

/**
 * Resolves the signed-in caller in their active organisation, re-reading the user and their membership from
 * the database (a role in a token goes stale). The active organisation comes from the org cookie when the
 * user is still a member there, else their oldest membership. 401 when not signed in; 403 with no membership.
 */
export async function resolveCaller(cookieHeader: string | null): Promise<Caller> {
  const userId = await sessionUserId(cookieHeader);
  if (!userId) throw new PortalError(401, "Sign in to continue.");
  const user = await getUserById({ userId });
  if (!user) throw new PortalError(401, "Sign in to continue.");
  const wanted = Number(readCookies(cookieHeader).get(ORG_COOKIE));
  let m = Number.isSafeInteger(wanted) && wanted > 0 ? await getMembership({ userId, organizationId: wanted }) : null;
  if (!m) {
    const all = await listMembershipsOfUser({ userId });
    m = all[0] ?? null;
  }
  if (!m) throw new PortalError(403, "You do not belong to any organisation yet. Ask an admin for an invitation.");
  return {
    userId,
    email: user.email,
    name: user.name,
    organizationId: m.organizationId,
    organizationName: m.name,
    plan: m.plan,
    role: m.role,
    emailVerified: !!user.emailVerifiedAt,
  };
}

/** resolveCaller, then a permission check (403 when the role lacks every one of `anyOf`). */
export async function requireCaller(req: Request, anyOf?: Permission[]): Promise<Caller> {
  const caller = await resolveCaller(req.headers.get("cookie"));
  if (anyOf && !anyOf.some((p) => can(caller.role, p))) throw forbidden();
  return caller;
}
