import "server-only";
import type { z } from "zod";
import { DbUnavailableError } from "@/lib/db/client";
import { originOf, withRequestOrigin } from "@/lib/request-context";
import { fieldErrors } from "./schemas";

/** The one error of the portal's handlers: a status, a message for people, and per-field messages for forms. */
export class PortalError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
    this.name = "PortalError";
  }
}

export const notFound = (what = "This item") => new PortalError(404, `${what} does not exist in this organisation.`);
export const forbidden = (why = "Your role in this organisation does not allow this.") => new PortalError(403, why);

const json = (status: number, body: unknown, headers: Record<string, string> = {}) =>
  new Response(JSON.stringify(body), { status, headers: { "content-type": "application/json", "cache-control": "no-store", ...headers } });

export const ok = (body: unknown, status = 200, headers: Record<string, string> = {}) => json(status, body, headers);

/** Parses a JSON body with a schema; 415 unless JSON, 400 when malformed, 422 with field messages when invalid. */
export async function parseBody<S extends z.ZodType>(req: Request, schema: S): Promise<z.infer<S>> {
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (type !== "application/json") throw new PortalError(415, "Send the body as application/json.");
  let raw: unknown;
  try {
    const text = await req.text();
    if (text.length > 256 * 1024) throw new PortalError(413, "The request body is too large.");
    raw = text ? JSON.parse(text) : {};
  } catch (e) {
    if (e instanceof PortalError) throw e;
    throw new PortalError(400, "The request body is not valid JSON.");
  }
  const r = schema.safeParse(raw);
  if (!r.success) throw new PortalError(422, "Some fields need attention.", fieldErrors(r.error));
  return r.data;
}

export function parseQuery<S extends z.ZodType>(req: Request, schema: S): z.infer<S> {
  const params = Object.fromEntries([...new URL(req.url).searchParams].filter(([, v]) => v !== ""));
  const r = schema.safeParse(params);
  if (!r.success) throw new PortalError(422, "Some filters need attention.", fieldErrors(r.error));
  return r.data;
}

/**
 * Cookie-authenticated mutations accept requests from our own origin only: a browser always sends Origin on
 * cross-site POST/PATCH/DELETE, and JSON bodies cannot be sent cross-site without a preflight we never grant.
 */
function checkOrigin(req: Request) {
  if (req.method === "GET" || req.method === "HEAD") return;
  const origin = req.headers.get("origin");
  if (!origin) return;
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host");
  let originHost = "";
  try {
    originHost = new URL(origin).host;
  } catch {
    /* a malformed Origin is refused below */
  }
  if (!host || originHost !== host) throw new PortalError(403, "Cross-site requests are not accepted.");
}

type Ctx = { params: Promise<Record<string, string>> };

/** Wraps a portal route handler: origin check, and every thrown error rendered as one JSON shape. */
export function handler(fn: (req: Request, params: Record<string, string>) => Promise<Response>) {
  return async (req: Request, ctx?: Ctx): Promise<Response> => {
    try {
      checkOrigin(req);
      const params = (await ctx?.params) ?? {};
      return await withRequestOrigin(originOf(req), () => fn(req, params));
    } catch (e) {
      if (e instanceof PortalError) return json(e.status, { error: e.message, ...(e.fields ? { fields: e.fields } : {}) });
      if (e instanceof DbUnavailableError) return json(503, { error: "The database is not answering right now; try again in a few seconds." }, { "retry-after": "5" });
      console.error("[sumfold] portal handler failed", e);
      return json(500, { error: "Something went wrong on our side. It has been logged; please try again." });
    }
  };
}

/** Parses a positive integer path parameter; anything else is a 404 (never a 500). */
export function idParam(params: Record<string, string>, name: string): number {
  const n = Number(params[name]);
  if (!Number.isSafeInteger(n) || n <= 0) throw notFound();
  return n;
}
