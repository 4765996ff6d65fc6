import bcrypt from "bcryptjs";
import { and, eq } from "drizzle-orm";
import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import * as schema from "../../lib/db/schema";
import { DEMO_PASSWORD, demoModels, demoOrganizations, demoPeople } from "../../lib/demo/scenario";

/**
 * Seeds the demo scenario. Idempotent: rows that exist (by their natural keys) are left untouched.
 * Returns how many rows it inserted.
 */
export async function seedDemo(databaseUrl: string): Promise<number> {
  const conn = await mysql.createConnection({ uri: databaseUrl });
  const db = drizzle(conn, { schema, mode: "default" });
  let inserted = 0;
  const count = (r: unknown) => (inserted += (r as [{ affectedRows: number }])[0].affectedRows);
  try {
    const orgIds = new Map<string, number>();
    for (const o of demoOrganizations) {
      count(await db.insert(schema.organizations).ignore().values({ slug: o.slug, name: o.name, plan: o.plan }));
      const [row] = await db.select({ id: schema.organizations.id }).from(schema.organizations).where(eq(schema.organizations.slug, o.slug));
      orgIds.set(o.slug, row.id);
    }
    const hash = await bcrypt.hash(DEMO_PASSWORD, 10);
    const userIds = new Map<string, number>();
    for (const p of demoPeople) {
      const [existing] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, p.email));
      if (!existing) {
        count(
          await db.insert(schema.users).values({ email: p.email, name: p.name, passwordHash: hash, emailVerifiedAt: new Date("2026-11-02T09:00:00Z") }),
        );
      }
      const [row] = await db.select({ id: schema.users.id }).from(schema.users).where(eq(schema.users.email, p.email));
      userIds.set(p.email, row.id);
      for (const [org, role] of p.memberships) {
        count(await db.insert(schema.memberships).ignore().values({ userId: row.id, organizationId: orgIds.get(org)!, role }));
      }
    }
    for (const m of demoModels) {
      const orgId = orgIds.get(m.org)!;
      const [existing] = await db
        .select({ id: schema.savedModels.id })
        .from(schema.savedModels)
        .where(and(eq(schema.savedModels.organizationId, orgId), eq(schema.savedModels.name, m.name)));
      if (!existing) {
        count(await db.insert(schema.savedModels).values({ organizationId: orgId, name: m.name, description: m.description, model: m.model }));
      }
    }
  } finally {
    await conn.end();
  }
  return inserted;
}
