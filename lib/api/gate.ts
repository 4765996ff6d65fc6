import "server-only";
import { randomUUID } from "node:crypto";
import type { z } from "zod";
import { hasDatasetRef, resolveDatasets } from "@/lib/datasets/resolve";
import { getKeyByHash } from "@/lib/db/keys";
import type { ApiKey } from "@/lib/db/schema";
import { ENGINE_VERSION } from "@/lib/version";
import { readJson, validate } from "./body";
import { ApiError, problemBody, toApiError } from "./errors";
import { hashKey, parseKey, pepper } from "./key-format";
import { keyState } from "./key-state";
import { recordUsage } from "./metering";
import { checkLimits, refundUnits, type LimitDecision } from "./rate-limit";
import type { Scope } from "./scopes";

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
}

const CORS: Record<string, string> = {
  "access-control-allow-origin": "*",
  "access-control-allow-headers": "authorization, content-type",
  "access-control-expose-headers": "ratelimit, ratelimit-policy, retry-after, sumfold-request-id, sumfold-limiter",
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
  const row = await getKeyByHash({ secretHash: hash });
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
  return { id: found.key.id, organizationId: found.key.organizationId, prefix: found.key.prefix, scopes: found.key.scopes, plan: found.plan };
}

function limitHeaders(d: LimitDecision): Record<string, string> {
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
  scope: Scope;
  /** the request schema; omitted for GET */
  schema?: S;
  /** compute units charged for a valid request (documented formula), known before the work is done */
  units: (body: z.infer<S>) => number;
  /** where the model sits in the body, to prefix the core's pointers */
  modelPointer?: string;
}

type Handler<S extends z.ZodType> = (ctx: { body: z.infer<S>; key: AuthedKey; requestId: string; req: Request; params: Record<string, string> }) => Promise<Record<string, unknown>> | Record<string, unknown>;

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
    let headers: Record<string, string> = {};
    let admitted = false;
    try {
      key = await authenticate(req);
      if (!key.scopes.includes(opts.scope)) {
        throw new ApiError("forbidden", `This key lacks the "${opts.scope}" scope needed for ${opts.endpoint}; an admin can issue a key with it.`);
      }
      const raw = opts.schema ? await readJson(req) : undefined;
      const body = opts.schema ? validate(opts.schema, raw) : (undefined as z.infer<S>);
      // Dataset references become their empirical law first, so the units count the data's size.
      if (body && typeof body === "object" && "model" in body && hasDatasetRef(body.model)) {
        (body as { model: unknown }).model = await resolveDatasets(body.model, key.organizationId, "/model");
      }
      units = Math.max(1, Math.ceil(opts.units(body)));
      const decision = await checkLimits({ keyId: key.id, organizationId: key.organizationId, plan: key.plan, units });
      headers = limitHeaders(decision);
      if (!decision.allowed) {
        units = 0;
        if (decision.quotaExhausted) {
          const q = decision.quotaExhausted;
          const wait = Math.ceil((q.resetsAt.getTime() - Date.now()) / 1000);
          throw new ApiError("quota_exhausted", `This organisation has used ${q.used} of its ${q.quota} compute units this month; they renew on ${q.resetsAt.toISOString()}.`, {
            headers: { "retry-after": String(wait) },
          });
        }
        const wait = Math.max(1, Math.ceil((decision.reset - Date.now()) / 1000));
        throw new ApiError("rate_limited", `This key may make ${decision.limit} requests per second; retry after ${wait} s.`, {
          headers: { "retry-after": String(wait) },
        });
      }
      admitted = decision.source === "redis";
      const params = (await ctx?.params) ?? {};
      const result = await handler({ body, key, requestId, req, params });
      status = 200;
      const meta: Meta = { requestId, computeUnits: units, engineVersion: ENGINE_VERSION, elapsedMs: Math.round((performance.now() - t0) * 100) / 100 };
      return new Response(JSON.stringify({ ...result, meta }), {
        status,
        headers: { "content-type": "application/json", "sumfold-request-id": requestId, ...CORS, ...headers },
      });
    } catch (e) {
      const err = toApiError(e, opts.modelPointer);
      status = err.status;
      // Units are charged for successful responses only; an admitted request that fails gives them back.
      if (admitted && key) refundUnits(key.organizationId, units);
      units = 0;
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
