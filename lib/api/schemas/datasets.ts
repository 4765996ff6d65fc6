import { Meta } from "@/lib/api/common-schemas";
import { z } from "@/lib/api/zod";

export const DatasetSummarySchema = z
  .object({
    rows: z.number().int().openapi({ description: "rows kept" }),
    n: z.number().openapi({ description: "sample size: rows, or the sum of counts; the sum of weights for real weights" }),
    weightKind: z.enum(["none", "counts", "weights"]),
    mean: z.number(),
    sd: z.number().nullable().openapi({ description: "divisor n - 1 for samples and counts, the sum of weights for real weights; null when n < 2" }),
    sdDivisor: z.enum(["n-1", "sum of weights"]),
    min: z.number(),
    q1: z.number(),
    median: z.number(),
    q3: z.number(),
    max: z.number(),
    quartileRule: z.enum(["type 7", "inverse cdf"]).openapi({ description: "Hyndman & Fan (1996) type 7 for samples and counts; the inverse of the weighted CDF for real weights" }),
    skewness: z.number().nullable().openapi({ description: "g1 = m3 / m2^(3/2); null when all values are equal" }),
    kurtosis: z.number().nullable().openapi({ description: "excess kurtosis g2 = m4 / m2^2 - 3; null when all values are equal" }),
  })
  .openapi("DatasetSummary");

export const DatasetHistogram = z
  .object({ edges: z.array(z.number()).openapi({ description: "k + 1 equal-width bin edges from min to max" }), counts: z.array(z.number()).openapi({ description: "values (or their weights) per bin" }) })
  .openapi("DatasetHistogram");

export const DatasetVersionSchema = z
  .object({
    version: z.number().int().openapi({ description: "1, 2, ...; a model names it as { \"dataset\": id, \"version\": n }" }),
    rows: z.number().int(),
    skippedRows: z.number().int(),
    fileName: z.string(),
    fileBytes: z.number().int(),
    fileSha256: z.string().openapi({ description: "SHA-256 of the raw file as uploaded (kept for audit)" }),
    format: z.enum(["csv", "tsv", "list"]),
    delimiter: z.string().nullable(),
    valueColumn: z.string().nullable(),
    weightColumn: z.string().nullable(),
    weightKind: z.enum(["none", "counts", "weights"]),
    summary: DatasetSummarySchema,
    histogram: DatasetHistogram,
    notes: z.array(z.string()).openapi({ description: "how the file was read: delimiter guessed, rows skipped and why" }),
    createdAt: z.string().openapi({ format: "date-time" }),
  })
  .openapi("DatasetVersion");

const DatasetBase = {
  id: z.string().openapi({ example: "ds_7kq2m9x4c1vbt0hz" }),
  name: z.string(),
  description: z.string(),
  latestVersion: z.number().int(),
  createdAt: z.string().openapi({ format: "date-time" }),
  updatedAt: z.string().openapi({ format: "date-time" }),
};

export const DatasetListItem = z.object({ ...DatasetBase, latest: DatasetVersionSchema.nullable() }).openapi("DatasetListItem");
export const DatasetDetail = z.object({ ...DatasetBase, versions: z.array(DatasetVersionSchema).openapi({ description: "newest first" }) }).openapi("DatasetDetail");

export const DatasetsResponse = z.object({ datasets: z.array(DatasetListItem), meta: Meta }).openapi("DatasetsResponse");
export const DatasetResponse = z.object({ dataset: DatasetDetail, meta: Meta }).openapi("DatasetResponse");

export { DatasetRef } from "@/lib/api/common-schemas";
