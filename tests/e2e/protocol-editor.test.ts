import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { launchBrowser, screenshot, watchConsole } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const stepRows = (page: Page) => page.locator('[data-list="steps"] > li');
const abrasives = (page: Page) => stepRows(page).evaluateAll((rows) => rows.map((r) => (r.querySelector('input[type="text"]') as HTMLInputElement).value));

describe("protocol editor", () => {
  it("a lead reorders two sharpening steps with the keyboard, saves, and the order holds after reload", async () => {
    const baseUrl = inject("baseUrl");
    await browser.clearCookies();
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail").fill("lead@demo.test");
    await page.getByLabel("Password").fill("blindcut-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);

    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Protocols" }).click();
    await page.waitForURL(/\/protocols$/);
    // The demo lab's published protocols are listed.
    await page.getByRole("link", { name: "Hand rope test (demo)" }).waitFor();
    await page.getByRole("link", { name: "New protocol" }).click();
    await page.waitForURL(/\/protocols\/new$/);
    const name = `Keyboard reorder ${Date.now()}`;
    await page.getByLabel("Name").fill(name);
    await page.getByLabel(/Hand rope test with an edge-force tester/).check();
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/protocols\/[0-9a-f-]{36}\/versions\/1$/);
    const editorUrl = page.url();

    await expect.poll(() => abrasives(page)).toEqual(["Coarse bench stone", "Fine bench stone", "Plain leather strop"]);

    // Drag and drop by keyboard: focus the handle, Space picks up, ArrowDown moves, Space drops.
    const handle = page.getByRole("button", { name: /^Drag step 1:/ });
    await handle.focus();
    await page.keyboard.press("Space");
    await expect.poll(() => page.locator('[data-list="steps"] > li[data-dragging="true"]').count()).toBe(1);
    const heard = () => page.locator('[id^="DndLiveRegion"]').allTextContents().then((t) => t.join(" "));
    // The keyboard sensor listens for arrows only from a moment after the pick-up (it attaches its
    // listener in a timeout), so an arrow pressed in that moment is lost: press again until the
    // board says the step moved. A lost press moves nothing, so this never overshoots.
    for (let tries = 0; tries < 5 && !/is over position 2 of 3/.test(await heard()); tries++) {
      await page.keyboard.press("ArrowDown");
      for (let wait = 0; wait < 20 && !/is over position 2 of 3/.test(await heard()); wait++) await page.waitForTimeout(100);
    }
    // Drop only once the board says the step is over position 2, as a screen-reader user would.
    await expect.poll(heard, { timeout: 10_000 }).toMatch(/is over position 2 of 3/);
    await page.keyboard.press("Space");
    await page.waitForFunction(() => document.querySelectorAll('[data-list="steps"] > li[data-dragging="true"]').length === 0);

    await expect.poll(() => abrasives(page)).toEqual(["Fine bench stone", "Coarse bench stone", "Plain leather strop"]);
    // The screen reader heard where the step went (dnd-kit's live region).
    const announced = await page.locator('[id^="DndLiveRegion"]').allTextContents();
    expect(announced.join(" ")).toContain("dropped at position 2 of 3");
    await screenshot(page, "protocol-editor-reordered");

    await page.getByRole("button", { name: "Save draft" }).click();
    await page.getByRole("status").filter({ hasText: "Draft saved" }).first().waitFor();

    await page.goto(editorUrl);
    await expect.poll(() => abrasives(page)).toEqual(["Fine bench stone", "Coarse bench stone", "Plain leather strop"]);

    // The plain buttons do the same, without dragging.
    await page.getByRole("button", { name: /^Move step 3 up:/ }).click();
    await expect.poll(() => abrasives(page)).toEqual(["Fine bench stone", "Plain leather strop", "Coarse bench stone"]);

    // A user's mistake comes back beside the field, with what was typed kept.
    const threshold = page.getByLabel(/^▲?Threshold/);
    await threshold.fill("2500");
    await page.getByRole("button", { name: "Save draft" }).click();
    await page.getByText(/must be below the sharpness tester's maximum reading/).first().waitFor();
    await expect(threshold.inputValue()).resolves.toBe("2500");
    await expect(threshold.getAttribute("aria-invalid")).resolves.toBe("true");
    await screenshot(page, "protocol-editor-error");

    await page.goto(editorUrl);
    await expect.poll(() => abrasives(page)).toEqual(["Fine bench stone", "Coarse bench stone", "Plain leather strop"]);
    // The refused save answers 400 on purpose; the browser logs that response, nothing else may appear.
    expect(errors.filter((e) => !/status of 400 \(Bad Request\)/.test(e))).toEqual([]);
    expect(errors.length).toBeLessThanOrEqual(1);
  });

  it("a tester reads a published protocol's bench page with the safety cautions", async () => {
    const baseUrl = inject("baseUrl");
    await browser.clearCookies();
    const page = await browser.newPage();
    const errors = watchConsole(page);
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail").fill("tester@demo.test");
    await page.getByLabel("Password").fill("blindcut-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Protocols" }).click();
    await page.waitForURL(/\/protocols$/);
    await page.getByRole("link", { name: "Hand rope test (demo)" }).waitFor();
    await expect(page.getByText("demo draft").count()).resolves.toBe(0);
    await page.getByRole("link", { name: "Hand rope test (demo)" }).click();
    await page.getByRole("link", { name: "Bench page" }).first().click();
    await page.waitForURL(/\/print$/);
    await page.getByText("Cut-resistant gloves").first().waitFor();
    const text = await page.locator("main").innerText();
    expect(text).toContain("Cut-resistant gloves");
    expect(text).toContain("local regulations come first");
    expect(text).toContain("400 gf");
    await screenshot(page, "protocol-bench-page");
    expect(errors).toEqual([]);
  });
});
