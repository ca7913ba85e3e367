// Debian's Chromium driven by playwright-core, with a fresh profile per test file.
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { inject } from "vitest";
import { mkdirSync, mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";

export const screenshotDir = path.resolve(import.meta.dirname, "../../test-results/screenshots");

export async function launchBrowser(): Promise<BrowserContext> {
  const profile = mkdtempSync(path.join(os.tmpdir(), "blindcut-chromium-"));
  return chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    viewport: { width: 1280, height: 900 },
    args: [
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--disable-dev-shm-usage",
    ],
  });
}

/** Collects console errors and failed page errors so a test can assert there were none. */
export function watchConsole(page: Page) {
  const errors: string[] = [];
  page.on("console", (msg) => {
    if (msg.type() === "error") errors.push(msg.text());
  });
  page.on("pageerror", (err) => errors.push(err.message));
  return errors;
}

export async function screenshot(page: Page, name: string) {
  mkdirSync(screenshotDir, { recursive: true });
  await page.screenshot({ path: path.join(screenshotDir, `${name}.png`), fullPage: true });
}

/** Signs in through the form, from a clean cookie jar. */
export async function signInAs(page: Page, email: string, password = "blindcut-demo") {
  await page.context().clearCookies();
  await page.goto(`${inject("baseUrl")}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
  await page.getByTestId("account-area").getByRole("button", { name: "Sign out" }).waitFor();
}
