// POST /api/portal/explore/jobs: the explorer's heavy runs as jobs on the queue (density, quantiles, moments), on
// the signed-in session, with the same schemas, limits and metering as POST /api/v1/jobs.
import "@/lib/api/zod";
import { randomUUID } from "node:crypto";
import { readJson, validate } from "@/lib/api/body";
import { ApiError, problemBody, toApiError } from "@/lib/api/errors";
import { limitHeaders, refusal } from "@/lib/api/gate";
import { recordUsage } from "@/lib/api/metering";
import { planOf } from "@/lib/api/plans";
import { checkLimits, refundUnits } from "@/lib/api/rate-limit";
import { requireCaller } from "@/lib/auth/session";
import { resolveBodyDatasets } from "@/lib/datasets/resolve";
import { getJobView, submitJob } from "@/lib/jobs/queue";
import { handler } from "@/lib/portal/http";
import { JOB_OPERATIONS } from "@/lib/api/schemas/jobs";

export const dynamic = "force-dynamic";

const EXPLORER_OPS = ["density", "quantiles", "moments"] as const;

export const POST = handler(async (req) => {
  const caller = await requireCaller(req, ["explore"]);
  const t0 = performance.now();
  const requestId = randomUUID();
  let status = 500;
  let units = 0;
  let headers: Record<string, string> = {};
  try {
    const raw = (await readJson(req)) as { operation?: unknown; body?: unknown };
    const op = EXPLORER_OPS.find((o) => o === raw?.operation);
    if (!op) throw new ApiError("validation", "operation must be density, quantiles or moments.", { errors: [{ detail: "operation must be density, quantiles or moments.", pointer: "/operation" }] });
    let body = validate(JOB_OPERATIONS[op].schema, raw.body) as Record<string, unknown>;
    const decision = await checkLimits({ keyId: -caller.userId, organizationId: caller.organizationId, plan: caller.plan, units: 1 });
    headers = limitHeaders(decision);
    if (!decision.allowed) throw refusal(decision, "user");
    units = 1;
    try {
      body = await resolveBodyDatasets(body, { organizationId: caller.organizationId });
      const id = await submitJob({
        op,
        body,
        organizationId: caller.organizationId,
        keyId: 0,
        userId: caller.userId,
        plan: caller.plan,
        budgetMs: planOf(caller.plan).jobBudgetMs,
        submittedAt: new Date().toISOString(),
      });
      status = 202;
      return new Response(JSON.stringify(await getJobView(id, caller.organizationId)), { status: 202, headers: { "content-type": "application/json", "cache-control": "no-store", ...headers } });
    } catch (e) {
      if (decision.source === "redis") refundUnits(caller.organizationId, 1);
      units = 0;
      throw e;
    }
  } catch (e) {
    const err = toApiError(e);
    status = err.status;
    return new Response(JSON.stringify(problemBody(err, `urn:sumfold:request:${requestId}`)), {
      status: err.status,
      headers: { "content-type": "application/problem+json", "cache-control": "no-store", ...headers, ...err.headers },
    });
  } finally {
    recordUsage({ requestId, keyId: 0, organizationId: caller.organizationId, endpoint: "POST /api/portal/explore/jobs", status, durationMs: Math.round(performance.now() - t0), computeUnits: units });
  }
});
