// The generated migrations build the schema lib/db/schema.ts declares, on a fresh database; seeding twice
// changes nothing.
import { randomBytes } from "node:crypto";
import { is } from "drizzle-orm";
import { getTableConfig, MySqlTable } from "drizzle-orm/mysql-core";
import mysql from "mysql2/promise";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as schema from "@/lib/db/schema";
import { databaseUrl } from "../../scripts/lib/mariadb";
import { applyMigrations } from "../../scripts/lib/migrate";
import { seedDemo } from "../../scripts/lib/seed";
import { testLayout } from "../support/layout";

const layout = testLayout();
const scratch = `sumfold_mig_${randomBytes(4).toString("hex")}`;
const url = databaseUrl(layout.db, scratch);
let conn: mysql.Connection;

const tables = (Object.values(schema) as unknown[]).filter((v) => is(v, MySqlTable)) as MySqlTable[];

beforeAll(async () => {
  conn = await mysql.createConnection({ uri: databaseUrl(layout.db) });
  await conn.query(`CREATE DATABASE \`${scratch}\``);
});
afterAll(async () => {
  await conn.query(`DROP DATABASE IF EXISTS \`${scratch}\``);
  await conn.end();
});

async function checksums(): Promise<Record<string, unknown>> {
  const out: Record<string, unknown> = {};
  for (const t of tables) {
    const name = getTableConfig(t).name;
    const [rows] = await conn.query(`CHECKSUM TABLE \`${scratch}\`.\`${name}\``);
    out[name] = (rows as { Checksum: unknown }[])[0].Checksum;
  }
  return out;
}

describe("migrations", () => {
  it("create every table and column the Drizzle schema declares, with its nullability", async () => {
    await applyMigrations(url);
    for (const t of tables) {
      const cfg = getTableConfig(t);
      const [rows] = await conn.query(
        "SELECT COLUMN_NAME AS name, IS_NULLABLE AS nullable FROM information_schema.COLUMNS WHERE TABLE_SCHEMA=? AND TABLE_NAME=?",
        [scratch, cfg.name],
      );
      const actual = Object.fromEntries((rows as { name: string; nullable: string }[]).map((r) => [r.name, r.nullable === "YES"]));
      const expected = Object.fromEntries(cfg.columns.map((c) => [c.name, !c.notNull]));
      expect(actual, `table ${cfg.name}`).toEqual(expected);
    }
  });

  it("are a no-op when applied again", async () => {
    const before = await checksums();
    await applyMigrations(url);
    expect(await checksums()).toEqual(before);
  });

  it("seed the demo scenario once; a second seed inserts nothing and changes no row", async () => {
    const first = await seedDemo(url);
    expect(first).toBeGreaterThan(0);
    const before = await checksums();
    expect(await seedDemo(url)).toBe(0);
    expect(await checksums()).toEqual(before);
    const [orgs] = await conn.query(`SELECT slug FROM \`${scratch}\`.organizations ORDER BY slug`);
    expect((orgs as { slug: string }[]).map((o) => o.slug)).toEqual(["harrowgate-mutual", "kestrel-precision"]);
  });
});
