import "server-only";
import { onUsageWritten } from "@/lib/api/metering";
import { warnExpiringKeys } from "./keys";
import { notifyQuotaThresholds } from "./quota";

export const EXPIRY_SCAN_MS = 3600_000;

const g = globalThis as unknown as { __sumfoldPortalSchedules?: NodeJS.Timeout };

/**
 * The portal's background duties, for the server's start-up hook (instrumentation.ts): quota e-mails after
 * every metering write, and an hourly scan for keys that expire within 7 days. Idempotent per process.
 */
export function startPortalSchedules(): void {
  if (g.__sumfoldPortalSchedules) return;
  onUsageWritten((organizationIds) => notifyQuotaThresholds(organizationIds));
  const scan = () => void warnExpiringKeys().catch((e) => console.error("[sumfold] expiry scan failed", e));
  g.__sumfoldPortalSchedules = setInterval(scan, EXPIRY_SCAN_MS);
  g.__sumfoldPortalSchedules.unref();
  scan();
}
