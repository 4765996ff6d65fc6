// POST /api/v1/density: invert a model's CF to pdf (or pmf), cdf and sf on a grid or at points.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { DensityBody } from "@/lib/api/schemas/density";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body, compute }) => compute("density", body), {
  endpoint: "POST /api/v1/density",
  scope: "distribution",
  schema: DensityBody,
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
