import "server-only";
import { withDbDeadline } from "@/lib/db/client";
import { getUserById, listMembershipsOfUser } from "@/lib/db/portal";
import type { Role } from "@/lib/db/schema";
import { can, type Permission } from "@/lib/auth/roles";
import { sessionUserId } from "@/lib/auth/session";
import { PortalError, forbidden } from "./http";

/**
 * The organisation a portal request acts in travels with the request itself, never as ambient state another
 * tab can change: the `x-sumfold-org` header (what the portal's fetch sends, from the page's `?org=` address)
 * or an `org` query parameter (plain links such as CSV downloads). It names the organisation by slug or id and
 * is checked against the caller's memberships, read from the database, on every request.
 */
export const ORG_HEADER = "x-sumfold-org";
export const ORG_PARAM = "org";

export interface Caller {
  userId: number;
  email: string;
  name: string;
  organizationId: number;
  organizationSlug: string;
  organizationName: string;
  plan: string;
  /** re-read from the database on this request */
  role: Role;
  emailVerified: boolean;
}

export interface CallerOptions {
  /** 403 unless the caller's role has at least one of these permissions */
  anyOf?: Permission[];
  /**
   * With no organisation named, a person with several memberships is refused (400). Read-only entry points that
   * only choose where a fresh page starts (the portal's own /me) may take the oldest membership instead.
   */
  defaultToFirst?: boolean;
}

/** The organisation named by the request (header first, then the query parameter), or null when none is named. */
export function requestedOrg(req: Request): string | null {
  const fromHeader = req.headers.get(ORG_HEADER)?.trim();
  if (fromHeader) return fromHeader;
  const fromQuery = new URL(req.url, "http://localhost").searchParams.get(ORG_PARAM)?.trim();
  return fromQuery || null;
}

/**
 * The caller's organisation and role for this request: the signed-in person (401 when not signed in), in the
 * organisation the request names (404 when they are not a member of it; 400 when none is named and they
 * belong to several), with their role re-read from the database, and an optional permission check (403).
 * A person with exactly one membership needs not name it.
 */
export async function callerFor(req: Request, opts: CallerOptions = {}): Promise<Caller> {
  return callerFromParts({ cookieHeader: req.headers.get("cookie"), org: requestedOrg(req) }, opts);
}

/** callerFor for code that has the cookie header and the named organisation but no Request (server components). */
export async function callerFromParts({ cookieHeader, org }: { cookieHeader: string | null; org: string | null }, opts: CallerOptions = {}): Promise<Caller> {
  const userId = await sessionUserId(cookieHeader);
  if (!userId) throw new PortalError(401, "Sign in to continue.");
  const user = await withDbDeadline(getUserById({ userId }));
  if (!user) throw new PortalError(401, "Sign in to continue.");
  const all = await withDbDeadline(listMembershipsOfUser({ userId }));
  if (all.length === 0) throw new PortalError(403, "You do not belong to any organisation yet. Create one, or ask an admin for an invitation.");
  let m: (typeof all)[number] | undefined;
  if (org) {
    m = all.find((x) => x.slug === org || String(x.organizationId) === org);
    if (!m) throw new PortalError(404, "You are not a member of that organisation (or it does not exist).");
  } else if (all.length === 1 || opts.defaultToFirst) {
    m = all[0];
  } else {
    throw new PortalError(400, "You belong to several organisations: reload the page, or choose one in the organisation menu.");
  }
  if (opts.anyOf && !opts.anyOf.some((p) => can(m.role, p))) throw forbidden();
  return {
    userId,
    email: user.email,
    name: user.name,
    organizationId: m.organizationId,
    organizationSlug: m.slug,
    organizationName: m.name,
    plan: m.plan,
    role: m.role,
    emailVerified: !!user.emailVerifiedAt,
  };
}
