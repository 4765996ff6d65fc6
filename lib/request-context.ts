import "server-only";
import { AsyncLocalStorage } from "node:async_hooks";

/** Where the request being handled came from, for the audit log; set by the portal's handler wrapper. */
export interface RequestOrigin {
  ip: string | null;
  userAgent: string | null;
}

const store = new AsyncLocalStorage<RequestOrigin>();

/** The client address: the first X-Forwarded-For hop set by the proxy in front, else X-Real-IP. */
export function originOf(req: Request): RequestOrigin {
  const xff = req.headers.get("x-forwarded-for")?.split(",")[0]?.trim();
  const ip = xff || req.headers.get("x-real-ip")?.trim() || null;
  return { ip: ip ? ip.slice(0, 64) : null, userAgent: req.headers.get("user-agent")?.slice(0, 200) ?? null };
}

export const withRequestOrigin = <T>(origin: RequestOrigin, fn: () => Promise<T>) => store.run(origin, fn);
export const currentOrigin = (): RequestOrigin | undefined => store.getStore();
