// The explorer's risk panel as an actuary, a risk analyst and a tolerance engineer use it: tail choice, stop-loss,
// the exceedance curve on a log scale with return periods, and ppm outside spec limits (the tolerance template brings
// its LSL/USL), at 1280 and 390 px. Values are checked against closed forms (fixtures of
// tests/fixtures/reference-risk/generate.py and scipy constants named below) within the error bound the panel shows.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { baseUrl } from "../support/layout";
import { makeOrganization, makePerson, overflow, shot, signIn } from "./portal-support";
import { useBrowser } from "./browser-session";

const ref = JSON.parse(readFileSync("tests/fixtures/reference-risk/risk.json", "utf8"));
const session = useBrowser();

const panel = (page: Page) => page.getByRole("heading", { name: "Risk measures" }).locator("xpath=..");
// each finished run numbers its result block, so a check never reads the previous run's table
let runsSeen = 0;
const compute = async (page: Page) => {
  await panel(page).getByRole("button", { name: "Compute risk measures" }).click();
  runsSeen++;
  await panel(page).locator(`[data-testid=risk-result][data-run="${runsSeen}"]`).waitFor({ timeout: 60_000 });
};
/** The value and the bound of the table row whose first cell matches `label`. */
async function row(page: Page, label: RegExp): Promise<{ value: number; bound: number; text: string }> {
  const r = panel(page).locator("tbody tr").filter({ hasText: label }).first();
  const cells = await r.locator("td").allInnerTexts();
  const value = Number(cells[1].replace(/ppm/, "").trim());
  const bound = Number(cells[2].replace(/[±ppm\s]/g, ""));
  return { value, bound, text: cells.join(" | ") };
}
/** |shown - expected| within the shown bound (printed to 2 digits, so 5% slack) plus the 7-digit rounding of the value. */
function within(shown: { value: number; bound: number; text: string }, expected: number, what: string) {
  const diff = Math.abs(shown.value - expected);
  const tol = 1.05 * shown.bound + 5e-7 * Math.abs(expected);
  expect(Number.isFinite(shown.value) && Number.isFinite(shown.bound), `${what}: ${shown.text}`).toBe(true);
  expect(diff, `${what}: shown ${shown.text}, expected ${expected}, difference ${diff}, tolerance ${tol}`).toBeLessThanOrEqual(tol);
}
// a template's risk fields arrive in an effect after the click, so their checks poll
const setModel = (page: Page, model: unknown) => page.getByLabel("Model (JSON)").fill(JSON.stringify(model));

