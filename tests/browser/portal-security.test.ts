// Security features in the browser, each used by the role that needs it: an admin turns on two-step sign-in
// (QR + code, recovery codes), signs in with a recovery code, sees their sessions and signs out another one
// (whose cookie is then refused); a developer edits a key's scopes and address ranges; an admin removes a
// member after seeing their keys and hands them over; every page renders under the CSP without a violation.
import { join } from "node:path";
import { generate } from "otplib";
import type { Page } from "playwright-core";
import { afterAll, beforeEach, describe, expect, it } from "vitest";
import { createKey } from "@/lib/db/keys";
import { launchBrowser } from "../support/browser";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { callMoments, makeOrganization, makePerson, shot, signIn } from "./portal-support";

const session = useBrowser();
// Each test signs in as its own person: start without the previous test's session cookie.
beforeEach(async () => {
  await session?.browser.clearCookies();
});

const SHOTS = "/tmp/sumfold-shots";
const closeLater: (() => Promise<void>)[] = [];
afterAll(async () => {
  for (const c of closeLater) await c();
});

/** Screenshots at 1280 and 390 px wide (for review), and the page must not scroll sideways at 390. */
async function bothWidths(page: Page, name: string) {
  const { mkdirSync } = await import("node:fs");
  mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: join(SHOTS, `${name}-1280.png`), fullPage: true });
  await page.setViewportSize({ width: 390, height: 844 });
  await page.waitForTimeout(200);
  await page.screenshot({ path: join(SHOTS, `${name}-390.png`), fullPage: true });
  const extra = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  await page.setViewportSize({ width: 1280, height: 860 });
  expect(extra, `${name} overflows at 390 px`).toBe(0);
  await shot(page, name);
}

/** Records CSP violations the page reports (securitypolicyviolation events) from its first script on. */
async function watchCsp(page: Page): Promise<() => Promise<string[]>> {
  await page.addInitScript(() => {
    (window as unknown as { __csp: string[] }).__csp = [];
    document.addEventListener("securitypolicyviolation", (e) => (window as unknown as { __csp: string[] }).__csp.push(`${e.violatedDirective} ${e.blockedURI} at ${e.sourceFile}:${e.lineNumber}:${e.columnNumber}`));
  });
  const console: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy/i.test(m.text())) console.push(m.text());
  });
  return async () => [...((await page.evaluate(() => (window as unknown as { __csp?: string[] }).__csp ?? []).catch(() => [])) as string[]), ...console];
}

