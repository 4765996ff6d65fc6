/** A key's state at an instant. A rotated key carries revokedAt = the end of its grace period. */
export type KeyState = "active" | "retiring" | "revoked" | "expired";

export function keyState(k: { revokedAt: Date | null; expiresAt: Date | null; graceEndsAt: Date | null }, now = new Date()): KeyState {
  if (k.revokedAt && k.revokedAt <= now) return "revoked";
  if (k.expiresAt && k.expiresAt <= now) return "expired";
  if (k.revokedAt && k.graceEndsAt && k.graceEndsAt > now) return "retiring";
  return "active";
}

export const GRACE_PERIODS = {
  immediately: 0,
  "1h": 3_600_000,
  "24h": 86_400_000,
  "7d": 7 * 86_400_000,
} as const;
export type GracePeriod = keyof typeof GRACE_PERIODS;