describe("explorer risk panel", () => {
  for (const width of [1280, 390]) {
    it(`at ${width} px: tail choice, stop-loss, exceedance curve with return periods, ppm outside spec limits`, { timeout: 240_000 }, async () => {
      const org = await makeOrganization(`Brackwater Re ${width}`);
      const dev = await makePerson(`Ines Calder ${width}`, [{ id: org.id, role: "developer" }], `brackwater-dev-${width}`);
      const page = await session.browser.newPage();
      runsSeen = 0;
      await page.setViewportSize({ width, height: width > 500 ? 900 : 844 });
      await signIn(page, dev.email, dev.password);
      await page.goto(`${baseUrl()}/explorer`);
      await expect(panel(page).innerText()).resolves.toMatch(/computational aids/i);

      // Tolerance stack: the template brings its spec limits, so the first run shows ppm outside them at once.
      await page.getByRole("button", { name: /Tolerance stack/ }).click();
      await expect.poll(() => panel(page).getByLabel(/Spec limits/).inputValue()).toBe("77.38, 77.62");
      await compute(page);
      const ppm = await row(page, /outside spec limits/);
      expect(ppm.value, ppm.text).toBeGreaterThan(0);
      expect(ppm.value, ppm.text).toBeLessThan(1e6);
      expect(ppm.text).toMatch(/ppm/);
      // Irwin-Hall: four uniform(0, 1) parts outside [0.5, 3.5] is exactly 1/192 (fixture, exact fractions)
      const ih = ref.irwinHall.find((c: { lsl: number; usl: number }) => c.lsl === 0.5 && c.usl === 3.5);
      await setModel(page, ih.model);
      await panel(page).getByLabel(/Spec limits/).fill(`${ih.lsl}, ${ih.usl}`);
      await compute(page);
      within(await row(page, /outside spec limits/), ih.ppm, `ppm outside [${ih.lsl}, ${ih.usl}] (${ih.exact})`);
      await shot(page, `explorer-risk-ppm-${width}`);

      // Lower tail of a daily return, normal(0.0005, 0.01): VaR_0.01 = mu + sigma z_0.01, ES_0.01 = mu - sigma phi(z)/0.01
      // (common practice; z_0.01 = -2.3263478740408408 and phi(z_0.01) = 0.026652142203457912 from scipy.stats.norm)
      await page.getByRole("button", { name: /Stable law/ }).click();
      await expect.poll(() => panel(page).getByLabel("lower (returns, p near 0)").isChecked()).toBe(true);
      await setModel(page, { family: "normal", mu: 0.0005, sigma: 0.01 });
      await panel(page).getByLabel("VaR and ES levels").fill("0.01");
      await compute(page);
      within(await row(page, /^VaR 0\.01 \(lower\)/), 0.0005 + 0.01 * -2.3263478740408408, "lower VaR 0.01");
      within(await row(page, /^ES 0\.01 \(lower\)/), 0.0005 - 0.026652142203457912, "lower ES 0.01");
      // the same levels in the upper tail read the other side
      await panel(page).getByLabel("upper (losses, p near 1)").check();
      await panel(page).getByLabel("VaR and ES levels").fill("0.99");
      await compute(page);
      within(await row(page, /^VaR 0\.99 \(upper\)/), 0.0005 + 0.01 * 2.3263478740408408, "upper VaR 0.99");

      // Aggregate claims: stop-loss of compound Poisson(3) with exponential(0.5) claims against the Erlang mixture (fixture)
      await page.getByRole("button", { name: /Aggregate claims/ }).click();
      await expect.poll(() => panel(page).getByLabel("upper (losses, p near 1)").isChecked()).toBe(true);
      const cp = ref.compoundPoissonExponential[0];
      await setModel(page, cp.model);
      await panel(page).getByLabel("Stop-loss retentions").fill(cp.stopLoss.map((x: { d: number }) => x.d).slice(0, 3).join(", "));
      await compute(page);
      for (const x of cp.stopLoss.slice(0, 3)) within(await row(page, new RegExp(`stop-loss E\\[\\(S − ${x.d}\\)\\+\\]`)), x.value, `stop-loss at ${x.d}`);
      // 1-in-200 level: P(S > x) = 1/200 there, checked against the Erlang mixture's exceedance bracket (fixture points)
      const t200 = await row(page, /1-in-200 level/);
      const ex = cp.exceedance as { x: number; value: number }[];
      expect(t200.value, t200.text).toBeGreaterThan(Math.max(...ex.filter((e) => e.value > 0.005).map((e) => e.x)));
      expect(t200.value, t200.text).toBeLessThan(Math.min(...ex.filter((e) => e.value < 0.005).map((e) => e.x)));

      // The exceedance curve: a log axis in decades, return periods on the right, a polyline of the 41 points
      const curve = panel(page).getByRole("img", { name: /Exceedance probability on a log scale/ });
      await curve.waitFor({ timeout: 60_000 });
      const labels = await curve.locator("text").allTextContents();
      expect(labels).toEqual(expect.arrayContaining(["1e0", "1e-1", "1e-2", "1e-3", "10", "100", "1000", "years"]));
      const pts = ((await curve.locator("polyline").getAttribute("points")) ?? "").trim().split(/\s+/);
      expect(pts.length).toBeGreaterThan(20);
      const ys = pts.map((p) => Number(p.split(",")[1]));
      // P(S > x) falls as x grows: y (downwards on screen) never goes back up by more than a hair (inversion noise)
      ys.slice(1).forEach((y, i) => expect(y, `point ${i + 1} of ${pts.join(" ")}`).toBeGreaterThanOrEqual(ys[i] - 0.5));
      expect(ys[ys.length - 1] - ys[0], pts.join(" ")).toBeGreaterThan(100);

      const { extra, wide } = await overflow(page);
      expect(extra, wide.join(" | ")).toBe(0);
      await shot(page, `explorer-risk-${width}`);
      await page.close();
    });
  }
});
