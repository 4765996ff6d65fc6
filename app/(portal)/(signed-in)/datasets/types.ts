import type { DatasetJson, VersionJson } from "@/lib/datasets/present";

export type ListedDataset = DatasetJson & { ownedByYou: boolean; latest: VersionJson | null };
export type DatasetView = DatasetJson & { ownedByYou: boolean; canChange: boolean };
export type { DatasetJson, VersionJson };

/** 1234567.891 -> "1,234,568" or "0.001235": four significant digits for a summary table. */
export function fmtNum(v: number | null | undefined): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  const a = Math.abs(v);
  if (a !== 0 && (a >= 1e9 || a < 1e-4)) return v.toExponential(3);
  return v.toLocaleString("en-GB", { maximumSignificantDigits: a >= 1000 ? 7 : 4 });
}

export const fmtBytes = (n: number) => (n < 1024 ? `${n} B` : n < 1048576 ? `${(n / 1024).toFixed(1)} KiB` : `${(n / 1048576).toFixed(1)} MiB`);
