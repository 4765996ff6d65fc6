// Two-step sign-in over HTTP against `next start`: enrolment needs the password and a first code; then the
// password alone is refused ("TwoFactorRequired"), a code works once (RFC 6238 time step claimed), a
// recovery code works once, and turning it off needs the password. Codes are made with otplib's generate,
// the reference implementation of RFC 6238 used by authenticator apps' test vectors.
import bcrypt from "bcryptjs";
import { generate } from "otplib";
import { describe, expect, it } from "vitest";
import { getDb } from "@/lib/db/client";
import { memberships, organizations, users } from "@/lib/db/schema";
import { uniq } from "../portal/support";
import { call, signInHttp, type Jar } from "./http-session";

const json = (body: unknown) => ({ method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
const signedIn = async (jar: Jar) => (await call(new Map(jar), "/api/portal/me")).status === 200;
const errorOf = (url: string) => new URL(url, "http://x").searchParams.get("error");

describe("two-step sign-in", () => {
  it("enrols, then asks for a code; codes and recovery codes work once; turning it off needs the password", { timeout: 60_000 }, async () => {
    const email = `tfa.${uniq()}@security.example`;
    const password = "a-long-password-1";
    const [o] = await getDb().insert(organizations).values({ slug: `tfa-${uniq()}`, name: "Harrowgate Mutual", plan: "team" });
    const [u] = await getDb().insert(users).values({ email, name: "Ada Lindqvist", passwordHash: await bcrypt.hash(password, 4), emailVerifiedAt: new Date() });
    await getDb().insert(memberships).values({ userId: u.insertId, organizationId: o.insertId, role: "admin" });

    const { jar } = await signInHttp(email, password);
    expect(await signedIn(jar)).toBe(true);
    expect((await call(jar, "/api/portal/account/two-factor", json({ password: "wrong-password" }))).status).toBe(422);
    const start = await call(jar, "/api/portal/account/two-factor", json({ password }));
    expect(start.status).toBe(200);
    const { secret, uri, qrSvg } = (await start.json()) as { secret: string; uri: string; qrSvg: string };
    expect(uri).toMatch(new RegExp(`^otpauth://totp/Sumfold:${encodeURIComponent(email).replace(/\./g, "\\.")}\\?.*secret=${secret}`));
    expect(qrSvg).toMatch(/^<svg/);
    // Not on until a first code confirms the device.
    expect(errorOf((await signInHttp(email, password)).url)).toBeNull();
    expect((await call(jar, "/api/portal/account/two-factor/confirm", json({ code: "000000" }))).status).toBe(422);
    const now = Math.floor(Date.now() / 1000);
    const confirm = await call(jar, "/api/portal/account/two-factor/confirm", json({ code: await generate({ secret, epoch: now }) }));
    expect(confirm.status).toBe(200);
    const { recoveryCodes } = (await confirm.json()) as { recoveryCodes: string[] };
    expect(recoveryCodes).toHaveLength(10);
    expect(new Set(recoveryCodes).size).toBe(10);

    // Password alone: no session, the form is told to ask for a code.
    const bare = await signInHttp(email, password);
    expect(errorOf(bare.url)).toBe("TwoFactorRequired");
    expect(await signedIn(bare.jar)).toBe(false);
    // A wrong password with a right code says nothing about the second factor.
    const nextStep = await generate({ secret, epoch: now + 30 });
    expect(errorOf((await signInHttp(email, "not-the-password", nextStep)).url)).toBe("CredentialsSignin");
    // The code of the next step (within the one-step drift allowed) signs in once; the same code again is refused.
    const withCode = await signInHttp(email, password, nextStep);
    expect(errorOf(withCode.url)).toBeNull();
    expect(await signedIn(withCode.jar)).toBe(true);
    expect(errorOf((await signInHttp(email, password, nextStep)).url)).toBe("TwoFactorInvalid");
    // The enrolment code (an older step) is refused too.
    expect(errorOf((await signInHttp(email, password, await generate({ secret, epoch: now }))).url)).toBe("TwoFactorInvalid");

    // A recovery code, typed loosely (upper case, spaces), works once.
    const loose = recoveryCodes[3].toUpperCase().replace(/-/g, " ");
    const rec = await signInHttp(email, password, loose);
    expect(await signedIn(rec.jar)).toBe(true);
    expect(errorOf((await signInHttp(email, password, recoveryCodes[3])).url)).toBe("TwoFactorInvalid");
    const status = (await (await call(jar, "/api/portal/account/two-factor")).json()) as { enabled: boolean; recoveryCodesLeft: number };
    expect(status).toMatchObject({ enabled: true, recoveryCodesLeft: 9 });
    const sessions = (await (await call(jar, "/api/portal/account/sessions")).json()) as { sessions: { method: string }[] };
    expect(sessions.sessions.map((s) => s.method).sort()).toEqual(["password", "password", "password+recovery", "password+totp"]);

    // Turning it off needs the password; then the password alone signs in again.
    const off = await call(jar, "/api/portal/account/two-factor", { method: "DELETE", headers: { "content-type": "application/json" }, body: JSON.stringify({ password: "wrong" }) });
    expect(off.status).toBe(422);
    expect((await call(jar, "/api/portal/account/two-factor", { method: "DELETE", headers: { "content-type": "application/json" }, body: JSON.stringify({ password }) })).status).toBe(200);
    expect(await signedIn((await signInHttp(email, password)).jar)).toBe(true);
  });

  it("stores the secret sealed, never in the clear", async () => {
    const { seal, unseal } = await import("@/lib/auth/totp");
    const sealed = seal("JBSWY3DPEHPK3PXP");
    expect(sealed).not.toContain("JBSWY3DPEHPK3PXP");
    expect(unseal(sealed)).toBe("JBSWY3DPEHPK3PXP");
    // Flip one bit of the ciphertext: the GCM tag no longer matches.
    const [v, iv, body, tag] = sealed.split(".");
    const bytes = Buffer.from(body, "base64url");
    bytes[0] ^= 1;
    expect(unseal([v, iv, bytes.toString("base64url"), tag].join("."))).toBeNull();
  });
});
