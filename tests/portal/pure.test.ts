// Pure pieces of the portal: the role table, the shared form schemas, CSV escaping, link tokens.
import { describe, expect, it } from "vitest";
import { can, PERMISSIONS, ROLE_PERMISSIONS } from "@/lib/auth/roles";
import { hashLinkToken, newLinkToken } from "@/lib/portal/tokens";
import { inviteSchema, keyCreateSchema, signUpSchema, usageQuerySchema } from "@/lib/portal/schemas";
import { usageCsv } from "@/lib/portal/usage";
import { slugify } from "@/lib/portal/accounts";

describe("roles", () => {
  const cases: [Parameters<typeof can>[0], keyof typeof PERMISSIONS, boolean][] = [
    ["admin", "keys.all", true],
    ["developer", "keys.all", false],
    ["developer", "keys.own", true],
    ["billing", "keys.own", false],
    ["billing", "usage.all", true],
    ["developer", "usage.all", false],
    ["developer", "members.manage", false],
    ["billing", "explore", false],
  ];
  for (const [role, perm, expected] of cases) it(`${role} ${expected ? "may" : "may not"} ${perm}`, () => expect(can(role, perm)).toBe(expected));
  it("the role -> permission map is the table read the other way", () => {
    for (const [role, perms] of Object.entries(ROLE_PERMISSIONS)) for (const p of perms) expect(PERMISSIONS[p]).toContain(role);
  });
});

describe("shared schemas", () => {
  it("normalise e-mail addresses", () => {
    expect(inviteSchema.parse({ email: "  Ada.Okafor@Harrowgate.Example ", role: "billing" }).email).toBe("ada.okafor@harrowgate.example");
  });
  it("reject a sign-up with a short password and name each field", () => {
    const r = signUpSchema.safeParse({ name: "A", email: "a@b.example", password: "123", organization: "Org" });
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => i.path[0])).toEqual(["password"]);
  });
  it("key creation: unknown scopes and past expiry are refused", () => {
    expect(keyCreateSchema.safeParse({ label: "x", scopes: ["everything"] }).success).toBe(false);
    expect(keyCreateSchema.safeParse({ label: "x", scopes: ["moments"], expiresOn: "2000-01-01" }).success).toBe(false);
    expect(keyCreateSchema.safeParse({ label: "x", scopes: ["moments"], expiresOn: "2099-01-01" }).success).toBe(true);
  });
  it("usage query: defaults and bounds", () => {
    expect(usageQuerySchema.parse({})).toMatchObject({ sort: "day", dir: "desc", page: 1, pageSize: 25 });
    expect(usageQuerySchema.safeParse({ pageSize: "501" }).success).toBe(false);
    expect(usageQuerySchema.safeParse({ sort: "1;DROP TABLE" }).success).toBe(false);
  });
});

describe("usage CSV", () => {
  it("quotes commas and quotes (RFC 4180) and defuses formula-looking labels", () => {
    const csv = usageCsv([
      { day: "2026-12-01", keyId: 1, keyLabel: 'pricing, "beta"', keyPrefix: "sfk_abc", endpoint: "POST /api/v1/moments", requests: 3, units: 9, errors: 0, medianMs: 4.5 },
      { day: "2026-12-01", keyId: 2, keyLabel: "=HYPERLINK(1)", keyPrefix: null, endpoint: "POST /api/v1/cf", requests: 1, units: 1, errors: 1, medianMs: 2 },
    ]);
    const lines = csv.split("\r\n");
    expect(lines[1]).toBe('2026-12-01,"pricing, ""beta""",sfk_abc,POST /api/v1/moments,3,9,0,4.5');
    expect(lines[2]).toBe("2026-12-01,'=HYPERLINK(1),,POST /api/v1/cf,1,1,1,2");
    expect(csv.endsWith("\r\n")).toBe(true);
  });
});

describe("link tokens and slugs", () => {
  it("tokens are 256-bit, distinct, and stored only as a keyed hash", () => {
    process.env.NEXTAUTH_SECRET ??= "unit-test-secret";
    const a = newLinkToken();
    const b = newLinkToken();
    expect(Buffer.from(a.token, "base64url")).toHaveLength(32);
    expect(a.token).not.toBe(b.token);
    expect(a.hash).toBe(hashLinkToken(a.token));
    expect(a.hash).not.toContain(a.token);
    expect(a.hash).toMatch(/^[0-9a-f]{64}$/);
  });
  it("slugs are lowercase ASCII", () => {
    expect(slugify("Zürich Rückversicherung & Co.")).toBe("zurich-ruckversicherung-co");
    expect(slugify("!!!")).toBe("org");
  });
});
