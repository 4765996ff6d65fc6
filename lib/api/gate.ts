import "server-only";
import { randomUUID } from "node:crypto";
import type { z } from "zod";
import { resolveBodyDatasets } from "@/lib/datasets/resolve";
import { withDbDeadline } from "@/lib/db/client";
import { getKeyByHash } from "@/lib/db/keys";
import type { ApiKey } from "@/lib/db/schema";
import { ENGINE_VERSION } from "@/lib/version";
import { readJson, validate } from "./body";
import { addressAllowed, clientAddress } from "./cidr";
import { ApiError, problemBody, toApiError } from "./errors";
import { hashKey, parseKey, pepper } from "./key-format";
import { keyState } from "./key-state";
import { runCompute } from "@/lib/compute/pool";
import type { OperationName } from "@/lib/compute/types";
import { acquireSlot } from "./concurrency";
import { recordUsage } from "./metering";
import { planOf } from "./plans";
import { chargeUnits, checkLimits, refundUnits, type LimitDecision } from "./rate-limit";
import type { Scope } from "./scopes";
import { unitsForWork } from "./units";

export interface AuthedKey {
  id: number;
  organizationId: number;
  prefix: string;
  scopes: string[];
  plan: string;
}

export interface Meta {
  requestId: string;
  computeUnits: number;
  engineVersion: string;
  elapsedMs: number;
  computeMs?: number;
}

const CORS: Record<string, string> = {
  "access-control-allow-origin": "*",
  "access-control-allow-headers": "authorization, content-type",
  "access-control-expose-headers": "ratelimit, ratelimit-policy, retry-after, sumfold-request-id, sumfold-limiter, location",
  "access-control-max-age": "600",
};

// Key look-ups are cached for at most KEY_CACHE_MS, so a revocation takes effect within a second everywhere.
const KEY_CACHE_MS = 1000;
const g = globalThis as unknown as { __sumfoldKeyCache?: Map<string, { at: number; row: { key: ApiKey; plan: string } | null }> };
const cache = () => (g.__sumfoldKeyCache ??= new Map());

async function lookUp(hash: string) {
  const now = Date.now();
  const hit = cache().get(hash);
  if (hit && now - hit.at < KEY_CACHE_MS) return hit.row;
  const row = await withDbDeadline(getKeyByHash({ secretHash: hash }));
  if (cache().size > 50_000) cache().clear();
  cache().set(hash, { at: now, row });
  return row;
}

/** Resolves the bearer key; 401 for anything but a live key. Malformed keys never reach the database. */
export async function authenticate(req: Request): Promise<AuthedKey> {
  const header = req.headers.get("authorization") ?? "";
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (!m) throw new ApiError("unauthorized", "Send your API key as `Authorization: Bearer <key>`.", { headers: { "www-authenticate": 'Bearer realm="sumfold"' } });
  const token = m[1];
  if (!parseKey(token)) {
    throw new ApiError("unauthorized", "The API key is malformed (mistyped or truncated): copy it again from where you stored it.", {
      headers: { "www-authenticate": 'Bearer realm="sumfold", error="invalid_token"' },
    });
  }
  let found;
  try {
    found = await lookUp(hashKey(token, pepper()));
  } catch (e) {
    console.error("[sumfold] key look-up failed", e);
    throw new ApiError("unavailable", "Keys cannot be checked right now; retry in a few seconds.", { headers: { "retry-after": "5" } });
  }
  // The row was found by the HMAC of the presented key (a unique index), so equality is the database's.
  const state = found ? keyState(found.key) : "revoked";
  if (!found || state === "revoked" || state === "expired") {
    throw new ApiError("unauthorized", found ? `This API key is ${state}.` : "This API key is not known.", {
      headers: { "www-authenticate": 'Bearer realm="sumfold", error="invalid_token"' },
    });
  }
  const ranges = found.key.allowedCidrs;
  if (ranges && ranges.length > 0) {
    const ip = clientAddress(req.headers);
    if (!addressAllowed(ip, ranges)) {
      throw new ApiError("address_not_allowed", `This API key accepts calls only from ${ranges.join(", ")}; this call came from ${ip ?? "an unknown address"}.`);
    }
  }
  return { id: found.key.id, organizationId: found.key.organizationId, prefix: found.key.prefix, scopes: found.key.scopes, plan: found.plan };
}

