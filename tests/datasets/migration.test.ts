// drizzle/0002_datasets.sql builds the tables lib/db/schema-datasets.ts declares (the shared migrations test
// covers lib/db/schema.ts only).
import { randomBytes } from "node:crypto";
import { is } from "drizzle-orm";
import { getTableConfig, MySqlTable } from "drizzle-orm/mysql-core";
import mysql from "mysql2/promise";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as schema from "@/lib/db/schema-datasets";
import { databaseUrl } from "../../scripts/lib/mariadb";
import { applyMigrations } from "../../scripts/lib/migrate";
import { testLayout } from "../support/layout";

const layout = testLayout();
const scratch = `sumfold_dsmig_${randomBytes(4).toString("hex")}`;
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

describe("dataset migration", () => {
  it("creates datasets, dataset_versions and dataset_chunks with every column and its nullability", async () => {
    await applyMigrations(databaseUrl(layout.db, scratch));
    expect(tables.map((t) => getTableConfig(t).name).sort()).toEqual(["dataset_chunks", "dataset_versions", "datasets"]);
    for (const t of tables) {
      const cfg = getTableConfig(t);
      const [rows] = await conn.query("SELECT COLUMN_NAME AS name, IS_NULLABLE AS nullable, DATA_TYPE AS type FROM information_schema.COLUMNS WHERE TABLE_SCHEMA=? AND TABLE_NAME=?", [scratch, cfg.name]);
      const list = rows as { name: string; nullable: string; type: string }[];
      const actual = Object.fromEntries(list.map((r) => [r.name, r.nullable === "YES"]));
      expect(actual, `table ${cfg.name}`).toEqual(Object.fromEntries(cfg.columns.map((c) => [c.name, !c.notNull])));
      if (cfg.name === "dataset_chunks") expect(list.find((r) => r.name === "bytes")?.type).toBe("mediumblob");
    }
  });
});
