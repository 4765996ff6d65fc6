// GET /api/v1/datasets/{id}: one dataset of the key's organisation with every version's summary (404 otherwise).
import { ApiError } from "@/lib/api/errors";
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { datasetJson, versionJson } from "@/lib/datasets/present";
import { DATASET_ID } from "@/lib/datasets/schemas";
import { getDatasetInOrg } from "@/lib/db/datasets";

export const dynamic = "force-dynamic";

export const GET = withApiKey(
  async ({ key, params }) => {
    const id = params.id ?? "";
    // Another organisation's dataset answers exactly like one that does not exist.
    const found = DATASET_ID.test(id) ? await getDatasetInOrg({ organizationId: key.organizationId, publicId: id }) : null;
    if (!found) throw new ApiError("not_found", `No dataset ${JSON.stringify(id.slice(0, 40))} in this key's organisation.`);
    return { dataset: { ...datasetJson(found.dataset), versions: found.versions.map(versionJson) } };
  },
  { endpoint: "GET /api/v1/datasets/{id}", scope: "catalogue", units: () => 1 },
);

export const OPTIONS = preflight(["GET"]);
export const { POST, PUT, PATCH, DELETE } = methodNotAllowed(["GET"]);
