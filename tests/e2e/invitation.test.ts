import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext } from "playwright-core";
import { launchBrowser, screenshot, watchConsole } from "../support/browser.ts";
import { firstLink, waitForMail } from "../support/mail.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("invitation by e-mail", () => {
  it("an owner invites a tester, who follows the mailed link, sets a password and lands signed in as a tester", async () => {
    const baseUrl = inject("baseUrl");
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail").fill("owner@demo.test");
    await page.getByLabel("Password").fill("blindcut-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    await screenshot(page, "lab-home-owner");

    await page.getByRole("link", { name: /Invitations/ }).click();
    await page.waitForURL(/\/invitations$/);
    const email = `new-tester-${Date.now()}@lab.test`;
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Role").selectOption("tester");
    await page.getByRole("button", { name: "Send the invitation" }).click();
    await page.getByRole("status").filter({ hasText: `Invitation sent to ${email}` }).waitFor();
    await screenshot(page, "invitations");

    const mail = await waitForMail(inject("mailDir"), email, /invited/);
    expect(mail.html).toContain("Accept the invitation");
    const link = firstLink(mail);

    // The invited person uses a browser of their own.
    await page.context().clearCookies();
    await page.goto(link);
    await page.getByLabel("Your name").fill("Invited Tester");
    await page.getByLabel("Choose a password").fill("tester passphrase 1");
    await page.getByRole("button", { name: "Create my account and join" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    // Playwright's locators wait for the page to render after the URL changes.
    await page.getByText("Your role: Tester").waitFor();
    await expect.poll(() => page.getByTestId("account-area").textContent()).toContain("Invited Tester");
    await screenshot(page, "lab-home-tester");
    expect(errors).toEqual([]);
  });
});
