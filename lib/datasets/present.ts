import type { Dataset, DatasetVersion } from "@/lib/db/schema-datasets";
import type { DatasetSummary, Histogram } from "./stats";

/** A version as the portal and the public API show it (no payloads). */
export interface VersionJson {
  version: number;
  rows: number;
  skippedRows: number;
  fileName: string;
  fileBytes: number;
  fileSha256: string;
  format: DatasetVersion["format"];
  delimiter: string | null;
  valueColumn: string | null;
  weightColumn: string | null;
  weightKind: DatasetVersion["weightKind"];
  summary: DatasetSummary;
  histogram: Histogram;
  notes: string[];
  createdAt: string;
}

export interface DatasetJson {
  id: string;
  name: string;
  description: string;
  latestVersion: number;
  createdAt: string;
  updatedAt: string;
}

export function versionJson(v: DatasetVersion): VersionJson {
  return {
    version: v.version,
    rows: v.rowCount,
    skippedRows: v.skippedRows,
    fileName: v.fileName,
    fileBytes: v.fileBytes,
    fileSha256: v.fileSha256,
    format: v.format,
    delimiter: v.delimiter,
    valueColumn: v.valueColumn,
    weightColumn: v.weightColumn,
    weightKind: v.weightKind,
    summary: v.summary as unknown as DatasetSummary,
    histogram: v.histogram as unknown as Histogram,
    notes: v.notes,
    createdAt: v.createdAt.toISOString(),
  };
}

export function datasetJson(d: Dataset): DatasetJson {
  return {
    id: d.publicId,
    name: d.name,
    description: d.description,
    latestVersion: d.latestVersion,
    createdAt: d.createdAt.toISOString(),
    updatedAt: d.updatedAt.toISOString(),
  };
}
