// POST /api/v1/risk: risk measures of a model (VaR, ES, stop-loss, limited and layer means, exceedance, return levels, ppm outside spec limits).
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { RiskBody } from "@/lib/api/schemas/risk";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body, compute }) => compute("risk", body), {
  endpoint: "POST /api/v1/risk",
  scope: "distribution",
  schema: RiskBody,
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
