// The generated migrations build the schema lib/db/schema.ts declares, on a fresh database; seeding twice
// changes nothing.
import { describe, expect, it } from "vitest";
import * as schema from "@/lib/db/schema";
import { applyMigrations } from "../../scripts/lib/migrate";
import { seedDemo } from "../../scripts/lib/seed";
import { columnsIn, getTableConfig, scratchDatabase, tablesOf } from "../support/scratch-db";

const db = scratchDatabase("sumfold_mig");
const scratch = db.name;
const url = db.url;
const tables = tablesOf(schema);

async function checksums(): Promise<Record<string, unknown>> {
  const out: Record<string, unknown> = {};
  for (const t of tables) {
    const name = getTableConfig(t).name;
    const [rows] = await db.conn.query(`CHECKSUM TABLE \`${scratch}\`.\`${name}\``);
    out[name] = (rows as { Checksum: unknown }[])[0].Checksum;
  }
  return out;
}

describe("migrations", () => {
  it("create every table and column the Drizzle schema declares, with its nullability", async () => {
    await applyMigrations(url);
    for (const t of tables) {
      const cfg = getTableConfig(t);
      const actual = Object.fromEntries((await columnsIn(db, cfg.name)).map((r) => [r.name, r.nullable === "YES"]));
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
    const [orgs] = await db.conn.query(`SELECT slug FROM \`${scratch}\`.organizations ORDER BY slug`);
    expect((orgs as { slug: string }[]).map((o) => o.slug)).toEqual(["harrowgate-mutual", "kestrel-precision"]);
  });
});
