// An admin's small journeys: a role change asks first (and says what the role may do); usage shows the quota on
// its own bar and daily units on one axis, keeps its filters in the address, and explains a From after To.
import { describe, expect, it } from "vitest";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { makeOrganization, makePerson, shot, signIn } from "./portal-support";

const session = useBrowser();

describe("admin journeys", () => {
  it("confirms a promotion before it happens, and usage keeps one honest scale and its filters in the address", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Harrowgate Mutual");
    const admin = await makePerson("Ada Okafor", [{ id: org.id, role: "admin" }], "harrowgate-admin-9");
    await makePerson("Tomas Lind", [{ id: org.id, role: "developer" }], "harrowgate-dev-9");
    const page = await session.browser.newPage();
    await signIn(page, admin.email, admin.password);
    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Members" }).click();

    const role = page.getByLabel("Role of Tomas Lind");
    await role.selectOption("admin");
    const dialog = page.getByRole("alertdialog");
    await expect(dialog.innerText()).resolves.toMatch(/Change Tomas Lind from developer to admin\?[\s\S]*members, every key, plan/);
    await shot(page, "members-role-confirm");
    // Nothing changed yet: keeping the role puts the picker back.
    await page.getByRole("button", { name: "Keep developer" }).click();
    await expect(role.inputValue()).resolves.toBe("developer");
    await page.reload();
    await expect(page.getByLabel("Role of Tomas Lind").inputValue()).resolves.toBe("developer");
    await page.getByLabel("Role of Tomas Lind").selectOption("admin");
    await page.getByRole("button", { name: "Change role" }).click();
    await page.getByText("Tomas Lind is now admin.").waitFor();

    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Usage" }).click();
    await page.getByRole("progressbar", { name: "Share of the monthly quota used" }).waitFor();
    // One y axis on the daily chart; the quota is not drawn on it.
    await expect(page.locator("figure .recharts-yAxis").count()).resolves.toBe(1);
    await expect(page.locator("figure .recharts-legend-item").first().innerText()).resolves.toMatch(/units per day/);
    await page.getByLabel("From").fill("2026-11-20");
    await page.waitForURL(/from=2026-11-20/);
    await page.reload();
    await expect(page.getByLabel("From").inputValue()).resolves.toBe("2026-11-20");
    await page.getByLabel("To").fill("2026-11-10");
    await page.getByRole("alert").filter({ hasText: /“From” is after “To”/ }).waitFor();
    await shot(page, "usage-from-after-to");
    await page.close();
  });
});
