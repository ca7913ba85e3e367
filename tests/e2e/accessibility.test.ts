// Accessibility in Chromium: an axe scan (WCAG 2.0 and 2.1, levels A and AA) of every
// main page, as the demo account that can open it, must find no serious or critical
// violation; every form field has a label that is on screen; focus is visible; every
// chart offers its table; the sign-in form works by keyboard alone.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { AxeBuilder } from "@axe-core/playwright";
import { launchBrowser, screenshot } from "../support/browser.ts";
import { closeDemoBenchDb, createDemoBenchStudy, signInAs, startRunAsTester, type DemoBenchStudy } from "../support/demo-bench-study.ts";

const TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"];

let browser: BrowserContext;
let page: Page;
let bench: DemoBenchStudy;
let labUrl = "";
const scanned: string[] = [];
const problems: string[] = [];

beforeAll(async () => {
  bench = await createDemoBenchStudy("Access check");
  browser = await launchBrowser();
  page = await browser.newPage();
  page.setDefaultTimeout(15_000);
});
afterAll(async () => {
  await browser?.close();
  await closeDemoBenchDb();
});

/**
 * Runs axe on the page as it is now and records serious and critical violations, then
 * checks that every visible form field has a label a sighted user can see.
 */
async function scan(name: string) {
  await page.getByRole("heading", { level: 1 }).first().waitFor();
  const results = await new AxeBuilder({ page }).withTags(TAGS).analyze();
  scanned.push(name);
  for (const v of results.violations.filter((x) => x.impact === "serious" || x.impact === "critical")) {
    problems.push(`${name}: ${v.id} (${v.impact}) ${v.help} at ${v.nodes.slice(0, 3).map((n) => `${n.target.join(" ")} (${n.failureSummary?.split("\n")[1]?.trim() ?? ""})`).join(" | ")}`);
  }
  for (const field of await unlabelledFields(page)) problems.push(`${name}: field without a visible label: ${field}`);
}

/**
 * Visible inputs, selects and text areas whose label is missing or not on screen. A
 * field inside a table cell may take its visible name from its column header (its
 * hidden label repeats the row's name for screen readers).
 */
function unlabelledFields(p: Page) {
  return p.evaluate(() => {
    const shown = (el: Element) => {
      const r = el.getBoundingClientRect();
      const s = getComputedStyle(el);
      return r.width > 2 && r.height > 2 && s.visibility !== "hidden" && s.clip !== "rect(0px, 0px, 0px, 0px)" && !(s.clipPath && s.clipPath.includes("inset(50%)"));
    };
    const bad: string[] = [];
    for (const el of document.querySelectorAll<HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement>("input, select, textarea")) {
      if (el instanceof HTMLInputElement && ["hidden", "submit", "button", "reset", "image"].includes(el.type)) continue;
      // A visually hidden file input styled behind its label, or a field not on screen, is not checked.
      if (!shown(el) && !(el instanceof HTMLInputElement && (el.type === "checkbox" || el.type === "radio"))) continue;
      const labels = [...(el.labels ?? [])];
      const byId = (el.getAttribute("aria-labelledby") ?? "").split(/\s+/).filter(Boolean).map((id) => document.getElementById(id)).filter((x): x is HTMLElement => !!x);
      const visibleLabel = [...labels, ...byId].some((l) => shown(l) && (l.textContent ?? "").trim().length > 0);
      const cell = el.closest("td");
      const header = cell ? cell.closest("table")?.querySelectorAll("thead th")[cell.cellIndex] : null;
      const columnHeader = !!header && shown(header) && (header.textContent ?? "").trim().length > 0 && labels.length > 0;
      if (!visibleLabel && !columnHeader) bad.push(el.outerHTML.slice(0, 160));
    }
    return bad;
  });
}

async function go(path: string) {
  await page.goto(`${inject("baseUrl")}${path}`);
}

/** Opens a study of the demo lab from the studies list and returns its base path. */
async function studyPath(name: string) {
  await go(`${labUrl}/studies`);
  await page.getByRole("link", { name }).click();
  await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
  await page.getByRole("heading", { level: 1 }).waitFor();
  return new URL(page.url()).pathname;
}

async function waitForCharts() {
  const charts = page.locator("[data-chart-state]");
  await expect.poll(() => charts.count(), { timeout: 20_000 }).toBeGreaterThan(0);
  await expect.poll(() => charts.evaluateAll((els) => els.every((e) => e.getAttribute("data-chart-state") === "ready")), { timeout: 30_000 }).toBe(true);
  return charts;
}

