import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { writeFileSync, mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { launchBrowser, screenshot, signInAs, watchConsole } from "../support/browser.ts";
import { TINY_PNG } from "../support/images.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("the lab's library", () => {
  it("a lead adds a blade with a photo, sees the upload progress, and finds the blade in the filtered table", async () => {
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await signInAs(page, "lead@demo.test");
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Library" }).click();
    await page.waitForURL(/\/blades$/);
    await screenshot(page, "library-blades");
    await page.getByRole("link", { name: "Add a blade" }).click();

    await page.getByLabel("Inventory number").fill("E2E-PHOTO-1");
    await page.getByLabel("Steel designation").fill("AISI 440C");
    await page.getByLabel("Hardness readings").fill("58.5 58.9 58.7");
    await page.getByLabel("Edge angle per side").fill("19");

    // A slow uplink makes the progress visible: 1 MB at about 256 kB/s.
    const cdp = await page.context().newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 20, downloadThroughput: -1, uploadThroughput: 256 * 1024 });
    const dir = mkdtempSync(path.join(os.tmpdir(), "blindcut-photo-"));
    const photo = path.join(dir, "edge.png");
    const bytes = Buffer.alloc(1024 * 1024);
    TINY_PNG.copy(bytes);
    writeFileSync(photo, bytes);
    await page.getByLabel(/Photo of the blade/).setInputFiles(photo);

    const progress = page.getByTestId("upload-progress");
    await progress.waitFor({ state: "visible" });
    const seen = new Set<number>();
    while (await progress.isVisible()) {
      const text = await progress.textContent().catch(() => null);
      if (text) seen.add(Number(text.replace("%", "")));
      await page.waitForTimeout(100);
    }
    expect([...seen].some((p) => p > 0 && p < 100)).toBe(true);
    await page.getByTestId("upload-done").waitFor();
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await screenshot(page, "library-blade-new");

    await page.getByRole("button", { name: "Add the blade" }).click();
    await page.waitForURL(/\/blades\/[0-9a-f-]{36}$/);
    const img = page.getByRole("img", { name: /Photo of blade E2E-PHOTO-1/ });
    await img.waitFor();
    // The photo came back through the app and decoded as an image.
    await expect.poll(() => img.evaluate((el: HTMLImageElement) => el.complete && el.naturalWidth)).toBe(1);
    await screenshot(page, "library-blade");

    await page.goto(`${page.url().replace(/\/blades\/.*$/, "/blades")}`);
    await page.getByLabel("Steel").fill("440C");
    await page.getByRole("button", { name: "Apply" }).click();
    await page.waitForURL(/steel=440C/);
    const rows = page.getByTestId("blades-table").locator("tbody tr");
    await expect.poll(() => rows.count(), { timeout: 5_000 }).toBe(1);
    await expect(rows.first().textContent()).resolves.toContain("E2E-PHOTO-1");
    expect(errors).toEqual([]);
  });
});
