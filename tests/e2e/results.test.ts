import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { execFileSync } from "node:child_process";
import { mkdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { launchBrowser, screenshot, screenshotDir, signInAs, watchConsole } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("results in the browser", () => {
  it("an analyst sees blinded results with charts and their table view; the lead unblinds and the names appear; the report prints to PDF", async () => {
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await signInAs(page, "analyst@demo.test");
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}\/results$/);
    await page.getByRole("link", { name: /Finish trial F-1/ }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/results$/);
    const resultsUrl = page.url();
    await page.getByText("Blinded.").waitFor();
    // Before unblinding only neutral labels are shown.
    const labelsBefore = await page.getByTestId("arm-label").allTextContents();
    expect(labelsBefore.join(" ")).toMatch(/Condition A.*Condition B/);
    expect(await page.content()).not.toContain("Polished finish");

    // The charts load in the client; vega draws SVG; every chart has a table view.
    const curves = page.getByTestId("chart-curves");
    await curves.waitFor();
    await expect.poll(() => curves.getAttribute("data-chart-state"), { timeout: 20_000 }).toBe("ready");
    await expect.poll(() => curves.locator("svg").count()).toBeGreaterThan(0);
    await screenshot(page, "results-blinded");
    await curves.getByRole("button", { name: "Show the numbers as a table" }).click();
    await expect.poll(() => curves.locator("table tbody tr").count()).toBeGreaterThan(3);

    // The lead unblinds on the record.
    await signInAs(page, "lead@demo.test");
    await page.goto(resultsUrl);
    await page.getByRole("link", { name: "Unblind…" }).click();
    await page.getByText("Unblinding cannot be undone.").waitFor();
    await page.getByLabel("I understand: unblind this study now.").check();
    await page.getByRole("button", { name: "Unblind the study" }).click();
    await page.getByTestId("unblinded-note").waitFor();

    await signInAs(page, "analyst@demo.test");
    await page.goto(resultsUrl);
    await page.getByTestId("unblinded-note").waitFor();
    const labelsAfter = (await page.getByTestId("arm-label").allTextContents()).join(" ");
    expect(labelsAfter).toContain("Polished finish");
    expect(labelsAfter).toContain("Coarse finish");
    await screenshot(page, "results-unblinded");

    // The report prints to PDF in Chromium, and its first page is not blank.
    await page.goto(resultsUrl.replace(/\/results$/, "/report"));
    await page.getByRole("heading", { level: 1 }).waitFor();
    await screenshot(page, "report");
    mkdirSync(screenshotDir, { recursive: true });
    const pdf = path.join(screenshotDir, "report.pdf");
    await page.pdf({ path: pdf, format: "A4", printBackground: true });
    expect(readFileSync(pdf).subarray(0, 5).toString()).toBe("%PDF-");
    const png = path.join(screenshotDir, "report-page1");
    execFileSync("pdftoppm", ["-png", "-r", "50", "-f", "1", "-l", "1", "-singlefile", pdf, png]);
    const size = statSync(`${png}.png`).size;
    expect(size).toBeGreaterThan(5_000);
    expect(errors).toEqual([]);
  });
});