describe("accessibility", () => {
  it("signed out: the landing page, sign-in and sign-up", async () => {
    await go("/");
    await scan("landing");
    await go("/sign-in");
    await scan("sign-in");
    await go("/sign-up");
    await scan("sign-up");
  });

  it("the owner's pages: lab home, members, invitations, settings", async () => {
    await signInAs(page, "owner@demo.test");
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    labUrl = new URL(page.url()).pathname;
    await scan("lab home");
    await go(`${labUrl}/members`);
    await scan("members");
    await go(`${labUrl}/invitations`);
    await scan("invitations");
    await go(`${labUrl}/settings`);
    await scan("lab settings");
    // A zone that is not IANA is refused at the form, the message tied to the field.
    await page.getByLabel("Time zone").fill("Mars/Olympus_Mons");
    await page.getByRole("button", { name: "Save the settings" }).click();
    await page.getByText("is not an IANA time zone").waitFor();
    expect(await page.getByLabel("Time zone").getAttribute("aria-invalid")).toBe("true");
    await scan("lab settings, refused zone");
  });

  it("the lead's pages: library, protocols, studies and their designer, labels, progress, audit, planning", async () => {
    await signInAs(page, "lead@demo.test");
    await go(`${labUrl}/blades`);
    await page.getByTestId("blades-table").waitFor();
    await scan("blades table");
    await page.getByTestId("blades-table").locator("tbody tr a").first().click();
    await page.waitForURL(/\/blades\/[0-9a-f-]{36}$/);
    await scan("blade page");
    await go(`${labUrl}/blades/new`);
    await scan("blade form");
    await go(`${labUrl}/blades/import`);
    await scan("blade import");
    await go(`${labUrl}/media`);
    await scan("media");
    await page.getByRole("link", { name: "Manila rope 12 mm (demo)" }).click();
    await page.waitForURL(/\/media\/[0-9a-f-]{36}$/);
    await scan("medium and its lots");
    await go(`${labUrl}/instruments`);
    await scan("instruments");
    await page.getByTestId("instruments-table").locator("tbody tr a").first().click();
    await page.waitForURL(/\/instruments\/[0-9a-f-]{36}$/);
    await scan("instrument and its calibration");

    await go(`${labUrl}/protocols`);
    await scan("protocols list");
    await page.getByRole("link", { name: /demo draft/ }).click();
    await page.waitForURL(/\/protocols\/[0-9a-f-]{36}$/);
    await scan("protocol page");
    await page.locator('a[href*="/versions/"]:not([href$="/print"])').first().click();
    await page.waitForURL(/\/versions\/\d+$/);
    await page.getByRole("button", { name: "Save draft" }).waitFor();
    await scan("protocol editor");
    await go(`${labUrl}/protocols`);
    await page.getByRole("link", { name: "Hand rope test (demo)" }).click();
    await page.getByRole("link", { name: "Bench page" }).first().click();
    await page.waitForURL(/\/print$/);
    await scan("protocol bench page");
    await go(`${labUrl}/protocols/new`);
    await scan("new protocol");

    await go(`${labUrl}/studies`);
    await scan("study list");
    await go(`${labUrl}/studies/new`);
    await scan("new study");
    const draft = await studyPath("Angle trial A-1 (demo draft)");
    await scan("study page (draft)");
    for (const step of ["question", "protocol", "outcomes", "arms", "blades", "analysis", "people", "randomization"]) {
      await go(`${draft}/design/${step}`);
      await page.getByRole("button", { name: /Save and continue|Save the table/ }).or(page.getByRole("link", { name: "Continue →" })).first().waitFor();
      await scan(`designer step: ${step}`);
    }
    await go(`${draft}/randomize`);
    await page.getByLabel("Seed").waitFor();
    await scan("randomize (review)");

    const randomized = await studyPath("Temper repeat T-2 (demo, randomized)");
    await go(`${randomized}/randomize`);
    await page.getByTestId("schedule").waitFor();
    await scan("randomize (schedule preview)");
    await go(`${randomized}/labels`);
    await page.getByTestId("labels").waitFor();
    await scan("label sheet");
    await go(`${randomized}/start`);
    await scan("start the study");

    await go(`${labUrl}/studies/${bench.studyId}/progress`);
    await scan("progress");
    await go(`${labUrl}/audit`);
    await scan("audit log");
    await go(`${labUrl}/planning/sample-size?design=two-sample&unit=cuts&sd=20&difference=10&alpha=0.05&power=0.9`);
    await waitForCharts();
    await scan("sample-size planner");

    const finish = await studyPath("Finish trial F-1 (demo)");
    await go(`${finish}/results/unblind`);
    await scan("unblind confirmation");
  });

  it("the tester's bench: the queue, a run's setup and a run in progress", async () => {
    await signInAs(page, "tester@demo.test");
    await go("/bench");
    await page.getByTestId("queue-study").filter({ hasText: bench.shortName }).waitFor();
    await scan("bench queue");
    await go(`${labUrl}/bench/runs/${bench.runIds[1]}`);
    await page.getByRole("button", { name: "Start the run" }).waitFor();
    // Out of order: the deviation reason field is on screen too.
    await page.getByText("This is not your next run in the schedule.").waitFor();
    await scan("bench run: setup");
    await go(`${labUrl}/bench/runs/${bench.runIds[0]}`);
    await startRunAsTester(page, bench.codes.get(bench.runIds[0])!);
    for (const value of ["150", "160"]) {
      const before = await page.getByTestId("entry-label").textContent();
      await page.locator("#reading-value").fill(value);
      await page.locator("#reading-value").press("Enter");
      await expect.poll(() => page.getByTestId("entry-label").textContent()).not.toBe(before);
    }
    await expect.poll(() => page.locator('[data-testid="reading-line"][data-status="saved"]').count()).toBe(2);
    await page.getByRole("button", { name: "Correct" }).first().click();
    await page.getByLabel(/Corrected value/).waitFor();
    await scan("bench run: readings, with a correction open");
    await go(`${labUrl}/protocols`);
    await scan("protocols list (tester)");
  });

  it("the analyst's results with their charts, and the report", async () => {
    await signInAs(page, "analyst@demo.test");
    await go(`${labUrl}/results`);
    await scan("results list");
    await page.getByRole("link", { name: /Temper trial T-1/ }).click();
    await page.waitForURL(/\/results$/);
    const charts = await waitForCharts();
    await expect.poll(() => charts.locator("svg").count()).toBeGreaterThan(0);
    await scan("results (with charts)");
    // Every chart has its table alternative, and the table shows numbers.
    const n = await charts.count();
    expect(n).toBeGreaterThanOrEqual(2);
    for (let i = 0; i < n; i++) {
      const chart = charts.nth(i);
      const toggle = chart.getByRole("button", { name: "Show the numbers as a table" });
      expect(await toggle.count(), `chart ${i + 1} has its table button`).toBe(1);
      await toggle.click();
      await expect.poll(() => chart.locator("table tbody tr").count()).toBeGreaterThan(0);
    }
    await scan("results (charts as tables)");
    await page.goto(page.url().replace(/\/results$/, "/report"));
    await scan("report");
  });

  it("focus is visible: tabbing to a control draws the app's outline", async () => {
    await page.context().clearCookies();
    await go("/sign-in");
    await page.getByLabel("E-mail").waitFor();
    const seen: { tag: string; style: string; width: number }[] = [];
    for (let i = 0; i < 12; i++) {
      await page.keyboard.press("Tab");
      const f = await page.evaluate(() => {
        const el = document.activeElement as HTMLElement | null;
        if (!el || el === document.body) return null;
        const s = getComputedStyle(el);
        return { tag: `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""}:${el.textContent?.trim().slice(0, 20) ?? ""}`, style: s.outlineStyle, width: parseFloat(s.outlineWidth), focusVisible: el.matches(":focus-visible") };
      });
      if (!f) continue;
      expect(f.focusVisible, `${f.tag} matches :focus-visible after Tab`).toBe(true);
      seen.push(f);
    }
    expect(seen.length).toBeGreaterThanOrEqual(5);
    for (const f of seen) {
      expect(f.style, `${f.tag} has an outline when focused`).toBe("solid");
      expect(f.width, `${f.tag} outline width`).toBeGreaterThanOrEqual(2);
    }
    // The input's outline is the ink colour of the design tokens.
    await page.getByLabel("E-mail").focus();
    await page.keyboard.press("Shift+Tab");
    await page.keyboard.press("Tab");
    const colour = await page.getByLabel("E-mail").evaluate((el) => getComputedStyle(el).outlineColor);
    expect(colour).toBe("rgb(31, 78, 107)");
    await screenshot(page, "accessibility-focus");
  });

  it("keyboard only: signing in with Tab, typing and Enter", async () => {
    await page.context().clearCookies();
    await go("/sign-in");
    await page.getByLabel("E-mail").waitFor();
    // From the top of the page: Tab until the e-mail field has focus, as a keyboard user would.
    let tabs = 0;
    while (!(await page.getByLabel("E-mail").evaluate((el) => el === document.activeElement))) {
      await page.keyboard.press("Tab");
      tabs += 1;
      expect(tabs, "the e-mail field is reachable by Tab").toBeLessThan(20);
    }
    await page.keyboard.type("analyst@demo.test");
    await page.keyboard.press("Tab");
    expect(await page.getByLabel("Password").evaluate((el) => el === document.activeElement)).toBe(true);
    await page.keyboard.type("blindcut-demo");
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/labs\/[0-9a-f-]{36}$/);
    await page.getByText(/Your role: Analyst/).waitFor();
    // The skip link is the first stop on a page, and it moves focus to the main content.
    await page.reload();
    await page.getByText(/Your role: Analyst/).waitFor();
    await page.keyboard.press("Tab");
    const first = await page.evaluate(() => document.activeElement?.textContent?.trim());
    expect(first).toBe("Skip to content");
    await page.keyboard.press("Enter");
    await expect.poll(() => page.evaluate(() => location.hash)).toBe("#main");
  });

  it("reports the scans: no serious or critical violation on any page", () => {
    console.log(`axe scanned ${scanned.length} pages: ${scanned.join("; ")}`);
    expect(scanned.length).toBeGreaterThanOrEqual(40);
    expect(problems).toEqual([]);
  });
});
