// POST /api/portal/explore/:op (density | quantiles | moments): the explorer's runs, on the signed-in session,
// through the same request schemas and computations as the public endpoints (not metered as key usage).
// First: .openapi() must be on zod before any schema module (lib/cf/schema included) builds its schemas.
import "@/lib/api/zod";
import { randomUUID } from "node:crypto";
import { readJson, validate } from "@/lib/api/body";
import { problemBody, toApiError } from "@/lib/api/errors";
import { runDensity, runMoments, runQuantiles } from "@/lib/api/operations";
import { requireCaller } from "@/lib/auth/session";
import { hasDatasetRef, resolveDatasets } from "@/lib/datasets/resolve";
import { handler, notFound } from "@/lib/portal/http";
import { DensityBody } from "@/app/api/v1/density/schema";
import { MomentsBody } from "@/app/api/v1/moments/schema";
import { QuantilesBody } from "@/app/api/v1/quantiles/schema";

export const dynamic = "force-dynamic";

async function withData<B extends { model: unknown }>(body: B, organizationId: number): Promise<B> {
  return hasDatasetRef(body.model) ? { ...body, model: await resolveDatasets(body.model, organizationId) } : body;
}

const OPS = {
  density: async (raw: unknown, org: number) => runDensity(await withData(validate(DensityBody, raw), org)),
  quantiles: async (raw: unknown, org: number) => runQuantiles(await withData(validate(QuantilesBody, raw), org)),
  moments: async (raw: unknown, org: number) => runMoments(await withData(validate(MomentsBody, raw), org)),
} as const;

export const POST = handler(async (req, params) => {
  const caller = await requireCaller(req, ["explore"]);
  const op = OPS[params.op as keyof typeof OPS];
  if (!op || !Object.hasOwn(OPS, params.op)) throw notFound("This computation");
  const t0 = performance.now();
  try {
    const result = await op(await readJson(req), caller.organizationId);
    return new Response(JSON.stringify({ ...result, elapsedMs: Math.round((performance.now() - t0) * 10) / 10 }), {
      headers: { "content-type": "application/json", "cache-control": "no-store" },
    });
  } catch (e) {
    const err = toApiError(e);
    return new Response(JSON.stringify(problemBody(err, `urn:sumfold:request:${randomUUID()}`)), {
      status: err.status,
      headers: { "content-type": "application/problem+json", "cache-control": "no-store" },
    });
  }
});
