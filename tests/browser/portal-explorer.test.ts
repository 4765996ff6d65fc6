// The explorer as a developer uses it: a plot that shows the law (range from quantiles, atom with its mass,
// exceedance on a log scale, hover read-out, CSV/SVG export), tables, code in three languages, a model built
// on a dataset, no stale results beside an error, and saved models with versions shared in the organisation.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { getDb } from "@/lib/db/client";
import { savedModels, savedModelVersions } from "@/lib/db/schema";
import { makeOrganization, makePerson, overflow, shot, signIn } from "./portal-support";

const session = useBrowser();

const run = (page: Page) => page.getByRole("button", { name: "Run density, quantiles and moments" }).click();
const plotRange = async (page: Page) => {
  const label = (await page.getByTestId("law-plot").getAttribute("aria-label")) ?? "";
  const m = /from (\S+) to (\S+)$/.exec(label);
  expect(m, label).not.toBeNull();
  return [Number(m![1].replace(/,/g, "")), Number(m![2].replace(/,/g, ""))];
};

describe("explorer", () => {
  it("plots the law between quantiles, marks the atom, reads out the hover, exports, and shows code in three languages", { timeout: 180_000 }, async () => {
    const org = await makeOrganization("Halvard Gears");
    const dev = await makePerson("Ruth Amsel", [{ id: org.id, role: "developer" }], "halvard-dev-31");
    const page = await session.browser.newPage();
    await signIn(page, dev.email, dev.password);
    await page.goto(`${baseUrl()}/explorer`);
    await expect(page.title()).resolves.toContain("Explorer");
    await expect(page.getByRole("note").first().innerText()).resolves.toMatch(/computational aids/i);

    await page.getByRole("button", { name: /Tolerance stack/ }).click();
    await run(page);
    await page.getByRole("heading", { name: "Quantiles and expected shortfall" }).waitFor({ timeout: 30_000 });
    const d = await page.getByTestId("law-plot").locator("path[fill=none]").first().getAttribute("d");
    expect((d ?? "").split("L").length).toBeGreaterThan(100);
    const rows = page.getByRole("heading", { name: "Quantiles and expected shortfall" }).locator("xpath=..").locator("tbody tr");
    await expect(rows.count()).resolves.toBe(3);
    // Median of the stack = sum of the part means, 12 + 8.5 + 21 + 5 + 31 = 77.5 mm (each part is symmetric; common practice).
    const median = Number((await rows.nth(1).locator("td").nth(1).innerText()).trim());
    expect(Math.abs(median - 77.5)).toBeLessThan(1e-6);
    // each quantile and shortfall shows its error bound beside it (the API's quantileError / expectedShortfallError)
    const medianBound = (await rows.nth(1).locator("td").nth(2).innerText()).trim();
    expect(medianBound).toMatch(/^± \d/);
    expect(Number(medianBound.slice(2))).toBeLessThan(1e-6);
    await expect(rows.nth(1).locator("td").nth(4).innerText()).resolves.toMatch(/^± \d/);
    // every bound of this light-tailed sum is derived: no caveat box beside the table
    await expect(page.getByTestId("bound-caveats").count()).resolves.toBe(0);
    await shot(page, "explorer-stack");

    // The axis follows the quantiles 0.0001..0.9999 (nice ends just outside them), not the inversion's window, which
    // for a heavy tail is many times wider.
    const levels = page.getByLabel("Levels p for quantiles and expected shortfall");
    const plotted = async () => {
      await levels.fill("0.0001, 0.9999");
      await run(page);
      await page
        .getByTestId("law-plot")
        .waitFor({ timeout: 60_000 })
        .catch(async (e) => {
          await shot(page, "explorer-failure");
          throw new Error(`${(e as Error).message}\npage says: ${(await page.locator("main").innerText()).slice(0, 2000)}`);
        });
      const qlo = Number((await rows.nth(0).locator("td").nth(1).innerText()).trim());
      const qhi = Number((await rows.nth(1).locator("td").nth(1).innerText()).trim());
      const [lo, hi] = await plotRange(page);
      const span = qhi - qlo;
      expect(lo, `axis start ${lo}, quantile ${qlo}`).toBeLessThanOrEqual(qlo + 1e-9 * Math.abs(qlo));
      expect(hi, `axis end ${hi}, quantile ${qhi}`).toBeGreaterThanOrEqual(qhi - 1e-9 * Math.abs(qhi));
      expect(hi - lo, `axis [${lo}, ${hi}] against quantiles [${qlo}, ${qhi}]`).toBeLessThan(1.6 * span);
      return hi;
    };
    // A stable law (alpha 1.7): heavy tails on both sides.
    await page.getByRole("button", { name: /Stable law/ }).click();
    await plotted();
    await shot(page, "explorer-heavy");
    // A compound: 3 claims a year (Poisson), gamma(2, 0.001) sizes. The atom P(N = 0) = e^-3 = 0.049787 (closed
    // form) is a marker with its mass.
    await page.getByLabel("Model (JSON)").fill(JSON.stringify({ compound: { count: { family: "poisson", lambda: 3 }, each: { family: "gamma", shape: 2, rate: 0.001 } } }));
    const hi = await plotted();
    await expect(page.getByTestId("atom-marker").first().textContent()).resolves.toMatch(/P\(X = 0\) = 0\.04979/);
    // its damped route's bounds are derived (the gamma claims' transform in closed form): no caveat box
    await expect(page.getByTestId("bound-caveats").count()).resolves.toBe(0);
    await shot(page, "explorer-atom");

    // A sum of two stable terms and a uniform: the expected shortfall's derived bound (what the two terms' images leave,
    // lib/cf/invert/heavy-residual2.ts) stays above its goal, which the answer says and the explorer shows beside the table
    await page.getByLabel("Model (JSON)").fill(
      JSON.stringify({
        sum: [
          { family: "uniform", a: -1, b: 2.684 },
          { family: "stable", alpha: 1.606, beta: -0.096, scale: 1, loc: 0, param: "S1" },
          { family: "stable", alpha: 1.715, beta: 0.234, scale: 1, loc: 0, param: "S1" },
        ],
      }),
    );
    await plotted();
    await expect(page.getByTestId("bound-caveats").innerText()).resolves.toMatch(/not reached/);
    await page.getByLabel("Model (JSON)").fill(JSON.stringify({ compound: { count: { family: "poisson", lambda: 3 }, each: { family: "gamma", shape: 2, rate: 0.001 } } }));
    await plotted();

    // Hover read-out of x, density, F and 1 - F.
    const area = page.getByTestId("plot-area");
    await area.scrollIntoViewIfNeeded();
    const box = (await area.boundingBox())!;
    await area.hover({ position: { x: box.width * 0.4, y: box.height * 0.5 } });
    // each value read out with its bound
    await expect.poll(() => page.getByTestId("plot-readout").innerText()).toMatch(/x = .+ · (pdf|pmf) = \S+ ± \S+ · F = \S+ ± \S+ · 1 − F = \S+ ± \S+$/);
    // Exceedance 1 - F on a log scale.
    await page.getByRole("radio", { name: "Exceedance 1 − F" }).check();
    // the view switches its y axis to log after the click has rendered: read both once the page has settled
    await expect.poll(() => page.getByRole("radio", { name: "log" }).nth(1).isChecked()).toBe(true);
    await expect.poll(() => page.getByTestId("law-plot").getAttribute("aria-label")).toMatch(/^1 − F\(x\) = P\(X > x\)/);
    await shot(page, "explorer-exceedance");
    // A narrower range on request.
    await page.getByLabel("Range to level").fill("0.99");
    await page.getByRole("button", { name: "Replot" }).click();
    await expect.poll(async () => (await plotRange(page))[1], { timeout: 20_000 }).toBeLessThan(hi);

    // Export: the plotted table as CSV, the figure as SVG.
    const [csv] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "CSV" }).click()]);
    const text = readFileSync((await csv.path())!, "utf8");
    // each value with its per-point bound (the API's diagnostics.pointError)
    expect(text.split("\r\n")[0]).toMatch(/^x,(pdf|pmf),cdf,sf,(pdf|pmf)_error,cdf_error,sf_error$/);
    expect(text.split("\r\n")[1]).toMatch(/^[^,]+(,[^,]+){3},\d[^,]*,\d[^,]*,\d[^,]*$/);
    expect(text.split("\r\n").length).toBeGreaterThan(100);
    const [svg] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "SVG" }).click()]);
    expect(readFileSync((await svg.path())!, "utf8")).toMatch(/<svg[^>]*xmlns="http:\/\/www.w3.org\/2000\/svg"/);

    // Code for the same call: curl, Python requests, TypeScript fetch.
    for (const [tab, marker] of [["curl", "curl -sS -X POST"], ["Python (requests)", "requests.post("], ["TypeScript (fetch)", "await fetch("]] as const) {
      await page.getByRole("tab", { name: tab }).click();
      const code = await page.getByTestId("snippet").innerText();
      expect(code).toContain(marker);
      expect(code).toContain("/api/v1/quantiles");
      expect(code).toContain("gamma");
    }

    // An invalid model: the API's message by pointer, and the previous results are gone.
    const editor = page.getByLabel("Model (JSON)");
    await editor.fill('{"family": "normal", "mu": 0, "sigma": -2}');
    await run(page);
    await page.getByTestId("model-issues").waitFor();
    await expect(page.getByTestId("model-issues").innerText()).resolves.toMatch(/sigma/);
    await expect(page.getByTestId("law-plot").count()).resolves.toBe(0);
    await expect(page.getByRole("heading", { name: "Moments" }).count()).resolves.toBe(0);
    await shot(page, "explorer-invalid");
    await page.setViewportSize({ width: 390, height: 844 });
    await page.getByRole("button", { name: /Aggregate claims/ }).click();
    await run(page);
    await page.getByTestId("law-plot").waitFor({ timeout: 30_000 });
    // Poisson(42) claims: the atom P(N = 0) = e^-42 = 5.749e-19 (closed form) lies below the quantile range (about
    // 200..1200); the plot widens to take it in and marks it beside the density, and the caption counts what is drawn
    await expect(page.getByTestId("atom-marker").first().textContent()).resolves.toMatch(/P\(X = 0\) = 5\.7e-19/);
    await expect(page.locator("figcaption").first().innerText()).resolves.toMatch(/1 atom, marked with its mass/);
    expect((await plotRange(page))[0]).toBeLessThanOrEqual(0);
    // names the elements that stick out past the viewport, so a failure says where to look
    const { extra, wide } = await overflow(page);
    expect(extra, wide.join(" | ")).toBe(0);
    await shot(page, "explorer-narrow");
    await page.close();
  });

  it("runs a compound whose claim sizes are a dataset, as the API does", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Harrowgate Mutual");
    const dev = await makePerson("Tomas Lind", [{ id: org.id, role: "developer" }], "harrowgate-dev-44");
    const page = await session.browser.newPage();
    await signIn(page, dev.email, dev.password);
    const up = await page.request.post(`${baseUrl()}/api/portal/datasets?name=${encodeURIComponent("Hail sizes")}`, { data: Buffer.from("size\n2\n4\n6\n8\n"), headers: { "content-type": "text/csv" } });
    expect(up.status(), await up.text()).toBe(201);
    const id = ((await up.json()) as { dataset: { id: string } }).dataset.id;
    await page.goto(`${baseUrl()}/explorer`);
    await page.getByLabel("Model (JSON)").fill(JSON.stringify({ compound: { count: { family: "poisson", lambda: 2 }, each: { dataset: id, version: 1 } } }));
    await run(page);
    await page.getByRole("heading", { name: "Moments" }).waitFor({ timeout: 30_000 });
    // Compound mean = E[N] E[X] = 2 * 5 = 10 (Wald's identity on the sample's mean 5; common practice).
    const mean = Number((await page.locator("dt", { hasText: "Mean" }).locator("xpath=following-sibling::dd[1]").innerText()).trim());
    expect(Math.abs(mean - 10)).toBeLessThan(1e-9);
    await expect(page.getByTestId("model-issues").count()).resolves.toBe(0);
    await page.close();
  });

  it("saves a model, adds a version, shares it, and a colleague opens it from the models page", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Kestrel Precision Works");
    const dev = await makePerson("Wen Castillo", [{ id: org.id, role: "developer" }], "kestrel-dev-12");
    const colleague = await makePerson("Ilse Moreau", [{ id: org.id, role: "admin" }], "kestrel-admin-12");
    const page = await session.browser.newPage();
    await signIn(page, dev.email, dev.password);
    // A docs example opens in the explorer.
    await page.goto(`${baseUrl()}/docs/models`);
    await page.getByRole("link", { name: "Open this example in the explorer" }).nth(1).click();
    await page.waitForURL(/\/explorer\?example=stack/);
    await expect.poll(() => page.getByLabel("Model (JSON)").inputValue()).toContain("uniform");
    await page.getByLabel("Name", { exact: true }).fill("Gearbox housing stack");
    await page.getByRole("button", { name: "Save model" }).click();
    await page.getByText("Saved “Gearbox housing stack” as version 1.").waitFor();
    await page.getByLabel("Model (JSON)").fill(JSON.stringify({ sum: [{ family: "normal", mu: 12, sigma: 0.01 }, { family: "uniform", a: 20.97, b: 21.03 }] }));
    await page.getByLabel("What changed (optional)").fill("tighter machining");
    await page.getByRole("button", { name: "Save model" }).click();
    await page.getByText("Saved “Gearbox housing stack” as version 2.").waitFor();
    await page.close();

    const other = await session.browser.newPage();
    await other.context().clearCookies();
    await signIn(other, colleague.email, colleague.password);
    await other.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Models" }).click();
    const card = other.locator('[data-model="Gearbox housing stack"]');
    await card.waitFor();
    await expect(card.innerText()).resolves.toMatch(/Version 2 · shared with the organisation · saved by Wen Castillo/);
    // a model with no author on record (seeded, as the demo's are) names none rather than guessing who saved it
    const [seeded] = await getDb().insert(savedModels).values({ organizationId: org.id, name: "Seeded housing stack", description: "", model: { family: "normal", mu: 12, sigma: 0.01 }, shared: true });
    await getDb().insert(savedModelVersions).values({ savedModelId: seeded.insertId, version: 1, model: { family: "normal", mu: 12, sigma: 0.01 } });
    await other.reload();
    const seededCard = other.locator('[data-model="Seeded housing stack"]');
    await seededCard.waitFor();
    await expect(seededCard.innerText()).resolves.toMatch(/Version 1 · shared with the organisation · \d/);
    await expect(seededCard.innerText()).resolves.not.toMatch(/saved by/);
    await card.getByRole("button", { name: "Versions" }).click();
    await card.getByText("tighter machining").waitFor();
    await shot(other, "models-list");
    await card.getByRole("link", { name: "Version 1" }).click();
    await other.waitForURL(/\/explorer\?model=\d+&version=1/);
    await expect.poll(() => other.getByLabel("Model (JSON)").inputValue()).toContain("31");
    await other.getByText(/Opened: “Gearbox housing stack”, version 1/).waitFor();
    await other.close();
  });
});
