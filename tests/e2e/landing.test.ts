import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext } from "playwright-core";
import { launchBrowser, screenshot, watchConsole } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("landing page", () => {
  it("renders with the app's own font and styles and no console error", async () => {
    const page = await browser.newPage();
    const errors = watchConsole(page);
    const fontResponses: string[] = [];
    page.on("response", (res) => {
      if (res.url().endsWith(".woff2") && res.ok()) fontResponses.push(res.url());
    });
    const baseUrl = inject("baseUrl");
    await page.goto(baseUrl, { waitUntil: "networkidle" });
    await page.getByRole("heading", { level: 1, name: /Edge retention/ }).waitFor();
    // The font comes from the app's own build, never from elsewhere.
    expect(fontResponses.length).toBeGreaterThan(0);
    for (const url of fontResponses) expect(url.startsWith(baseUrl)).toBe(true);
    const fontFamily = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
    expect(fontFamily).toContain("Atkinson Hyperlegible");
    expect(await page.evaluate(() => document.fonts.check('16px "Atkinson Hyperlegible"'))).toBe(true);
    await screenshot(page, "landing");
    expect(errors).toEqual([]);
  });

  it("sends security headers on pages and static files", async () => {
    const baseUrl = inject("baseUrl");
    const page = await fetch(baseUrl);
    const csp = page.headers.get("content-security-policy") ?? "";
    expect(csp).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+'/);
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).not.toContain("unsafe-eval");
    expect(page.headers.get("x-content-type-options")).toBe("nosniff");
    const html = await page.text();
    const asset = html.match(/\/assets\/[^"]+\.js/)?.[0];
    expect(asset).toBeTruthy();
    const staticFile = await fetch(baseUrl + asset);
    expect(staticFile.status).toBe(200);
    expect(staticFile.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
    expect(staticFile.headers.get("x-content-type-options")).toBe("nosniff");
  });
});
