// A newcomer: sign up -> confirm the address from the mail (which signs them in) -> quickstart: a key, the call,
// its output -> create another key (secret shown once) -> call the API with it -> see the calls in the usage table.
import { describe, expect, it } from "vitest";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { callMoments, linkIn, mailTo, shot, uniq } from "./portal-support";

const session = useBrowser();

describe("newcomer flow", () => {
  it("signs up, confirms, creates a key, calls the API and sees the call in usage", { timeout: 120_000 }, async () => {
    const page = await session.browser.newPage();
    const email = `oskar.brandt.${uniq()}@tidewater.example`;
    const password = "tidewater-claims-42";

    await page.goto(`${baseUrl()}/sign-up`);
    await expect(page.title()).resolves.toContain("Create an account");
    // Client-side validation with the shared schema: errors are tied to their fields.
    await page.getByRole("button", { name: "Create account" }).click();
    const nameField = page.getByLabel("Your name");
    await expect(nameField.getAttribute("aria-invalid")).resolves.toBe("true");
    const describedBy = (await nameField.getAttribute("aria-describedby"))!;
    await expect(page.locator(`[id="${describedBy.split(" ").pop()}"]`).innerText()).resolves.toMatch(/enter your name/i);
    await shot(page, "signup-errors");

    await nameField.fill("Oskar Brandt");
    await page.getByLabel("Work e-mail").fill(email);
    await page.getByLabel("Organisation").fill("Tidewater Syndicate");
    await page.getByLabel("Password").fill(password);
    await page.getByRole("button", { name: "Create account" }).click();
    await page.getByRole("heading", { name: "Check your inbox" }).waitFor();
    await shot(page, "signup-done");

    // Signing in before confirming is refused with a way forward.
    await page.goto(`${baseUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByRole("alert").filter({ hasText: /confirm your e-mail address first/i }).waitFor();

    const [mail] = await mailTo(email);
    expect(mail.subject).toMatch(/confirm/i);
    await page.goto(linkIn(mail.text, "/verify"));
    await page.getByRole("button", { name: "Confirm my address" }).click();
    // Confirming signs the newcomer in (no second sign-in) and opens the quickstart.
    await page.waitForURL(/\/quickstart\?org=/);
    await page.getByRole("heading", { level: 1, name: "Quickstart" }).waitFor();
    await page.getByRole("button", { name: "Make my key" }).click();
    const qsSecret = (await page.getByTestId("quickstart-secret").innerText()).replace("export SUMFOLD_KEY=", "").trim();
    expect(qsSecret).toMatch(/^sfk_/);
    // The snippet names this server and the key variable; the same call runs from the page and its output is shown.
    const snippet = await page.getByTestId("snippet").innerText();
    expect(snippet).toContain(`${baseUrl()}/api/v1/moments`);
    expect(snippet).toContain("$SUMFOLD_KEY");
    await page.getByRole("button", { name: "Run it here with my key" }).click();
    // Compound mean = E[N] E[claim] = 42 * 1.8 / 0.12 = 630 (Wald's identity; common practice).
    await expect.poll(async () => Number(await page.getByTestId("quickstart-mean").textContent().catch(() => "NaN"))).toBeCloseTo(630, 6);
    await expect(page.getByTestId("quickstart-output").innerText()).resolves.toMatch(/"variance"/);
    await shot(page, "quickstart-done");
    await page.setViewportSize({ width: 390, height: 844 });
    await expect(page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).resolves.toBe(0);
    await shot(page, "quickstart-narrow");
    await page.setViewportSize({ width: 1280, height: 860 });
    // The same snippet works from outside the browser too.
    expect((await callMoments(qsSecret)).status).toBe(200);

    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Overview" }).click();
    await page.getByRole("heading", { level: 1, name: /Hello, Oskar/ }).waitFor();
    await shot(page, "dashboard-admin");

    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "API keys" }).click();
    await page.locator('tr[data-key-prefix]').filter({ hasText: "quickstart" }).waitFor();
    await page.getByRole("button", { name: "New key" }).click();
    await page.getByLabel("Label").fill("reserving notebook");
    await page.getByRole("button", { name: "Create key" }).click();
    const secretEl = page.getByTestId("new-secret");
    await secretEl.waitFor();
    const secret = (await secretEl.innerText()).trim();
    expect(secret).toMatch(/^sfk_/);
    await page.getByRole("button", { name: "Copy" }).click();
    await expect(page.getByRole("status").filter({ hasText: /clipboard|blocked/ }).innerText()).resolves.toMatch(/clipboard|blocked/);
    await shot(page, "key-created");

    const call = await callMoments(secret);
    expect(call.status, JSON.stringify(call.body)).toBe(200);

    // Hiding the secret removes it from the page for good.
    await page.getByRole("button", { name: /I have stored it/ }).click();
    await expect(page.getByTestId("new-secret").count()).resolves.toBe(0);
    await expect(page.content()).resolves.not.toContain(secret);

    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Usage" }).click();
    // Metering writes in batches (about every half second): reload until the call shows.
    const row = page.getByRole("row").filter({ hasText: "POST /api/v1/moments" }).filter({ hasText: "reserving notebook" });
    await page.getByRole("heading", { name: "Usage", exact: true }).waitFor();
    await page.waitForLoadState("networkidle");
    for (let i = 0; i < 20 && (await row.count()) === 0; i++) {
      await page.waitForTimeout(500);
      await page.reload({ waitUntil: "networkidle" });
    }
    await shot(page, "usage-after-call");
    await expect(row.count()).resolves.toBe(1);
    await expect(page.getByRole("row").filter({ hasText: "quickstart" }).count()).resolves.toBe(1);
    await expect(page.getByRole("note").first().innerText()).resolves.toMatch(/computational aids/i);
    await page.locator("figure svg").first().waitFor();
    await page.close();
  });
});
