// POST /api/v1/quantiles: quantiles (and expected shortfall) of a model at levels p.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { runQuantiles } from "@/lib/api/operations";
import { modelSize, toUnits } from "@/lib/api/units";
import { QuantilesBody } from "./schema";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body }) => runQuantiles(body), {
  endpoint: "POST /api/v1/quantiles",
  scope: "distribution",
  schema: QuantilesBody,
  units: (b) => toUnits(b.p.length * modelSize(b.model) * 64 * (b.expectedShortfall ? 2 : 1)),
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
