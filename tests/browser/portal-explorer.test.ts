// The explorer renders a plot, quantiles and moments for a template, and explains a bad model.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser } from "../support/browser";
import { baseUrl } from "../support/layout";
import { makeOrganization, makePerson, shot, signIn } from "./portal-support";

let session: Awaited<ReturnType<typeof launchBrowser>>;
beforeAll(async () => {
  session = await launchBrowser();
});
afterAll(async () => {
  await session?.close();
});

describe("explorer", () => {
  it("plots a template's density with its quantile and moment tables, and shows the caution and the curl request", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Halvard Gears");
    const dev = await makePerson("Ruth Amsel", [{ id: org.id, role: "developer" }], "halvard-dev-31");
    const page = await session.browser.newPage();
    await signIn(page, dev.email, dev.password);
    await page.goto(`${baseUrl()}/explorer`);
    await expect(page.title()).resolves.toContain("Explorer");
    await expect(page.getByRole("note").first().innerText()).resolves.toMatch(/computational aids/i);

    await page.getByRole("button", { name: /Tolerance stack/ }).click();
    await page.getByRole("button", { name: "Run density, quantiles and moments" }).click();
    await page.getByRole("heading", { name: "Quantiles and expected shortfall" }).waitFor({ timeout: 20_000 });
    // A drawn line has a path with many segments.
    const d = await page.locator("figure .recharts-line path.recharts-curve").first().getAttribute("d");
    expect((d ?? "").split(/[LC]/).length).toBeGreaterThan(50);
    const rows = page.getByRole("heading", { name: "Quantiles and expected shortfall" }).locator("xpath=..").locator("tbody tr");
    await expect(rows.count()).resolves.toBe(3);
    // Median of the stack = sum of the part means, 12 + 8.5 + 21 + 5 + 31 = 77.5 mm (each part is symmetric; common practice).
    const median = Number((await rows.nth(1).locator("td").nth(1).innerText()).trim());
    expect(Math.abs(median - 77.5)).toBeLessThan(1e-6);
    await expect(page.getByTestId("curl").innerText()).resolves.toContain("/api/v1/quantiles");
    await shot(page, "explorer-stack");

    await page.getByRole("button", { name: /Aggregate claims/ }).click();
    await page.getByRole("button", { name: "Run density, quantiles and moments" }).click();
    await page.getByRole("heading", { name: "Moments" }).waitFor({ timeout: 20_000 });
    // Compound sum mean = E[N] E[claim] = 42 * 1.8 / 0.12 = 630 (Wald's identity; common practice).
    const mean = Number((await page.locator("dt", { hasText: "Mean" }).locator("xpath=following-sibling::dd[1]").innerText()).trim());
    expect(Math.abs(mean - 630) / 630).toBeLessThan(1e-9);
    await shot(page, "explorer-claims");

    const editor = page.getByLabel("Model (JSON)");
    await editor.fill('{"family": "normal", "mu": 0, "sigma": -2}');
    await page.getByRole("button", { name: "Run density, quantiles and moments" }).click();
    const describedBy = await editor.getAttribute("aria-describedby");
    expect(describedBy).toBeTruthy();
    await expect(page.locator(`[id="${describedBy}"]`).innerText()).resolves.toMatch(/sigma/);
    await shot(page, "explorer-invalid");
    await page.close();
  });
});
