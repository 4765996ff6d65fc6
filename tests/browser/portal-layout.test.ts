// Every page at 390 px (a phone) and 1280 px: nothing wider than the screen, tables as cards or scrolling in
// their own box with the actions in view; and the audit log used by an admin (filter, CSV).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { makeOrganization, makePerson, shot, signIn } from "./portal-support";

const session = useBrowser();

/** How far the page itself scrolls sideways, and the widest elements that stick out (outside scroll boxes). */
const overflow = (page: Page) =>
  page.evaluate(() => {
    const w = document.documentElement.clientWidth;
    const inScroller = (el: Element) => {
      for (let p = el.parentElement; p; p = p.parentElement) if (["auto", "scroll"].includes(getComputedStyle(p).overflowX)) return true;
      return false;
    };
    const wide = [...document.querySelectorAll("body *")].filter((el) => el.getBoundingClientRect().right > w + 1 && !inScroller(el)).map((el) => `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 50)}`);
    return { extra: document.documentElement.scrollWidth - w, wide: wide.slice(0, 6) };
  });

describe("narrow and wide screens", () => {
  it("every portal and docs page fits 390 px; keys' Rotate and Revoke stay in view; the admin reads and filters the audit log", { timeout: 300_000 }, async () => {
    const org = await makeOrganization("Harrowgate Mutual");
    const admin = await makePerson("Ada Okafor", [{ id: org.id, role: "admin" }], "harrowgate-admin-1");
    await makePerson("Tomas Lind", [{ id: org.id, role: "developer" }], "harrowgate-dev-2");
    const page = await session.browser.newPage();
    await signIn(page, admin.email, admin.password);
    await page.waitForURL(/[?&]org=/);
    const org1 = new URL(page.url()).searchParams.get("org")!;
    // Something in each list: a key, a saved model, a dataset.
    await page.goto(`${baseUrl()}/keys?org=${org1}`);
    await page.getByRole("button", { name: "New key" }).click();
    await page.getByLabel("Label").fill("reserving batch with a long label");
    await page.getByRole("button", { name: "Create key" }).click();
    await page.getByRole("button", { name: /I have stored it/ }).click();
    const headers = { "content-type": "application/json", "x-sumfold-org": org1 };
    expect((await page.request.post(`${baseUrl()}/api/portal/models`, { headers, data: { name: "Hail book 2027", model: { family: "gamma", shape: 1.8, rate: 0.12 } } })).status()).toBe(201);
    const ds = await page.request.post(`${baseUrl()}/api/portal/datasets?name=Hail%20sizes&org=${org1}`, { headers: { "content-type": "text/csv" }, data: Buffer.from("size\n2\n4\n6\n") });
    const dsId = ((await ds.json()) as { dataset: { id: string } }).dataset.id;

    const pages = ["/dashboard", "/quickstart", "/keys", "/usage", "/members", "/audit", "/models", "/datasets", `/datasets/${dsId}`, "/explorer", "/docs/models", "/docs/errors", "/docs/snippets", "/"];
    for (const width of [1280, 390]) {
      await page.setViewportSize({ width, height: width > 400 ? 860 : 844 });
      for (const path of pages) {
        await page.goto(`${baseUrl()}${path}${path.startsWith("/docs") || path === "/" ? "" : `${path.includes("?") ? "&" : "?"}org=${org1}`}`);
        await page.getByRole("heading", { level: 1 }).first().waitFor();
        await page.waitForLoadState("networkidle");
        const o = await overflow(page);
        expect(o, `${path} at ${width}px: ${JSON.stringify(o)}`).toMatchObject({ extra: 0 });
        await shot(page, `w${width}${path.replace(/\//g, "-") || "-home"}`);
      }
    }
    // At 390 px the keys table scrolls in its own box, and its actions column stays on screen.
    await page.goto(`${baseUrl()}/keys?org=${org1}`);
    const rotate = page.getByRole("button", { name: /^Rotate reserving batch/ });
    const box = (await rotate.boundingBox())!;
    expect(box.x + box.width).toBeLessThanOrEqual(390);
    await expect(page.getByText("Scroll the table sideways for more columns").first().isVisible()).resolves.toBe(true);

    // The audit log: the key made above is there, with who and from where; filters live in the address; CSV.
    await page.setViewportSize({ width: 1280, height: 860 });
    await page.goto(`${baseUrl()}/audit?org=${org1}`);
    const created = page.locator('[data-action="key.created"]').first();
    await created.waitFor();
    await expect(created.innerText()).resolves.toMatch(/Ada Okafor[\s\S]*from \S+/);
    await page.getByLabel("Action").selectOption("model.saved");
    await page.waitForURL(/action=model\.saved/);
    // the filtered list arrives with the next server render: on a loaded machine that takes longer than the 1 s default
    await expect.poll(() => page.locator("[data-action]").count(), { timeout: 20_000 }).toBe(1);
    await expect(page.locator('[data-action="model.saved"]').innerText()).resolves.toMatch(/Hail book 2027/);
    const [csv] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download CSV" }).click()]);
    const lines = readFileSync((await csv.path())!, "utf8").trim().split("\r\n");
    expect(lines[0]).toBe("time_utc,who,email,action,target,detail,ip,user_agent");
    expect(lines.slice(1).every((l) => l.includes("model.saved"))).toBe(true);
    await shot(page, "audit-filtered");
    await page.close();
  });
});