describe("two-step sign-in and sessions (admin)", () => {
  it("turns on two-step sign-in, signs in with a recovery code, and signs out another session", { timeout: 180_000 }, async () => {
    const org = await makeOrganization("Harrowgate Mutual");
    const admin = await makePerson("Ada Lindqvist", [{ id: org.id, role: "admin" }], "harrowgate-admin-1");
    const page = await session.browser.newPage();
    const csp = await watchCsp(page);
    await signIn(page, admin.email, admin.password);
    await page.getByRole("link", { name: /Security/ }).click();
    await page.getByRole("heading", { name: "Sign-in and security" }).waitFor();
    await page.getByRole("button", { name: "Set up two-step sign-in" }).click();
    await page.getByLabel("Your password").fill("not-my-password");
    await page.getByRole("button", { name: "Continue" }).click();
    await page.getByText("That password is not right.").first().waitFor();
    await page.getByLabel("Your password").fill(admin.password);
    await page.getByRole("button", { name: "Continue" }).click();
    const secret = (await page.locator("[data-totp-secret]").innerText()).trim();
    await expect(page.getByRole("img", { name: /QR code/ }).isVisible()).resolves.toBe(true);
    await bothWidths(page, "account-two-factor-scan");
    await page.getByLabel("Code from the app").fill(await generate({ secret }));
    await page.getByRole("button", { name: "Turn on two-step sign-in" }).click();
    await page.locator("[data-recovery-codes] li").first().waitFor();
    const codes = (await page.locator("[data-recovery-codes] li").allInnerTexts()).map((c) => c.trim());
    expect(codes).toHaveLength(10);
    await bothWidths(page, "account-recovery-codes");
    await page.getByRole("button", { name: "I have saved them" }).click();
    await page.getByText(/10 unused recovery codes left/).waitFor();

    // A second browser signs in: the password alone is not enough any more.
    const otherBrowser = await launchBrowser();
    closeLater.push(otherBrowser.close);
    const other = otherBrowser.browser;
    const second = await other.newPage();
    await second.goto(`${baseUrl()}/sign-in`);
    await second.getByLabel("E-mail").fill(admin.email);
    await second.getByLabel("Password").fill(admin.password);
    await second.getByRole("button", { name: "Sign in" }).click();
    await second.getByLabel("Authentication code").waitFor();
    await second.getByLabel("Authentication code").fill("000000");
    await second.getByRole("button", { name: "Sign in" }).click();
    await second.getByText(/That code is not right/).waitFor();
    await second.getByLabel("Authentication code").fill(codes[0]);
    await second.getByRole("button", { name: "Sign in" }).click();
    await second.waitForURL(/\/dashboard(\?|$)/);
    const secondCookies = await other.cookies();

    // The first browser lists both sessions and signs the other one out.
    await page.reload();
    await page.getByText(/9 unused recovery codes left/).waitFor();
    const rows = page.getByRole("list", { name: "Sessions" }).getByRole("listitem");
    await expect.poll(() => rows.count(), { timeout: 10_000 }).toBe(2);
    await page.getByText(/password and a recovery code/).waitFor();
    await bothWidths(page, "account-sessions");
    await page.getByRole("button", { name: /^Sign out .*\(/ }).click();
    await page.getByText(/is signed out\./).waitFor();
    await expect.poll(() => rows.count(), { timeout: 10_000 }).toBe(1);

    // The other browser's cookie is refused from now on, by the API and by the pages.
    const cookieHeader = secondCookies.map((c) => `${c.name}=${c.value}`).join("; ");
    expect((await fetch(`${baseUrl()}/api/portal/me`, { headers: { cookie: cookieHeader } })).status).toBe(401);
    await second.goto(`${baseUrl()}/keys`);
    await second.waitForURL(/\/sign-in/);
    expect(await csp()).toEqual([]);
    await page.close();
  });
});

describe("key lifecycle (developer)", () => {
  it("edits a key's label, scopes and address ranges; the gate refuses other addresses; reminders show", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Kestrel Precision Works");
    const dev = await makePerson("Tomas Erlin", [{ id: org.id, role: "developer" }], "kestrel-dev-1234");
    await createKey({ organizationId: org.id, createdBy: dev.id, label: "bore gauge nightly", scopes: ["moments"], expiresAt: new Date(Date.now() + 2.5 * 86_400_000), actor: { type: "system" } });
    const page = await session.browser.newPage();
    const csp = await watchCsp(page);
    await signIn(page, dev.email, dev.password);
    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "API keys" }).click();
    await page.getByText("Expires in 2 days: rotate it before then").waitFor();

    // A new key calls every endpoint unless narrowed: all groups are ticked.
    await page.getByRole("button", { name: "New key" }).click();
    const boxes = page.locator('form[aria-label="New API key"] input[name="scopes"]');
    const n = await boxes.count();
    expect(n).toBe(5);
    for (let i = 0; i < n; i++) expect(await boxes.nth(i).isChecked()).toBe(true);
    await page.getByLabel("Label").fill("tolerance stack");
    await page.getByRole("button", { name: "Create key" }).click();
    const secret = (await page.getByTestId("new-secret").innerText()).trim();
    await page.getByRole("button", { name: /I have stored it/ }).click();
    const prefix = secret.slice(0, 14);

    await page.getByRole("button", { name: `Edit tolerance stack (${prefix})` }).click();
    const form = page.getByRole("form", { name: "Edit key" });
    await form.getByLabel("Label").fill("tolerance stack (line 2)");
    await form.getByLabel("Allowed client addresses").fill("10.20.0.0/16, not-a-range");
    await form.getByRole("button", { name: "Save changes" }).click();
    await form.getByText(/“not-a-range” is not an address range/).waitFor();
    await form.getByLabel("Allowed client addresses").fill("10.20.0.0/16");
    await form.locator('input[name="scopes"][value="cf"]').uncheck();
    await bothWidths(page, "keys-edit");
    await form.getByRole("button", { name: "Save changes" }).click();
    await page.getByText(/saved\. Its secret did not change\./).waitFor();
    const row = page.locator(`tr[data-key-prefix="${prefix}"]`);
    await row.getByText("Only from 10.20.0.0/16").waitFor();
    await row.getByText("tolerance stack (line 2)").waitFor();
    await bothWidths(page, "keys-list");
    expect(await csp()).toEqual([]);
    await page.close();

    // The test server sees the call from 127.0.0.1, outside 10.20.0.0/16 (the gate's cache lives 1 s).
    await new Promise((r) => setTimeout(r, 1100));
    const refused = await callMoments(secret);
    expect(refused.status).toBe(403);
    expect(refused.body.type).toMatch(/#address_not_allowed$/);
  });
});

