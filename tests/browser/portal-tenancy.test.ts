// A person in two organisations works in both at once: tab A stays in Kestrel while tab B switches to
// Harrowgate; tab A's upload lands in Kestrel and tab A keeps listing Kestrel's data under Kestrel's name.
import { describe, expect, it } from "vitest";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { makeOrganization, makePerson, shot, signIn } from "./portal-support";

const session = useBrowser();

describe("tenancy across tabs", () => {
  it("each tab keeps its own organisation for what it shows and what it stores", { timeout: 120_000 }, async () => {
    const kestrel = await makeOrganization("Kestrel Precision Works");
    const harrow = await makeOrganization("Harrowgate Mutual");
    const wen = await makePerson("Wen Castillo", [{ id: kestrel.id, role: "admin" }, { id: harrow.id, role: "developer" }], "two-tabs-2026");
    const tabA = await session.browser.newPage();
    await signIn(tabA, wen.email, wen.password);
    // The oldest membership (Kestrel) is where a fresh page starts, and the address says so.
    await tabA.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Datasets" }).click();
    await tabA.waitForURL(/\/datasets\?org=kestrel-precision-works-/);
    await tabA.getByText("No datasets yet").waitFor();

    const tabB = await session.browser.newPage();
    await tabB.goto(`${baseUrl()}/datasets`);
    await tabB.getByLabel("Active organisation").selectOption({ label: "Harrowgate Mutual (developer)" });
    await tabB.waitForURL(/\/datasets\?org=harrowgate-mutual-/);
    await tabB.getByText("No datasets yet").waitFor();

    // Back in tab A (still Kestrel), upload.
    await tabA.bringToFront();
    await expect(tabA.getByLabel("Active organisation").locator("option:checked").innerText()).resolves.toMatch(/Kestrel/);
    await tabA.getByRole("button", { name: "Upload a dataset" }).click();
    await tabA.getByLabel("File").setInputFiles({ name: "bore-gauges.csv", mimeType: "text/csv", buffer: Buffer.from("bore_um\n12.1\n11.8\n12.4\n") });
    await tabA.getByLabel("Name").fill("Bore gauges");
    await tabA.getByRole("button", { name: "Upload", exact: true }).click();
    await tabA.getByText(/“Bore gauges” stored/).waitFor();
    await tabA.reload();
    await tabA.getByRole("link", { name: "Bore gauges" }).waitFor();
    await expect(tabA.getByLabel("Active organisation").locator("option:checked").innerText()).resolves.toMatch(/Kestrel/);
    await shot(tabA, "tenancy-tab-a");

    // Tab B (Harrowgate) does not see it, even after a reload.
    await tabB.reload();
    await tabB.getByText("No datasets yet").waitFor();
    await expect(tabB.getByLabel("Active organisation").locator("option:checked").innerText()).resolves.toMatch(/Harrowgate/);
    await shot(tabB, "tenancy-tab-b");
    await tabA.close();
    await tabB.close();
  });
});
