import { OpenAPIRegistry, OpenApiGeneratorV31 } from "@asteasolutions/zod-to-openapi";
import { CfRequest, CfResponse } from "@/lib/api/schemas/cf";
import { ConvolveRequest, ConvolveResponse } from "@/lib/api/schemas/convolve";
import { DensityRequest, DensityResponse } from "@/lib/api/schemas/density";
import { DatasetResponse, DatasetsResponse } from "@/lib/api/schemas/datasets";
import { FamiliesResponse } from "@/lib/api/schemas/families";
import { JobRequest, JobResponse } from "@/lib/api/schemas/jobs";
import { datasetExample } from "@/lib/datasets/example";
import { MomentsRequest, MomentsResponse } from "@/lib/api/schemas/moments";
import { QuantilesRequest, QuantilesResponse } from "@/lib/api/schemas/quantiles";
import { RiskRequest, RiskResponse } from "@/lib/api/schemas/risk";
import { ENGINE_VERSION } from "@/lib/version";
import { Problem } from "./common-schemas";
import { PROBLEMS } from "./errors";
import { endpointExamples } from "./examples";
import { runCompute } from "@/lib/compute/pool";
import type { OperationName } from "@/lib/compute/types";
import { catalogueResponse } from "./catalogue";
import { z } from "./zod";

const EXAMPLE_META = { requestId: "3b0f0a52-95c3-4f0e-8a4e-8f3f7c0d51a2", computeUnits: 1, engineVersion: ENGINE_VERSION, elapsedMs: 1.8 };

const rateLimitHeaders = {
  RateLimit: { description: 'Current state of the per-key limit, e.g. `"per-key";r=49;t=1` (draft-ietf-httpapi-ratelimit-headers-11).', schema: { type: "string" as const } },
  "RateLimit-Policy": { description: 'The per-key policy, e.g. `"per-key";q=50;w=1`.', schema: { type: "string" as const } },
  "Sumfold-Request-Id": { description: "The request id, also in meta.requestId.", schema: { type: "string" as const } },
};

/**
 * The problem responses of an operation, one per status: several problem types can share a status (422:
 * validation, limit_exceeded, not_applicable), so each response lists its types as named examples.
 */
function problems(codes: (keyof typeof PROBLEMS)[]) {
  const byStatus = new Map<number, (keyof typeof PROBLEMS)[]>();
  for (const c of codes) byStatus.set(PROBLEMS[c].status, [...(byStatus.get(PROBLEMS[c].status) ?? []), c]);
  return Object.fromEntries(
    [...byStatus].map(([status, cs]) => [
      String(status),
      {
        description: cs.map((c) => `${c}: ${PROBLEMS[c].title}`).join("; "),
        ...(cs.some((c) => c === "rate_limited" || c === "quota_exhausted" || c === "too_many_concurrent" || c === "unavailable")
          ? { headers: { "Retry-After": { description: "seconds until a retry can succeed", schema: { type: "string" as const } } } }
          : {}),
        content: {
          "application/problem+json": {
            schema: Problem,
            examples: Object.fromEntries(
              cs.map((c) => [c, { summary: PROBLEMS[c].title, value: { type: `/docs/errors#${c}`, title: PROBLEMS[c].title, status } }]),
            ),
          },
        },
      },
    ]),
  );
}

/** What every keyed endpoint can answer before its own work: the gate, the body reader, limits and quota. */
const KEYED_PROBLEMS = ["bad_request", "unauthorized", "forbidden", "address_not_allowed", "method_not_allowed", "payload_too_large", "unsupported_media_type", "validation", "rate_limited", "quota_exhausted", "unavailable", "internal"] as const;
/** A model may name a dataset: one that does not exist in the key's organisation answers 404. */
const MODEL_PROBLEMS = ["not_found"] as const;
/** What a computation can answer from the compute pool: its deadline, the per-key cap, an accuracy it could not reach. */
const COMPUTE_PROBLEMS = ["compute_budget_exceeded", "too_many_concurrent", "tolerance_unreached"] as const;

/** The demo examples' responses, computed on the compute pool like any request (a failed one is left out). */
async function computeExamples(): Promise<Record<string, unknown>> {
  const out: Record<string, unknown> = {};
  for (const e of endpointExamples) {
    if (!e.body) continue;
    try {
      out[e.id] = { ...(await runCompute({ op: e.id as OperationName, body: e.body, budgetMs: 10_000 })).result, meta: EXAMPLE_META };
    } catch {
      out[e.id] = undefined;
    }
  }
  return out;
}

function example(id: string, responses: Record<string, unknown>) {
  const e = endpointExamples.find((x) => x.id === id)!;
  return { request: e.body, response: responses[id], title: e.title };
}

