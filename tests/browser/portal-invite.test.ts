// An admin invites a billing contact -> the mail arrives -> the billing contact joins, sees usage, and can
// neither see nor create keys.
import { describe, expect, it } from "vitest";
import { PLANS } from "@/lib/api/plans";
import { launchBrowser } from "../support/browser";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { linkIn, mailTo, makeOrganization, makePerson, shot, signIn, uniq } from "./portal-support";

const session = useBrowser();

describe("inviting a billing contact", () => {
  it("admin invites, the invitee joins from the mail, sees usage and no keys", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Ashcombe Mutual");
    const admin = await makePerson("Lena Ashcombe", [{ id: org.id, role: "admin" }], "ashcombe-admin-1");
    const adminPage = await session.browser.newPage();
    await signIn(adminPage, admin.email, admin.password);
    await adminPage.getByRole("navigation", { name: "Portal" }).getByRole("link", { name: "Members" }).click();
    await adminPage.getByText("No open invitations").waitFor();
    const invitee = `farid.haddad.${uniq()}@ashcombe.example`;
    const form = adminPage.getByRole("form", { name: "Invite someone" });
    await form.getByLabel("E-mail").fill(invitee);
    await form.getByLabel("Role").selectOption("billing");
    await form.getByRole("button", { name: "Send invitation" }).click();
    await adminPage.getByText(`Invitation sent to ${invitee}.`).waitFor();
    await adminPage.getByText(invitee, { exact: true }).waitFor();
    await shot(adminPage, "members-invited");

    // Last-admin protection shows as a message, and nothing changes.
    // Removal asks for confirmation first (and lists the person's keys).
    await adminPage.getByRole("button", { name: `Remove ${admin.name}` }).click();
    await adminPage.getByRole("form", { name: `Remove ${admin.name}` }).getByRole("button", { name: `Remove ${admin.name}` }).click();
    await adminPage.getByRole("alert").filter({ hasText: /last admin cannot be removed/i }).waitFor();
    await expect(adminPage.getByRole("combobox", { name: `Role of ${admin.name}` }).inputValue()).resolves.toBe("admin");
    await adminPage.close();

    const [mail] = await mailTo(invitee);
    expect(mail.subject).toContain("Ashcombe Mutual");
    // A fresh browser profile: the invitee has never signed in.
    const other = await launchBrowser();
    try {
      const page = await other.browser.newPage();
      await page.goto(linkIn(mail.text, "/invite"));
      await page.getByRole("heading", { name: "Join Ashcombe Mutual" }).waitFor();
      await expect(page.getByText(/invited as/).innerText()).resolves.toMatch(/billing contact/);
      await shot(page, "invite-accept");
      await page.getByLabel("Your name").fill("Farid Haddad");
      await page.getByLabel("Choose a password").fill("farid-billing-77");
      await page.getByRole("button", { name: "Join Ashcombe Mutual" }).click();
      await page.waitForURL(/\/dashboard\?org=/);
      await page.getByRole("heading", { name: "Hello, Farid" }).waitFor();
      const nav = page.getByRole("navigation", { name: "Portal" });
      await expect(nav.getByRole("link", { name: "API keys" }).count()).resolves.toBe(0);
      await expect(nav.getByRole("link", { name: "Members" }).count()).resolves.toBe(0);
      await shot(page, "dashboard-billing");

      await nav.getByRole("link", { name: "Usage" }).click();
      await page.getByRole("heading", { name: "Usage" }).waitFor();
      await page.getByText("No calls in this period").waitFor();
      await page.locator("figure svg").first().waitFor();
      // the quota is the plan's cap; the sentence says where the fee's included units end (lib/api/plans.ts, Team)
      const quotaText = await page.locator("#quota-h").locator("xpath=..").innerText();
      expect(quotaText).toContain(`of ${PLANS.team.monthlyUnits.toLocaleString("en-GB")} compute units, the plan’s monthly cap (`);
      expect(quotaText).toContain(`Team plan). The fee includes ${PLANS.team.includedUnits.toLocaleString("en-GB")} of them; units past those are billed per extra million (see Billing).`);
      await shot(page, "usage-billing");

      // Going to the keys page by address: refused, with a reason, and the API agrees.
      // The page does not ask for what the role may not see (a refused request would show as a console error).
      const refused: string[] = [];
      page.on("response", (r) => {
        if (r.status() >= 400) refused.push(`${r.status()} ${r.url()}`);
      });
      await page.goto(`${baseUrl()}/keys`);
      await page.getByRole("alert").filter({ hasText: /does not include API keys/i }).waitFor();
      await expect(page.getByRole("button", { name: "New key" }).count()).resolves.toBe(0);
      await page.waitForLoadState("networkidle");
      expect(refused).toEqual([]);
      await shot(page, "keys-billing-refused");
      const api = await page.evaluate(async () => {
        const list = await fetch("/api/portal/keys");
        const create = await fetch("/api/portal/keys", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ label: "sneaky", scopes: ["moments"] }) });
        return [list.status, create.status];
      });
      expect(api).toEqual([403, 403]);
      await page.close();
    } finally {
      await other.close();
    }
  });
});
