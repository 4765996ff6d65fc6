import "server-only";

/** What the portal polls while an upload runs: bytes the parser has read, rows seen, and the phase. */
export interface UploadProgress {
  userId: number;
  phase: "receiving" | "storing" | "done" | "failed";
  bytesRead: number;
  totalBytes: number | null;
  rows: number;
  updatedAt: number;
}

// In-process (one server process serves the portal); entries expire after ten minutes.
const TTL_MS = 10 * 60 * 1000;
const g = globalThis as unknown as { __sumfoldUploads?: Map<string, UploadProgress> };
const table = () => (g.__sumfoldUploads ??= new Map());

export function setProgress(id: string | undefined, p: Omit<UploadProgress, "updatedAt">) {
  if (!id) return;
  const now = Date.now();
  const t = table();
  if (t.size > 1000) for (const [k, v] of t) if (now - v.updatedAt > TTL_MS) t.delete(k);
  t.set(id, { ...p, updatedAt: now });
}

/** The progress of an upload, visible to the user who started it only. */
export function getProgress(id: string, userId: number): UploadProgress | null {
  const p = table().get(id);
  return p && p.userId === userId && Date.now() - p.updatedAt < TTL_MS ? p : null;
}
