// The bench in Chromium: a tester signs in, opens the next run, enters the code, ticks
// the lists, records readings until the app ends the run; then, with the readings API
// cut for a moment, a reading shows as not saved and is saved once the network is back.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { launchBrowser, screenshot, watchConsole } from "../support/browser.ts";
import { closeDemoBenchDb, createDemoBenchStudy, readingCount, signInAs } from "../support/demo-bench-study.ts";

let browser: BrowserContext;
let study: { shortName: string; codes: Map<string, string>; runIds: string[]; labId: string };
const readingsOf = readingCount;

beforeAll(async () => {
  study = await createDemoBenchStudy("Bench check", { cap: 3, question: "Does the bench save every reading?" });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await closeDemoBenchDb();
});

async function openNextRun(page: Page) {
  await page.goto(`${inject("baseUrl")}/bench`);
  const section = page.getByTestId("queue-study").filter({ hasText: study.shortName });
  await section.waitFor();
  await section.locator('[data-testid="queue-run"][data-next="yes"]').click();
  await page.waitForURL(/\/bench\/runs\/[0-9a-f-]{36}$/);
  await page.getByTestId("run-code").waitFor();
  return page.url().split("/").pop()!;
}

async function startRun(page: Page, runId: string) {
  const code = study.codes.get(runId)!;
  const codeInput = page.getByLabel("1. Blind code on the blade's label");
  // A mistyped check character is refused at once, before anything is sent.
  const last = code[code.length - 1];
  await codeInput.fill(code.slice(0, -1) + (last === "A" ? "B" : "A"));
  await expect.poll(() => page.getByTestId("code-error").textContent()).toContain("The last character does not match");
  await codeInput.fill(code.toLowerCase());
  await page.getByTestId("code-ok").waitFor();
  for (const box of await page.locator('input[type="checkbox"]').all()) await box.check();
  await page.getByLabel("Media lot").selectOption({ index: 1 });
  await page.getByLabel("Instrument").selectOption({ index: 1 });
  await page.getByLabel(/Room temperature/).fill("21");
  await page.getByLabel(/Relative humidity/).fill("45");
  await page.getByRole("button", { name: "Start the run" }).click();
  await page.getByTestId("entry-label").waitFor();
}

/** Types a value and presses Enter, then waits for the entry to move on. */
async function enter(page: Page, value: string) {
  const label = page.getByTestId("entry-label");
  const before = await label.textContent();
  await page.locator("#reading-value").fill(value);
  await page.locator("#reading-value").press("Enter");
  await expect.poll(async () => ((await label.count()) ? await label.textContent() : "(gone)"), { timeout: 10_000 }).not.toBe(before);
}

describe("the bench", () => {
  it("a tester records a run until the app ends it, and a reading cut off from the network is saved once it is back", async () => {
    const page = await browser.newPage();
    page.setDefaultTimeout(15_000);
    const errors = watchConsole(page);
    await signInAs(page, "tester@demo.test");
    await page.getByRole("link", { name: "My runs" }).first().click();
    await page.waitForURL(/\/bench$/);
    await page.getByTestId("queue-study").filter({ hasText: study.shortName }).waitFor();
    await screenshot(page, "bench-queue");

    const first = await openNextRun(page);
    expect(first).toBe(study.runIds[0]);
    await screenshot(page, "bench-setup");
    await startRun(page, first);

    // Baseline, then one check per cut: below, then over the threshold, then the confirmation.
    const plan: [RegExp, string][] = [
      [/^Baseline · heel/, "150"],
      [/^Baseline · tip/, "160"],
      [/^Cut 1 · heel/, "300"],
      [/^Cut 1 · tip/, "310"],
      [/^Cut 2 · heel/, "420"],
      [/^Cut 2 · tip/, "440"],
    ];
    for (const [label, value] of plan) {
      await expect.poll(() => page.getByTestId("entry-label").textContent()).toMatch(label);
      await enter(page, value);
    }
    await expect.poll(() => page.getByTestId("entry-label").textContent()).toMatch(/^Confirmation at a fresh spot · cut 2/);
    await page.getByTestId("server-decision").filter({ hasText: "take one confirmation reading" }).waitFor();
    await screenshot(page, "bench-confirmation");
    await page.locator("#reading-value").fill("435");
    await page.locator("#reading-value").press("Enter");
    const decision = page.getByTestId("server-decision");
    await expect.poll(() => decision.getAttribute("data-state"), { timeout: 15_000 }).toBe("ended_threshold");
    await expect.poll(() => decision.textContent()).toContain("Ended at threshold at cut 2");
    await expect.poll(() => page.locator('[data-testid="reading-line"][data-status="saved"]').count()).toBe(7);
    expect(await readingsOf(first)).toBe(7);
    expect(await page.locator("#reading-value").count()).toBe(0);
    await page.getByTestId("run-curve").waitFor();
    await screenshot(page, "bench-ended");

    // The next run: the readings API is cut for a moment.
    const second = await openNextRun(page);
    expect(second).toBe(study.runIds[1]);
    await startRun(page, second);
    await page.route("**/api/runs/**", (route) => route.abort());
    await page.locator("#reading-value").fill("151");
    await page.locator("#reading-value").press("Enter");
    const line = page.locator('[data-testid="reading-line"][data-position="heel"]');
    await expect.poll(() => line.getAttribute("data-status")).toMatch(/^(pending|failed)$/);
    await expect.poll(() => line.getByTestId("reading-status").textContent()).toMatch(/Not saved yet|Saving/);
    await screenshot(page, "bench-offline");
    // It survives a reload while the network is still down.
    await page.reload();
    await page.getByTestId("entry-label").waitFor();
    await expect.poll(() => page.locator('[data-testid="reading-line"][data-position="heel"]').getAttribute("data-status")).toMatch(/^(pending|failed)$/);
    expect(await readingsOf(second)).toBe(0);
    await page.unroute("**/api/runs/**");
    await expect.poll(() => page.locator('[data-testid="reading-line"][data-position="heel"]').getAttribute("data-status"), { timeout: 40_000 }).toBe("saved");
    expect(await readingsOf(second)).toBe(1);
    await expect.poll(() => page.getByTestId("entry-label").textContent()).toMatch(/^Baseline · tip/);

    // Tablet both ways and phone: no horizontal scrolling, targets of at least 44 px.
    for (const [width, height] of [[1024, 768], [768, 1024], [390, 844]]) {
      await page.setViewportSize({ width, height });
      await page.waitForTimeout(150);
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow, `horizontal overflow at ${width}×${height}`).toBeLessThanOrEqual(0);
      for (const target of [page.locator("#reading-value"), page.getByRole("button", { name: "Save", exact: true })]) {
        const box = await target.boundingBox();
        expect(box!.height).toBeGreaterThanOrEqual(44);
      }
      await screenshot(page, `bench-run-${width}x${height}`);
    }
    // The cautions are on screen, with the lab's own rules first.
    await page.getByText("Your lab's own safety rules and local regulations come first").waitFor();
    expect(errors.filter((e) => !/Failed to load resource|ERR_FAILED|net::/.test(e))).toEqual([]);
  });
});
