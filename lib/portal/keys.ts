import "server-only";
import { keyState, type GracePeriod } from "@/lib/api/key-state";
import type { Scope } from "@/lib/api/scopes";
import type { Caller } from "@/lib/auth/session";
import { can } from "@/lib/auth/roles";
import { recordAudit } from "@/lib/db/audit";
import { claimExpiryWarning, createKey, getKeyInOrg, listKeysByOrg, listKeysToWarnOfExpiry, revokeKey, rotateKey, updateKey } from "@/lib/db/keys";
import { listEmailsByRole } from "@/lib/db/portal";
import type { ApiKey } from "@/lib/db/schema";
import { keyNoticeMail } from "@/lib/mail/templates";
import { sendMail } from "@/lib/mail/transport";
import { forbidden, notFound, PortalError } from "./http";
import type { KeyCreateInput, KeyUpdateInput } from "./schemas";
import { baseUrl } from "./tokens";

/** How a key is shown in the portal: never its hash. */
export interface KeyView {
  id: number;
  label: string;
  prefix: string;
  scopes: string[];
  createdBy: string | null;
  createdById: number | null;
  createdAt: string;
  lastUsedAt: string | null;
  expiresAt: string | null;
  state: ReturnType<typeof keyState>;
  /** end of the grace period of a retiring key, or when a revoked key stopped */
  retiringUntil: string | null;
  revokedAt: string | null;
  replacesKeyId: number | null;
  /** client address ranges the key is limited to; empty for any address */
  allowedCidrs: string[];
  /** whole days until expiry when the key expires within the warning window (7 days), else null */
  expiresInDays: number | null;
}

export const EXPIRY_WARNING_MS = 7 * 86_400_000;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function toKeyView(k: ApiKey, creator: string | null, now = new Date()): KeyView {
  const state = keyState(k, now);
  return {
    id: k.id,
    label: k.label,
    prefix: k.prefix,
    scopes: k.scopes,
    createdBy: creator,
    createdById: k.createdBy,
    createdAt: k.createdAt.toISOString(),
    lastUsedAt: iso(k.lastUsedAt),
    expiresAt: iso(k.expiresAt),
    state,
    retiringUntil: state === "retiring" ? iso(k.graceEndsAt) : null,
    revokedAt: state === "revoked" ? iso(k.revokedAt) : null,
    replacesKeyId: k.replacesKeyId,
    allowedCidrs: k.allowedCidrs ?? [],
    expiresInDays:
      (state === "active" || state === "retiring") && k.expiresAt && k.expiresAt.getTime() - now.getTime() <= EXPIRY_WARNING_MS
        ? Math.max(0, Math.floor((k.expiresAt.getTime() - now.getTime()) / 86_400_000))
        : null,
  };
}

/** Keys the caller may see: every key of the organisation for admins, their own for developers. */
export async function listKeys(caller: Caller): Promise<KeyView[]> {
  const all = can(caller.role, "keys.all");
  if (!all && !can(caller.role, "keys.own")) throw forbidden("Billing contacts do not see API keys.");
  const rows = await listKeysByOrg({ organizationId: caller.organizationId, createdBy: all ? undefined : caller.userId });
  const now = new Date();
  return rows.map((r) => toKeyView(r.key, r.creatorName, now));
}

/** The key when the caller may manage it; another organisation's key, or a colleague's for a developer, is 404. */
async function manageable(caller: Caller, keyId: number): Promise<ApiKey> {
  if (!can(caller.role, "keys.own")) throw forbidden("Billing contacts do not manage API keys.");
  const key = await getKeyInOrg({ organizationId: caller.organizationId, keyId });
  if (!key || (!can(caller.role, "keys.all") && key.createdBy !== caller.userId)) throw notFound("This key");
  return key;
}

async function notifyAdmins(caller: Caller, event: "created" | "rotated" | "revoked", key: { label: string; prefix: string }, detail?: string) {
  const to = await listEmailsByRole({ organizationId: caller.organizationId, roles: ["admin"] });
  await sendMail(
    to,
    keyNoticeMail({ organization: caller.organizationName, event, label: key.label, prefix: key.prefix, actor: `${caller.name} <${caller.email}>`, detail, url: `${baseUrl()}/keys` }),
  );
}

