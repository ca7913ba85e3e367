// Layouts: the bench's queue and a run's setup and entry screens at tablet size (both
// ways) and phone size scroll only vertically and keep every target at least 44 px; the
// results and the report fit a desktop width (wide tables scroll in their own box) and
// the report fits an A4 page when printed. The entry screen's own sizes are checked in
// bench.test.ts; this file covers the rest of the bench.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { launchBrowser, screenshot, watchConsole } from "../support/browser.ts";
import { closeDemoBenchDb, createDemoBenchStudy, signInAs, startRunAsTester, type DemoBenchStudy } from "../support/demo-bench-study.ts";

const SIZES = [
  [1024, 768],
  [768, 1024],
  [390, 844],
] as const;

let browser: BrowserContext;
let page: Page;
let errors: string[];
let bench: DemoBenchStudy;

beforeAll(async () => {
  bench = await createDemoBenchStudy("Layout check");
  browser = await launchBrowser();
  page = await browser.newPage();
  page.setDefaultTimeout(15_000);
  errors = watchConsole(page);
});
afterAll(async () => {
  await browser?.close();
  await closeDemoBenchDb();
});

const overflow = (p: Page) => p.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);

/**
 * Visible interactive targets smaller than 44 × 44 px. A checkbox or radio counts by its
 * label (the label is the target); a link inside a sentence is exempt, as WCAG's target
 * size rule allows, since its size is the text's.
 */
function smallTargets(p: Page) {
  return p.evaluate(() => {
    const small: string[] = [];
    for (const el of document.querySelectorAll<HTMLElement>("a[href], button, input:not([type=hidden]), select, textarea, summary")) {
      if (!el.checkVisibility({ visibilityProperty: true, contentVisibilityAuto: true })) continue;
      let target: Element = el;
      if (el instanceof HTMLInputElement && (el.type === "checkbox" || el.type === "radio")) target = el.closest("label") ?? el;
      const r = target.getBoundingClientRect();
      if (r.width <= 1 || r.height <= 1) continue; // visually hidden (a skip link until focused)
      if (el.tagName === "A" && getComputedStyle(el).display === "inline") {
        const parent = el.parentElement!;
        const own = (el.textContent ?? "").trim().length;
        if ((parent.textContent ?? "").trim().length > own + 3) continue;
      }
      if (r.height < 44 || r.width < 44) small.push(`${el.tagName.toLowerCase()} "${(el.textContent || el.getAttribute("aria-label") || el.getAttribute("name") || "").trim().slice(0, 40)}" ${Math.round(r.width)}×${Math.round(r.height)}`);
    }
    return small;
  });
}

async function checkSizes(name: string) {
  for (const [width, height] of SIZES) {
    await page.setViewportSize({ width, height });
    await page.waitForTimeout(150);
    expect(await overflow(page), `${name}: horizontal overflow at ${width}×${height}`).toBeLessThanOrEqual(0);
    expect(await smallTargets(page), `${name}: targets under 44 px at ${width}×${height}`).toEqual([]);
    await screenshot(page, `layout-${name}-${width}x${height}`);
  }
}

describe("layouts", () => {
  it("the bench queue and a run's setup fit tablets and phones, with 44 px targets", async () => {
    await signInAs(page, "tester@demo.test");
    await page.goto(`${inject("baseUrl")}/bench`);
    await page.getByTestId("queue-study").filter({ hasText: bench.shortName }).waitFor();
    await checkSizes("bench-queue");

    // Out of order, so the reason field shows as well.
    await page.goto(`${inject("baseUrl")}/labs/${bench.labId}/bench/runs/${bench.runIds[1]}`);
    await page.getByRole("button", { name: "Start the run" }).waitFor();
    await page.getByText("This is not your next run in the schedule.").waitFor();
    await checkSizes("bench-setup");
  });

  it("a run in progress, with a correction and the bench tools open, fits tablets and phones", async () => {
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(`${inject("baseUrl")}/labs/${bench.labId}/bench/runs/${bench.runIds[0]}`);
    await startRunAsTester(page, bench.codes.get(bench.runIds[0])!);
    await page.locator("#reading-value").fill("150");
    await page.locator("#reading-value").press("Enter");
    await expect.poll(() => page.locator('[data-testid="reading-line"][data-status="saved"]').count()).toBe(1);
    await page.getByRole("button", { name: "Correct" }).click();
    await page.getByLabel(/Corrected value/).waitFor();
    for (const summary of await page.locator("details > summary").all()) await summary.click();
    await checkSizes("bench-run-open");
    expect(errors).toEqual([]);
  });

  it("the results and the report fit a desktop width, and the report an A4 page in print", async () => {
    await page.setViewportSize({ width: 1280, height: 900 });
    await signInAs(page, "analyst@demo.test");
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/results$/);
    await page.getByRole("link", { name: /Temper trial T-1/ }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/results$/);
    const charts = page.locator("[data-chart-state]");
    await expect.poll(() => charts.count()).toBeGreaterThan(0);
    await expect.poll(() => charts.evaluateAll((els) => els.every((e) => e.getAttribute("data-chart-state") === "ready")), { timeout: 30_000 }).toBe(true);
    expect(await overflow(page), "results: horizontal overflow at 1280 px").toBeLessThanOrEqual(0);
    // Every chart is drawn inside the page's width.
    const widest = await charts.evaluateAll((els) => Math.max(...els.map((e) => e.getBoundingClientRect().right)));
    expect(widest).toBeLessThanOrEqual(1280);
    await screenshot(page, "layout-results-1280");

    await page.getByRole("link", { name: "Study report (print)" }).click();
    await page.waitForURL(/\/report$/);
    await page.getByRole("heading", { level: 1 }).waitFor();
    expect(await overflow(page), "report: horizontal overflow at 1280 px").toBeLessThanOrEqual(0);
    await screenshot(page, "layout-report-1280");

    // Printed on A4 (210 mm at 96 dpi, less the page margins): no overflow, no app chrome.
    await page.emulateMedia({ media: "print" });
    await page.setViewportSize({ width: 794 - 2 * 53, height: 1123 });
    await page.waitForTimeout(150);
    expect(await overflow(page), "report: horizontal overflow printed on A4").toBeLessThanOrEqual(0);
    expect(await page.locator('nav[aria-label="Main"]').isVisible()).toBe(false);
    expect(await page.getByRole("button", { name: "Print or save as PDF" }).isVisible()).toBe(false);
    await page.emulateMedia({ media: "screen" });
    expect(errors).toEqual([]);
  });
});