/** The 429 for a refused limit decision: the monthly quota, or the per-second window. */
export function refusal(decision: LimitDecision, who: "key" | "user"): ApiError {
  if (decision.quotaExhausted) {
    const q = decision.quotaExhausted;
    const wait = Math.ceil((q.resetsAt.getTime() - Date.now()) / 1000);
    return new ApiError("quota_exhausted", `This organisation has used ${q.used} of its ${q.quota} compute units this month; they renew on ${q.resetsAt.toISOString()}.`, {
      headers: { "retry-after": String(wait) },
    });
  }
  const wait = Math.max(1, Math.ceil((decision.reset - Date.now()) / 1000));
  return new ApiError("rate_limited", `This ${who === "key" ? "key" : "account"} may make ${decision.limit} requests per second; retry after ${wait} s.`, {
    headers: { "retry-after": String(wait) },
  });
}

export function limitHeaders(d: LimitDecision): Record<string, string> {
  const seconds = Math.max(1, Math.ceil((d.reset - Date.now()) / 1000));
  // draft-ietf-httpapi-ratelimit-headers-11: a named policy, quota q over window w seconds; remaining r, reset t.
  return {
    "ratelimit-policy": `"per-key";q=${d.limit};w=1`,
    ratelimit: `"per-key";r=${d.remaining};t=${seconds}`,
    ...(d.source === "local" ? { "sumfold-limiter": "local" } : {}),
  };
}

export function problemResponse(e: ApiError, requestId: string, extraHeaders: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(problemBody(e, `urn:sumfold:request:${requestId}`)), {
    status: e.status,
    headers: { "content-type": "application/problem+json", "sumfold-request-id": requestId, ...CORS, ...extraHeaders, ...e.headers },
  });
}

interface Options<S extends z.ZodType> {
  /** usage_events.endpoint, e.g. "POST /api/v1/density" */
  endpoint: string;
  /** the scope the key needs; omitted when the handler checks it (jobs: the scope of the job's operation) */
  scope?: Scope;
  /** the request schema; omitted for GET */
  schema?: S;
  /** fixed compute units for a call that does no engine work (catalogue); computations are charged by their work */
  units?: (body: z.infer<S>) => number;
  /** where the model sits in the body, to prefix the core's pointers */
  modelPointer?: string;
}

/** A handler may set its success status and extra headers under this key (JSON never sends symbol keys). */
export const RESPONSE_INIT = Symbol("sumfold.responseInit");
export type WithInit = { [RESPONSE_INIT]?: { status: number; headers?: Record<string, string> } };

/** Runs one computation on the compute pool under the caller's deadline and concurrency cap. */
export type Compute = (op: OperationName, body: unknown) => Promise<Record<string, unknown>>;

type Handler<S extends z.ZodType> = (ctx: {
  body: z.infer<S>;
  key: AuthedKey;
  requestId: string;
  req: Request;
  params: Record<string, string>;
  compute: Compute;
}) => Promise<Record<string, unknown>> | Record<string, unknown>;

/** The work a request's computations did, for charging after the fact. */
export interface Work {
  computeMs: number;
  computed: boolean;
}

/** A `compute` bound to one caller: its plan's deadline, its concurrency cap (by `who`), and a work tally. */
export function computeFor(who: string, plan: string, work: Work, opts: { budgetMs?: number; advice?: string[]; signal?: AbortSignal } = {}): Compute {
  return async (op, body) => {
    const p = planOf(plan);
    const budgetMs = opts.budgetMs ?? p.computeBudgetMs;
    const release = await acquireSlot(who, p.concurrentComputations, budgetMs);
    work.computed = true;
    try {
      const r = await runCompute(
        { op, body, budgetMs },
        { onWork: (ms) => (work.computeMs += ms), advice: opts.advice, signal: opts.signal },
      );
      return r.result;
    } finally {
      await release();
    }
  };
}

/**
 * The whole gate around a keyed handler: bearer key (format and checksum first, then its hash), scope, body
 * (media type, size, JSON, schema), per-key rate and monthly units, timing, metering, and one error shape.
 */
