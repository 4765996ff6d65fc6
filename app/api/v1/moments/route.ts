// POST /api/v1/moments: raw and central moments and cumulants, null where they do not exist.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { MomentsBody } from "@/lib/api/schemas/moments";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body, compute }) => compute("moments", body), {
  endpoint: "POST /api/v1/moments",
  scope: "moments",
  schema: MomentsBody,
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
