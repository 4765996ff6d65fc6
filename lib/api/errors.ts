import { isCfError } from "@/lib/cf/errors";

/** Every problem the public API can answer with: code -> HTTP status and title, declared once. */
export const PROBLEMS = {
  bad_request: { status: 400, title: "The request could not be read" },
  unauthorized: { status: 401, title: "A valid API key is required" },
  forbidden: { status: 403, title: "The key may not call this endpoint" },
  address_not_allowed: { status: 403, title: "The key may not be used from this address" },
  not_found: { status: 404, title: "Not found" },
  method_not_allowed: { status: 405, title: "Method not allowed" },
  payload_too_large: { status: 413, title: "The request body is too large" },
  unsupported_media_type: { status: 415, title: "The request body must be JSON" },
  validation: { status: 422, title: "The request is not valid" },
  limit_exceeded: { status: 422, title: "The request exceeds a limit of the engine" },
  not_applicable: { status: 422, title: "The computation does not apply to this model" },
  compute_budget_exceeded: { status: 422, title: "The computation did not finish within its deadline" },
  tolerance_unreached: { status: 422, title: "The requested accuracy could not be reached" },
  rate_limited: { status: 429, title: "Too many requests" },
  quota_exhausted: { status: 429, title: "The monthly compute units are used up" },
  too_many_concurrent: { status: 429, title: "Too many computations running for this key" },
  unavailable: { status: 503, title: "The service is temporarily unavailable" },
  internal: { status: 500, title: "Something went wrong on our side" },
} as const;

export type ProblemCode = keyof typeof PROBLEMS;

export interface FieldError {
  detail: string;
  /** RFC 6901 JSON pointer into the request body. */
  pointer: string;
}

/** The one error the API layer throws; rendered once as RFC 9457 problem+json. */
export class ApiError extends Error {
  readonly code: ProblemCode;
  readonly status: number;
  readonly detail: string;
  readonly errors?: FieldError[];
  readonly headers: Record<string, string>;
  readonly extra: Record<string, unknown>;

  constructor(code: ProblemCode, detail: string, opts: { errors?: FieldError[]; headers?: Record<string, string>; extra?: Record<string, unknown> } = {}) {
    super(detail);
    this.name = "ApiError";
    this.code = code;
    this.status = PROBLEMS[code].status;
    this.detail = detail;
    this.errors = opts.errors;
    this.headers = opts.headers ?? {};
    this.extra = opts.extra ?? {};
  }
}

/** Problem type URIs are documented on the docs page: <base>/docs/errors#<code>. */
export const problemType = (code: ProblemCode) => `${process.env.SUMFOLD_BASE_URL ?? "http://127.0.0.1:3000"}/docs/errors#${code}`;

export function problemBody(e: ApiError, instance?: string): Record<string, unknown> {
  return {
    type: problemType(e.code),
    title: PROBLEMS[e.code].title,
    status: e.status,
    detail: e.detail,
    ...(instance ? { instance } : {}),
    ...(e.errors ? { errors: e.errors } : {}),
    ...e.extra,
  };
}

/**
 * Maps anything thrown to an ApiError: the core's typed errors keep their pointer (prefixed by where the
 * object it points into sits in the body, e.g. "/model"); unknown errors become a generic 500 and are
 * logged, never shown.
 */
export function toApiError(e: unknown, modelPointer = ""): ApiError {
  if (e instanceof ApiError) return e;
  if (isCfError(e)) {
    const errors = e.issues.map((i) => ({ detail: i.detail, pointer: modelPointer + i.pointer }));
    switch (e.code) {
      case "invalid_model":
        return new ApiError("validation", e.detail, { errors });
      case "limit_exceeded":
        return new ApiError("limit_exceeded", e.detail, { errors });
      case "not_applicable":
      case "no_moment":
        return new ApiError("not_applicable", e.detail, { errors });
    }
  }
  if (e instanceof Error && e.name === "DbUnavailableError") {
    return new ApiError("unavailable", "The database is not answering right now; retry in a few seconds.", { headers: { "retry-after": "5" } });
  }
  console.error("[sumfold] unexpected error", e);
  return new ApiError("internal", "The request failed unexpectedly. It has been logged; please retry, and contact support if it persists.");
}
