import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { BrowserContext } from "playwright-core";
import path from "node:path";
import { launchBrowser, screenshotDir, signInAs, watchConsole } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("censored study in the browser", () => {
  it("the demo's censored study shows censor ticks, the band, the number at risk and the medians; RMST beside the means; the warning on the comparison row", async () => {
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await signInAs(page, "analyst@demo.test");
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}\/results$/);
    // Temper trial T-1: the demo's finished study with censored runs in one arm.
    await page.getByRole("link", { name: /Temper trial T-1/ }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/results$/);

    // RMST beside the means, and the arm row's caveat.
    const armTable = page.getByTestId("arm-table");
    await expect.poll(() => armTable.getByRole("columnheader", { name: /RMST to 80 cuts/ }).count()).toBe(1);
    const rmstCells = await page.getByTestId("arm-rmst").allTextContents();
    expect(rmstCells).toHaveLength(2);
    for (const c of rmstCells) expect(c).toMatch(/^\d+\.\d\d \(\d+\.\d\d; \d+\.\d\d to \d+\.\d\d\)$/);
    expect(await page.getByTestId("arm-censor-notes").textContent()).toMatch(/lower bound of its true mean/);

    // The comparison row carries the censoring warning and the RMST difference.
    const row = page.getByTestId("comparison-table").locator("tbody tr").first();
    expect(await row.getByTestId("comparison-censor-warning").textContent()).toMatch(/censored.*either way.*inflated/i);
    expect(await row.getByTestId("comparison-rmst").textContent()).toMatch(/RMST difference to 80 cuts/);
    expect(await page.getByTestId("log-rank").textContent()).toMatch(/not valid for inference when blades have replicates/);

    // The survival chart: band (area), censor ticks, number at risk (text), medians (rules and text).
    const chart = page.getByTestId("chart-survival");
    await chart.scrollIntoViewIfNeeded();
    await expect.poll(() => chart.getAttribute("data-chart-state"), { timeout: 20_000 }).toBe("ready");
    await expect.poll(() => chart.locator("svg .mark-area path").count()).toBeGreaterThan(0);
    await expect.poll(() => chart.locator("svg .mark-rect path, svg .mark-rect rect").count()).toBeGreaterThan(0); // ticks are drawn as rects
    const svgText = (await chart.locator("svg").textContent()) ?? "";
    expect(svgText).toContain("At risk");
    expect(await chart.locator("svg .mark-text text").count()).toBeGreaterThan(5);
    expect(await chart.locator("svg .mark-rule line").count()).toBeGreaterThan(0);
    expect(await chart.getByTestId("km-medians").textContent()).toMatch(/Median cuts to threshold \(Kaplan–Meier\): Arm A[^:]*: \d+\.\d cuts \(95 % interval [^)]+\); Arm B/);
    await chart.screenshot({ path: path.join(screenshotDir, "survival-chart.png") });

    // The table view gives the same numbers: censored runs, number at risk, medians.
    await chart.getByRole("button", { name: "Show the numbers as a table" }).click();
    const tables = chart.locator("table");
    expect(await tables.count()).toBe(4);
    expect(await tables.nth(1).locator("tbody tr").count()).toBeGreaterThan(0); // censored runs
    expect(await tables.nth(2).locator("tbody tr").count()).toBe(10); // 2 arms x 5 cuts at risk
    expect(await tables.nth(3).locator("tbody tr").count()).toBe(2); // medians

    // The arm-mean curve states its rule.
    expect(await page.getByTestId("arm-curve-rule").textContent()).toMatch(/at least half of the arm's runs are still going/);
    expect(errors).toEqual([]);
  });
});
