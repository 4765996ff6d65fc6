// The Datasets page: upload a file with its upload and parsing progress, see the summary and histogram, and
// a bad file's message (line and column, nothing stored). Screenshots in test-results/screenshots.
import jStatDefault from "jstat";
import { describe, expect, it } from "vitest";
import { useBrowser } from "./browser-session";
import { makeOrganization, makePerson, shot, signIn } from "./portal-support";

const jStat = jStatDefault as unknown as { mean(x: number[]): number; stdev(x: number[], sample?: boolean): number };

const session = useBrowser();

// Demo file (invented): Harrowgate Mutual's storm claims, about 1.3 MB, so the upload takes a moment when throttled.
function stormClaims(n: number) {
  const values: number[] = [];
  let s = 12345;
  const lines = ["claim_id,settled_on,amount_eur,adjuster_note"];
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1103515245) + 12345) >>> 0;
    const v = Math.round((200 + ((s >>> 8) % 50_000) * Math.exp(((s >>> 4) % 7) / 3)) * 100) / 100;
    values.push(v);
    lines.push(`HM-${100000 + i},2025-0${1 + (i % 9)}-1${i % 10},${v},"roof and gutter, storm of the ${(i % 28) + 1}th"`);
  }
  return { text: `${lines.join("\n")}\n`, values };
}

describe("Datasets page", () => {
  it("uploads a CSV with progress bars, shows its summary and histogram, and explains a bad file", { timeout: 180_000 }, async () => {
    const org = await makeOrganization("Harrowgate Mutual");
    const dev = await makePerson("Ines Calloway", [{ id: org.id, role: "developer" }], "harrowgate-dev-7");
    const page = await session.browser.newPage();
    await signIn(page, dev.email, dev.password);
    await page.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Datasets" }).click();
    await page.getByRole("heading", { level: 1, name: "Datasets" }).waitFor();
    await page.getByText("No datasets yet").waitFor();
    await shot(page, "datasets-empty");

    const { text, values } = stormClaims(20_000);
    await page.getByRole("button", { name: "Upload a dataset" }).click();
    await page.getByLabel("File").setInputFiles({ name: "storm-claims-2025.csv", mimeType: "text/csv", buffer: Buffer.from(text) });
    await expect(page.getByTestId("detected").innerText()).resolves.toMatch(/CSV separated by comma, header: claim_id, settled_on, amount_eur, adjuster_note/);
    await expect(page.getByLabel("Values column").inputValue()).resolves.toBe("amount_eur");
    await expect(page.getByLabel("Name").inputValue()).resolves.toBe("storm claims 2025");
    await page.getByLabel("Name").fill("Storm claims 2025");
    await page.getByLabel("Description").fill("Settled storm claims, household book");

    // Throttle the upload to ~400 KB/s so the bars are seen moving.
    const cdp = await session.browser.newCDPSession(page);
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: 400 * 1024 });
    await page.getByRole("button", { name: "Upload", exact: true }).click();
    const upload = page.getByRole("progressbar", { name: "Upload" });
    const parsing = page.getByRole("progressbar", { name: "Parsing" });
    await upload.waitFor();
    const seen: { upload: number; parsing: number }[] = [];
    let midShot = false;
    for (let i = 0; i < 200; i++) {
      const u = Number((await upload.getAttribute("aria-valuenow").catch(() => null)) ?? 100);
      const p = Number((await parsing.getAttribute("aria-valuenow").catch(() => null)) ?? 100);
      seen.push({ upload: u, parsing: p });
      if (!midShot && u > 20 && u < 90) {
        await shot(page, "datasets-uploading");
        midShot = true;
      }
      if (p >= 100) break;
      await page.waitForTimeout(100);
    }
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    expect(seen.some((s) => s.upload > 0 && s.upload < 100), JSON.stringify(seen)).toBe(true);
    expect(seen.some((s) => s.parsing > 0 && s.parsing < 100), JSON.stringify(seen)).toBe(true);
    await page.getByText(/“Storm claims 2025” stored: 20,000 values/).waitFor();
    await shot(page, "datasets-uploaded");

    // The list and the detail page show the summary; the mean is checked against jstat (jStat.mean).
    await page.getByRole("link", { name: "Open it" }).click();
    await page.getByRole("heading", { level: 1, name: "Storm claims 2025" }).waitFor();
    const meanText = await page.locator('td[data-stat="Mean"]').innerText();
    const mean = Number(meanText.replace(/,/g, ""));
    const expected = jStat.mean(values);
    expect(Math.abs(mean - expected) / expected, `shown ${meanText}, jStat.mean ${expected}, tolerance 5e-4 relative (4-7 significant digits shown)`).toBeLessThan(5e-4);
    // Both standard deviations, each saying its divisor: the sample's (n - 1) and the empirical law's (n), the one models use.
    for (const [stat, sample] of [["Standard deviation", true], ["Sd of the empirical law", false]] as const) {
      const shown = Number((await page.locator(`td[data-stat="${stat}"]`).innerText()).replace(/,/g, ""));
      const ref = jStat.stdev(values, sample);
      expect(Math.abs(shown - ref) / ref, `${stat}: shown ${shown}, jStat.stdev(values, ${sample}) ${ref}, tolerance 5e-4 relative`).toBeLessThan(5e-4);
    }
    await expect(page.getByText("divisor n: what a model built on this dataset has").count()).resolves.toBe(1);
    await expect(page.getByRole("img", { name: /Histogram of Storm claims 2025, version 1/ }).count()).resolves.toBe(1);
    await expect(page.getByText(/Header row found; values from column "amount_eur"/).count()).resolves.toBe(1);
    await shot(page, "dataset-detail");

    // A bad file: the message names the line and column, and nothing is stored.
    await page.getByRole("link", { name: "← Datasets" }).click();
    await page.getByRole("button", { name: "Upload a dataset" }).click();
    await page.getByLabel("File").setInputFiles({ name: "hail.csv", mimeType: "text/csv", buffer: Buffer.from("claim_id,amount_eur\nHM-1,820.50\nHM-2,1 200.00\nHM-3,n/a\n") });
    await page.getByLabel("Values column").selectOption("amount_eur");
    await page.getByLabel("Name").fill("Hail claims");
    await page.getByRole("button", { name: "Upload", exact: true }).click();
    const alert = page.getByTestId("upload-error");
    await alert.waitFor();
    const message = await alert.innerText();
    expect(message).toMatch(/Problem at line 3, column 2/);
    expect(message).toMatch(/Line 3, column 2 \("amount_eur"\) holds "1 200\.00", which is not a number \(it seems to use a thousands separator; remove it\)/);
    expect(message).toMatch(/2 rows cannot be read/);
    expect(message).toMatch(/Nothing was stored/);
    await shot(page, "datasets-upload-error");
    await page.getByRole("button", { name: "Cancel" }).click();
    await expect(page.locator("tbody tr").count()).resolves.toBe(1);
    await page.setViewportSize({ width: 390, height: 844 });
    await shot(page, "datasets-narrow");
    await page.setViewportSize({ width: 1280, height: 860 });
  });
});
