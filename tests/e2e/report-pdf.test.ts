// The unblinded demo report saved as PDF by headless Chromium carries its charts: poppler
// finds the chart page by its axis titles, and that page, rendered to an image, is drawn on.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdirSync, readFileSync } from "node:fs";
import path from "node:path";
import type { BrowserContext } from "playwright-core";
import { launchBrowser, screenshotDir, signInAs } from "../support/browser.ts";

let browser: BrowserContext;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/** Share of pixels darker than near-white in a binary PGM (P5) greyscale image. */
function inkedShare(pgm: Buffer): number {
  const header = pgm.subarray(0, 64).toString("latin1").match(/^P5\s+(\d+)\s+(\d+)\s+(\d+)\s/);
  if (!header) throw new Error("not a binary PGM");
  const [, w, h] = header.map(Number);
  const pixels = pgm.subarray(header[0].length, header[0].length + w * h);
  let inked = 0;
  for (const p of pixels) if (p < 230) inked++;
  return inked / (w * h);
}

describe("report as PDF", () => {
  it("the unblinded report's PDF has a chart page that poppler reads as charts, not a blank page", async () => {
    const page = await browser.newPage();
    await signInAs(page, "analyst@demo.test");
    await page.getByRole("navigation", { name: "Lab" }).getByRole("link", { name: "Results" }).click();
    await page.waitForURL(/\/results$/);
    await page.getByRole("link", { name: /Temper trial T-1/ }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/results$/);
    await page.goto(page.url().replace(/\/results$/, "/report"));
    await page.getByTestId("report-charts").waitFor();
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toContain("Temper trial T-1");

    mkdirSync(screenshotDir, { recursive: true });
    const pdf = path.join(screenshotDir, "report-unblinded.pdf");
    await page.pdf({ path: pdf, format: "A4", printBackground: true });
    expect(readFileSync(pdf).subarray(0, 5).toString()).toBe("%PDF-");

    // pdftotext splits pages with form feeds: find the page that carries the sharpness curves' axis titles.
    const pages = execFileSync("pdftotext", ["-layout", pdf, "-"]).toString().split("\f");
    const chartPage = pages.findIndex((t) => t.includes("Sharpness curves") && t.includes("Reading (gf)") && t.includes("Cuts"));
    expect(chartPage, "a page with the sharpness curves and their axis titles").toBeGreaterThan(-1);
    const pageNo = chartPage + 1;
    // Every chart's axis title is in the PDF's text (the SVG text survives printing).
    const all = pages.join("\n");
    for (const title of ["Reading (gf)", "Share of runs not yet at the threshold", "Effect size (standardized)"]) expect(all).toContain(title);

    // Rendered at 40 dpi in grey, the chart page is drawn on: a blank A4 page has no ink at all.
    const base = path.join(screenshotDir, "report-chart-page");
    execFileSync("pdftoppm", ["-gray", "-r", "40", "-f", String(pageNo), "-l", String(pageNo), "-singlefile", pdf, base]);
    const share = inkedShare(readFileSync(`${base}.pgm`));
    expect(share).toBeGreaterThan(0.03);
    // The image of the chart page, kept for review.
    execFileSync("pdftoppm", ["-png", "-r", "80", "-f", String(pageNo), "-l", String(pageNo), "-singlefile", pdf, base]);
    // The chart figures are SVG line art in the PDF, not pictures: pdfimages lists no raster image for them.
    const images = execFileSync("pdfimages", ["-list", "-f", String(pageNo), "-l", String(pageNo), pdf]).toString().trim().split("\n").slice(2);
    expect(images.length).toBe(0);
  });
});
