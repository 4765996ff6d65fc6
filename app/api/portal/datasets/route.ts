// GET /api/portal/datasets: the organisation's datasets; POST: upload a file as a new dataset (raw body, fields in the query)
import { requireCaller } from "@/lib/auth/session";
import { handleUpload } from "@/lib/datasets/portal";
import { datasetJson, versionJson } from "@/lib/datasets/present";
import { listDatasetsOfOrg } from "@/lib/db/datasets";
import { handler, ok } from "@/lib/portal/http";

export const dynamic = "force-dynamic";

export const GET = handler(async (req) => {
  const caller = await requireCaller(req);
  const rows = await listDatasetsOfOrg({ organizationId: caller.organizationId });
  return ok({
    datasets: rows.map((r) => ({ ...datasetJson(r.dataset), ownedByYou: r.dataset.ownerId === caller.userId, latest: r.latest ? versionJson(r.latest) : null })),
    canUpload: caller.role === "admin" || caller.role === "developer",
  });
});

export const POST = handler(async (req) => handleUpload(req, await requireCaller(req, ["datasets.upload"])));
