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

  it("every example of the notation guide works as copied: request bodies to their endpoint, models inside a quantiles request", { timeout: 180_000 }, async () => {
    const { secret } = await orgWithKey();
    const page = await session.browser.newPage();
    await page.goto(`${baseUrl()}/docs/models`);
    const blocks = await page.locator("main figure").evaluateAll((fs) => fs.map((f) => ({ label: f.querySelector("figcaption")?.textContent ?? "", code: f.querySelector("code")?.textContent ?? "" })));
    await page.close();
    const post = async (path: string, body: unknown) => {
      const res = await fetch(`${baseUrl()}${path}`, { method: "POST", headers: { authorization: `Bearer ${secret}`, "content-type": "application/json" }, body: JSON.stringify(body) });
      return { status: res.status, body: (await res.json()) as Record<string, unknown> };
    };
    const requests = blocks.filter((b) => b.label.startsWith("request body"));
    // the reinsurance layer and the parts-per-million stack, each naming its endpoint
    expect(requests.length).toBe(2);
    for (const b of requests) {
      const path = /POST (\/api\/v1\/\w+)$/.exec(b.label)?.[1];
      expect(path, b.label).toBe("/api/v1/risk");
      const r = await post(path!, JSON.parse(b.code));
      expect(r.status, JSON.stringify(r.body).slice(0, 400)).toBe(200);
      // every measure asked for comes back with its error bound
      for (const k of Object.keys(JSON.parse(b.code)).filter((k) => k !== "model")) expect(r.body[k === "outside" ? "outside" : k], k).toHaveProperty("error");
    }
    const models = blocks.filter((b) => !b.label.startsWith("request body"));
    expect(models.length).toBeGreaterThanOrEqual(5);
    for (const b of models) {
      const r = await post("/api/v1/quantiles", { model: JSON.parse(b.code), p: [0.5, 0.99], expectedShortfall: true });
      expect(r.status, `${b.label}: ${JSON.stringify(r.body).slice(0, 400)}`).toBe(200);
      const d = r.body.diagnostics as { quantileError: (number | null)[] };
      expect(d.quantileError.every((e) => typeof e === "number" && e >= 0), b.label).toBe(true);
    }
  });
});