describe("removing a member (admin)", () => {
  it("asks first, lists their keys, and hands them to another member", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Brindle Surety");
    const admin = await makePerson("Mara Quint", [{ id: org.id, role: "admin" }], "brindle-admin-99");
    const dev = await makePerson("Joel Harker", [{ id: org.id, role: "developer" }], "brindle-dev-999");
    const heir = await makePerson("Rhea Solberg", [{ id: org.id, role: "developer" }], "brindle-dev-998");
    const { secret } = await createKey({ organizationId: org.id, createdBy: dev.id, label: "claims triangle job", scopes: ["moments"], actor: { type: "system" } });
    const page = await session.browser.newPage();
    const csp = await watchCsp(page);
    await signIn(page, admin.email, admin.password);
    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Members" }).click();
    await page.getByRole("button", { name: "Remove Joel Harker" }).click();
    const panel = page.getByRole("form", { name: "Remove Joel Harker" });
    await panel.getByText("claims triangle job").waitFor();
    expect(await panel.getByLabel(/Revoke them now/).isChecked()).toBe(true);
    await panel.getByLabel(/Hand them to another member/).check();
    await panel.getByLabel("New owner").selectOption({ label: "Rhea Solberg (developer)" });
    await bothWidths(page, "members-remove");
    await panel.getByRole("button", { name: "Remove Joel Harker" }).click();
    await page.getByText(/Joel Harker was removed\. 1 key now belongs to Rhea Solberg\./).waitFor();
    await expect.poll(() => page.locator("tr", { hasText: dev.email }).count(), { timeout: 10_000 }).toBe(0);
    await page.locator("tr", { hasText: heir.email }).waitFor();
    expect((await callMoments(secret)).status).toBe(200);
    expect(await csp()).toEqual([]);
    await page.close();
  });
});

describe("pages under the CSP", () => {
  it("renders the public pages, the reference, and the charted portal pages without a CSP violation", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Fenwick Reinsurance");
    const admin = await makePerson("Lena Brooke", [{ id: org.id, role: "admin" }], "fenwick-admin-12");
    const page = await session.browser.newPage();
    const csp = await watchCsp(page);
    const seen: Record<string, string[]> = {};
    for (const path of ["/", "/docs", "/docs/models", "/docs/limits", "/docs/errors", "/sign-in", "/sign-up"]) {
      await page.goto(`${baseUrl()}${path}`, { waitUntil: "networkidle" });
      seen[path] = await csp();
    }
    await page.goto(`${baseUrl()}/docs`, { waitUntil: "networkidle" });
    await page.locator(".swagger-ui .opblock").first().waitFor();
    seen["/docs (reference)"] = await csp();
    await signIn(page, admin.email, admin.password);
    for (const [name, ready] of [
      ["Usage", "figure svg"],
      ["Explorer", "main h1"],
      ["Datasets", "main h1"],
      ["API keys", "main h1"],
      ["Members", "main h1"],
    ] as const) {
      await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name }).click();
      await page.locator(ready).first().waitFor();
      await page.waitForTimeout(1000);
      seen[name] = await csp();
    }
    // Fonts are self-hosted (next/font): the computed font is ours, not a fallback.
    const fonts = await page.evaluate(async () => {
      await document.fonts.ready;
      return [...document.fonts].filter((f) => f.status === "loaded").map((f) => f.family);
    });
    expect(fonts.join(","), "no self-hosted font loaded").toMatch(/bodyFont/);
    expect(Object.fromEntries(Object.entries(seen).filter(([, v]) => v.length))).toEqual({});
    await page.close();
  });
});
