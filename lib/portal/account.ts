import "server-only";
import { currentSession } from "@/lib/auth/session";
import { verifyPassword } from "@/lib/auth/passwords";
import { endAllSessions, endOtherSessions, endSession, listOpenSessions } from "@/lib/auth/sessions";
import { beginEnrolment, confirmEnrolment, disableTwoFactor, recoveryCodesLeft } from "@/lib/auth/totp";
import { recordAudit } from "@/lib/db/audit";
import { getUserById } from "@/lib/db/portal";
import { PortalError } from "./http";
import QRCode from "qrcode";

// The signed-in person's own account: sessions and two-factor sign-in. Nothing here depends on an organisation.

export interface Account {
  userId: number;
  sid: string;
  email: string;
  name: string;
}

/** The signed-in person (401 otherwise); needs no organisation. */
export async function requireAccount(req: Request): Promise<Account> {
  const s = await currentSession(req.headers.get("cookie"));
  const user = s ? await getUserById({ userId: s.userId }) : null;
  if (!s || !user) throw new PortalError(401, "Sign in to continue.");
  return { userId: s.userId, sid: s.sid, email: user.email, name: user.name };
}

const audit = (a: Account, action: string, detail?: Record<string, unknown>) =>
  recordAudit({ actorType: "user", actorUserId: a.userId, action, targetType: "user", targetId: String(a.userId), detail });

/** Describes a browser from its user agent in a few words (for the sessions list; never used for decisions). */
export function describeAgent(ua: string): string {
  if (!ua) return "Unknown client";
  const browser = /Edg\//.test(ua) ? "Edge" : /Firefox\//.test(ua) ? "Firefox" : /Chrom(e|ium)\//.test(ua) ? "Chromium-based browser" : /Safari\//.test(ua) ? "Safari" : /curl\//.test(ua) ? "curl" : "Browser";
  const os = /Android/.test(ua) ? "Android" : /iPhone|iPad/.test(ua) ? "iOS" : /Mac OS X/.test(ua) ? "macOS" : /Windows/.test(ua) ? "Windows" : /Linux/.test(ua) ? "Linux" : "";
  return os ? `${browser} on ${os}` : browser;
}

export async function listSessions(a: Account) {
  const rows = await listOpenSessions(a.userId);
  return rows.map((r) => ({
    id: r.sid.slice(0, 8),
    client: describeAgent(r.userAgent),
    ip: r.ip,
    method: r.method,
    createdAt: r.createdAt.toISOString(),
    lastSeenAt: r.lastSeenAt.toISOString(),
    current: r.sid === a.sid,
  }));
}

/** Ends one of the person's sessions by the short id the list shows. */
export async function endOneSession(a: Account, shortId: string) {
  const rows = await listOpenSessions(a.userId);
  const hit = rows.find((r) => r.sid.slice(0, 8) === shortId);
  if (!hit) throw new PortalError(404, "This session has ended already.");
  await endSession(hit.sid);
  await audit(a, "session.ended", { session: shortId, current: hit.sid === a.sid });
}

export async function signOutOthers(a: Account) {
  const n = await endOtherSessions(a.userId, a.sid);
  await audit(a, "session.ended_others", { count: n });
  return n;
}

/** "Sign out everywhere": every session, this one included, ends. */
export async function signOutEverywhere(a: Account) {
  await endAllSessions(a.userId);
  await audit(a, "session.ended_all");
}

export async function twoFactorStatus(a: Account) {
  const u = await getUserById({ userId: a.userId });
  const enabled = !!u?.totpEnabledAt;
  return { enabled, enabledAt: u?.totpEnabledAt?.toISOString() ?? null, recoveryCodesLeft: enabled ? await recoveryCodesLeft(a.userId) : 0 };
}

async function checkPassword(a: Account, password: string) {
  const u = await getUserById({ userId: a.userId });
  if (!u || !(await verifyPassword(password, u.passwordHash))) throw new PortalError(422, "That password is not right.", { password: "That password is not right." });
  return u;
}

/** Starts two-factor enrolment (password asked again); returns the secret, its otpauth URI and a QR code (SVG). */
export async function startTwoFactor(a: Account, password: string) {
  const u = await checkPassword(a, password);
  if (u.totpEnabledAt) throw new PortalError(409, "Two-factor sign-in is on already. Turn it off first to enrol a new device.");
  const { secret, uri } = await beginEnrolment({ id: a.userId, email: a.email });
  const qrSvg = await QRCode.toString(uri, { type: "svg", margin: 1, errorCorrectionLevel: "M" });
  return { secret, uri, qrSvg };
}

export async function finishTwoFactor(a: Account, code: string) {
  const codes = await confirmEnrolment(a.userId, code);
  if (!codes) throw new PortalError(422, "That code does not match. Check the device's clock and enter the current code.", { code: "That code does not match." });
  await audit(a, "user.two_factor_enabled");
  return { recoveryCodes: codes };
}

export async function stopTwoFactor(a: Account, password: string) {
  await checkPassword(a, password);
  await disableTwoFactor(a.userId);
  await audit(a, "user.two_factor_disabled");
}
