import "server-only";
import { currentOrigin } from "@/lib/request-context";
import { getDb, type Db } from "./client";
import { auditEvents, type NewAuditEvent } from "./schema";

/**
 * Records who did what to which object, and from where (the address of the request being handled, unless the
 * event names one). Takes a transaction when the change is part of one.
 */
export async function recordAudit(event: NewAuditEvent, db: Pick<Db, "insert"> = getDb()): Promise<void> {
  const origin = currentOrigin();
  await db.insert(auditEvents).values({ ip: origin?.ip ?? null, userAgent: origin?.userAgent ?? null, ...event });
}
