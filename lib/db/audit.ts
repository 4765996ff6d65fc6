import "server-only";
import { getDb, type Db } from "./client";
import { auditEvents, type NewAuditEvent } from "./schema";

/** Records who did what to which object. Takes a transaction when the change is part of one. */
export async function recordAudit(event: NewAuditEvent, db: Pick<Db, "insert"> = getDb()): Promise<void> {
  await db.insert(auditEvents).values(event);
}