export async function createPortalKey(caller: Caller, input: KeyCreateInput): Promise<{ key: KeyView; secret: string }> {
  if (!can(caller.role, "keys.own")) throw forbidden("Billing contacts do not create API keys.");
  if (!caller.emailVerified) throw new PortalError(403, "Confirm your e-mail address before creating keys.");
  const expiresAt = input.expiresOn ? new Date(`${input.expiresOn}T23:59:59.999Z`) : null;
  const { key, secret } = await createKey({
    organizationId: caller.organizationId,
    createdBy: caller.userId,
    label: input.label,
    scopes: input.scopes as Scope[],
    expiresAt,
    allowedCidrs: input.allowedCidrs,
    actor: { type: "user", userId: caller.userId },
  });
  const ranges = key.allowedCidrs?.length ? ` Accepted only from ${key.allowedCidrs.join(", ")}.` : "";
  await notifyAdmins(caller, "created", key, `Scopes: ${key.scopes.join(", ")}. ${expiresAt ? `Expires ${expiresAt.toUTCString()}.` : "No expiry."}${ranges}`);
  return { key: toKeyView(key, caller.name), secret };
}

/** Edits a key's label, scopes or address ranges; the secret does not change. Developers edit their own keys. */
export async function updatePortalKey(caller: Caller, keyId: number, input: KeyUpdateInput): Promise<KeyView> {
  const key = await manageable(caller, keyId);
  const now = new Date();
  const state = keyState(key, now);
  if (state === "revoked" || state === "expired") throw new PortalError(409, `This key is ${state}; it cannot be changed.`);
  const row = await updateKey({
    organizationId: caller.organizationId,
    keyId,
    changes: { label: input.label, scopes: input.scopes as Scope[] | undefined, allowedCidrs: input.allowedCidrs },
    actor: { type: "user", userId: caller.userId },
  });
  if (!row) throw notFound("This key");
  return toKeyView(row, null, now);
}

export async function rotatePortalKey(caller: Caller, keyId: number, grace: GracePeriod) {
  await manageable(caller, keyId);
  const r = await rotateKey({ organizationId: caller.organizationId, keyId, grace, actor: { type: "user", userId: caller.userId }, createdBy: caller.userId });
  if (!r) throw new PortalError(409, "Only an active key can be rotated.");
  await notifyAdmins(
    caller,
    "rotated",
    r.key,
    grace === "immediately" ? "The previous secret stopped working at once." : `The previous secret keeps working until ${r.graceEndsAt.toUTCString()}.`,
  );
  return { key: toKeyView(r.key, caller.name), secret: r.secret, graceEndsAt: r.graceEndsAt.toISOString() };
}

export async function revokePortalKey(caller: Caller, keyId: number): Promise<void> {
  const key = await manageable(caller, keyId);
  const done = await revokeKey({ organizationId: caller.organizationId, keyId, actor: { type: "user", userId: caller.userId } });
  if (!done) throw new PortalError(409, "This key is revoked already.");
  await notifyAdmins(caller, "revoked", key, "Requests with this key are refused from now on.");
}


/**
 * Warns the admins (and the key's creator) once per key that it expires within 7 days. Takes an organisation
 * to scan one, or none to scan all (for a scheduled job). Returns how many warnings went out.
 */
export async function warnExpiringKeys(opts: { organizationId?: number; now?: Date } = {}): Promise<number> {
  const now = opts.now ?? new Date();
  const rows = await listKeysToWarnOfExpiry({ organizationId: opts.organizationId, now, until: new Date(now.getTime() + EXPIRY_WARNING_MS) });
  let sent = 0;
  for (const r of rows) {
    // Claim the warning first so two servers never both send it.
    if (!(await claimExpiryWarning({ keyId: r.key.id, at: now }))) continue;
    const admins = await listEmailsByRole({ organizationId: r.key.organizationId, roles: ["admin"] });
    const to = [...new Set([...admins, ...(r.creatorEmail ? [r.creatorEmail] : [])])];
    await sendMail(
      to,
      keyNoticeMail({
        organization: r.orgName,
        event: "expires soon",
        label: r.key.label,
        prefix: r.key.prefix,
        actor: "",
        detail: `It stops working on ${r.key.expiresAt!.toUTCString()}. Rotate it before then to keep your integrations running.`,
        url: `${baseUrl()}/keys`,
      }),
    );
    await recordAudit({
      organizationId: r.key.organizationId,
      actorType: "system",
      action: "key.expiry_warned",
      targetType: "api_key",
      targetId: String(r.key.id),
      detail: { expiresAt: r.key.expiresAt!.toISOString() },
    });
    sent++;
  }
  return sent;
}
