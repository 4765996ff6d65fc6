// drizzle/0002_datasets.sql builds the tables lib/db/schema-datasets.ts declares (the shared migrations test
// covers lib/db/schema.ts only).
import { describe, expect, it } from "vitest";
import * as schema from "@/lib/db/schema-datasets";
import { applyMigrations } from "../../scripts/lib/migrate";
import { columnsIn, getTableConfig, scratchDatabase, tablesOf } from "../support/scratch-db";

const scratch = scratchDatabase("sumfold_dsmig");
const tables = tablesOf(schema);

describe("dataset migration", () => {
  it("creates datasets, dataset_versions and dataset_chunks with every column and its nullability", async () => {
    await applyMigrations(scratch.url);
    expect(tables.map((t) => getTableConfig(t).name).sort()).toEqual(["dataset_chunks", "dataset_versions", "datasets"]);
    for (const t of tables) {
      const cfg = getTableConfig(t);
      const list = await columnsIn(scratch, cfg.name);
      const actual = Object.fromEntries(list.map((r) => [r.name, r.nullable === "YES"]));
      expect(actual, `table ${cfg.name}`).toEqual(Object.fromEntries(cfg.columns.map((c) => [c.name, !c.notNull])));
      if (cfg.name === "dataset_chunks") expect(list.find((r) => r.name === "bytes")?.type).toBe("mediumblob");
    }
  });
});
