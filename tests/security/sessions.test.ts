// Sessions that can be ended, over HTTP against `next start`: a session cookie copied before sign-out, a
// password reset, "sign out everywhere" or "sign out other sessions" is refused when replayed, by the portal's
// API (401), by next-auth's session endpoint (no session) and by the signed-in pages (sent to sign-in).
import bcrypt from "bcryptjs";
import { describe, expect, it } from "vitest";
import { getDb } from "@/lib/db/client";
import { memberships, organizations, users } from "@/lib/db/schema";
import { linkToken, uniq, waitForMail } from "../portal/support";
import { call, replay, signInHttp, signOutHttp, type Jar } from "./http-session";

async function person(password = "a-long-password-1") {
  const email = `session.${uniq()}@security.example`;
  const [o] = await getDb().insert(organizations).values({ slug: `sessions-${uniq()}`, name: "Harrowgate Mutual", plan: "team" });
  const [u] = await getDb().insert(users).values({ email, name: "Ines Varga", passwordHash: await bcrypt.hash(password, 4), emailVerifiedAt: new Date() });
  await getDb().insert(memberships).values({ userId: u.insertId, organizationId: o.insertId, role: "admin" });
  return { id: u.insertId, email, password };
}

/** What three readers of a cookie say about it: the portal API, next-auth's session endpoint, a signed-in page. */
async function verdict(jar: Jar) {
  const me = (await call(new Map(jar), "/api/portal/me")).status;
  const session = (await (await call(new Map(jar), "/api/auth/session")).json()) as { user?: { email?: string } };
  const page = await call(new Map(jar), "/dashboard");
  return { me, sessionUser: session.user?.email ?? null, page: page.status === 200 ? "rendered" : `${page.status} ${page.headers.get("location") ?? ""}` };
}

const refused = { me: 401, sessionUser: null, page: expect.stringMatching(/^30[37] .*\/sign-in/) };

// `next start` is one process and drops its cached verdicts on each change it makes, so no wait for
// CHECK_CACHE_MS is needed here (another instance would honour a copied cookie for at most that long).
describe("ending sessions", () => {
  it("a cookie replayed after sign-out is refused", async () => {
    const p = await person();
    const { jar } = await signInHttp(p.email, p.password);
    expect(await verdict(jar)).toEqual({ me: 200, sessionUser: p.email, page: "rendered" });
    const copy = replay(jar);
    await signOutHttp(jar);
    expect(await verdict(copy)).toEqual(refused);
  });

  it("a password reset ends every session of the person", async () => {
    const p = await person();
    const a = await signInHttp(p.email, p.password);
    const b = await signInHttp(p.email, p.password);
    const copyA = replay(a.jar);
    expect((await verdict(copyA)).me).toBe(200);
    const ask = await call(new Map(), "/api/portal/auth/reset-request", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email: p.email }) });
    expect(ask.status).toBeLessThan(300);
    const [mail] = await waitForMail(p.email, 1);
    const done = await call(new Map(), "/api/portal/auth/reset", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ token: linkToken(mail, "/reset"), password: "a-brand-new-password-2" }),
    });
    expect(done.status, await done.clone().text()).toBe(200);
    expect(await verdict(copyA)).toEqual(refused);
    expect(await verdict(replay(b.jar))).toEqual(refused);
    // The new password opens a new session.
    const c = await signInHttp(p.email, "a-brand-new-password-2");
    expect((await verdict(c.jar)).me).toBe(200);
  });

  it("sign out everywhere ends this session and the others", async () => {
    const p = await person();
    const a = await signInHttp(p.email, p.password);
    const b = await signInHttp(p.email, p.password);
    const res = await call(a.jar, "/api/portal/account/sessions?all=1", { method: "DELETE" });
    expect(res.status).toBe(200);
    expect(await verdict(replay(a.jar))).toEqual(refused);
    expect(await verdict(replay(b.jar))).toEqual(refused);
  });

  it("lists the open sessions and signs out the others, keeping this one", async () => {
    const p = await person();
    const a = await signInHttp(p.email, p.password);
    const b = await signInHttp(p.email, p.password);
    const list = (await (await call(a.jar, "/api/portal/account/sessions")).json()) as { sessions: { id: string; current: boolean; ip: string }[] };
    expect(list.sessions).toHaveLength(2);
    expect(list.sessions.filter((s) => s.current)).toHaveLength(1);
    const res = await call(a.jar, "/api/portal/account/sessions", { method: "DELETE" });
    expect(await res.json()).toEqual({ ended: 1 });
    expect((await verdict(replay(a.jar))).me).toBe(200);
    expect(await verdict(replay(b.jar))).toEqual(refused);
    const after = (await (await call(a.jar, "/api/portal/account/sessions")).json()) as { sessions: { current: boolean }[] };
    expect(after.sessions.map((s) => s.current)).toEqual([true]);
  });

  it("ends one chosen session by its listed id; another person's session id is not found", async () => {
    const p = await person();
    const q = await person();
    const a = await signInHttp(p.email, p.password);
    const b = await signInHttp(p.email, p.password);
    const other = await signInHttp(q.email, q.password);
    const mine = (await (await call(a.jar, "/api/portal/account/sessions")).json()) as { sessions: { id: string; current: boolean }[] };
    const theirs = (await (await call(other.jar, "/api/portal/account/sessions")).json()) as { sessions: { id: string }[] };
    expect((await call(a.jar, `/api/portal/account/sessions/${theirs.sessions[0].id}`, { method: "DELETE" })).status).toBe(404);
    expect((await verdict(replay(other.jar))).me).toBe(200);
    const target = mine.sessions.find((s) => !s.current)!;
    expect((await call(a.jar, `/api/portal/account/sessions/${target.id}`, { method: "DELETE" })).status).toBe(200);
    expect(await verdict(replay(b.jar))).toEqual(refused);
    expect((await verdict(replay(a.jar))).me).toBe(200);
  });

  it("a token without a session (minted before sessions were recorded, or forged with the secret) is refused", async () => {
    const p = await person();
    const { encode } = await import("next-auth/jwt");
    const legacy = await encode({ token: { uid: p.id, email: p.email, name: "x" } as never, secret: process.env.NEXTAUTH_SECRET ?? "test-nextauth-secret-not-for-production" });
    expect(await verdict(new Map([["next-auth.session-token", legacy]]))).toEqual(refused);
  });
});
