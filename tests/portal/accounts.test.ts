// Sign-up, e-mail confirmation, sign-in (credentials, throttled) and password reset, through the SMTP sink.
import { eq } from "drizzle-orm";
import request from "supertest";
import { afterAll, describe, expect, it } from "vitest";
import { authOptions } from "@/lib/auth/options";
import { verifyPassword } from "@/lib/auth/passwords";
import { PER_EMAIL } from "@/lib/auth/throttle";
import { getDb } from "@/lib/db/client";
import { auditEvents, memberships, organizations, users } from "@/lib/db/schema";
import { linkToken, portalServer, uniq, waitForMail } from "./support";

const server = portalServer();
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const json = (path: string, body: unknown) => request(server).post(path).set("content-type", "application/json").send(JSON.stringify(body));

type Authorize = (c: Record<string, string>, req: { headers: Record<string, string> }) => Promise<{ id: string; email: string } | null>;
const authorize = (authOptions.providers[0] as unknown as { options: { authorize: Authorize } }).options.authorize;

describe("sign-up and e-mail confirmation", () => {
  const email = `marta.vidal.${uniq()}@loftwell.example`;
  const password = "gearbox-tolerance-7";

  it("creates the person, an organisation with them as admin, and mails a confirmation link", async () => {
    const res = await json("/api/portal/auth/sign-up", { name: "Marta Vidal", email: email.toUpperCase(), password, organization: "Loftwell Cover" });
    expect(res.status).toBe(201);
    const [u] = await getDb().select().from(users).where(eq(users.email, email));
    expect(u.name).toBe("Marta Vidal");
    expect(u.emailVerifiedAt).toBeNull();
    expect(await verifyPassword(password, u.passwordHash)).toBe(true);
    const [m] = await getDb().select({ role: memberships.role, org: organizations.name }).from(memberships).innerJoin(organizations, eq(organizations.id, memberships.organizationId)).where(eq(memberships.userId, u.id));
    expect(m).toEqual({ role: "admin", org: "Loftwell Cover" });
    const mail = await waitForMail(email);
    expect(mail[0].subject).toMatch(/confirm/i);
    expect(mail[0].text).toMatch(/\/verify\?token=/);
  });

  it("refuses sign-in before confirmation, with a message the form can show", async () => {
    await expect(authorize({ email, password }, { headers: { "x-forwarded-for": "10.1.0.1" } })).rejects.toThrow("Unverified");
  });

  it("a second sign-up with the same address is a 409 tied to the e-mail field", async () => {
    const res = await json("/api/portal/auth/sign-up", { name: "Other", email, password, organization: "Other Org" });
    expect(res.status).toBe(409);
    expect(res.body.fields.email).toMatch(/already/i);
  });

  it("the link confirms once; a second use is 410; then sign-in works", async () => {
    const [mail] = await waitForMail(email);
    const token = linkToken(mail, "/verify");
    expect((await json("/api/portal/auth/verify", { token })).status).toBe(200);
    expect((await json("/api/portal/auth/verify", { token })).status).toBe(410);
    const [u] = await getDb().select().from(users).where(eq(users.email, email));
    expect(u.emailVerifiedAt).toBeInstanceOf(Date);
    const user = await authorize({ email, password }, { headers: { "x-forwarded-for": "10.1.0.2" } });
    expect(user?.email).toBe(email);
    const audit = await getDb().select().from(auditEvents).where(eq(auditEvents.actorUserId, u.id));
    expect(audit.map((a) => a.action)).toEqual(expect.arrayContaining(["organization.created", "user.email_verified"]));
  });

  it("a wrong password is refused without saying why", async () => {
    expect(await authorize({ email, password: "not-the-password" }, { headers: { "x-forwarded-for": "10.1.0.3" } })).toBeNull();
    expect(await authorize({ email: `nobody.${uniq()}@loftwell.example`, password }, { headers: { "x-forwarded-for": "10.1.0.3" } })).toBeNull();
  });

  it("validation errors are 422 with a message per field (same zod schema as the form)", async () => {
    const res = await json("/api/portal/auth/sign-up", { name: "", email: "not-an-address", password: "short", organization: "" });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.fields).sort()).toEqual(["email", "name", "organization", "password"]);
  });
});

describe("sign-in throttling", () => {
  it(`allows ${PER_EMAIL} attempts per address in 15 minutes, then refuses further attempts with "Throttled"`, async () => {
    const email = `throttle.${uniq()}@loftwell.example`;
    const results: (string | null)[] = [];
    for (let i = 0; i < PER_EMAIL + 1; i++) {
      results.push(await authorize({ email, password: "wrong-password" }, { headers: { "x-forwarded-for": `10.2.${i}.1` } }).then(() => "refused", (e: Error) => e.message));
    }
    expect(results.slice(0, PER_EMAIL).every((r) => r === "refused")).toBe(true);
    expect(results[PER_EMAIL]).toBe("Throttled");
  });
});

describe("password reset", () => {
  it("mails a single-use link; the new password works and the old one does not; unknown addresses get the same answer", async () => {
    const email = `reset.${uniq()}@loftwell.example`;
    await json("/api/portal/auth/sign-up", { name: "Reset Person", email, password: "first-password-1", organization: "Reset Org" });
    const unknown = await json("/api/portal/auth/reset-request", { email: `nobody.${uniq()}@loftwell.example` });
    const known = await json("/api/portal/auth/reset-request", { email });
    expect(unknown.status).toBe(202);
    expect(known.status).toBe(202);
    expect(known.body).toEqual(unknown.body);
    const mails = await waitForMail(email, 2);
    const resetMail = mails.find((m) => /new .*password/i.test(m.subject))!;
    const token = linkToken(resetMail, "/reset");
    expect((await json("/api/portal/auth/reset", { token, password: "short" })).status).toBe(422);
    expect((await json("/api/portal/auth/reset", { token, password: "second-password-2" })).status).toBe(200);
    expect((await json("/api/portal/auth/reset", { token, password: "third-password-3" })).status).toBe(410);
    const [u] = await getDb().select().from(users).where(eq(users.email, email));
    expect(await verifyPassword("second-password-2", u.passwordHash)).toBe(true);
    expect(await verifyPassword("first-password-1", u.passwordHash)).toBe(false);
    // The reset link proves the address too.
    expect(u.emailVerifiedAt).toBeInstanceOf(Date);
  });
});
