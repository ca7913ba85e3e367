import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { launchBrowser, screenshot, watchConsole } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/**
 * The client chunks that hold vega: vega-embed's chunk (it carries vega and vega-lite;
 * found by a string of vega-embed's own) and vega-interpreter's. Read from the build the
 * server serves, so a renamed chunk is still found.
 */
function vegaChunks(): string[] {
  const dir = path.resolve(import.meta.dirname, "../../build/client/assets");
  return readdirSync(dir).filter(
    (f) => f.endsWith(".js") && (/^vega-/.test(f) || readFileSync(path.join(dir, f), "utf8").includes('"vega-lite":`Vega-Lite`')),
  );
}

function scriptRequests(page: Page) {
  const urls: string[] = [];
  page.on("request", (req) => {
    if (req.resourceType() === "script" || req.url().endsWith(".js")) urls.push(req.url());
  });
  return urls;
}

/** Records CSP violations reported by the page itself, beside the console check. */
async function watchCsp(page: Page) {
  await page.addInitScript(() => {
    const w = window as unknown as { __csp: string[] };
    w.__csp = [];
    document.addEventListener("securitypolicyviolation", (e) => w.__csp.push(`${e.violatedDirective}: ${e.blockedURI} at ${e.sourceFile}:${e.lineNumber}:${e.columnNumber}`));
  });
  return () => page.evaluate(() => (window as unknown as { __csp: string[] }).__csp);
}

describe("sample-size planner in the browser", () => {
  it("the landing page loads no vega chunk", async () => {
    const chunks = vegaChunks();
    // Both chunks exist in the build; otherwise this check would pass for nothing.
    expect(chunks.length).toBeGreaterThanOrEqual(2);
    const page = await browser.newPage();
    const requested = scriptRequests(page);
    await page.goto(inject("baseUrl"), { waitUntil: "networkidle" });
    expect(requested.length).toBeGreaterThan(0);
    for (const chunk of chunks) expect(requested.some((u) => u.endsWith(`/${chunk}`)), chunk).toBe(false);
    expect(requested.filter((u) => /sample-size/.test(u))).toEqual([]);
    await page.close();
  });

  it("a lead plans a study: the chart renders under the CSP, the table view shows the numbers", async () => {
    const baseUrl = inject("baseUrl");
    const page = await browser.newPage();
    const errors = watchConsole(page);
    const cspViolations = await watchCsp(page);
    const requested = scriptRequests(page);

    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail").fill("lead@demo.test");
    await page.getByLabel("Password").fill("blindcut-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);

    await page.getByRole("link", { name: /Sample size/ }).click();
    await page.waitForURL(/\/planning\/sample-size$/);
    await page.getByLabel("Design").selectOption("two-sample");
    await page.getByLabel("Outcome unit").selectOption("cuts");
    await page.getByLabel("Standard deviation").fill("20");
    await page.getByLabel("Smallest difference worth finding").fill("10");
    await page.getByLabel("Alpha (two-sided)").fill("0.05");
    await page.getByLabel("Power", { exact: true }).fill("0.9");
    await page.getByRole("button", { name: "Plan the sample size" }).click();
    // A GET form: the plan is in the URL.
    await page.waitForURL(/sd=20&difference=10&alpha=0.05&power=0.9/);

    // Source: Cohen (1988), table 2.4.1: d = 0.5, two-sided 0.05, power 0.90 needs 86 per group.
    await page.getByTestId("proposed-n").filter({ hasText: "86" }).waitFor();
    await expect(page.getByTestId("plan-sentence").textContent()).resolves.toContain("With 86 blades per arm (172 in all)");

    const chart = page.getByTestId("power-chart");
    await chart.locator("[data-testid=power-chart-canvas] svg, [data-testid=power-chart-canvas] canvas").first().waitFor({ timeout: 30_000 });
    await expect(chart.getAttribute("data-chart-state")).resolves.toBe("ready");
    await expect(chart.getByRole("status").count()).resolves.toBe(0);
    const canvas = chart.getByRole("img", { name: "Power against the number of blades per arm" });
    await expect(canvas.count()).resolves.toBe(1);
    // The labels drawn by vega: the target rule, the proposed point, the line's direct label.
    const svgText = await canvas.locator("svg").textContent();
    expect(svgText).toContain("Target power 90 %");
    expect(svgText).toContain("86 blades per arm");
    expect(svgText).toContain("Power of the test");
    const font = await canvas.locator("svg text").first().evaluate((el) => getComputedStyle(el).fontFamily);
    expect(font).toContain("Atkinson Hyperlegible");
    await screenshot(page, "sample-size");

    // The vega chunk came in for this page.
    expect(requested.some((u) => vegaChunks().some((c) => u.endsWith(`/${c}`)))).toBe(true);

    await chart.getByRole("button", { name: "Show the numbers as a table" }).click();
    const table = chart.getByRole("table");
    await table.waitFor();
    await expect(canvas.isVisible()).resolves.toBe(false);
    const proposedRow = table.getByRole("row").filter({ hasText: "proposed" });
    await expect(proposedRow.getByRole("rowheader").textContent()).resolves.toBe("86");
    expect(await proposedRow.textContent()).toMatch(/90\.\d %/);
    // n = 2 .. 3 × 86, every integer: 257 rows and the header.
    await expect(table.getByRole("row").count()).resolves.toBe(258);
    await screenshot(page, "sample-size-table");
    await chart.getByRole("button", { name: "Show the chart" }).click();
    await expect(canvas.isVisible()).resolves.toBe(true);

    expect(await cspViolations()).toEqual([]);
    expect(errors).toEqual([]);
  });
});
