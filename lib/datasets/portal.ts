import "server-only";
import type { Caller } from "@/lib/auth/session";
import { addDatasetVersion, createDatasetWithVersion, getDatasetInOrg, getDatasetVersionMeta } from "@/lib/db/datasets";
import { PortalError, notFound } from "@/lib/portal/http";
import { isDatasetParseError } from "./errors";
import { MAX_CONCURRENT_UPLOADS } from "./limits";
import { datasetJson, versionJson } from "./present";
import { setProgress } from "./progress";
import { uploadQuerySchema, type UploadQuery } from "./schemas";
import { receiveDatasetUpload } from "./upload";
import { fieldErrors } from "@/lib/portal/schemas";

// Uploads being parsed in this process (memory is bounded by MAX_CONCURRENT_UPLOADS of them).
const g = globalThis as unknown as { __sumfoldActiveUploads?: { n: number } };
const active = (g.__sumfoldActiveUploads ??= { n: 0 });

/** The upload form's fields from the query string; 422 with per-field messages when invalid. */
export function readUploadQuery(req: Request): UploadQuery {
  const params = Object.fromEntries([...new URL(req.url).searchParams].filter(([, v]) => v !== ""));
  const r = uploadQuerySchema.safeParse(params);
  if (!r.success) throw new PortalError(422, "Some fields need attention.", fieldErrors(r.error));
  return r.data;
}

/** Who may change a dataset (rename, describe, delete, new version): admins and its owner. */
export function canChange(caller: Caller, ownerId: number | null): boolean {
  return caller.role === "admin" || (ownerId !== null && ownerId === caller.userId);
}

const contentLength = (req: Request) => {
  const v = req.headers.get("content-length");
  const n = v === null ? NaN : Number(v);
  return Number.isFinite(n) && n >= 0 ? n : null;
};

/** The JSON answer for a file that cannot be read: 413 when too large, else 422, with line and column. */
function uploadProblem(e: unknown): Response | null {
  if (!isDatasetParseError(e)) return null;
  const status = e.code === "too_large" ? 413 : 422;
  return new Response(JSON.stringify({ error: e.message, problem: { code: e.code, ...e.detail } }), {
    status,
    headers: { "content-type": "application/json", "cache-control": "no-store", ...(status === 413 ? { connection: "close" } : {}) },
  });
}

/** POST a new dataset, or (with `publicId`) a new version of one: parse, then store everything in one transaction. */
export async function handleUpload(req: Request, caller: Caller, publicId?: string): Promise<Response> {
  const query = readUploadQuery(req);
  if (!publicId && !query.name) throw new PortalError(422, "Some fields need attention.", { name: "Name the dataset, e.g. “Motor claims 2025”." });
  if (publicId) {
    const found = await getDatasetInOrg({ organizationId: caller.organizationId, publicId });
    if (!found) throw notFound("This dataset");
    if (!canChange(caller, found.dataset.ownerId)) throw new PortalError(403, "Only an admin or the dataset's owner can upload a new version.");
  }
  if (active.n >= MAX_CONCURRENT_UPLOADS) {
    return new Response(JSON.stringify({ error: "The server is reading other uploads right now; try again in a minute." }), {
      status: 503,
      headers: { "content-type": "application/json", "cache-control": "no-store", "retry-after": "30", connection: "close" },
    });
  }
  active.n++;
  try {
    return await receiveAndStore(req, caller, query, publicId);
  } finally {
    active.n--;
  }
}

async function receiveAndStore(req: Request, caller: Caller, query: UploadQuery, publicId: string | undefined): Promise<Response> {
  let data;
  try {
    data = await receiveDatasetUpload({ body: req.body, contentLength: contentLength(req), query, userId: caller.userId });
  } catch (e) {
    const r = uploadProblem(e);
    if (r) return r;
    throw e;
  }
  const progress = (phase: "done" | "failed") => setProgress(query.uploadId, { userId: caller.userId, phase, bytesRead: data.raw.bytes, totalBytes: data.raw.bytes, rows: data.values.length + data.skippedRows });
  try {
    const saved = publicId
      ? await addDatasetVersion({ organizationId: caller.organizationId, publicId, userId: caller.userId, data })
      : await createDatasetWithVersion({ organizationId: caller.organizationId, ownerId: caller.userId, name: query.name!, description: query.description ?? "", data });
    if (!saved) throw notFound("This dataset");
    progress("done");
    const row = await getDatasetVersionMeta({ organizationId: caller.organizationId, publicId: saved.publicId, version: saved.version });
    return new Response(JSON.stringify({ dataset: datasetJson(row!.dataset), version: versionJson(row!.version) }), {
      status: 201,
      headers: { "content-type": "application/json", "cache-control": "no-store" },
    });
  } catch (e) {
    progress("failed");
    throw e;
  }
}
