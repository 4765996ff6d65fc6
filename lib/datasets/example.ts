import type { DatasetJson, VersionJson } from "./present";
import { histogram, summarize } from "./stats";

// Demo data for the OpenAPI document (invented): Harrowgate Mutual's windscreen claims, in euros.
const CLAIMS = [312, 289, 455, 198, 610, 275, 342, 1280, 401, 366, 295, 520, 233, 389, 708, 352, 264, 437, 318, 980];

/** A dataset as the API shows it, its numbers computed from the demo claims by the same code the API runs. */
export function datasetExample(): { listItem: DatasetJson & { latest: VersionJson }; detail: DatasetJson & { versions: VersionJson[] } } {
  const values = Float64Array.from(CLAIMS);
  const version: VersionJson = {
    version: 1,
    rows: CLAIMS.length,
    skippedRows: 0,
    fileName: "windscreen-claims-2025.csv",
    fileBytes: 412,
    fileSha256: "9c1f0d6e4b3a2f8e7d6c5b4a39281706f5e4d3c2b1a09f8e7d6c5b4a3928170f",
    format: "csv",
    delimiter: ",",
    valueColumn: "amount_eur",
    weightColumn: null,
    weightKind: "none",
    summary: summarize(values),
    histogram: histogram(values),
    notes: ["Read as CSV separated by comma.", 'Header row found; values from column "amount_eur".'],
    createdAt: "2026-11-03T09:12:44.000Z",
  };
  const base: DatasetJson = {
    id: "ds_7kq2m9x4c1vbt0hz",
    name: "Windscreen claims 2025",
    description: "Settled windscreen claims, Harrowgate Mutual motor book, calendar year 2025.",
    latestVersion: 1,
    createdAt: "2026-11-03T09:12:44.000Z",
    updatedAt: "2026-11-03T09:12:44.000Z",
  };
  return { listItem: { ...base, latest: version }, detail: { ...base, versions: [version] } };
}
