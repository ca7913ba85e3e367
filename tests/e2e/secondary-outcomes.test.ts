import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext } from "playwright-core";
import { launchBrowser, screenshot, signInAs, watchConsole } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("16.4 and 16.5 in the demo", () => {
  it("the demo study shows a section per secondary outcome, and its protocol version declares a working-sharpness horizon", async () => {
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await signInAs(page, "analyst@demo.test");
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}\/results$/);
    await page.getByRole("link", { name: /Temper trial T-1/ }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/results$/);
    const secondary = page.getByTestId("secondary-outcomes");
    await secondary.waitFor();
    // The demo declares working sharpness, baseline sharpness and loss rate as secondary outcomes.
    await expect.poll(() => page.getByTestId("secondary-section").count()).toBe(3);
    const text = await secondary.innerText();
    expect(text).toContain("Secondary: no adjustment across outcomes; read as supportive.");
    expect(text).toContain("Working sharpness (gf)");
    expect(text).toContain("Loss rate (gf per cut)");
    // The demo rope protocol's version 2 declares a horizon of 40 cuts.
    expect(text).toContain("over a fixed horizon of the first 40 cuts");
    await screenshot(page, "results-secondary-outcomes");

    const labPath = /\/labs\/[0-9a-f-]{36}/.exec(page.url())![0];
    await page.goto(`${inject("baseUrl")}${labPath}/protocols`);
    await page.getByRole("link", { name: "Hand rope test (demo)" }).click();
    await page.locator('a[href$="/versions/2"]').first().click();
    await page.waitForURL(/\/versions\/2$/);
    const horizon = page.getByTestId("working-horizon");
    await horizon.waitFor();
    expect(await horizon.innerText()).toMatch(/^40 cuts\. Working sharpness is the mean sharpness/);
    expect(errors).toEqual([]);
  });
});
