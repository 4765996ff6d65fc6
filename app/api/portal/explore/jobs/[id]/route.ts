// GET /api/portal/explore/jobs/:id: an explorer job's status, progress and result, for the signed-in organisation.
import { requireCaller } from "@/lib/auth/session";
import { getJobView } from "@/lib/jobs/queue";
import { handler, notFound, ok } from "@/lib/portal/http";

export const dynamic = "force-dynamic";

export const GET = handler(async (req, params) => {
  const caller = await requireCaller(req, ["explore"]);
  const view = await getJobView(params.id ?? "", caller.organizationId);
  if (!view) throw notFound("This job");
  return ok(view);
});
