import "server-only";
import { and, eq, gte, sql } from "drizzle-orm";
import { getDb } from "./client";
import { quotaNotices, usageEvents, type NewUsageEvent } from "./schema";

export const monthStart = (d = new Date()) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1));

/** Compute units an organisation was charged since the first of this month (UTC). */
export async function sumUnitsThisMonth({ organizationId }: { organizationId: number }): Promise<number> {
  const [row] = await getDb()
    .select({ units: sql<string>`COALESCE(SUM(${usageEvents.computeUnits}), 0)` })
    .from(usageEvents)
    .where(and(eq(usageEvents.organizationId, organizationId), gte(usageEvents.createdAt, monthStart())));
  return Number(row.units);
}

/** Writes usage events; INSERT IGNORE on the unique request id makes a repeated write count nothing twice. */
export async function insertUsageEvents({ rows }: { rows: NewUsageEvent[] }) {
  await getDb().insert(usageEvents).ignore().values(rows);
}

/** Claims the quota notice of (organisation, month, threshold) once; false when it was claimed before. */
export async function claimQuotaNotice({ organizationId, month, threshold }: { organizationId: number; month: string; threshold: number }): Promise<boolean> {
  const [res] = await getDb().insert(quotaNotices).ignore().values({ organizationId, month, threshold });
  return res.affectedRows > 0;
}
