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

/**
 * The organisation this tab works in. The portal shell sets it from the page's `?org=` address before any page
 * renders; every call to the portal's handlers names it (header), so another tab switching organisation never
 * changes what this one reads or writes.
 */
let activeOrg: string | null = null;
export const ORG_HEADER = "x-sumfold-org";
export const setActiveOrg = (slug: string | null) => {
  activeOrg = slug;
};
export const getActiveOrg = () => activeOrg;

/** Headers that name this tab's organisation, for calls made without portalFetch (uploads, streaming). */
export const orgHeaders = (): Record<string, string> => (activeOrg ? { [ORG_HEADER]: activeOrg } : {});

/** A portal path (page, or a download link) with this tab's organisation in its query. */
export function withOrg(path: string, org: string | null = activeOrg): string {
  if (!org) return path;
  const [base, hash] = path.split("#", 2);
  const u = new URL(base, "http://x");
  u.searchParams.set("org", org);
  return `${u.pathname}${u.search}${hash !== undefined ? `#${hash}` : ""}`;
}

/** fetch for the portal's own handlers: JSON in and out, errors thrown as PortalFetchError. */
export async function portalFetch<T>(path: string, init: { method?: string; body?: unknown } = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method: init.method ?? (init.body === undefined ? "GET" : "POST"),
      headers: { ...orgHeaders(), ...(init.body === undefined ? {} : { "content-type": "application/json" }) },
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
