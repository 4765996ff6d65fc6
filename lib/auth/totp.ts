import "server-only";
import { createCipheriv, createDecipheriv, createHash, createHmac, randomBytes } from "node:crypto";
import { generateSecret, generateURI, verify } from "otplib";
import { claimTotpStep, countUnusedRecoveryCodes, disableTotp, enableTotp, setTotpSecret, spendRecoveryCode } from "@/lib/db/auth";
import { getUserById } from "@/lib/db/portal";

/**
 * Two-factor sign-in with time-based one-time codes (RFC 6238, 30 s steps, 6 digits; otplib) and single-use
 * recovery codes. The secret is stored sealed (AES-256-GCM, key derived from NEXTAUTH_SECRET, so rotating that
 * secret leaves enrolled people unable to pass the second step until an operator resets it: see DEVELOPERS.md);
 * recovery codes are stored as HMACs. A code is accepted once:
 * the last accepted time step is kept and older or equal steps are refused.
 */
export const ISSUER = "Sumfold";
export const RECOVERY_CODE_COUNT = 10;
/** Clock drift allowed either side, in seconds (one step). */
const TOLERANCE_S = 30;

function key(): Buffer {
  const s = process.env.NEXTAUTH_SECRET;
  if (!s) throw new Error("NEXTAUTH_SECRET is not set");
  return createHash("sha256").update(`sumfold:totp-seal:${s}`).digest();
}

export function seal(plain: string): string {
  const iv = randomBytes(12);
  const c = createCipheriv("aes-256-gcm", key(), iv);
  const body = Buffer.concat([c.update(plain, "utf8"), c.final()]);
  return ["v1", iv.toString("base64url"), body.toString("base64url"), c.getAuthTag().toString("base64url")].join(".");
}

export function unseal(sealed: string): string | null {
  const [v, iv, body, tag] = sealed.split(".");
  if (v !== "v1" || !iv || !body || !tag) return null;
  try {
    const d = createDecipheriv("aes-256-gcm", key(), Buffer.from(iv, "base64url"));
    d.setAuthTag(Buffer.from(tag, "base64url"));
    return Buffer.concat([d.update(Buffer.from(body, "base64url")), d.final()]).toString("utf8");
  } catch {
    return null;
  }
}

const hashRecovery = (code: string) =>
  createHmac("sha256", process.env.NEXTAUTH_SECRET ?? "").update(`recovery:${code.replace(/[\s-]/g, "").toLowerCase()}`).digest("hex");

/** Ten codes like "k3f9-2hq8-x7vd" (60 bits each, base32 alphabet without look-alikes). */
export function newRecoveryCodes(): string[] {
  const alphabet = "abcdefghjkmnpqrstuvwxyz23456789";
  return Array.from({ length: RECOVERY_CODE_COUNT }, () => {
    const b = randomBytes(12);
    const s = [...b].map((x) => alphabet[x % alphabet.length]).join("");
    return `${s.slice(0, 4)}-${s.slice(4, 8)}-${s.slice(8, 12)}`;
  });
}

/** Starts enrolment: a fresh secret is stored (not yet enabled); returns it with its otpauth URI. */
export async function beginEnrolment(user: { id: number; email: string }) {
  const secret = generateSecret();
  await setTotpSecret({ userId: user.id, sealed: seal(secret) });
  return { secret, uri: generateURI({ issuer: ISSUER, label: user.email, secret }) };
}

/** Checks a 6-digit code against a sealed secret and claims its time step. False when wrong or reused. */
async function checkCode(userId: number, sealed: string | null, lastStep: number | null, code: string): Promise<boolean> {
  const secret = sealed ? unseal(sealed) : null;
  if (!secret || !/^\d{6}$/.test(code)) return false;
  const r = await verify({ secret, token: code, epochTolerance: TOLERANCE_S, ...(lastStep != null ? { afterTimeStep: lastStep } : {}) });
  if (!r.valid || !("timeStep" in r)) return false;
  const step = r.timeStep as number;
  return claimTotpStep({ userId, step });
}

/** Confirms enrolment with a first code; enables two-factor and returns fresh recovery codes (shown once). */
export async function confirmEnrolment(userId: number, code: string): Promise<string[] | null> {
  const u = await getUserById({ userId });
  if (!u?.totpSecret || u.totpEnabledAt) return null;
  if (!(await checkCode(userId, u.totpSecret, u.totpLastStep, code.trim()))) return null;
  const codes = newRecoveryCodes();
  await enableTotp({ userId, codeHashes: codes.map(hashRecovery) });
  return codes;
}

export async function disableTwoFactor(userId: number): Promise<void> {
  await disableTotp({ userId });
}

/** The second factor at sign-in: a current code, or an unused recovery code (spent here). */
export async function checkSecondFactor(
  user: { id: number; totpSecret: string | null; totpLastStep: number | null },
  input: string,
): Promise<"totp" | "recovery" | null> {
  const code = input.trim();
  if (/^\d{6}$/.test(code)) return (await checkCode(user.id, user.totpSecret, user.totpLastStep, code)) ? "totp" : null;
  if (code.length < 8 || code.length > 40) return null;
  return (await spendRecoveryCode({ userId: user.id, codeHash: hashRecovery(code) })) ? "recovery" : null;
}

export async function recoveryCodesLeft(userId: number): Promise<number> {
  return countUnusedRecoveryCodes({ userId });
}
