// Helpers of the portal's browser tests: people made directly in the test database, sign-in through the
// real form, the SMTP sink's mailbox, and screenshots.
import { randomBytes } from "node:crypto";
import { join } from "node:path";
import bcrypt from "bcryptjs";
import type { Page } from "playwright-core";
import { expect } from "vitest";
import { getDb } from "@/lib/db/client";
import { memberships, organizations, users, type Role } from "@/lib/db/schema";
import { SCREENSHOTS } from "../support/browser";
import { baseUrl, testLayout } from "../support/layout";

export const uniq = () => randomBytes(3).toString("hex");

export async function makePerson(name: string, orgs: { id: number; role: Role }[], password: string) {
  const email = `${name.toLowerCase().replace(/\W+/g, ".")}.${uniq()}@browser.example`;
  const [r] = await getDb().insert(users).values({ email, name, passwordHash: await bcrypt.hash(password, 4), emailVerifiedAt: new Date() });
  for (const o of orgs) await getDb().insert(memberships).values({ userId: r.insertId, organizationId: o.id, role: o.role });
  return { id: r.insertId, email, name, password };
}

export async function makeOrganization(name: string, plan = "team") {
  const [r] = await getDb().insert(organizations).values({ slug: `${name.toLowerCase().replace(/\W+/g, "-")}-${uniq()}`, name, plan });
  return { id: r.insertId, name };
}

export async function signIn(page: Page, email: string, password: string) {
  // Signing in is switching person: the previous session of this browser ends first.
  await page.context().clearCookies();
  await page.goto(`${baseUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/dashboard(\?|$)/);
  await page.getByRole("heading", { level: 1 }).waitFor();
}

export async function mailTo(address: string, count = 1, timeoutMs = 10_000) {
  const url = `http://127.0.0.1:${testLayout().mailboxPort}/messages.json?to=${encodeURIComponent(address)}`;
  const end = Date.now() + timeoutMs;
  for (;;) {
    const list = (await (await fetch(url)).json()) as { id: string; subject: string; text: string }[];
    if (list.length >= count || Date.now() > end) return list;
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The first link to `path` in a message, rewritten to the test server (the mail names the same host). */
export function linkIn(text: string, path: string): string {
  const m = new RegExp(`https?://[^\\s]+${path.replace(/\//g, "\\/")}\\?token=[\\w-]+`).exec(text);
  expect(m, `a ${path} link in:\n${text}`).not.toBeNull();
  return m![0];
}

export const shot = (page: Page, name: string) => page.screenshot({ path: join(SCREENSHOTS, `portal-${name}.png`), fullPage: true });

/** How far the page is wider than the viewport, and the first elements of main that stick out (to name in a failure). */
export async function overflow(page: Page): Promise<{ extra: number; wide: string[] }> {
  return page.evaluate(() => ({
    extra: document.documentElement.scrollWidth - document.documentElement.clientWidth,
    wide: [...document.querySelectorAll("main *")]
      .filter((e) => e.getBoundingClientRect().right > document.documentElement.clientWidth + 1)
      .slice(0, 5)
      .map((e) => `${e.tagName.toLowerCase()}.${e.className}`.slice(0, 120)),
  }));
}

/** Calls the public API with a key, as a customer's code would. */
export async function callMoments(secret: string) {
  const res = await fetch(`${baseUrl()}/api/v1/moments`, {
    method: "POST",
    headers: { authorization: `Bearer ${secret}`, "content-type": "application/json" },
    body: JSON.stringify({ model: { family: "normal", mu: 12, sigma: 0.012 }, order: 2 }),
  });
  return { status: res.status, body: (await res.json()) as Record<string, unknown> };
}
