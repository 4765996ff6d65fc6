// The landing page from `next start`: it renders in the shipped font and makes no request off the host.
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { SCREENSHOTS } from "../support/browser";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";

const session = useBrowser();

describe("landing page", () => {
  it("shows the product, the caution, and uses the shipped fonts with every request on 127.0.0.1", async () => {
    const page = await session.browser.newPage();
    const requested: string[] = [];
    page.on("request", (r) => requested.push(r.url()));
    const fontResponses: { url: string; status: number }[] = [];
    page.on("response", (r) => {
      if (r.url().endsWith(".woff2")) fontResponses.push({ url: r.url(), status: r.status() });
    });
    await page.goto(baseUrl(), { waitUntil: "networkidle" });
    await page.evaluate(() => document.fonts.ready);

    await expect(page.title()).resolves.toContain("Sumfold");
    const h1 = await page.locator("h1").first().innerText();
    expect(h1).toMatch(/folded/i);
    expect(await page.getByRole("note").first().innerText()).toMatch(/computational aids/i);

    const fonts = await page.evaluate(() => {
      const body = getComputedStyle(document.body).fontFamily;
      const first = body.split(",")[0].trim().replace(/['"]/g, "");
      const faces = [...document.fonts].filter((f) => f.family.replace(/['"]/g, "") === first);
      return { body, first, loaded: faces.filter((f) => f.status === "loaded").length, check: document.fonts.check(`16px "${first}"`) };
    });
    // next/font/local names the family after the font's variable (bodyFont) — the file shipped in app/fonts.
    expect(fonts.first).toMatch(/bodyFont/);
    expect(fonts.loaded).toBeGreaterThan(0);
    expect(fonts.check).toBe(true);
    expect(fontResponses.length).toBeGreaterThan(0);
    expect(fontResponses.every((f) => f.status === 200)).toBe(true);

    const offHost = requested.filter((u) => new URL(u).hostname !== "127.0.0.1");
    expect(offHost).toEqual([]);
    await page.screenshot({ path: join(SCREENSHOTS, "landing.png"), fullPage: true });
    await page.close();
  });
});
