// POST /api/v1/density: invert a model's CF to pdf (or pmf), cdf and sf on a grid or at points.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { runDensity } from "@/lib/api/operations";
import { modelSize, pointsOf, toUnits } from "@/lib/api/units";
import { DensityBody } from "./schema";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body }) => runDensity(body), {
  endpoint: "POST /api/v1/density",
  scope: "distribution",
  schema: DensityBody,
  units: (b) => toUnits(pointsOf(b) * modelSize(b.model) * 4),
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
