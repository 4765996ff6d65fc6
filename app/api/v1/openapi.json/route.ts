// GET /api/v1/openapi.json: the OpenAPI 3.1 document (no key), generated from the handlers' zod schemas.
import { buildOpenApiDocument } from "@/lib/api/openapi";

export const dynamic = "force-static";

export async function GET() {
  return Response.json(await buildOpenApiDocument(), {
    headers: { "access-control-allow-origin": "*", "cache-control": "public, max-age=300" },
  });
}
