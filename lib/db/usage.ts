import "server-only";
import { and, eq, gte, sql } from "drizzle-orm";
import { getDb } from "./client";
import { usageEvents } from "./schema";

export const monthStart = (d = new Date()) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1));

/** Compute units an organisation was charged since the first of this month (UTC). */
export async function sumUnitsThisMonth({ organizationId }: { organizationId: number }): Promise<number> {
  const [row] = await getDb()
    .select({ units: sql<string>`COALESCE(SUM(${usageEvents.computeUnits}), 0)` })
    .from(usageEvents)
    .where(and(eq(usageEvents.organizationId, organizationId), gte(usageEvents.createdAt, monthStart())));
  return Number(row.units);
}
