// The lab home by role on the demo lab: what needs doing now, each item a link to where
// it is done; the persistent lab navigation marks where you are; after a client-side
// navigation focus is on the new page's main heading; axe finds nothing serious.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { AxeBuilder } from "@axe-core/playwright";
import { launchBrowser, screenshot, signInAs, watchConsole } from "../support/browser.ts";

const TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"];
let browser: BrowserContext;
let page: Page;
let errors: string[];

beforeAll(async () => {
  browser = await launchBrowser();
  page = await browser.newPage();
  page.setDefaultTimeout(15_000);
  errors = watchConsole(page);
});
afterAll(async () => {
  await browser?.close();
});

async function seriousViolations(name: string) {
  const results = await new AxeBuilder({ page }).withTags(TAGS).analyze();
  return results.violations.filter((v) => v.impact === "serious" || v.impact === "critical").map((v) => `${name}: ${v.id} ${v.help}`);
}

const focusedIsH1 = () => page.evaluate(() => document.activeElement?.tagName === "H1" && document.activeElement.closest("main") !== null);

describe("lab home by role", () => {
  it("the lead sees running studies with progress, lapsed calibration, drafts and the audit trail", async () => {
    await page.setViewportSize({ width: 1280, height: 900 });
    await signInAs(page, "lead@demo.test");
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    const running = page.getByTestId("home-running");
    await running.getByRole("link", { name: "Steel screen S-1 (demo, running)" }).waitFor();
    const progress = running.getByTestId("home-progress").first();
    expect(await progress.getByRole("img").getAttribute("aria-label")).toMatch(/^\d+ done, \d+ in progress, \d+ waiting of \d+ runs$/);
    expect(await running.textContent()).toMatch(/Oldest waiting run: #\d+/);
    const calibration = page.getByTestId("home-calibration");
    expect(await calibration.textContent()).toContain("Card rig 1 (demo)");
    expect(await calibration.locator('[data-state="lapsed"]').count()).toBe(1);
    // The edge-force tester was checked 10 days ago on a 30-day interval: due within 30 days.
    expect(await calibration.locator('[data-state="due_soon"]').count()).toBe(1);
    const drafts = page.getByTestId("home-drafts");
    await drafts.getByRole("link", { name: /Angle trial A-1/ }).waitFor();
    expect(await drafts.textContent()).toMatch(/Still lacks \d+ thing|Ready to randomize/);
    expect(await page.getByTestId("home-audit").locator("li").count()).toBeGreaterThan(0);
    // Each item links to where it is done.
    expect(await running.getByRole("link", { name: "Steel screen S-1 (demo, running)" }).getAttribute("href")).toMatch(/\/studies\/[0-9a-f-]{36}\/progress$/);
    expect(await calibration.getByRole("link", { name: "Card rig 1 (demo)" }).getAttribute("href")).toMatch(/\/instruments\/[0-9a-f-]{36}$/);
    // The lab navigation marks the home as the current page.
    const nav = page.getByRole("navigation", { name: "Lab" });
    expect(await nav.getByRole("link", { name: "Home" }).getAttribute("aria-current")).toBe("page");
    expect(await seriousViolations("lead home")).toEqual([]);
    await screenshot(page, "lead-home");

    // A client-side navigation: the place is marked and focus is on the new h1.
    await nav.getByRole("link", { name: "Library" }).click();
    await page.waitForURL(/\/blades$/);
    await page.getByRole("heading", { level: 1 }).waitFor();
    await expect.poll(focusedIsH1).toBe(true);
    expect(await nav.getByRole("link", { name: "Library" }).getAttribute("aria-current")).toBe("page");
    expect(await nav.getByRole("link", { name: "Home" }).getAttribute("aria-current")).toBeNull();

    // A detail page: the place stays marked (as a location) and a breadcrumb trail leads back.
    await page.goto(`${new URL(page.url()).origin}${new URL(page.url()).pathname.replace(/\/blades$/, "")}`);
    await page.getByTestId("home-calibration").getByRole("link", { name: "Card rig 1 (demo)" }).click();
    await page.waitForURL(/\/instruments\/[0-9a-f-]{36}$/);
    await expect.poll(focusedIsH1).toBe(true);
    expect(await nav.getByRole("link", { name: "Library" }).getAttribute("aria-current")).toBe("location");
    const trail = page.getByRole("navigation", { name: "Breadcrumb" });
    expect(await trail.textContent()).toContain("Instruments");
    expect(await trail.locator('[aria-current="page"]').textContent()).toBe("Card rig 1 (demo)");
    expect(await seriousViolations("instrument with breadcrumbs")).toEqual([]);
  });

  it("a tester sees the next run as one button and the runs waiting, and no lab-management place", async () => {
    await signInAs(page, "tester@demo.test");
    const base = inject("baseUrl");
    await page.goto(`${base}/labs?all`);
    await page.getByRole("link", { name: "Demo Edge Lab (invented)" }).first().click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    const runs = page.getByTestId("home-my-runs");
    const next = runs.getByTestId("home-next-run");
    await next.waitFor();
    expect(await next.getByRole("link").count()).toBe(1);
    expect(await next.getByRole("link").textContent()).toMatch(/^Start the next run: [0-9A-Z]{3,}-/);
    expect(await runs.locator('[data-kind="run"]').count()).toBeGreaterThan(0);
    const nav = page.getByRole("navigation", { name: "Lab" });
    expect(await nav.getByRole("link").allTextContents()).toEqual(["Home", "My runs", "Protocols"]);
    expect(await page.getByTestId("home-running").count()).toBe(0);
    expect(await page.getByTestId("home-calibration").count()).toBe(0);
    expect(await seriousViolations("tester home")).toEqual([]);
    await next.getByRole("link").click();
    await page.waitForURL(/\/bench\/runs\/[0-9a-f-]{36}$/);
    await expect.poll(focusedIsH1).toBe(true);
  });

  it("an analyst sees closed studies waiting for analysis and those recently unblinded", async () => {
    await signInAs(page, "analyst@demo.test");
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    const waiting = page.getByTestId("home-awaiting-analysis");
    await waiting.getByRole("link", { name: "Finish trial F-1 (demo)" }).waitFor();
    expect(await waiting.getByRole("link", { name: "Finish trial F-1 (demo)" }).getAttribute("href")).toMatch(/\/results$/);
    const unblinded = page.getByTestId("home-unblinded");
    await unblinded.getByRole("link", { name: /Temper trial T-1/ }).waitFor();
    const nav = page.getByRole("navigation", { name: "Lab" });
    expect(await nav.getByRole("link").allTextContents()).toEqual(["Home", "Results", "Quality", "Protocols"]);
    expect(await seriousViolations("analyst home")).toEqual([]);
    await nav.getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/results$/);
    await expect.poll(focusedIsH1).toBe(true);
    expect(errors).toEqual([]);
  });
});
