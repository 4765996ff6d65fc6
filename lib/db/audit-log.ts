import "server-only";
import { and, desc, eq, gte, like, lt, or, sql } from "drizzle-orm";
import { getDb } from "./client";
import { apiKeys, auditEvents, users } from "./schema";

/** The organisation's audit events, newest first, with the acting person's name and e-mail. */
export async function listAuditEvents(q: { organizationId: number; from?: Date; to?: Date; action?: string; actorUserId?: number; limit: number }) {
  const where = [eq(auditEvents.organizationId, q.organizationId)];
  if (q.from) where.push(gte(auditEvents.createdAt, q.from));
  if (q.to) where.push(lt(auditEvents.createdAt, q.to));
  if (q.action) where.push(q.action.includes(".") ? eq(auditEvents.action, q.action) : like(auditEvents.action, `${q.action}.%`));
  if (q.actorUserId) where.push(eq(auditEvents.actorUserId, q.actorUserId));
  return getDb()
    .select({
      id: auditEvents.id,
      at: auditEvents.createdAt,
      actorType: auditEvents.actorType,
      actorUserId: auditEvents.actorUserId,
      actorName: users.name,
      actorEmail: users.email,
      action: auditEvents.action,
      targetType: auditEvents.targetType,
      targetId: auditEvents.targetId,
      targetKeyPrefix: apiKeys.prefix,
      detail: auditEvents.detail,
      ip: auditEvents.ip,
      userAgent: auditEvents.userAgent,
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorUserId))
    .leftJoin(apiKeys, and(eq(auditEvents.targetType, "api_key"), eq(apiKeys.id, sql`cast(${auditEvents.targetId} as unsigned)`)))
    .where(and(...where))
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(q.limit);
}

/** The actions and the people that occur in the organisation's log, for the filters. */
export async function auditFacets({ organizationId }: { organizationId: number }) {
  const db = getDb();
  const actions = await db.selectDistinct({ action: auditEvents.action }).from(auditEvents).where(eq(auditEvents.organizationId, organizationId));
  const people = await db
    .selectDistinct({ id: users.id, name: users.name, email: users.email })
    .from(auditEvents)
    .innerJoin(users, eq(users.id, auditEvents.actorUserId))
    .where(and(eq(auditEvents.organizationId, organizationId), or(eq(auditEvents.actorType, "user"))));
  return { actions: actions.map((a) => a.action).sort(), people: people.sort((a, b) => a.name.localeCompare(b.name)) };
}
