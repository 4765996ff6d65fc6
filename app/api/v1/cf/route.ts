// POST /api/v1/cf: evaluate a model's characteristic function at given arguments.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { runCf } from "@/lib/api/operations";
import { modelSize, pointsOf, toUnits } from "@/lib/api/units";
import { CfBody } from "./schema";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body }) => runCf(body), {
  endpoint: "POST /api/v1/cf",
  scope: "cf",
  schema: CfBody,
  units: (b) => toUnits(pointsOf(b) * modelSize(b.model)),
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
