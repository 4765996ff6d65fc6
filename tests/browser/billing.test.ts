// A billing contact upgrades through the provider's hosted checkout (the local fake's card page) and downloads
// the invoice PDF, whose text is then read back.
import { readFileSync } from "node:fs";
import { extractText, getDocumentProxy } from "unpdf";
import { describe, expect, it } from "vitest";
import { formatMoney, PLANS } from "@/lib/api/plans";
import { useBrowser } from "./browser-session";
import { makeOrganization, makePerson, shot, signIn } from "./portal-support";

const session = useBrowser();

describe("billing in the portal", () => {
  it("a billing contact upgrades through the hosted checkout and downloads the invoice PDF", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Tamsin Hydraulics", "free");
    const person = await makePerson("Uma Reyes", [{ id: org.id, role: "billing" }], "tamsin-billing-7");
    const page = await session.browser.newPage();
    await signIn(page, person.email, person.password);
    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Billing" }).click();
    await page.getByRole("heading", { name: "Billing", level: 1 }).waitFor();
    await expect(page.getByTestId("current-plan").innerText()).resolves.toBe("Free");
    await shot(page, "billing-free");

    await page.getByRole("button", { name: "Upgrade to Team" }).click();
    await page.waitForURL(/\/pay\/cs_test_/);
    await page.getByRole("heading", { name: "Save a card" }).waitFor();
    await page.getByLabel("Name on card").fill("Uma Reyes");
    await page.getByLabel("Card number").fill("4242 4242 4242 4242");
    await page.getByLabel("Expiry (MM/YY)").fill("11/31");
    await page.getByLabel("CVC").fill("321");
    await shot(page, "billing-hosted-checkout");
    await page.getByRole("button", { name: "Save card" }).click();

    await page.waitForURL(/\/billing\?org=.*checkout=upgraded/);
    await page.getByText("Your card is saved and the new plan applies now.").waitFor();
    await expect(page.getByTestId("current-plan").innerText()).resolves.toBe("Team");
    // the quota bar runs to the cap; where the fee's included units end is said beside it (lib/api/plans.ts)
    const team = PLANS.team;
    await expect(page.getByTestId("included-units").innerText()).resolves.toBe(
      `The fee includes ${team.includedUnits.toLocaleString("en-GB")} units; past them each further million costs ${formatMoney(team.overagePerMillionMinor)}, up to the cap of ${team.monthlyUnits.toLocaleString("en-GB")}.`,
    );
    await expect(page.getByTestId("saved-card").innerText()).resolves.toMatch(/visa ending 4242/i);
    const row = page.locator("tr[data-invoice]").first();
    const number = await row.getAttribute("data-invoice");
    expect(number).toMatch(/^SFV-\d{4}-\d{6}$/);
    await shot(page, "billing-upgraded");

    const [download] = await Promise.all([page.waitForEvent("download"), row.getByRole("link", { name: `PDF of ${number}` }).click()]);
    expect(download.suggestedFilename()).toBe(`${number}.pdf`);
    const bytes = readFileSync((await download.path())!);
    expect(bytes.subarray(0, 5).toString()).toBe("%PDF-");
    const { text } = await extractText(await getDocumentProxy(new Uint8Array(bytes)), { mergePages: true });
    expect(text).toContain(number!);
    expect(text).toContain("Tamsin Hydraulics");
    expect(text).toContain("Free to Team for the rest of");
    expect(text).toContain("Caution");

    // The invoice's own page shows the same total.
    await row.getByRole("link", { name: number!, exact: true }).click();
    await page.getByRole("heading", { name: `Invoice ${number}` }).waitFor();
    await expect(page.getByTestId("invoice-status").innerText()).resolves.toMatch(/^Paid/);
    await shot(page, "billing-invoice");
  });
});
