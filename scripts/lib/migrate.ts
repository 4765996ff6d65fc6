import { resolve } from "node:path";
import { drizzle } from "drizzle-orm/mysql2";
import { migrate } from "drizzle-orm/mysql2/migrator";
import mysql from "mysql2/promise";
import { REPO } from "./config";

/** Applies the generated SQL migrations in drizzle/ (already applied ones are skipped by the journal table). */
export async function applyMigrations(databaseUrl: string): Promise<void> {
  const conn = await mysql.createConnection({ uri: databaseUrl, multipleStatements: false });
  try {
    await migrate(drizzle(conn), { migrationsFolder: resolve(REPO, "drizzle") });
  } finally {
    await conn.end();
  }
}
