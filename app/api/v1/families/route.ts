// GET /api/v1/families: the catalogue of named laws.
import { catalogueResponse } from "@/lib/api/catalogue";
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";

export const dynamic = "force-dynamic";

export const GET = withApiKey(() => catalogueResponse(), {
  endpoint: "GET /api/v1/families",
  scope: "catalogue",
  units: () => 1,
});

export const OPTIONS = preflight(["GET"]);
export const { POST, PUT, PATCH, DELETE } = methodNotAllowed(["GET"]);
