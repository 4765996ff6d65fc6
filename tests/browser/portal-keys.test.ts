// Rotate with 1 hour grace -> both secrets work; revoke the old one -> it is refused. Plus org switching.
import { describe, expect, it } from "vitest";
import { useBrowser } from "./browser-session";
import { callMoments, makeOrganization, makePerson, shot, signIn } from "./portal-support";

const session = useBrowser();

describe("key rotation and revocation", () => {
  it("rotates with 1 hour grace (both keys work), then revokes the retiring one (refused)", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Wrenfield Instruments");
    const second = await makeOrganization("Orrin Dampers");
    const dev = await makePerson("Sam Okoye", [{ id: org.id, role: "admin" }, { id: second.id, role: "developer" }], "wrenfield-dev-9");
    const page = await session.browser.newPage();
    await signIn(page, dev.email, dev.password);
    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "API keys" }).click();
    await page.getByRole("button", { name: "New key" }).click();
    await page.getByLabel("Label").fill("calibration service");
    await page.getByRole("button", { name: "Create key" }).click();
    const oldSecret = (await page.getByTestId("new-secret").innerText()).trim();
    await page.getByRole("button", { name: /I have stored it/ }).click();
    const prefix = oldSecret.slice(0, 14); // "sfk_" and the 10-character public id

    await page.getByRole("button", { name: `Rotate calibration service (${prefix})` }).click();
    await page.getByLabel("The current secret stops working").selectOption("1h");
    await page.getByRole("button", { name: "Rotate key" }).click();
    const newSecret = (await page.getByTestId("new-secret").innerText()).trim();
    expect(newSecret).not.toBe(oldSecret);
    await expect(page.getByText(/previous secret keeps working until/).count()).resolves.toBe(1);
    const oldRow = page.locator(`tr[data-key-prefix="${prefix}"]`);
    await oldRow.getByText(/Retiring until/).waitFor();
    await shot(page, "key-rotated");

    expect((await callMoments(oldSecret)).status).toBe(200);
    expect((await callMoments(newSecret)).status).toBe(200);

    await page.getByRole("button", { name: /I have stored it/ }).click();
    await page.getByRole("button", { name: `Revoke calibration service (${prefix}) now` }).click();
    await page.getByRole("button", { name: "Revoke key now" }).click();
    await page.getByText(/is revoked/).waitFor();
    await oldRow.getByText("Revoked", { exact: true }).waitFor();
    await shot(page, "key-revoked");
    // Narrow screens: the table scrolls sideways inside its box; the page itself does not.
    await page.setViewportSize({ width: 390, height: 844 });
    await shot(page, "keys-narrow");
    const overflow = await page.evaluate(() => {
      const w = document.documentElement.clientWidth;
      const wide = [...document.querySelectorAll("body *")]
        .filter((el) => el.getBoundingClientRect().right > w + 1 && (!el.closest(".overflow-x-auto") || getComputedStyle(el).position === "absolute"))
        .map((el) => `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 60)}`);
      return { extra: document.documentElement.scrollWidth - w, wide: wide.slice(0, 8) };
    });
    expect(overflow, JSON.stringify(overflow)).toMatchObject({ extra: 0 });
    await page.setViewportSize({ width: 1280, height: 860 });
    // The gate caches key look-ups for at most one second.
    await page.waitForTimeout(1200);
    const refused = await callMoments(oldSecret);
    expect(refused.status).toBe(401);
    expect(String(refused.body.detail)).toMatch(/revoked/);
    expect((await callMoments(newSecret)).status).toBe(200);

    // Switching organisation: in Orrin Dampers this person is a developer with no keys yet.
    // The switch keeps the page's section and puts the organisation in the address.
    await page.getByLabel("Active organisation").selectOption({ label: "Orrin Dampers (developer)" });
    await page.waitForURL(/\/keys\?org=orrin-dampers-/);
    await page.getByText("No keys yet").waitFor();
    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Overview" }).click();
    await page.getByText(/working in Orrin Dampers as developer/).waitFor();
    await expect(page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Members" }).count()).resolves.toBe(0);
    await shot(page, "keys-other-org");
    await page.close();
  });
});
