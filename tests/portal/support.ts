// Shared set-up of the portal's API tests: fixtures in the real MariaDB, session cookies minted with the
// server's NEXTAUTH_SECRET, the SMTP sink's mailbox, and an in-process server over every portal route.
import { randomBytes } from "node:crypto";
import { encode } from "next-auth/jwt";
import { getDb } from "@/lib/db/client";
import { apiKeys, memberships, organizations, users, type Role } from "@/lib/db/schema";
import { createKey } from "@/lib/db/keys";
import { openSession } from "@/lib/auth/sessions";
import { routeServer, type RouteModule } from "../support/route-server";
import * as me from "@/app/api/portal/me/route";
import * as organizations_ from "@/app/api/portal/organizations/route";
import * as models from "@/app/api/portal/models/route";
import * as audit from "@/app/api/portal/audit/route";
import * as auditCsv from "@/app/api/portal/audit/csv/route";
import * as model from "@/app/api/portal/models/[id]/route";
import * as keys from "@/app/api/portal/keys/route";
import * as rotate from "@/app/api/portal/keys/[id]/rotate/route";
import * as revoke from "@/app/api/portal/keys/[id]/revoke/route";
import * as members from "@/app/api/portal/members/route";
import * as member from "@/app/api/portal/members/[userId]/route";
import * as invitationsRoute from "@/app/api/portal/invitations/route";
import * as invitation from "@/app/api/portal/invitations/[id]/route";
import * as resend from "@/app/api/portal/invitations/[id]/resend/route";
import * as lookup from "@/app/api/portal/invitations/lookup/route";
import * as accept from "@/app/api/portal/invitations/accept/route";
import * as usage from "@/app/api/portal/usage/route";
import * as usageMonth from "@/app/api/portal/usage/month/route";
import * as usageCsv from "@/app/api/portal/usage/csv/route";
import * as signUp from "@/app/api/portal/auth/sign-up/route";
import * as verify from "@/app/api/portal/auth/verify/route";
import * as resendVerification from "@/app/api/portal/auth/resend-verification/route";
import * as resetRequest from "@/app/api/portal/auth/reset-request/route";
import * as reset from "@/app/api/portal/auth/reset/route";

export const portalServer = () =>
  routeServer({
    "/api/portal/me": me as RouteModule,
    "/api/portal/organizations": organizations_ as RouteModule,
    "/api/portal/models": models as RouteModule,
    "/api/portal/audit": audit as RouteModule,
    "/api/portal/audit/csv": auditCsv as RouteModule,
    "/api/portal/models/[id]": model as RouteModule,
    "/api/portal/keys": keys as RouteModule,
    "/api/portal/keys/[id]/rotate": rotate as RouteModule,
    "/api/portal/keys/[id]/revoke": revoke as RouteModule,
    "/api/portal/members": members as RouteModule,
    "/api/portal/members/[userId]": member as RouteModule,
    "/api/portal/invitations": invitationsRoute as RouteModule,
    "/api/portal/invitations/lookup": lookup as RouteModule,
    "/api/portal/invitations/accept": accept as RouteModule,
    "/api/portal/invitations/[id]": invitation as RouteModule,
    "/api/portal/invitations/[id]/resend": resend as RouteModule,
    "/api/portal/usage": usage as RouteModule,
    "/api/portal/usage/month": usageMonth as RouteModule,
    "/api/portal/usage/csv": usageCsv as RouteModule,
    "/api/portal/auth/sign-up": signUp as RouteModule,
    "/api/portal/auth/verify": verify as RouteModule,
    "/api/portal/auth/resend-verification": resendVerification as RouteModule,
    "/api/portal/auth/reset-request": resetRequest as RouteModule,
    "/api/portal/auth/reset": reset as RouteModule,
  });

export const uniq = () => randomBytes(4).toString("hex");

/** A session cookie as next-auth would set it after sign-in (a session row, and its JWT encrypted with NEXTAUTH_SECRET). */
export async function cookieFor(userId: number): Promise<string> {
  const { sid, sv } = await openSession({ userId, ip: "127.0.0.1", userAgent: "fixture", method: "password" });
  const token = await encode({ token: { uid: userId, email: "", name: "", sid, sv }, secret: process.env.NEXTAUTH_SECRET! });
  return `next-auth.session-token=${token}`;
}

/** The header the portal's pages send to name the organisation a call acts in. */
export const ORG = "x-sumfold-org";

export async function makeUser(name: string, opts: { verified?: boolean } = {}) {
  const email = `${name.toLowerCase().replace(/\W+/g, ".")}.${uniq()}@fixture.example`;
  const [r] = await getDb().insert(users).values({ email, name, passwordHash: "$2b$04$notarealhashnotarealhashnotarealhashnotarealhashnot", emailVerifiedAt: opts.verified === false ? null : new Date() });
  return { id: r.insertId, email, name };
}

export async function makeOrg(name: string, plan = "starter") {
  const [r] = await getDb().insert(organizations).values({ slug: `${name.toLowerCase().replace(/\W+/g, "-")}-${uniq()}`, name, plan });
  return { id: r.insertId, name };
}

export async function join(userId: number, organizationId: number, role: Role) {
  await getDb().insert(memberships).values({ userId, organizationId, role });
}

/** An organisation with an admin, a developer and a billing contact, and one key made by each keyed role. */
export async function makeTeam(name: string, plan = "starter") {
  const org = await makeOrg(name, plan);
  const admin = await makeUser(`${name} Admin`);
  const developer = await makeUser(`${name} Dev`);
  const billing = await makeUser(`${name} Billing`);
  await join(admin.id, org.id, "admin");
  await join(developer.id, org.id, "developer");
  await join(billing.id, org.id, "billing");
  const adminKey = (await createKey({ organizationId: org.id, createdBy: admin.id, label: "admin batch", scopes: ["moments"], actor: { type: "system" } })).key;
  const devKey = (await createKey({ organizationId: org.id, createdBy: developer.id, label: "dev notebook", scopes: ["moments"], actor: { type: "system" } })).key;
  return { org, admin, developer, billing, adminKey, devKey };
}

export interface Mail {
  id: string;
  subject: string;
  text: string;
  to: string[];
}

/** Messages the SMTP sink holds for an address, newest first. */
export async function mailTo(address: string): Promise<Mail[]> {
  const res = await fetch(`${process.env.SUMFOLD_MAILBOX_URL}/messages.json?to=${encodeURIComponent(address)}`);
  return (await res.json()) as Mail[];
}

/** Waits until the sink holds at least `count` messages for the address. */
export async function waitForMail(address: string, count = 1, timeoutMs = 5000): Promise<Mail[]> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const m = await mailTo(address);
    if (m.length >= count || Date.now() > end) return m;
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** The token of the first link to `path` in a message's text. */
export function linkToken(mail: Mail, path: string): string {
  const m = new RegExp(`${path}\\?token=([\\w-]+)`).exec(mail.text);
  if (!m) throw new Error(`no ${path} link in "${mail.subject}": ${mail.text}`);
  return m[1];
}

export { apiKeys };
