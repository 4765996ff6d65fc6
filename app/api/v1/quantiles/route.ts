// POST /api/v1/quantiles: quantiles (and expected shortfall) of a model at levels p.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { QuantilesBody } from "@/lib/api/schemas/quantiles";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body, compute }) => compute("quantiles", body), {
  endpoint: "POST /api/v1/quantiles",
  scope: "distribution",
  schema: QuantilesBody,
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
