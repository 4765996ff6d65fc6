// GET /api/v1/datasets: the key's organisation's datasets with their latest version's summary.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { datasetJson, versionJson } from "@/lib/datasets/present";
import { listDatasetsOfOrg } from "@/lib/db/datasets";

export const dynamic = "force-dynamic";

export const GET = withApiKey(
  async ({ key }) => {
    const rows = await listDatasetsOfOrg({ organizationId: key.organizationId });
    return { datasets: rows.map((r) => ({ ...datasetJson(r.dataset), latest: r.latest ? versionJson(r.latest) : null })) };
  },
  { endpoint: "GET /api/v1/datasets", scope: "catalogue", units: () => 1 },
);

export const OPTIONS = preflight(["GET"]);
export const { POST, PUT, PATCH, DELETE } = methodNotAllowed(["GET"]);
