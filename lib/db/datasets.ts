import "server-only";
import { randomBytes } from "node:crypto";
import { and, asc, desc, eq, sql } from "drizzle-orm";
import { decodeFloat64, encodeFloat64 } from "@/lib/datasets/codec";
import type { DatasetSummary, Histogram } from "@/lib/datasets/stats";
import { recordAudit } from "./audit";
import { getDb, type Db } from "./client";
import { datasetChunks, datasets, datasetVersions, type ChunkKind, type Dataset, type DatasetVersion } from "./schema-datasets";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

const ALPHABET = "0123456789abcdefghjkmnpqrstvwxyz"; // Crockford base 32, lower case
/** A random public id, e.g. "ds_7kq2m9x4c1vbt0hz" (80 bits). */
export function newDatasetId(): string {
  const b = randomBytes(16);
  let s = "";
  for (let i = 0; i < 16; i++) s += ALPHABET[b[i] & 31];
  return `ds_${s}`;
}

export interface NewVersionData {
  fileName: string;
  raw: { chunks: Buffer[]; bytes: number; sha256: string };
  format: DatasetVersion["format"];
  delimiter: string | null;
  valueColumn: string | null;
  weightColumn: string | null;
  weightKind: DatasetVersion["weightKind"];
  values: Float64Array;
  weights: Float64Array | null;
  skippedRows: number;
  summary: DatasetSummary;
  histogram: Histogram;
  notes: string[];
}

async function insertChunks(tx: Tx, versionId: number, kind: ChunkKind, chunks: Buffer[]) {
  // One row per statement: each stays far below max_allowed_packet.
  for (let seq = 0; seq < chunks.length; seq++) await tx.insert(datasetChunks).values({ versionId, kind, seq, bytes: chunks[seq] });
}

async function insertVersion(tx: Tx, datasetId: number, version: number, createdBy: number | null, d: NewVersionData) {
  const [res] = await tx.insert(datasetVersions).values({
    datasetId,
    version,
    fileName: d.fileName.slice(0, 255),
    fileBytes: d.raw.bytes,
    fileSha256: d.raw.sha256,
    format: d.format,
    delimiter: d.delimiter,
    valueColumn: d.valueColumn?.slice(0, 255) ?? null,
    weightColumn: d.weightColumn?.slice(0, 255) ?? null,
    weightKind: d.weightKind,
    rowCount: d.values.length,
    skippedRows: d.skippedRows,
    summary: d.summary as unknown as Record<string, unknown>,
    histogram: d.histogram as unknown as Record<string, unknown>,
    notes: d.notes,
    createdBy,
  });
  const versionId = res.insertId;
  await insertChunks(tx, versionId, "raw", d.raw.chunks);
  await insertChunks(tx, versionId, "values", encodeFloat64(d.values));
  if (d.weights) await insertChunks(tx, versionId, "weights", encodeFloat64(d.weights));
  return versionId;
}

/** Creates a dataset with its first version, all in one transaction (nothing is left behind on failure). */
export async function createDatasetWithVersion(args: { organizationId: number; ownerId: number; name: string; description: string; data: NewVersionData }) {
  const publicId = newDatasetId();
  await getDb().transaction(async (tx) => {
    const [res] = await tx.insert(datasets).values({ publicId, organizationId: args.organizationId, ownerId: args.ownerId, name: args.name, description: args.description, latestVersion: 1 });
    await insertVersion(tx, res.insertId, 1, args.ownerId, args.data);
    await recordAudit(
      { organizationId: args.organizationId, actorUserId: args.ownerId, actorType: "user", action: "dataset.create", targetType: "dataset", targetId: publicId, detail: { version: 1, rows: args.data.values.length, bytes: args.data.raw.bytes } },
      tx,
    );
  });
  return { publicId, version: 1 };
}

/** Adds the next version to a dataset of the organisation (row-locked so concurrent uploads get distinct numbers). */
export async function addDatasetVersion(args: { organizationId: number; publicId: string; userId: number; data: NewVersionData }): Promise<{ publicId: string; version: number } | null> {
  return getDb().transaction(async (tx) => {
    const [ds] = await tx
      .select()
      .from(datasets)
      .where(and(eq(datasets.publicId, args.publicId), eq(datasets.organizationId, args.organizationId)))
      .for("update");
    if (!ds) return null;
    const version = ds.latestVersion + 1;
    await insertVersion(tx, ds.id, version, args.userId, args.data);
    await tx.update(datasets).set({ latestVersion: version, updatedAt: new Date() }).where(eq(datasets.id, ds.id));
    await recordAudit(
      { organizationId: args.organizationId, actorUserId: args.userId, actorType: "user", action: "dataset.version", targetType: "dataset", targetId: args.publicId, detail: { version, rows: args.data.values.length, bytes: args.data.raw.bytes } },
      tx,
    );
    return { publicId: args.publicId, version };
  });
}

/** Version rows hold metadata only; the payloads live in dataset_chunks. */
export type VersionMeta = DatasetVersion;

