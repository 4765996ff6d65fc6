// Signing in over HTTP exactly as the sign-in form does (next-auth's CSRF token, then the credentials
// callback), against the `next start` of the test run; cookies kept by hand so a test can replay them.
import { baseUrl } from "../support/layout";

export type Jar = Map<string, string>;

const cookieHeader = (jar: Jar) => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");

function keep(jar: Jar, res: Response) {
  for (const c of res.headers.getSetCookie()) {
    const [pair, ...attrs] = c.split(";");
    const i = pair.indexOf("=");
    const name = pair.slice(0, i).trim();
    const value = pair.slice(i + 1).trim();
    const expired = attrs.some((a) => /^\s*(max-age=0|expires=thu, 01 jan 1970)/i.test(a));
    if (expired || value === "") jar.delete(name);
    else jar.set(name, value);
  }
}

export async function call(jar: Jar, path: string, init: RequestInit = {}): Promise<Response> {
  const res = await fetch(`${baseUrl()}${path}`, { ...init, redirect: "manual", headers: { ...(init.headers as Record<string, string>), cookie: cookieHeader(jar) } });
  keep(jar, res);
  return res;
}

async function csrf(jar: Jar): Promise<string> {
  const res = await call(jar, "/api/auth/csrf");
  return ((await res.json()) as { csrfToken: string }).csrfToken;
}

/** Signs in; returns the cookie jar (session cookie included) and where next-auth sent the browser. */
export async function signInHttp(email: string, password: string, code?: string): Promise<{ jar: Jar; url: string }> {
  const jar: Jar = new Map();
  const token = await csrf(jar);
  const body = new URLSearchParams({ csrfToken: token, email, password, ...(code ? { code } : {}), callbackUrl: `${baseUrl()}/dashboard`, json: "true" });
  const res = await call(jar, "/api/auth/callback/credentials", { method: "POST", headers: { "content-type": "application/x-www-form-urlencoded" }, body });
  const url = res.headers.get("location") ?? ((await res.json().catch(() => ({}))) as { url?: string }).url ?? "";
  return { jar, url };
}

export async function signOutHttp(jar: Jar): Promise<void> {
  const token = await csrf(jar);
  await call(jar, "/api/auth/signout", { method: "POST", headers: { "content-type": "application/x-www-form-urlencoded" }, body: new URLSearchParams({ csrfToken: token, json: "true" }) });
}

export const sessionCookieOf = (jar: Jar) => [...jar].filter(([k]) => k.startsWith("next-auth.session-token")).map(([k, v]) => `${k}=${v}`).join("; ");

/** A fresh jar holding only a copy of another jar's session cookie (what an attacker replaying it would send). */
export function replay(jar: Jar): Jar {
  return new Map([...jar].filter(([k]) => k.startsWith("next-auth.session-token")));
}
