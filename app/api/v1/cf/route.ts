// POST /api/v1/cf: evaluate a model's characteristic function at given arguments.
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { CfBody } from "@/lib/api/schemas/cf";

export const dynamic = "force-dynamic";

export const POST = withApiKey(({ body, compute }) => compute("cf", body), {
  endpoint: "POST /api/v1/cf",
  scope: "cf",
  schema: CfBody,
});

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
