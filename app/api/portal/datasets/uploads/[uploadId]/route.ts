// GET /api/portal/datasets/uploads/{uploadId}: how far the server has read and parsed an upload
import { requireCaller } from "@/lib/auth/session";
import { getProgress } from "@/lib/datasets/progress";
import { handler, notFound, ok } from "@/lib/portal/http";

export const dynamic = "force-dynamic";

export const GET = handler(async (req, params) => {
  const caller = await requireCaller(req);
  const p = getProgress(params.uploadId, caller.userId);
  if (!p) throw notFound("This upload");
  return ok({ phase: p.phase, bytesRead: p.bytesRead, totalBytes: p.totalBytes, rows: p.rows });
});
