// GET /api/v1/jobs/:id: a job's status and progress and, once done, its result (or its problem).
import { ApiError } from "@/lib/api/errors";
import { methodNotAllowed, preflight, withApiKey } from "@/lib/api/gate";
import { getJobView } from "@/lib/jobs/queue";
import { JOB_OPERATIONS } from "@/lib/api/schemas/jobs";

export const dynamic = "force-dynamic";

export const GET = withApiKey(
  async ({ key, params, req }) => {
    let view;
    try {
      view = await getJobView(params.id ?? "", key.organizationId);
    } catch (e) {
      console.error("[sumfold] job look-up failed", e);
      throw new ApiError("unavailable", "The job queue is not reachable right now; retry in a few seconds.", { headers: { "retry-after": "5" } });
    }
    // Another organisation's job reads exactly like one that does not exist (or has expired).
    if (!view || !key.scopes.includes(JOB_OPERATIONS[view.operation].scope)) throw new ApiError("not_found", "No such job for this key's organisation (results are kept 24 hours after a job finishes).");
    return { ...view, url: new URL(`/api/v1/jobs/${view.id}`, process.env.SUMFOLD_BASE_URL ?? req.url).toString() };
  },
  { endpoint: "GET /api/v1/jobs/{id}", units: () => 1 },
);

export const OPTIONS = preflight(["GET"]);
export const { POST, PUT, PATCH, DELETE } = methodNotAllowed(["GET"]);
