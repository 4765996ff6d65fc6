// POST /api/portal/explore/:op (density | quantiles | moments | risk): the explorer's runs, on the signed-in session,
// through the same request schemas, compute pool, deadlines, rate limit and metering as the public endpoints.
// Usage rows carry key id 0 and the explorer's path as endpoint, so usage shows them as the explorer's.
// First: .openapi() must be on zod before any schema module (lib/cf/schema included) builds its schemas.
import "@/lib/api/zod";
import { randomUUID } from "node:crypto";
import { readJson, validate } from "@/lib/api/body";
import { problemBody, toApiError } from "@/lib/api/errors";
import { computeFor, limitHeaders, refusal, type Work } from "@/lib/api/gate";
import { recordUsage } from "@/lib/api/metering";
import { chargeUnits, checkLimits, refundUnits } from "@/lib/api/rate-limit";
import { unitsForWork } from "@/lib/api/units";
import { requireCaller } from "@/lib/auth/session";
import { resolveBodyDatasets } from "@/lib/datasets/resolve";
import { handler, notFound } from "@/lib/portal/http";
import { DensityBody } from "@/lib/api/schemas/density";
import { MomentsBody } from "@/lib/api/schemas/moments";
import { QuantilesBody } from "@/lib/api/schemas/quantiles";
import { RiskBody } from "@/lib/api/schemas/risk";

export const dynamic = "force-dynamic";

const SCHEMAS = { density: DensityBody, quantiles: QuantilesBody, moments: MomentsBody, risk: RiskBody } as const;
type Op = keyof typeof SCHEMAS;

// Explorer callers are limited per user; their limiter ids are negative so they never meet a key's.
const explorerLimiterId = (userId: number) => -userId;

const EXPLORER_ADVICE = [
  "Loosen the tolerance (a larger value, e.g. 1e-9 instead of 1e-14).",
  "Narrow the range, or ask for fewer points or levels.",
  "Run it as a job (the explorer's \"Run as job\"), whose deadline is longer.",
];

export const POST = handler(async (req, params) => {
  const caller = await requireCaller(req, ["explore"]);
  if (!Object.hasOwn(SCHEMAS, params.op)) throw notFound("This computation");
  const op = params.op as Op;
  const t0 = performance.now();
  const requestId = randomUUID();
  const work: Work = { computeMs: 0, computed: false };
  let status = 500;
  let units = 0;
  let admitted = false;
  let headers: Record<string, string> = {};
  try {
    const body = validate(SCHEMAS[op], await readJson(req)) as { model: unknown };
    const decision = await checkLimits({ keyId: explorerLimiterId(caller.userId), organizationId: caller.organizationId, plan: caller.plan, units: 1 });
    headers = limitHeaders(decision);
    if (!decision.allowed) throw refusal(decision, "user");
    admitted = decision.source === "redis";
    const input = await resolveBodyDatasets(body, { organizationId: caller.organizationId, where: "this organisation" });
    const result = await computeFor(`user:${caller.userId}`, caller.plan, work, { advice: EXPLORER_ADVICE })(op, input);
    status = 200;
    units = unitsForWork(work.computeMs);
    if (admitted) chargeUnits(caller.organizationId, units - 1);
    return new Response(
      JSON.stringify({ ...result, elapsedMs: Math.round((performance.now() - t0) * 10) / 10, computeMs: Math.round(work.computeMs * 10) / 10, computeUnits: units }),
      { headers: { "content-type": "application/json", "cache-control": "no-store", ...headers } },
    );
  } catch (e) {
    const err = toApiError(e);
    status = err.status;
    if (err.code === "compute_budget_exceeded") {
      units = unitsForWork(work.computeMs);
      if (admitted) chargeUnits(caller.organizationId, units - 1);
      err.extra.computeUnits = units;
    } else {
      if (admitted) refundUnits(caller.organizationId, 1);
      units = 0;
    }
    return new Response(JSON.stringify(problemBody(err, `urn:sumfold:request:${requestId}`)), {
      status: err.status,
      headers: { "content-type": "application/problem+json", "cache-control": "no-store", ...headers, ...err.headers },
    });
  } finally {
    recordUsage({
      requestId,
      keyId: 0,
      organizationId: caller.organizationId,
      endpoint: `POST /api/portal/explore/${op}`,
      status,
      durationMs: Math.round(performance.now() - t0),
      computeUnits: units,
    });
  }
});
