import { sql } from "drizzle-orm";
import { bigint, customType, datetime, index, int, json, mysqlEnum, mysqlTable, primaryKey, text, uniqueIndex, varchar } from "drizzle-orm/mysql-core";
import { organizations, users } from "./schema";

const ref = (name: string) => bigint(name, { mode: "number", unsigned: true });
const createdAt = () => datetime("created_at", { mode: "date", fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`);

/** MEDIUMBLOB (up to 16 MiB) as a Buffer; chunks are kept well below it and below max_allowed_packet. */
const mediumBlob = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => "mediumblob",
  fromDriver: (v) => (Buffer.isBuffer(v) ? v : Buffer.from(v as unknown as Uint8Array)),
});

/** An organisation's named dataset; its data lives in immutable versions (a new upload is a new version). */
export const datasets = mysqlTable(
  "datasets",
  {
    id: bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey(),
    /** The id models and the API use, e.g. "ds_7kq2m9x4c1vb"; random so ids cannot be enumerated. */
    publicId: varchar("public_id", { length: 32 }).notNull(),
    organizationId: ref("organization_id").notNull().references(() => organizations.id, { onDelete: "cascade" }),
    ownerId: ref("owner_id").references(() => users.id, { onDelete: "set null" }),
    name: varchar("name", { length: 160 }).notNull(),
    description: text("description").notNull(),
    latestVersion: int("latest_version", { unsigned: true }).notNull().default(0),
    createdAt: createdAt(),
    updatedAt: datetime("updated_at", { mode: "date", fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex("datasets_public_id_uq").on(t.publicId), index("datasets_org_idx").on(t.organizationId)],
);

export const DATASET_FORMATS = ["csv", "tsv", "list", "xlsx"] as const;
export const WEIGHT_KINDS = ["none", "counts", "weights"] as const;

/** One upload of a dataset: what was parsed, how, its summary, and (in dataset_chunks) the raw file and values. */
export const datasetVersions = mysqlTable(
  "dataset_versions",
  {
    id: bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey(),
    datasetId: ref("dataset_id").notNull().references(() => datasets.id, { onDelete: "cascade" }),
    version: int("version", { unsigned: true }).notNull(),
    fileName: varchar("file_name", { length: 255 }).notNull(),
    fileBytes: bigint("file_bytes", { mode: "number", unsigned: true }).notNull(),
    /** SHA-256 of the raw file, hex, so an audit can check the kept file. */
    fileSha256: varchar("file_sha256", { length: 64 }).notNull(),
    format: mysqlEnum("format", DATASET_FORMATS).notNull(),
    delimiter: varchar("delimiter", { length: 4 }),
    valueColumn: varchar("value_column", { length: 255 }),
    weightColumn: varchar("weight_column", { length: 255 }),
    weightKind: mysqlEnum("weight_kind", WEIGHT_KINDS).notNull(),
    /** rows kept (values stored) */
    rowCount: int("row_count", { unsigned: true }).notNull(),
    skippedRows: int("skipped_rows", { unsigned: true }).notNull().default(0),
    summary: json("summary").$type<Record<string, unknown>>().notNull(),
    histogram: json("histogram").$type<Record<string, unknown>>().notNull(),
    notes: json("notes").$type<string[]>().notNull(),
    createdBy: ref("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("dataset_versions_ds_version_uq").on(t.datasetId, t.version)],
);

export const CHUNK_KINDS = ["raw", "values", "weights"] as const;
export type ChunkKind = (typeof CHUNK_KINDS)[number];

/** Binary payloads in ordered chunks: the raw file as uploaded, values and weights as little-endian Float64. */
export const datasetChunks = mysqlTable(
  "dataset_chunks",
  {
    versionId: ref("version_id").notNull().references(() => datasetVersions.id, { onDelete: "cascade" }),
    kind: mysqlEnum("kind", CHUNK_KINDS).notNull(),
    seq: int("seq", { unsigned: true }).notNull(),
    bytes: mediumBlob("bytes").notNull(),
  },
  (t) => [primaryKey({ columns: [t.versionId, t.kind, t.seq] })],
);

export type Dataset = typeof datasets.$inferSelect;
export type NewDataset = typeof datasets.$inferInsert;
export type DatasetVersion = typeof datasetVersions.$inferSelect;
export type NewDatasetVersion = typeof datasetVersions.$inferInsert;
export type DatasetChunk = typeof datasetChunks.$inferSelect;

