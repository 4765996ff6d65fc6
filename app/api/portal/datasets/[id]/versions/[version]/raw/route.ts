// GET /api/portal/datasets/{id}/versions/{version}/raw: the file as uploaded, for audit
import { requireCaller } from "@/lib/auth/session";
import { getDatasetVersionMeta, readVersionRaw } from "@/lib/db/datasets";
import { handler, idParam, notFound } from "@/lib/portal/http";

export const dynamic = "force-dynamic";

export const GET = handler(async (req, params) => {
  const caller = await requireCaller(req, ["datasets.raw"]);
  const row = await getDatasetVersionMeta({ organizationId: caller.organizationId, publicId: params.id, version: idParam(params, "version") });
  if (!row) throw notFound("This dataset version");
  const bytes = await readVersionRaw({ versionId: row.version.id });
  const name = row.version.fileName.replace(/[^\w.\- ]+/g, "_");
  return new Response(new Uint8Array(bytes), {
    headers: {
      "content-type": "application/octet-stream",
      "content-disposition": `attachment; filename="${name}"`,
      "x-content-sha256": row.version.fileSha256,
      "cache-control": "no-store",
    },
  });
});
