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

describe("the lab's quality", () => {
  it("a lead opens the quality page, sees the drifting rope lot flagged, and opens the repeatability result", async () => {
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await signInAs(page, "lead@demo.test");
    const labId = new URL(page.url()).pathname.split("/")[2];
    await page.goto(`${inject("baseUrl")}/labs/${labId}/quality`);
    await page.getByRole("heading", { name: "The lab's quality" }).waitFor();
    const signals = page.getByTestId("chart-cuts_to_threshold").getByTestId("signals");
    await expect.poll(() => signals.textContent()).toContain("lot MR-2611");
    expect(await signals.textContent()).toContain("One point beyond the 3-sigma limits");
    // The earlier lots' baseline runs are not flagged by the 3-sigma rule.
    expect(await signals.textContent()).not.toMatch(/3-sigma limits at run \d+ \([^)]*lot MR-2440/);
    await page.getByTestId("individuals-cuts_to_threshold").locator("svg, canvas").first().waitFor();
    await screenshot(page, "quality-page");

    await page.goto(`${inject("baseUrl")}/labs/${labId}/instruments`);
    await page.getByRole("link", { name: "Edge-force tester 2000 gf (demo)" }).click();
    await page.getByText(/Repeatability R-1 \(demo\)/).click();
    const result = page.getByTestId("precision-result");
    await result.waitFor({ state: "visible" });
    expect(await page.getByTestId("sr").textContent()).toMatch(/^\d+\.\d gf$/);
    expect(await result.textContent()).toContain("ISO 5725-2");
    await screenshot(page, "instrument-repeatability");
    expect(errors).toEqual([]);
  });
});
