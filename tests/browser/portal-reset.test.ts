// Forgotten password: ask for a link -> it arrives in the SMTP sink -> choose a new password -> sign in with it.
import { describe, expect, it } from "vitest";
import { useBrowser } from "./browser-session";
import { baseUrl } from "../support/layout";
import { linkIn, mailTo, makeOrganization, makePerson, shot, signIn } from "./portal-support";

const session = useBrowser();

describe("password reset", () => {
  it("resets the password through the mailed link", { timeout: 120_000 }, async () => {
    const org = await makeOrganization("Brindle Surety");
    const person = await makePerson("Nadia Quist", [{ id: org.id, role: "developer" }], "old-password-123");
    const page = await session.browser.newPage();
    await page.goto(`${baseUrl()}/sign-in`);
    await page.getByRole("link", { name: "Forgot your password?" }).click();
    await page.waitForURL(/\/reset$/);
    await page.getByLabel("E-mail").fill(person.email);
    await page.getByRole("button", { name: "Send the reset link" }).click();
    await page.getByText(/a reset link is on its way/).waitFor();

    const [mail] = await mailTo(person.email);
    expect(mail.subject).toMatch(/new Sumfold password/);
    await page.goto(linkIn(mail.text, "/reset"));
    await page.getByRole("heading", { name: "Choose a new password" }).waitFor();
    await page.getByLabel("New password").fill("short");
    await page.getByRole("button", { name: "Save the new password" }).click();
    await page.getByText("Use at least 10 characters.", { exact: true }).waitFor();
    await shot(page, "reset-choose");
    await page.getByLabel("New password").fill("brand-new-password-9");
    await page.getByRole("button", { name: "Save the new password" }).click();
    await page.waitForURL(/\/sign-in\?notice=reset/);

    // The old password no longer works; the new one does.
    await page.getByLabel("E-mail").fill(person.email);
    await page.getByLabel("Password").fill(person.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByRole("alert").filter({ hasText: /do not match/ }).waitFor();
    await signIn(page, person.email, "brand-new-password-9");
    await page.getByRole("heading", { name: "Hello, Nadia" }).waitFor();
    await page.close();
  });
});
