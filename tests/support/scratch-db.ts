// A scratch database on the test run's MariaDB for migration tests: created before the file's tests, dropped
// after them; and the column list (with nullability) of a table there and in a Drizzle schema module.
import { randomBytes } from "node:crypto";
import { is } from "drizzle-orm";
import { getTableConfig, MySqlTable } from "drizzle-orm/mysql-core";
import mysql from "mysql2/promise";
import { afterAll, beforeAll } from "vitest";
import { databaseUrl } from "../../scripts/lib/mariadb";
import { testLayout } from "./layout";

export function scratchDatabase(prefix: string) {
  const layout = testLayout();
  const name = `${prefix}_${randomBytes(4).toString("hex")}`;
  let conn: mysql.Connection | undefined;
  beforeAll(async () => {
    conn = await mysql.createConnection({ uri: databaseUrl(layout.db) });
    await conn.query(`CREATE DATABASE \`${name}\``);
  });
  afterAll(async () => {
    await conn?.query(`DROP DATABASE IF EXISTS \`${name}\``);
    await conn?.end();
  });
  return {
    name,
    url: databaseUrl(layout.db, name),
    get conn(): mysql.Connection {
      if (!conn) throw new Error("the scratch database is created in beforeAll");
      return conn;
    },
  };
}

/** The tables a Drizzle schema module declares. */
export const tablesOf = (schema: Record<string, unknown>) => (Object.values(schema) as unknown[]).filter((v) => is(v, MySqlTable)) as MySqlTable[];

/** A table's columns in the scratch database: name, nullable, data type. */
export async function columnsIn(db: { conn: mysql.Connection; name: string }, table: string) {
  const [rows] = await db.conn.query("SELECT COLUMN_NAME AS name, IS_NULLABLE AS nullable, DATA_TYPE AS type FROM information_schema.COLUMNS WHERE TABLE_SCHEMA=? AND TABLE_NAME=?", [db.name, table]);
  return rows as { name: string; nullable: string; type: string }[];
}

export { getTableConfig };
