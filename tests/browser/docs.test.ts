// The docs page: the interactive reference renders the 3.1 document, and Try it out runs a call with a key.
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { SCREENSHOTS } from "../support/browser";
import { useBrowser } from "./browser-session";
import { orgWithKey } from "../support/api";
import { baseUrl } from "../support/layout";

const session = useBrowser();

describe("/docs", () => {
  it("expands an operation, authorises with a key, runs it and shows a 200 with a body", { timeout: 60_000 }, async () => {
    const { secret } = await orgWithKey();
    const page = await session.browser.newPage();
    await page.goto(`${baseUrl()}/docs`, { waitUntil: "networkidle" });
    await expect(page.getByRole("note").first().innerText()).resolves.toMatch(/computational aids/i);

    await page.getByRole("button", { name: /Authorize/ }).first().click();
    await page.locator("#auth-bearer-value").fill(secret);
    await page.locator(".modal-ux button.authorize").click();
    await page.locator(".modal-ux button.btn-done").click();

    const op = page.locator("#operations-Computation-moments");
    await op.locator(".opblock-summary").first().click();
    // The first click on "Try it out" can land while the operation is still mounting; retry until Execute shows.
    for (let i = 0; i < 5 && !(await op.locator("button.execute").isVisible()); i++) {
      await op.locator("button.try-out__btn").click();
      await page.waitForTimeout(400);
    }
    await op.locator("button.execute").click();
    const status = op.locator(".live-responses-table tbody .response-col_status").first();
    await status.waitFor({ timeout: 20_000 });
    expect((await status.innerText()).trim()).toBe("200");
    const body = await op.locator(".live-responses-table tbody .response-col_description pre").first().innerText();
    expect(body).toContain('"mean"');
    await op.locator(".live-responses-table").scrollIntoViewIfNeeded();
    await page.screenshot({ path: join(SCREENSHOTS, "docs-try-it-out.png"), fullPage: false });
    await page.close();
  });

  it("keeps the pasted key in memory only: nothing in storage, gone on reload, an old saved key wiped", { timeout: 60_000 }, async () => {
    const { secret } = await orgWithKey();
    const page = await session.browser.newPage();
    // A key an earlier version of the page persisted (swagger-ui's persistAuthorization format).
    await page.goto(`${baseUrl()}/docs/models`);
    await page.evaluate((s) => localStorage.setItem("authorized", JSON.stringify({ bearerAuth: { name: "bearerAuth", schema: { type: "http", scheme: "bearer" }, value: s } })), secret);
    await page.goto(`${baseUrl()}/docs`, { waitUntil: "networkidle" });
    await expect(page.locator("#authorize-note").innerText()).resolves.toMatch(/stays in this tab only.*never saved in the browser/s);
    const authorize = page.locator(".auth-wrapper button.authorize").first();
    await authorize.waitFor();
    expect(await page.evaluate(() => localStorage.getItem("authorized"))).toBeNull();
    expect(await authorize.getAttribute("class")).toContain("unlocked");

    await authorize.click();
    await page.locator("#auth-bearer-value").fill(secret);
    await page.locator(".modal-ux button.authorize").click();
    await page.locator(".modal-ux button.btn-done").click();
    expect(await authorize.getAttribute("class")).toMatch(/\blocked\b/);
    const stored = await page.evaluate(() => JSON.stringify({ ...localStorage }) + JSON.stringify({ ...sessionStorage }) + document.cookie);
    expect(stored).not.toContain(secret);
    expect(stored).not.toContain(secret.slice(0, 16));

    await page.reload({ waitUntil: "networkidle" });
    await authorize.waitFor();
    expect(await authorize.getAttribute("class")).toContain("unlocked");
    await page.close();
  });

  it("serves the guides with snippets for every endpoint", async () => {
    const page = await session.browser.newPage();
    await page.goto(`${baseUrl()}/docs/snippets`);
    const text = await page.locator("main").innerText();
    for (const p of ["/api/v1/cf", "/api/v1/density", "/api/v1/quantiles", "/api/v1/moments", "/api/v1/convolve", "/api/v1/families"]) expect(text).toContain(p);
    expect(text).toContain("import requests");
    await page.goto(`${baseUrl()}/docs/errors`);
    expect(await page.locator("#validation").innerText()).toContain("422");
    await page.close();
  });
});
