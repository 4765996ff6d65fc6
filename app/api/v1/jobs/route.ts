// POST /api/v1/jobs: submit a computation as a job on the queue; answers 202 with the job's URL.
import { validate } from "@/lib/api/body";
import { ApiError } from "@/lib/api/errors";
import { methodNotAllowed, preflight, RESPONSE_INIT, withApiKey } from "@/lib/api/gate";
import { planOf } from "@/lib/api/plans";
import { resolveBodyDatasets } from "@/lib/datasets/resolve";
import { getJobView, submitJob } from "@/lib/jobs/queue";
import { JOB_OPERATIONS, JobRequest } from "@/lib/api/schemas/jobs";

export const dynamic = "force-dynamic";

export const POST = withApiKey(
  async ({ body, key, req }) => {
    const op = JOB_OPERATIONS[body.operation];
    if (!key.scopes.includes(op.scope)) {
      throw new ApiError("forbidden", `This key lacks the "${op.scope}" scope needed for ${body.operation} jobs; an admin can issue a key with it.`);
    }
    let inner: Record<string, unknown>;
    try {
      inner = validate(op.schema, body.body) as Record<string, unknown>;
    } catch (e) {
      if (e instanceof ApiError && e.errors) throw new ApiError(e.code, e.detail, { errors: e.errors.map((x) => ({ ...x, pointer: `/body${x.pointer}` })) });
      throw e;
    }
    inner = await resolveBodyDatasets(inner, { organizationId: key.organizationId, pointer: "/body/model" });
    let id: string;
    try {
      id = await submitJob({
        op: body.operation,
        body: inner,
        organizationId: key.organizationId,
        keyId: key.id,
        plan: key.plan,
        budgetMs: planOf(key.plan).jobBudgetMs,
        submittedAt: new Date().toISOString(),
      });
    } catch (e) {
      console.error("[sumfold] job submission failed", e);
      throw new ApiError("unavailable", "The job queue is not reachable right now; retry in a few seconds.", { headers: { "retry-after": "5" } });
    }
    const url = new URL(`/api/v1/jobs/${id}`, process.env.SUMFOLD_BASE_URL ?? req.url).toString();
    const view = await getJobView(id, key.organizationId);
    return { ...view, id, url, [RESPONSE_INIT]: { status: 202, headers: { location: url } } };
  },
  { endpoint: "POST /api/v1/jobs", schema: JobRequest, units: () => 1 },
);

export const OPTIONS = preflight(["POST"]);
export const { GET, PUT, PATCH, DELETE } = methodNotAllowed(["POST"]);