/** Builds the OpenAPI 3.1 document from the same zod schemas the handlers validate with. */
export async function buildOpenApiDocument(serverUrl = "/") {
  const responses = await computeExamples();
  const registry = new OpenAPIRegistry();
  const bearer = registry.registerComponent("securitySchemes", "apiKey", {
    type: "http",
    scheme: "bearer",
    description: "An API key from the portal: `Authorization: Bearer sfk_...`",
  });
  const post = (path: string, id: string, summary: string, description: string, req: z.ZodType, res: z.ZodType, extra: (keyof typeof PROBLEMS)[] = []) => {
    const ex = example(id, responses);
    registry.registerPath({
      method: "post",
      path,
      operationId: id,
      summary,
      description,
      tags: ["Computation"],
      security: [{ [bearer.name]: [] }],
      request: { body: { required: true, content: { "application/json": { schema: req, examples: { demo: { summary: ex.title, value: ex.request } } } } } },
      responses: {
        200: {
          description: "The result",
          headers: rateLimitHeaders,
          content: { "application/json": { schema: res, ...(ex.response ? { examples: { demo: { summary: ex.title, value: ex.response } } } : {}) } },
        },
        ...problems([...KEYED_PROBLEMS, ...extra]),
      },
    });
  };
  post("/api/v1/cf", "cf", "Evaluate the characteristic function", "phi(t) = E[exp(i t X)] of the model at the given arguments.", CfRequest, CfResponse, [...MODEL_PROBLEMS, ...COMPUTE_PROBLEMS, "limit_exceeded"]);
  post(
    "/api/v1/density",
    "density",
    "Density, CDF and survival function",
    "Inverts the characteristic function to pdf (or pmf on a lattice), cdf and sf = 1 - cdf (computed directly), with atoms separated and an error estimate in the diagnostics.",
    DensityRequest,
    DensityResponse,
    [...MODEL_PROBLEMS, ...COMPUTE_PROBLEMS, "limit_exceeded", "not_applicable"],
  );
  post("/api/v1/quantiles", "quantiles", "Quantiles and expected shortfall", "The smallest x with F(x) >= p for each level, and optionally the expected shortfall beyond it.", QuantilesRequest, QuantilesResponse, [...MODEL_PROBLEMS, ...COMPUTE_PROBLEMS, "limit_exceeded", "not_applicable"]);
  post(
    "/api/v1/risk",
    "risk",
    "Risk measures",
    "VaR and expected shortfall in either tail, stop-loss premiums E[(S - d)+], limited means E[min(S, u)], aggregate layer means, exceedance probabilities, return levels and the probability (and ppm) outside specification limits, each value with an error bound; a measure that does not exist for the model is null with the reason in notes. Results are computational aids: decisions on capital, reserves or tolerances rest with licensed practice and local regulation.",
    RiskRequest,
    RiskResponse,
    [...MODEL_PROBLEMS, ...COMPUTE_PROBLEMS, "limit_exceeded", "not_applicable"],
  );
  post("/api/v1/moments", "moments", "Moments and cumulants", "Raw and central moments and cumulants up to the order asked; null (with a note) where an order does not exist.", MomentsRequest, MomentsResponse, [...MODEL_PROBLEMS, ...COMPUTE_PROBLEMS, "limit_exceeded"]);
  post("/api/v1/convolve", "convolve", "Convolve lattice tables", "Convolution of tabulated laws on a common step, and n-fold powers, by FFT with zero padding.", ConvolveRequest, ConvolveResponse, [...COMPUTE_PROBLEMS, "limit_exceeded"]);

  const jobExample = { operation: "quantiles", body: { model: { compound: { count: { family: "poisson", lambda: 42 }, each: { family: "gamma", shape: 1.8, rate: 0.12 } } }, p: [0.5, 0.9, 0.995] } };
  registry.registerPath({
    method: "post",
    path: "/api/v1/jobs",
    operationId: "submitJob",
    summary: "Submit a computation as a job",
    description:
      "Queues any computation (operation cf, density, quantiles, moments or convolve, with the body its endpoint takes) for a worker. Answers 202 with the job's URL (also in Location); poll it. A job's deadline is its plan's job deadline (see Limits), longer than a request's but finite. The key needs the scope of the operation. Submitting costs 1 unit; the job is charged for its work when it finishes.",
    tags: ["Jobs"],
    security: [{ [bearer.name]: [] }],
    request: { body: { required: true, content: { "application/json": { schema: JobRequest, examples: { demo: { summary: "Hail-damage aggregate claims, as a job", value: jobExample } } } } } },
    responses: {
      202: { description: "Queued", headers: { ...rateLimitHeaders, Location: { description: "the job's URL", schema: { type: "string" as const } } }, content: { "application/json": { schema: JobResponse } } },
      ...problems([...KEYED_PROBLEMS, ...MODEL_PROBLEMS, "limit_exceeded"]),
    },
  });
  registry.registerPath({
    method: "get",
    path: "/api/v1/jobs/{id}",
    operationId: "getJob",
    summary: "A job's status, progress and result",
    description:
      "status is queued, running, succeeded or failed. While running, progress reports the time used of the job's deadline. When succeeded, result is exactly the body the synchronous endpoint answers (without its meta); when failed, problem is the problem document it would answer. Results are kept 24 hours after the job finishes (expiresAt). Another organisation's job answers 404, like one that does not exist. Each poll costs 1 unit.",
    tags: ["Jobs"],
    security: [{ [bearer.name]: [] }],
    request: { params: z.object({ id: z.string().openapi({ example: "job_Q2x8m1Zr0bV7c4Kp9sT3" }) }) },
    responses: {
      200: { description: "The job", headers: rateLimitHeaders, content: { "application/json": { schema: JobResponse } } },
      ...problems(["unauthorized", "forbidden", "not_found", "rate_limited", "quota_exhausted", "unavailable", "internal"]),
    },
  });

  registry.registerPath({
    method: "get",
    path: "/api/v1/families",
    operationId: "families",
    summary: "The family catalogue",
    description: "Every named law: parameters with ranges, support, the characteristic function as text, and which moments exist.",
    tags: ["Catalogue"],
    security: [{ [bearer.name]: [] }],
    responses: {
      200: { description: "The catalogue", headers: rateLimitHeaders, content: { "application/json": { schema: FamiliesResponse, example: { ...catalogueResponse(), meta: EXAMPLE_META } } } },
      ...problems(["unauthorized", "forbidden", "rate_limited", "quota_exhausted", "unavailable", "internal"]),
    },
  });
  const ds = datasetExample();
  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets",
    operationId: "datasets",
    summary: "The organisation's datasets",
    description: "Datasets uploaded in the portal by the key's organisation, each with its latest version's summary and histogram. A model uses one as { \"dataset\": id, \"version\"?: n }.",
    tags: ["Catalogue"],
    security: [{ [bearer.name]: [] }],
    responses: {
      200: { description: "The datasets, most recently changed first", headers: rateLimitHeaders, content: { "application/json": { schema: DatasetsResponse, example: { datasets: [ds.listItem], meta: EXAMPLE_META } } } },
      ...problems(["unauthorized", "forbidden", "rate_limited", "quota_exhausted", "unavailable", "internal"]),
    },
  });
  registry.registerPath({
    method: "get",
    path: "/api/v1/datasets/{id}",
    operationId: "dataset",
    summary: "One dataset with its versions",
    description: "Metadata, summary statistics and histogram of every version (newest first). A dataset of another organisation answers 404, like one that does not exist.",
    tags: ["Catalogue"],
    security: [{ [bearer.name]: [] }],
    request: { params: z.object({ id: z.string().openapi({ example: ds.listItem.id }) }) },
    responses: {
      200: { description: "The dataset", headers: rateLimitHeaders, content: { "application/json": { schema: DatasetResponse, example: { dataset: ds.detail, meta: EXAMPLE_META } } } },
      ...problems(["unauthorized", "forbidden", "not_found", "rate_limited", "quota_exhausted", "unavailable", "internal"]),
    },
  });
  registry.registerPath({
    method: "get",
    path: "/api/v1/health",
    operationId: "health",
    summary: "Service health (no key)",
    tags: ["Service"],
    responses: {
      200: { description: "Healthy", content: { "application/json": { schema: z.object({ status: z.literal("ok"), database: z.literal("reachable"), databaseLatencyMs: z.number(), engineVersion: z.string(), time: z.string() }) } } },
      503: { description: "The database is unreachable", content: { "application/json": { schema: z.object({ status: z.literal("degraded"), database: z.literal("unreachable") }).passthrough() } } },
    },
  });
  registry.registerPath({
    method: "get",
    path: "/api/v1/openapi.json",
    operationId: "openapi",
    summary: "This document (no key)",
    tags: ["Service"],
    responses: { 200: { description: "OpenAPI 3.1 document", content: { "application/json": { schema: z.object({}).passthrough() } } } },
  });

  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: "3.1.0",
    info: {
      title: "Sumfold API",
      version: "1",
      description:
        "Distributions of sums of independent random quantities from their characteristic functions. Results are computational aids: capital, reserving, pricing and safety-tolerance decisions rest with licensed practice and local regulation.",
    },
    servers: [{ url: serverUrl }],
    tags: [
      { name: "Computation", description: "Read-only computations on models" },
      { name: "Jobs", description: "Long computations on the queue" },
      { name: "Catalogue", description: "What the engine knows" },
      { name: "Service", description: "Unkeyed service endpoints" },
    ],
  });
}
