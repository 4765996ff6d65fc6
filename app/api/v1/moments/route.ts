// POST /api/v1/moments: raw and central moments and cumulants, null where they do not exist.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { runMoments } from "@/lib/api/operations";
import { modelSize, toUnits } from "@/lib/api/units";
import { MomentsBody } from "./schema";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body }) => runMoments(body), {
  endpoint: "POST /api/v1/moments",
  scope: "moments",
  schema: MomentsBody,
  units: (b) => toUnits((b.order ?? 4) * modelSize(b.model) * 8),
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
