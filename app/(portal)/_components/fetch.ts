"use client";

/** The JSON error shape of /api/portal/*: a message for people and per-field messages for forms. */
export interface PortalProblem {
  status: number;
  error: string;
  fields?: Record<string, string>;
}

export class PortalFetchError extends Error {
  constructor(readonly problem: PortalProblem) {
    super(problem.error);
  }
}

/** fetch for the portal's own handlers: JSON in and out, errors thrown as PortalFetchError. */
export async function portalFetch<T>(path: string, init: { method?: string; body?: unknown } = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method: init.method ?? (init.body === undefined ? "GET" : "POST"),
      headers: init.body === undefined ? {} : { "content-type": "application/json" },
      body: init.body === undefined ? undefined : JSON.stringify(init.body),
      credentials: "same-origin",
      cache: "no-store",
    });
  } catch {
    throw new PortalFetchError({ status: 0, error: "The server could not be reached. Check your connection and try again." });
  }
  const data = (await res.json().catch(() => ({}))) as Record<string, unknown>;
  if (!res.ok) {
    throw new PortalFetchError({
      status: res.status,
      error: typeof data.error === "string" ? data.error : `The request failed (${res.status}).`,
      fields: data.fields as Record<string, string> | undefined,
    });
  }
  return data as T;
}
