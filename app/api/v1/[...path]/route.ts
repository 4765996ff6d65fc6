// Any path under /api/v1 that no route serves: a 404 problem+json (not the site's HTML page), as the error guide says.
import { randomUUID } from "node:crypto";
import { problemResponse } from "@/lib/api/gate";
import { unknownPathProblem } from "@/lib/api/unknown-path";

export const dynamic = "force-dynamic";

async function handler(req: Request, ctx: { params: Promise<{ path: string[] }> }) {
  const { path } = await ctx.params;
  return problemResponse(unknownPathProblem(req.method, path), randomUUID());
}

export { handler as GET, handler as POST, handler as PUT, handler as PATCH, handler as DELETE };