export function withApiKey<S extends z.ZodType>(handler: Handler<S>, opts: Options<S>) {
  return async (req: Request, ctx?: { params?: Promise<Record<string, string>> }): Promise<Response> => {
    const t0 = performance.now();
    const requestId = randomUUID();
    let key: AuthedKey | null = null;
    let status = 500;
    let units = 0;
    let reserved = 0;
    let headers: Record<string, string> = {};
    let admitted = false;
    const work: Work = { computeMs: 0, computed: false };
    try {
      key = await authenticate(req);
      if (opts.scope && !key.scopes.includes(opts.scope)) {
        throw new ApiError("forbidden", `This key lacks the "${opts.scope}" scope needed for ${opts.endpoint}. Use a key that has it, or give this key the scope on the portal's API keys page.`);
      }
      const raw = opts.schema ? await readJson(req) : undefined;
      const valid = opts.schema ? validate(opts.schema, raw) : (undefined as z.infer<S>);
      // Fixed-price calls are charged up front; computations reserve 1 unit and pay for their work afterwards.
      reserved = opts.units ? Math.max(1, Math.ceil(opts.units(valid))) : 1;
      const decision = await checkLimits({ keyId: key.id, organizationId: key.organizationId, plan: key.plan, units: reserved });
      headers = limitHeaders(decision);
      if (!decision.allowed) {
        reserved = 0;
        throw refusal(decision, "key");
      }
      admitted = decision.source === "redis";
      // Dataset references are loaded only for admitted requests (after the rate limit and the quota).
      const body = await resolveBodyDatasets(valid, { organizationId: key.organizationId });
      const params = (await ctx?.params) ?? {};
      const compute = computeFor(`key:${key.id}`, key.plan, work);
      const result = await handler({ body, key, requestId, req, params, compute });
      status = 200;
      units = work.computed ? unitsForWork(work.computeMs) : reserved;
      if (admitted && units > reserved) chargeUnits(key.organizationId, units - reserved);
      const meta: Meta = {
        requestId,
        computeUnits: units,
        engineVersion: ENGINE_VERSION,
        elapsedMs: Math.round((performance.now() - t0) * 100) / 100,
        ...(work.computed ? { computeMs: Math.round(work.computeMs * 100) / 100 } : {}),
      };
      const init = (result as WithInit)[RESPONSE_INIT];
      return new Response(JSON.stringify({ ...result, meta }), {
        status: init?.status ?? status,
        headers: { "content-type": "application/json", "sumfold-request-id": requestId, ...CORS, ...headers, ...init?.headers },
      });
    } catch (e) {
      const err = toApiError(e, opts.modelPointer);
      status = err.status;
      if (err.code === "compute_budget_exceeded" && key) {
        // A computation stopped at its deadline is charged for the time it ran.
        units = unitsForWork(work.computeMs);
        if (admitted && units > reserved) chargeUnits(key.organizationId, units - reserved);
        err.extra.computeUnits = units;
      } else {
        // Other failures charge nothing; an admitted request gives its reserved units back.
        if (admitted && key) refundUnits(key.organizationId, reserved);
        units = 0;
      }
      return problemResponse(err, requestId, headers);
    } finally {
      if (key) {
        recordUsage({
          requestId,
          keyId: key.id,
          organizationId: key.organizationId,
          endpoint: opts.endpoint,
          status,
          durationMs: Math.round(performance.now() - t0),
          computeUnits: units,
        });
      }
    }
  };
}

/** OPTIONS preflight for the keyed API (no cookies are involved, so any origin may call it). */
export function preflight(methods: string[]) {
  return () => new Response(null, { status: 204, headers: { ...CORS, "access-control-allow-methods": [...methods, "OPTIONS"].join(", ") } });
}

/** Answers 405 problem+json for the methods a route does not serve. */
export function methodNotAllowed(allowed: string[]) {
  const handler = () => {
    const e = new ApiError("method_not_allowed", `Use ${allowed.join(" or ")} on this path.`, { headers: { allow: [...allowed, "OPTIONS"].join(", ") } });
    return problemResponse(e, randomUUID());
  };
  return { GET: handler, POST: handler, PUT: handler, PATCH: handler, DELETE: handler };
}
