// The printed report shows its charts as SVG in the print view, with JavaScript off.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { BrowserContext } from "playwright-core";
import { launchBrowser, screenshot, signInAs } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("report charts in print", () => {
  it("the report's chart section holds drawn SVG charts in the print view", async () => {
    const page = await browser.newPage();
    await signInAs(page, "analyst@demo.test");
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/results$/);
    await page.getByRole("link", { name: /Temper trial T-1/ }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/results$/);
    const reportUrl = page.url().replace(/\/results$/, "/report");
    // With every script blocked: the charts come in the HTML.
    const noJs = await browser.newPage();
    await noJs.route(/\.(m?js)(\?|$)/, (route) => route.abort());
    await noJs.emulateMedia({ media: "print" });
    await noJs.goto(reportUrl);
    const charts = noJs.getByTestId("report-charts");
    await charts.waitFor();
    expect(await charts.locator("svg").count()).toBeGreaterThanOrEqual(3);
    // Each SVG has drawn marks (paths), not an empty frame.
    const paths = await charts.locator("svg").evaluateAll((svgs) => svgs.map((s) => s.querySelectorAll("path").length));
    for (const n of paths) expect(n).toBeGreaterThan(3);
    await charts.scrollIntoViewIfNeeded();
    await screenshot(noJs, "report-charts-print");
  });
});