/** The organisation's datasets, newest first, each with its latest version's metadata. */
export async function listDatasetsOfOrg({ organizationId }: { organizationId: number }): Promise<{ dataset: Dataset; latest: VersionMeta | null }[]> {
  const rows = await getDb()
    .select({ dataset: datasets, latest: datasetVersions })
    .from(datasets)
    .leftJoin(datasetVersions, and(eq(datasetVersions.datasetId, datasets.id), eq(datasetVersions.version, datasets.latestVersion)))
    .where(eq(datasets.organizationId, organizationId))
    .orderBy(desc(datasets.updatedAt), desc(datasets.id));
  return rows.map((r) => ({ dataset: r.dataset, latest: r.latest }));
}

/** One dataset of the organisation with every version's metadata (newest first), or null. */
export async function getDatasetInOrg({ organizationId, publicId }: { organizationId: number; publicId: string }): Promise<{ dataset: Dataset; versions: VersionMeta[] } | null> {
  const db = getDb();
  const [dataset] = await db.select().from(datasets).where(and(eq(datasets.publicId, publicId), eq(datasets.organizationId, organizationId)));
  if (!dataset) return null;
  const versions = await db.select().from(datasetVersions).where(eq(datasetVersions.datasetId, dataset.id)).orderBy(desc(datasetVersions.version));
  return { dataset, versions };
}

/** A version's metadata (the latest when `version` is omitted) of a dataset of the organisation, or null. */
export async function getDatasetVersionMeta({ organizationId, publicId, version }: { organizationId: number; publicId: string; version?: number }) {
  const [row] = await getDb()
    .select({ dataset: datasets, version: datasetVersions })
    .from(datasets)
    .innerJoin(datasetVersions, and(eq(datasetVersions.datasetId, datasets.id), eq(datasetVersions.version, version ?? datasets.latestVersion)))
    .where(and(eq(datasets.publicId, publicId), eq(datasets.organizationId, organizationId)));
  return row ?? null;
}

async function readChunks(versionId: number, kind: ChunkKind): Promise<Buffer[]> {
  const rows = await getDb()
    .select({ bytes: datasetChunks.bytes })
    .from(datasetChunks)
    .where(and(eq(datasetChunks.versionId, versionId), eq(datasetChunks.kind, kind)))
    .orderBy(asc(datasetChunks.seq));
  return rows.map((r) => r.bytes);
}

/** The stored values (and weights) of a version by its internal id. */
export async function readVersionValues({ versionId }: { versionId: number }): Promise<{ values: Float64Array; weights: Float64Array | null }> {
  const values = decodeFloat64(await readChunks(versionId, "values"));
  const w = await readChunks(versionId, "weights");
  return { values, weights: w.length ? decodeFloat64(w) : null };
}

/** The raw file of a version, as uploaded (for audit and download). */
export async function readVersionRaw({ versionId }: { versionId: number }): Promise<Buffer> {
  return Buffer.concat(await readChunks(versionId, "raw"));
}

export async function updateDatasetInOrg(args: { organizationId: number; publicId: string; userId: number; name?: string; description?: string }): Promise<boolean> {
  const set: Partial<Dataset> = { updatedAt: new Date() };
  if (args.name !== undefined) set.name = args.name;
  if (args.description !== undefined) set.description = args.description;
  return getDb().transaction(async (tx) => {
    const [res] = await tx.update(datasets).set(set).where(and(eq(datasets.publicId, args.publicId), eq(datasets.organizationId, args.organizationId)));
    if (res.affectedRows === 0) return false;
    await recordAudit({ organizationId: args.organizationId, actorUserId: args.userId, actorType: "user", action: "dataset.update", targetType: "dataset", targetId: args.publicId, detail: { name: args.name, description: args.description !== undefined } }, tx);
    return true;
  });
}

/** Deletes a dataset with all its versions and payloads (foreign keys cascade). */
export async function deleteDatasetInOrg(args: { organizationId: number; publicId: string; userId: number }): Promise<boolean> {
  return getDb().transaction(async (tx) => {
    const [res] = await tx.delete(datasets).where(and(eq(datasets.publicId, args.publicId), eq(datasets.organizationId, args.organizationId)));
    if (res.affectedRows === 0) return false;
    await recordAudit({ organizationId: args.organizationId, actorUserId: args.userId, actorType: "user", action: "dataset.delete", targetType: "dataset", targetId: args.publicId }, tx);
    return true;
  });
}

/** Bytes held by the organisation's dataset chunks (for usage pages and tests of "nothing stored"). */
export async function countDatasetChunks({ organizationId }: { organizationId: number }): Promise<{ chunks: number; versions: number; datasets: number }> {
  const [r] = await getDb()
    .select({
      datasets: sql<number>`count(distinct ${datasets.id})`,
      versions: sql<number>`count(distinct ${datasetVersions.id})`,
      chunks: sql<number>`count(${datasetChunks.seq})`,
    })
    .from(datasets)
    .leftJoin(datasetVersions, eq(datasetVersions.datasetId, datasets.id))
    .leftJoin(datasetChunks, eq(datasetChunks.versionId, datasetVersions.id))
    .where(eq(datasets.organizationId, organizationId));
  return { chunks: Number(r.chunks), versions: Number(r.versions), datasets: Number(r.datasets) };
}
